#!/usr/bin/python3
"""Golden Pd of a Swerling 4 target in one Doppler bin of a pulse train.

    /usr/bin/python3 pdtrain.py  -> pdtrain.json

Definition (docs/detection-probability.md §2): pulse p carries a complex
amplitude Z_p, independent from pulse to pulse, whose power is chi-square
with four degrees of freedom (Gamma(2)) and whose phase is uniform; the
Doppler bin forms X = sum_p A_p Z_p + n, n complex Gaussian noise of unit
power. With w_p = |A_p|^2 (normalised to sum 1) and chi the target's mean
power in the bin, A_p Z_p has power Gamma(2, theta_p), theta_p = chi w_p / 2.

Computed here without the Laguerre series the Go code uses: X is circular,
so (Kluyver's random-walk formula, from the 2-D Fourier transform of a
radial density) P(|X| <= r) = r * int_0^inf J1(b r) Phi(b) db, with Phi the
radial characteristic function, the product of the terms' E[J0(b R_p)] and
the noise's exp(-b^2/4). Each term's E[J0(b R)], R^2 ~ Gamma(2, theta), is
taken by scipy.integrate.quad over the gamma density (checked at a few b
against the closed form exp(-u)(1-u), u = theta b^2/4, then the closed form
is used to keep the run short). Behind a CA-CFAR with M cells and
multiplier alpha on their mean the threshold is alpha * S / M, S ~ Gamma(M):
Pd = E_S[P(|X|^2 > alpha S / M)] by quad over S.

Weights: Hamming- and Hann-windowed DFT taps and a uniform train, 1 to 32
pulses; chi 0 to 30 dB; Pfa 1e-3 to 1e-6.
"""
import json
import math

import numpy
import scipy
from scipy import integrate, special


def term_cf_quad(b, theta):
    f = lambda s: special.j0(b * math.sqrt(s)) * s * math.exp(-s / theta) / theta ** 2
    return integrate.quad(f, 0, 80 * theta, limit=400, epsabs=1e-13)[0]


def term_cf(b, theta):
    u = theta * b * b / 4
    return math.exp(-u) * (1 - u)


def phi(b, thetas):
    p = math.exp(-b * b / 4)
    for th in thetas:
        p *= term_cf(b, th)
    return p


def survival(w, chi, T):
    w = numpy.asarray(w, float) / numpy.sum(w)
    thetas = [chi * x / 2 for x in w if x > 0]
    r = math.sqrt(T)
    V = 1 + chi / 2
    bmax = math.sqrt(4 * 60 / V) * 1.5 + 1
    f = lambda b: special.j1(b * r) * phi(b, thetas)
    # split at the zeros' scale so quad sees the oscillation
    n = max(8, int(bmax * r / math.pi) + 1)
    edges = numpy.linspace(0, bmax, n + 1)
    cdf = r * sum(integrate.quad(f, a, c, limit=200, epsabs=1e-15, epsrel=1e-12)[0] for a, c in zip(edges, edges[1:]))
    return 1 - cdf


def ca_pd(w, chi, M, pfa):
    alpha = M * (pfa ** (-1 / M) - 1)
    g = lambda s: survival(w, chi, alpha * s / M) * math.exp((M - 1) * math.log(s) - s - math.lgamma(M)) if s > 0 else 0
    hi = M + 40 * math.sqrt(M) + 40
    edges = [0, max(M - 4 * math.sqrt(M), 0) / 2, M, M + 6 * math.sqrt(M), hi]
    edges = sorted(set(edges))
    return sum(integrate.quad(g, a, c, limit=100, epsabs=1e-12, epsrel=1e-9)[0] for a, c in zip(edges, edges[1:]))


def taps(kind, n):
    k = numpy.arange(n)
    if n == 1 or kind == "uniform":
        t = numpy.ones(n)
    elif kind == "hamming":
        t = 0.54 - 0.46 * numpy.cos(2 * math.pi * k / (n - 1))
    else:
        t = 0.5 - 0.5 * numpy.cos(2 * math.pi * k / (n - 1))
    return list(t ** 2)


def main():
    for th in (0.05, 1.0, 20.0):
        for b in (0.3, 1.0, 2.5):
            assert abs(term_cf_quad(b, th) - term_cf(b, th)) < 1e-9, (th, b)
    known = []
    for kind, n in (("uniform", 1), ("hamming", 4), ("hann", 8), ("hamming", 16), ("uniform", 32)):
        w = taps(kind, n)
        if kind == "hann":
            w = [x for x in w if x > 0]  # Hann's end taps are zero
        for chi_db in (0, 10, 16, 30):
            for pfa in (1e-3, 1e-6):
                T = -math.log(pfa)
                known.append({"weights": w, "taps": kind, "snr_db": chi_db, "threshold": T,
                              "pd": survival(w, 10 ** (chi_db / 10), T)})
    # one pulse against Richards' Table 6.1 Swerling 4 one-pulse form
    for c in known:
        if len(c["weights"]) == 1:
            a = 10 ** (c["snr_db"] / 10) / 2
            T = c["threshold"]
            ref = math.exp(-T / (1 + a)) * (1 + a * T / (1 + a) ** 2)
            assert abs(ref - c["pd"]) < 1e-8, (c, ref)
    ca = []
    for kind, n, chi_db, M, pfa in (("hamming", 8, 16, 16, 1e-3), ("hamming", 16, 13, 32, 1e-5), ("uniform", 4, 20, 8, 1e-4)):
        w = taps(kind, n)
        ca.append({"weights": w, "taps": kind, "snr_db": chi_db, "cells": M, "pfa": pfa,
                   "pd": ca_pd(w, 10 ** (chi_db / 10), M, pfa)})
    out = {"generator": "testdata/golden/pdtrain.py", "numpy": numpy.__version__, "scipy": scipy.__version__,
           "known_noise": known, "ca_cfar": ca}
    with open("pdtrain.json", "w") as f:
        json.dump(out, f, indent=1)
        f.write("\n")


if __name__ == "__main__":
    main()
