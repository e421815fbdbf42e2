#!/usr/bin/python3
"""Golden detection probabilities behind greatest-of and smallest-of CFARs.

    /usr/bin/python3 variantpd.py  -> variantpd.json

Square-law detector, one test, complex Gaussian noise of unit power. The
cell under test holds X = |s + n|^2 with n ~ CN(0, 1) and a target of mean
SNR chi:
  steady:          2X ~ noncentral chi-square(2 dof, nc = 2 chi)
                   (scipy.stats.ncx2);
  Swerling 1 / 2:  X exponential of mean 1 + chi;
  Swerling 3 / 4:  P(X > t) = exp(-t/(1+x)) (1 + x t/(1+x)^2), x = chi/2
                   (Richards, Fundamentals of Radar Signal Processing, 2nd
                   ed., Table 6.1, one pulse).
The training cells are unit exponentials; A and B are the MEANS of n1 and
n2 of them (gamma(n, scale 1/n)), Z = max(A, B) (greatest-of) or min(A, B)
(smallest-of), or Z = A when n2 = 0, and the test is X > alpha Z. Then

    Pd = integral over z of f_Z(z) P(X > alpha z) dz,

integrated here over the reference statistic z with scipy.integrate.quad
(the Go code integrates over the cell under test instead, with the
incomplete gamma functions as the reference's distribution). alpha is given
(not solved), so each case is the Pd for that multiplier.
"""
import json
import math

import numpy
import scipy
from scipy import integrate, stats


def survival(sw, chi):
    if sw == 0:
        return lambda t: stats.ncx2.sf(2 * t, 2, 2 * chi) if chi > 0 else math.exp(-t)
    if sw in (1, 2):
        return lambda t: math.exp(-t / (1 + chi))
    x = chi / 2
    return lambda t: math.exp(-t / (1 + x)) * (1 + x * t / (1 + x) ** 2)


def density(which, n1, n2):
    a = stats.gamma(n1, scale=1.0 / n1)
    if n2 == 0:
        return a.pdf, [a.ppf(q) for q in (1e-15, 1e-6, 0.5, 1 - 1e-6)] + [a.isf(1e-15)]
    b = stats.gamma(n2, scale=1.0 / n2)
    if which == "go":
        f = lambda z: a.pdf(z) * b.cdf(z) + b.pdf(z) * a.cdf(z)
    else:
        f = lambda z: a.pdf(z) * b.sf(z) + b.pdf(z) * a.sf(z)
    pts = sorted({d.ppf(q) for d in (a, b) for q in (1e-15, 1e-6, 0.5, 1 - 1e-6)} | {a.isf(1e-15), b.isf(1e-15)})
    return f, pts


def pd(which, sw, chi, alpha, n1, n2):
    f, pts = density(which, n1, n2)
    sf = survival(sw, chi)
    edges = [0.0] + pts
    total = 0.0
    for lo, hi in zip(edges, edges[1:]):
        v, _ = integrate.quad(lambda z: f(z) * sf(alpha * z), lo, hi, epsabs=0, epsrel=1e-12, limit=500)
        total += v
    return total


cases = []
for which in ("go", "so"):
    for n1, n2, alpha in [(8, 8, 30.0), (12, 12, 20.0), (6, 10, 40.0), (16, 0, 25.0), (64, 64, 14.0), (256, 256, 14.5)]:
        for sw in (0, 1, 3, 4):
            for chi_db in (0.0, 13.0, 20.0):
                cases.append((which, sw, chi_db, alpha, n1, n2))
        # a multiplier raised as a clutter edge raises it, a strong target
        for sw in (0, 3):
            cases.append((which, sw, 35.0, alpha * 100, n1, n2))
out = {"generator": "testdata/golden/variantpd.py", "numpy": numpy.__version__, "scipy": scipy.__version__, "cases": []}
for which, sw, chi_db, alpha, n1, n2 in cases:
    v = pd(which, sw, 10 ** (chi_db / 10), alpha, n1, n2)
    out["cases"].append({"variant": which, "swerling": sw, "snr_db": chi_db, "alpha": alpha, "n1": n1, "n2": n2, "pd": v})
with open("variantpd.json", "w") as fh:
    json.dump(out, fh, indent=1)
    fh.write("\n")
