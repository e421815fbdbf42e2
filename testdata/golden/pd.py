#!/usr/bin/python3
"""Golden values for dsp/pd.go: detection probabilities of a square-law
detector, computed with scipy by routes independent of the Go series.

Conventions (as in dsp/pd.go): snr is the mean per-pulse SNR (linear), noise
of one square-law pulse is exponential with mean 1, N pulses are summed
(non-coherent) so the noise statistic is Gamma(N, 1). The threshold T gives
Pfa = gammaincc(N, T). A steady target gives 2z ~ ncx2(2N, 2N*snr)
(scipy.stats.ncx2). Fluctuating targets are integrated numerically over the
RCS law (scipy.integrate.quad):
  Swerling 1: one exponential RCS for the whole dwell;
  Swerling 3: one chi-square-4 RCS (Gamma(2, 1/2)) for the whole dwell;
  Swerling 2: exact, per-pulse power Exp(1+snr): Pd = gammaincc(N, T/(1+snr));
  Swerling 4: independent Gamma(2, snr/2) powers per pulse; a non-central
    chi-square depends only on its total non-centrality, whose law is
    Gamma(2N, snr/2), so Pd = E[ncx2.sf(2T, 2N, 2*Lambda)].
Cell-averaging CFAR with M reference cells, each the sum of N pulses: the
sum S of the reference cells is Gamma(M*N, 1), the threshold is c*S with
Pfa = betainc(M*N, N, 1/(1+c)), and Pd = E_S[Pd_known(threshold c*S)]
integrated numerically over S (steady and Swerling 2 only, whose Pd_known
needs no quadrature of its own; Swerling 1 behind a CFAR has the closed form
of Richards eq. 6.137, tested in Go, and the other models are checked there
by Monte Carlo). Coherent integration of N pulses of a target
with constant complex amplitude is one pulse at N*snr (Swerling 2: at snr).
ordered-statistic CFAR (one pulse): the threshold is alpha times the k-th
smallest of M exponential cells, whose density is
k*C(M,k)*(1-exp(-x))^(k-1)*exp(-(M-k+1)x); alpha solves the Pfa of Rohling
(1983) by brentq, and Pd is integrated numerically over that density.
Required SNRs are found with scipy.optimize.brentq.

Run: cd testdata/golden && /usr/bin/python3 pd.py   (writes pd.json)
"""
import json

import numpy as np
import scipy
from scipy import integrate, optimize, special, stats


def threshold(pfa, n):
    return special.gammainccinv(n, pfa)


def pd_known(snr, n, sw, t):
    """Pd with a known noise level and threshold t on the N-pulse sum."""
    if snr == 0:
        return special.gammaincc(n, t)
    if sw == 0:
        return stats.ncx2.sf(2 * t, 2 * n, 2 * n * snr)
    if sw == 2:
        return special.gammaincc(n, t / (1 + snr))
    if sw in (1, 3):
        k = 1 if sw == 1 else 2
        law = stats.gamma(k, scale=1.0 / k)  # RCS relative to its mean
        f = lambda x: stats.ncx2.sf(2 * t, 2 * n, 2 * n * snr * x) * law.pdf(x)
        hi = law.ppf(1 - 1e-15)
        v, _ = integrate.quad(f, 0, hi, limit=400, epsabs=1e-14, epsrel=1e-11)
        return v
    if sw == 4:
        law = stats.gamma(2 * n, scale=snr / 2)
        f = lambda lam: stats.ncx2.sf(2 * t, 2 * n, 2 * lam) * law.pdf(lam)
        lo, hi = law.ppf(1e-15), law.ppf(1 - 1e-15)
        v, _ = integrate.quad(f, lo, hi, limit=400, epsabs=1e-14, epsrel=1e-11)
        return v
    raise ValueError(sw)


def cfar_sum_multiplier(pfa, n, m):
    y = special.betaincinv(m * n, n, pfa)
    return (1 - y) / y


def pd(snr, n, sw, pfa, cells=0, coherent=False):
    if coherent:
        snr = snr if sw == 2 else n * snr
        n = 1
    if cells == 0:
        return pd_known(snr, n, sw, threshold(pfa, n))
    c = cfar_sum_multiplier(pfa, n, cells)
    law = stats.gamma(cells * n)
    f = lambda s: pd_known(snr, n, sw, c * s) * law.pdf(s)
    lo, hi = law.ppf(1e-16), law.ppf(1 - 1e-16)
    v, _ = integrate.quad(f, lo, hi, limit=400, epsabs=1e-14, epsrel=1e-10)
    return v


def os_alpha(pfa, m, k):
    f = lambda la: np.sum(np.log((m - np.arange(k)) / (m - np.arange(k) + np.exp(la)))) - np.log(pfa)
    return np.exp(optimize.brentq(f, -10, 30, xtol=1e-14))


def pd_os(snr, sw, pfa, m, k):
    alpha = os_alpha(pfa, m, k)
    logc = special.gammaln(m + 1) - special.gammaln(k) - special.gammaln(m - k + 1)
    dens = lambda x: np.exp(logc + (k - 1) * np.log(-np.expm1(-x)) - (m - k + 1) * x)
    lo = -np.log1p(-special.betaincinv(k, m - k + 1, 1e-16))
    hi = -np.log(special.betaincinv(m - k + 1, k, 1e-16))
    f = lambda x: pd_known(snr, 1, sw, alpha * x) * dens(x)
    v, _ = integrate.quad(f, lo, hi, limit=400, epsabs=1e-15, epsrel=1e-11)
    return alpha, v


def required_db(p, n, sw, pfa, cells=0, coherent=False):
    g = lambda x: pd(10 ** (x / 10), n, sw, pfa, cells, coherent) - p
    return optimize.brentq(g, -20, 40, xtol=1e-6)


def albersheim(p, pfa, n):
    a = np.log(0.62 / pfa)
    b = np.log(p / (1 - p))
    return -5 * np.log10(n) + (6.2 + 4.54 / np.sqrt(n + 0.44)) * np.log10(a + 0.12 * a * b + 1.7 * b)


def main():
    out = {
        "generator": "testdata/golden/pd.py",
        "numpy": np.__version__,
        "scipy": scipy.__version__,
        "marcum": [],
        "threshold": [],
        "pd": [],
        "required": [],
        "albersheim": [],
        "os_cfar": [],
    }
    # Generalized Marcum Q_m(a, b) = ncx2.sf(b^2, 2m, a^2).
    for m, a, b in [(1, 0.5, 1.0), (1, 3.0, 4.0), (1, 5.0, 2.0), (2, 1.0, 3.0), (4, 2.0, 5.0),
                    (10, 4.0, 6.0), (10, 0.0, 5.0), (25, 10.0, 12.0), (1, 6.0, 9.0), (3, 30.0, 31.0),
                    (1, 10.0, 40.0), (50, 3.0, 20.0), (1, 0.01, 0.02), (200, 20.0, 25.0), (1, 100.0, 90.0)]:
        out["marcum"].append({"m": m, "a": a, "b": b, "q": float(stats.ncx2.sf(b * b, 2 * m, a * a))})
    for pfa in [1e-3, 1e-6, 1e-9, 1e-12]:
        for n in [1, 2, 10, 100]:
            out["threshold"].append({"pfa": pfa, "pulses": n, "t": float(threshold(pfa, n))})
        for n, m in [(1, 16), (1, 8), (4, 16), (10, 24)]:
            out["threshold"].append({"pfa": pfa, "pulses": n, "cfar_cells": m,
                                     "alpha": float(m * cfar_sum_multiplier(pfa, n, m))})
    cases = []
    for sw in range(5):
        for n in [1, 4, 10]:
            for snr_db in [-5.0, 0.0, 5.0, 10.0, 15.0, 20.0]:
                cases.append((snr_db, n, sw, 1e-6, 0, False))
        cases.append((3.0, 30, sw, 1e-8, 0, False))
        if sw in (0, 2):  # CFAR: one quadrature over the noise estimate
            cases.append((12.0, 1, sw, 1e-4, 16, False))
            cases.append((8.0, 4, sw, 1e-6, 16, False))
        cases.append((2.0, 8, sw, 1e-6, 0, True) if sw != 4 else (12.0, 1, sw, 1e-6, 0, True))
    cases.append((18.0, 1, 0, 1e-6, 8, False))
    cases.append((25.0, 1, 2, 1e-6, 8, False))
    for snr_db, n, sw, pfa, m, coh in cases:
        v = pd(10 ** (snr_db / 10), n, sw, pfa, m, coh)
        out["pd"].append({"swerling": sw, "pulses": n, "pfa": pfa, "cfar_cells": m, "coherent": coh,
                          "snr_db": snr_db, "pd": float(v)})
    req = []
    for sw in range(5):
        for n in [1, 10]:
            req.append((0.9, n, sw, 1e-6, 0, False))
        req.append((0.5, 3, sw, 1e-8, 0, False))
        if sw in (0, 2):
            req.append((0.9, 1, sw, 1e-6, 16, False))
    req += [(0.9, 1, 0, 1e-8, 0, False), (0.9, 10, 0, 1e-8, 0, False),
            (0.5, 1, 0, 1e-6, 0, False), (0.9, 1, 0, 1e-4, 0, False),
            (0.9, 4, 2, 1e-6, 16, False), (0.9, 4, 0, 1e-6, 16, False)]
    for p, n, sw, pfa, m, coh in req:
        out["required"].append({"swerling": sw, "pulses": n, "pfa": pfa, "cfar_cells": m, "coherent": coh,
                                "pd": p, "snr_db": float(required_db(p, n, sw, pfa, m, coh))})
    for p, pfa, n in [(0.9, 1e-6, 1), (0.9, 1e-6, 10), (0.5, 1e-6, 1), (0.9, 1e-4, 1), (0.8, 1e-5, 100)]:
        out["albersheim"].append({"pd": p, "pfa": pfa, "pulses": n, "snr_db": float(albersheim(p, pfa, n))})
    for sw, snr_db, m, k, pfa in [(0, 0.0, 16, 12, 1e-6), (0, 15.0, 16, 12, 1e-6), (0, 18.0, 24, 18, 1e-6),
                                  (2, 20.0, 16, 8, 1e-4), (0, 12.0, 32, 24, 1e-4), (0, 16.0, 8, 6, 1e-3),
                                  # Swerling 1, 3 and 4, and thresholds raised far above the noise
                                  # (a Pfa of 1e-30 or 1e-60 is the multiplier a clutter edge sets):
                                  (1, 20.0, 24, 18, 1e-6), (3, 18.0, 24, 18, 1e-6), (4, 15.0, 16, 12, 1e-4),
                                  (3, 10.0, 8, 6, 1e-3), (1, 35.0, 24, 18, 1e-30), (3, 35.0, 24, 18, 1e-30),
                                  (4, 40.0, 24, 18, 1e-60), (0, 35.0, 24, 18, 1e-30)]:
        alpha, v = pd_os(10 ** (snr_db / 10), sw, pfa, m, k)
        out["os_cfar"].append({"swerling": sw, "snr_db": snr_db, "cfar_cells": m, "rank": k, "pfa": pfa,
                               "alpha": float(alpha), "pd": float(v)})
    with open("pd.json", "w") as f:
        json.dump(out, f, indent=1)
        f.write("\n")


if __name__ == "__main__":
    main()
