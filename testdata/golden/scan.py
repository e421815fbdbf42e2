#!/usr/bin/python3
"""Golden values for the antenna-scan model of package dsp (dsp/scan.go),
computed here from the definitions, independently of the Go code.

Angles u are in one-way 3-dB beamwidths. One-way voltage patterns:
  gaussian  f(u) = exp(-2 ln2 u^2)
  sinc      f(u) = sinc(k u) (numpy's normalised sinc), k solved here by
            scipy.optimize.brentq from sinc(k/2)^2 = 1/2.
A train of n pulses spaced `step` beamwidths, centred on the peak, has
two-way voltage gains a_k = f(u_k)^2, u_k = (k - (n-1)/2) step.
  coherent_db     10 log10((sum w)^2 / (sum w a)^2), w uniform or a
                  symmetric Hann window (scipy.signal.windows.hann(n, sym=True))
  noncoherent_db  10 log10(n / sum a^2)
offset: trains starting at u0 (pulse k at u0 + k step), Hann weights.
dense: the limits over the 3-dB beamwidth by scipy.integrate.quad:
  noncoherent -10 log10(int_{-1/2}^{1/2} f^4 du), coherent
  -20 log10(int_{-1/2}^{1/2} f^2 du).
two_way_width: int f^4 du over every angle by quad (sinc: over +-200
  beamwidths, split at its nulls).
noncoherent_pd: the noncoherent loss checked by detection: the peak SNR a
  steady target needs for Pd with pulse SNRs a_k^2 chi (square-law sum,
  Pfa) over the SNR n equal pulses need, from scipy.stats.ncx2 and
  scipy.optimize.brentq.

Run: cd testdata/golden && /usr/bin/python3 scan.py
"""
import json
import math

import numpy as np
import scipy
from scipy import integrate, optimize, signal, stats

L2 = math.log(2)
K = optimize.brentq(lambda k: np.sinc(k / 2) ** 2 - 0.5, 0.5, 1.5, xtol=1e-15)


def f(shape, u):
    if shape == "gaussian":
        return math.exp(-2 * L2 * u * u)
    return float(np.sinc(K * u))


def gains(shape, n, step):
    return np.array([f(shape, (k - (n - 1) / 2) * step) ** 2 for k in range(n)])


def db(x):
    return 10 * math.log10(x)


cases = []
for shape in ("gaussian", "sinc"):
    for n, step in [(1, 0.1), (2, 0.5), (5, 0.2), (10, 0.1), (16, 0.05), (16, 0.125), (32, 0.1), (20, 0.05), (64, 0.03)]:
        a = gains(shape, n, step)
        c = {"shape": shape, "n": n, "step": step,
             "coherent_db": db(n * n / a.sum() ** 2),
             "noncoherent_db": db(n / (a * a).sum())}
        if n > 2:
            w = signal.windows.hann(n, sym=True)
            c["coherent_hann_db"] = db(w.sum() ** 2 / (w * a).sum() ** 2)
        cases.append(c)

# Trains placed off centre: pulse k at u0 + k step (the scenario's CPI half
# a CPI off the beam's peak), Hann weights.
offset = []
for shape, n, step, shift in [("gaussian", 16, 0.125, 1.0), ("gaussian", 16, 0.1, 0.8), ("sinc", 16, 0.1, 0.8)]:
    u0 = shift - (n - 1) / 2 * step
    a = np.array([f(shape, u0 + k * step) ** 2 for k in range(n)])
    w = signal.windows.hann(n, sym=True)
    offset.append({"shape": shape, "n": n, "step": step, "u0": u0, "coherent_hann_db": db(w.sum() ** 2 / (w * a).sum() ** 2)})

dense = []
for shape in ("gaussian", "sinc"):
    p4 = integrate.quad(lambda u: f(shape, u) ** 4, -0.5, 0.5, epsabs=1e-14, epsrel=1e-13)[0]
    p2 = integrate.quad(lambda u: f(shape, u) ** 2, -0.5, 0.5, epsabs=1e-14, epsrel=1e-13)[0]
    if shape == "gaussian":
        w = integrate.quad(lambda u: f(shape, u) ** 4, -np.inf, np.inf, epsabs=1e-14)[0]
    else:
        edges = [j / K for j in range(-200, 201)]
        w = sum(integrate.quad(lambda u: f(shape, u) ** 4, lo, hi, epsabs=1e-15)[0] for lo, hi in zip(edges[:-1], edges[1:]))
    dense.append({"shape": shape, "noncoherent_db": -db(p4), "coherent_db": -2 * db(p2), "two_way_width": w})


def required_chi(snrs, pfa, pd):
    n = len(snrs)
    thr = stats.chi2.isf(pfa, 2 * n) / 2  # threshold on sum |y|^2, unit noise power per pulse

    def miss(log_chi):
        lam = 2 * math.exp(log_chi) * sum(snrs)
        return stats.ncx2.sf(2 * thr, 2 * n, lam) - pd
    return math.exp(optimize.brentq(miss, math.log(1e-4), math.log(1e6), xtol=1e-13))


pdcases = []
for shape, n, step in [("gaussian", 10, 0.1), ("gaussian", 16, 0.125), ("sinc", 10, 0.1)]:
    a = gains(shape, n, step)
    chi = required_chi(list(a * a), 1e-6, 0.9)
    chi0 = required_chi([1.0] * n, 1e-6, 0.9)
    pdcases.append({"shape": shape, "n": n, "step": step, "pfa": 1e-6, "pd": 0.9, "loss_db": db(chi / chi0)})

out = {"script": "scan.py", "numpy": np.__version__, "scipy": scipy.__version__, "sinc_k": K,
       "cases": cases, "offset": offset, "dense": dense, "noncoherent_pd": pdcases}
with open("scan.json", "w") as fh:
    json.dump(out, fh, indent=1)
    fh.write("\n")
