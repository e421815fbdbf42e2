#!/usr/bin/python3
"""Golden values for dsp.PdInCell (dsp/pdcell.go): the probability that a
cell holding several echoes plus noise crosses a detector's threshold, every
echo's carrier phase uniform and independent, computed from the definition
with scipy by routes independent of the Go code.

Definition (docs/detection-probability.md §7). The cell holds
y = sum_i a_i exp(j phi_i) + n, n unit complex Gaussian noise (E|n|^2 = 1).
Amplitude laws: steady (|a|^2 = P), Swerling 1 (a complex Gaussian of power
P), Swerling 3 (|a|^2 ~ Gamma(2, P/2), uniform phase). The cell crosses when
|y|^2 > r * Thr, Thr the detector's threshold against noise alone:
  fixed:  Thr = -ln(pfa) (known noise level);
  ca:     Thr = c * S, S ~ Gamma(M, 1) the sum of M unit exponential cells,
          c = pfa**(-1/M) - 1 (Richards, Fundamentals of Radar Signal
          Processing, 2nd ed., eq. 6.135);
  os:     Thr = alpha * X_(k), the k-th smallest of M unit exponentials,
          alpha solving Rohling's Pfa = prod_{i<k} (M-i)/(M-i+alpha)
          (IEEE TAES 19(4), 1983) by brentq.
Given the steady part's resultant power A2 and the Gaussian variance
v = 1 + sum of the Swerling 1 powers, |y|^2 * 2/v is non-central chi-square
with 2 degrees of freedom and non-centrality 2*A2/v (scipy.stats.ncx2).
That is averaged over the threshold's law (Gauss-Legendre on its quantile,
400 nodes), then over the relative phase(s) of the steady phasors and the
Swerling 3 powers with scipy.integrate.quad.

Run: cd testdata/golden && /usr/bin/python3 pdcell.py   (writes pdcell.json)
"""
import json

import numpy as np
import scipy
from scipy import integrate, optimize, special, stats

GL_X, GL_W = np.polynomial.legendre.leggauss(400)
U = 0.5 * (GL_X + 1)
W = 0.5 * GL_W


def os_alpha(pfa, m, k):
    f = lambda a: np.sum(np.log((m - np.arange(k)) / (m - np.arange(k) + a))) - np.log(pfa)
    return optimize.brentq(f, 1e-9, 1e9, xtol=1e-14, rtol=1e-15)


def thresholds(det):
    """Quadrature nodes (values, weights) of the threshold's law."""
    kind, pfa, r = det["kind"], det["pfa"], det["scale"]
    if kind == "fixed":
        return np.array([-r * np.log(pfa)]), np.array([1.0])
    m = det["cells"]
    if kind == "ca":
        c = pfa ** (-1.0 / m) - 1
        return r * c * stats.gamma.ppf(U, m), W
    k = det["rank"]
    a = os_alpha(pfa, m, k)
    # X_(k) of M unit exponentials: P(X_(k) <= x) = I_{1-e^-x}(k, M-k+1).
    p = special.betaincinv(k, m - k + 1, U)
    return r * a * (-np.log1p(-p)), W


def cross(a2, v, thr):
    t, w = thr
    return float(np.sum(w * stats.ncx2.sf(2 * t / v, 2, 2 * a2 / v)))


def pd_cell(echoes, det):
    thr = thresholds(det)
    v = 1.0 + sum(e["power"] for e in echoes if e["swerling"] == 1)
    ph = sorted([e for e in echoes if e["swerling"] in (0, 3) and e["power"] > 0],
                key=lambda e: -e["power"])

    def expect(i, amp_sum):
        # amp_sum: the resultant amplitude of phasors before i (real, >= 0).
        if i == len(ph):
            return cross(amp_sum ** 2, v, thr)
        e = ph[i]

        def with_amp(a):
            if i == 0:
                return expect(1, a)
            f = lambda th: expect(i + 1, abs(amp_sum + a * np.exp(1j * th)))
            val, _ = integrate.quad(f, 0, np.pi, epsabs=1e-11, epsrel=1e-10, limit=200)
            return val / np.pi

        if e["swerling"] == 0:
            return with_amp(np.sqrt(e["power"]))
        law = stats.gamma(2, scale=e["power"] / 2)
        f = lambda q: with_amp(np.sqrt(q)) * law.pdf(q)
        hi = law.ppf(1 - 1e-13)
        pts = [law.ppf(x) for x in (0.01, 0.1, 0.5, 0.9, 0.99)]
        val, _ = integrate.quad(f, 0, hi, epsabs=1e-11, epsrel=1e-10, limit=400, points=pts)
        return val

    return expect(0, 0.0)


def main():
    rng = np.random.default_rng(20261202)
    cases = []
    # The two cases of the trials (docs §8): a 14 dB steady target with a
    # steady 30 dB target's sidelobe of 6.8 and 9.1 dB in its cell.
    for s in (6.8, 9.1):
        cases.append({"echoes": [{"power": 10 ** 1.4, "swerling": 0}, {"power": 10 ** (s / 10), "swerling": 0}],
                      "det": {"kind": "fixed", "pfa": 1e-6, "scale": 1.0}})
    kinds = ["fixed", "ca", "os"]
    for i in range(30):
        kind = kinds[i % 3]
        tsw = [0, 1, 3][(i // 3) % 3]
        nsw = [0, 1, 3][rng.integers(0, 3)]
        n_echo = 1 if kind != "fixed" or rng.random() < 0.6 else 2
        echoes = [{"power": float(10 ** (rng.uniform(5, 22) / 10)), "swerling": tsw}]
        for _ in range(n_echo):
            echoes.append({"power": float(10 ** (rng.uniform(-3, 11) / 10)), "swerling": int(nsw)})
            nsw = [0, 1][rng.integers(0, 2)]
        det = {"kind": kind, "pfa": float(10 ** -rng.uniform(3, 7)), "scale": float(10 ** (rng.uniform(0, 3) / 10))}
        if kind != "fixed":
            det["cells"] = int(rng.choice([8, 16, 24, 32]))
        if kind == "os":
            det["rank"] = int(round(0.75 * det["cells"]))
        # At most two nested integrals (as the Go code): the phases of the
        # steady phasors after the first, and each Swerling 3 power.
        ph = [e for e in echoes if e["swerling"] in (0, 3)]
        dims = max(len(ph) - 1, 0) + sum(1 for e in ph if e["swerling"] == 3)
        if dims > 2:
            echoes[-1]["swerling"] = 1
        cases.append({"echoes": echoes, "det": det})
    for c in cases:
        c["pd"] = pd_cell(c["echoes"], c["det"])
        print(c["det"]["kind"], [(round(10 * np.log10(e["power"]), 2), e["swerling"]) for e in c["echoes"]], round(c["pd"], 6))
    out = {"numpy": np.__version__, "scipy": scipy.__version__,
           "source": "testdata/golden/pdcell.py", "cases": cases}
    with open("pdcell.json", "w") as f:
        json.dump(out, f, indent=1)
        f.write("\n")


if __name__ == "__main__":
    main()
