#!/usr/bin/python3
"""Golden multipliers for greatest-of, smallest-of and censored CA-CFAR.

    /usr/bin/python3 cfarvariants.py  -> cfarvariants.json

Square-law detector in complex Gaussian noise: every cell's power is a unit
exponential, the cell under test X0 independent of its training cells, so
Pfa = E[exp(-alpha * Z)] for a threshold alpha * Z. Computed here by
numerical integration (scipy.integrate.quad) of the densities of Z, not with
the closed forms the Go code uses:

- greatest-of / smallest-of: Z = max(A, B) or min(A, B), A and B the MEANS
  of n1 and n2 cells (gamma(n, scale 1/n)); the density of the max is
  f_A F_B + f_B F_A, of the min f_A S_B + f_B S_A. "t_halfsum" is alpha/n
  (the multiplier on the half-SUM) when n1 = n2 = n, as tabulated by Hansen
  & Sawyers (IEEE TAES 16(6), 1980) and Weiss (IEEE TAES 18(1), 1982).
- censored: Z = mean of the n-c smallest of n cells. Conditioning on the
  largest kept cell X_(m) = x, m = n-c: the m-1 smaller ones are unit
  exponentials truncated to [0, x], so
  Pfa = int f_(m)(x) exp(-b x) [(1-exp(-(1+b)x)) / ((1+b)(1-exp(-x)))]^(m-1) dx,
  b = alpha/m, f_(m) the density of the m-th order statistic of n.
alpha is solved with scipy.optimize.brentq.
"""
import json
import math

import numpy
import scipy
from scipy import integrate, stats
from scipy.optimize import brentq


def quad_split(f, alpha):
    # The integrand decays like exp(-alpha x): split where it has fallen
    # by e^-1, e^-10 and e^-40 so quad sees its scale.
    edges = [0.0] + [k / (1.0 + alpha) for k in (1.0, 10.0, 40.0)] + [numpy.inf]
    return sum(integrate.quad(f, a, b, epsabs=0, epsrel=1e-10, limit=500)[0] for a, b in zip(edges, edges[1:]))


def goso_pfa(alpha, n1, n2, which):
    a = stats.gamma(n1, scale=1.0 / n1)
    b = stats.gamma(n2, scale=1.0 / n2)
    if which == "go":
        dens = lambda x: a.pdf(x) * b.cdf(x) + b.pdf(x) * a.cdf(x)
    else:
        dens = lambda x: a.pdf(x) * b.sf(x) + b.pdf(x) * a.sf(x)
    return quad_split(lambda x: math.exp(-alpha * x) * dens(x), alpha)


def censored_pfa(alpha, n, c):
    m = n - c
    b = alpha / m
    logc = math.lgamma(n + 1) - math.lgamma(m) - math.lgamma(n - m + 1)

    def f(x):
        if x <= 0:
            return 0.0
        em = -math.expm1(-x)  # F(x)
        g = -math.expm1(-(1 + b) * x) / ((1 + b) * em)
        return math.exp(logc + (m - 1) * math.log(em) - (n - m) * x - x - b * x) * g ** (m - 1)

    return quad_split(f, alpha)


def solve(pfa, f):
    return brentq(lambda a: math.log(f(a)) - math.log(pfa), 1e-6, 1e6, xtol=1e-12, rtol=1e-13)


out = {"numpy": numpy.__version__, "scipy": scipy.__version__, "goso": [], "censored": []}
for n1, n2, pfa in [(8, 8, 1e-6), (8, 8, 1e-3), (16, 16, 1e-6), (8, 3, 1e-6), (5, 2, 1e-4), (4, 4, 1e-2)]:
    go = solve(pfa, lambda a: goso_pfa(a, n1, n2, "go"))
    so = solve(pfa, lambda a: goso_pfa(a, n1, n2, "so"))
    case = {"n1": n1, "n2": n2, "pfa": pfa, "alpha_go": go, "alpha_so": so}
    if n1 == n2:
        case["t_halfsum_go"] = go / n1
        case["t_halfsum_so"] = so / n1
    out["goso"].append(case)
for n, c, pfa in [(16, 0, 1e-6), (16, 2, 1e-6), (16, 4, 1e-6), (24, 3, 1e-3), (8, 1, 1e-2), (4, 3, 1e-3)]:
    out["censored"].append({"n": n, "c": c, "pfa": pfa, "alpha": solve(pfa, lambda a: censored_pfa(a, n, c))})
with open("cfarvariants.json", "w") as fh:
    json.dump(out, fh, indent=1)
    fh.write("\n")
for g in out["goso"]:
    print(g)
for g in out["censored"]:
    print(g)
