#!/usr/bin/python3
"""Independent model of a staggered pulse train's blind speed and velocity response.

Written from the definitions in docs/detection.md section 16 (not from the
Go code):

* pulse p of a train whose PRIs cycle through a pattern T_0..T_{L-1} is sent
  at t_p = sum of the PRIs before it;
* a range rate v (m/s, positive receding) has Doppler f_d = -2 v / lambda, a
  unit tone at pulse p is exp(j 2 pi f_d t_p);
* the canceller with taps h runs over consecutive pulses,
  y_q = sum_i h_i x_{q+l-1-i}, stamped with the time of its newest pulse;
* the window w (symmetric) over the M = N - l + 1 outputs, then the
  filter bank evaluated at the true times:
  Y_d = s * sum_q w_q y_q exp(-j 2 pi f_d t_{q+l-1} / Tbar), f_d = (d - M//2)/M
  cycles per mean PRI Tbar, s = 1/sqrt(sum h^2 * sum w^2) (the document
  takes its time origin at the first output, t_{l-1}; a common phase that
  does not change |Y_d|);
* velocity response: max over d of |Y_d|^2;
* first true blind speed: found by SCANNING range rates for the first v > 0
  at which every pulse of one pattern cycle sees the phase of zero Doppler
  (max_p |1 - exp(j 2 pi f_d t_p)| minimal), with no use of the common grid;
  it must come out as (n1 + n2)/2 times lambda/(2 Tbar) for a two-PRI
  stagger n1*Delta, n2*Delta (Skolnik, Introduction to Radar Systems,
  3rd ed., ch. 3, "staggered PRFs"; the section's page from memory:
  about p. 130).

It also writes the per-pulse geometry of staggered trains (eclipsed
fraction over one pattern cycle, and the delays at which a target's echoes
land in each sweep), by brute force over long runs of transmit times.

Writes cases.json, read by dsp/stagger_test.go and scenarios/stagger_test.go. Run with Debian's
/usr/bin/python3 (numpy, scipy):
cd testdata/stagger && /usr/bin/python3 gen.py
"""
import json

import numpy as np
import scipy
from scipy.signal import windows

C = 299792458.0


def times(pattern, n):
    t = np.zeros(n)
    for p in range(1, n):
        t[p] = t[p - 1] + pattern[(p - 1) % len(pattern)]
    return t


def window(kind, m):
    if kind == "none":
        return np.ones(m)
    if m == 1:
        return np.ones(1)
    return {"hamming": windows.hamming, "hann": windows.hann}[kind](m, sym=True)


def response(pattern, n, taps, wkind, lam, v):
    """max over bins of |Y_d|^2 for a unit tone at range rate v."""
    tb = np.mean(pattern)
    t = times(pattern, n)
    h = np.asarray(taps, float)
    l = len(h)
    m = n - l + 1
    w = window(wkind, m)
    s = 1 / np.sqrt(np.sum(h * h) * np.sum(w * w))
    fd = -2 * v / lam  # Hz
    x = np.exp(2j * np.pi * fd * t)
    y = np.array([sum(h[i] * x[q + l - 1 - i] for i in range(l)) for q in range(m)])
    tq = t[l - 1:] / tb  # mean PRIs
    f = (np.arange(m) - m // 2) / m
    Y = s * (np.exp(-2j * np.pi * np.outer(f, tq)) @ (w * y))
    return float(np.max(np.abs(Y) ** 2))


def scan_blind(pattern, lam):
    """First v > 0 blind for every pulse, by scanning and refining."""
    t = times(pattern, len(pattern) + 1)[1:]  # one whole cycle of pulse offsets

    def resid(v):
        return np.max(np.abs(1 - np.exp(2j * np.pi * (2 * v / lam) * t)))

    vb_min = lam / (2 * max(pattern))
    v = 0.25 * vb_min
    step = vb_min / 2000
    while v < 1e5:
        if resid(v) < 0.05:
            # Walk on to the bottom of this null, then refine it by
            # ternary search (resid is unimodal within one step of it).
            while resid(v + step) < resid(v):
                v += step
            lo, hi = v - step, v + step
            for _ in range(200):
                a, b = lo + (hi - lo) / 3, hi - (hi - lo) / 3
                if resid(a) < resid(b):
                    hi = b
                else:
                    lo = a
            return float((lo + hi) / 2)
        v += step
    return None


def curve_stats(pattern, n, taps, wkind, lam, vblind):
    """Mean power over one period and the deepest dip, as documented."""
    fine = 4096
    r = [response(pattern, n, taps, wkind, lam, vblind * (i + 0.5) / fine) for i in range(fine)]
    mean = float(np.mean(r))
    edge = lam / (4 * max(pattern))
    lo, hi = edge, vblind - edge
    best, at = np.inf, 0.0
    for i in range(fine + 1):
        v = lo + (hi - lo) * i / fine
        d = 10 * np.log10(max(response(pattern, n, taps, wkind, lam, v), mean * 1e-30) / mean)
        if d < best:
            best, at = d, v
    return mean, float(best), float(at)


CASES = [
    # The check of issue 17: 100 and 125 us at 9.5 GHz.
    {"name": "skolnik_100_125us_xband_two_pulse", "pattern": [100e-6, 125e-6], "pulses": 16, "taps": [1, -1], "window": "none", "carrier_hz": 9.5e9},
    {"name": "100_125us_no_mti_hamming", "pattern": [100e-6, 125e-6], "pulses": 24, "taps": [1], "window": "hamming", "carrier_hz": 9.5e9},
    {"name": "four_pri_three_pulse", "pattern": [1.0e-3, 1.1e-3, 1.2e-3, 1.3e-3], "pulses": 20, "taps": [1, -2, 1], "window": "hann", "carrier_hz": 3.0e9},
    {"name": "uniform_control", "pattern": [250e-6], "pulses": 8, "taps": [1, -1], "window": "none", "carrier_hz": 5.6e9},
]

out = {"numpy": np.__version__, "scipy": scipy.__version__, "c": C, "cases": []}
for c in CASES:
    lam = C / c["carrier_hz"]
    vb = scan_blind(c["pattern"], lam)
    tb = float(np.mean(c["pattern"]))
    span = 1.25 * vb
    speeds = [float(x) for x in np.linspace(0, span, 181)]
    resp = [response(c["pattern"], c["pulses"], c["taps"], c["window"], lam, v) for v in speeds]
    mean, dip, dip_at = curve_stats(c["pattern"], c["pulses"], c["taps"], c["window"], lam, vb)
    out["cases"].append(dict(c, wavelength_m=lam, mean_pri_s=tb,
                             first_blind_scan_mps=vb,
                             mean_pri_blind_mps=lam / (2 * tb),
                             speeds_mps=speeds, best_response=resp,
                             mean_response=mean, dip_db=dip, dip_mps=dip_at))
    print(f'{c["name"]}: first blind (scan) {vb:.3f} m/s, mean-PRI blind {lam / (2 * tb):.3f} m/s, '
          f'ratio {vb / (lam / (2 * tb)):.4f}, dip {dip:.2f} dB at {dip_at:.1f} m/s')


# Per-pulse geometry of a staggered train, by brute force over a long run
# of transmit times (no cyclic formula):
# * eclipse: the mean over one pattern cycle of pulses p of the fraction
#   of pulse p's echo (start t_p + 2R/c, length tau) under any transmit
#   pulse [t_q, t_q + tau);
# * sweeps: the delays after pulse p's edge, t_q + 2R/c - t_p for q <= p,
#   of the echoes that land in [t_lo, t_hi) (sweep p's record).


def long_times(pattern, before, after):
    """t_q for q = -before*L .. after*L - 1, with t_0 = 0."""
    L = len(pattern)
    fwd = [0.0]
    for q in range(after * L - 1):
        fwd.append(fwd[-1] + pattern[q % L])
    back = []
    t = 0.0
    for q in range(1, before * L + 1):
        t -= pattern[(-q) % L]
        back.append(t)
    idx = list(range(-before * L, 0)) + list(range(after * L))
    return dict(zip(idx, back[::-1] + fwd))


rng = np.random.default_rng(20261202)
geom = []
for pattern, tau in [([100e-6, 125e-6], 13e-6), ([1.0e-3, 1.1e-3, 1.3e-3], 50e-6), ([80e-6, 96e-6, 88e-6, 104e-6], 5e-6)]:
    L = len(pattern)
    T = long_times(pattern, 400, 400)
    ts = sorted(T.values())
    ranges = [float(x) for x in rng.uniform(0, C * 6 * max(pattern) / 2, 60)]
    # a few ranges exactly where an echo meets a transmit pulse
    ranges += [C * (T[q] - T[0]) / 2 for q in range(1, 4)] + [C * (T[q] - T[1]) / 2 for q in range(2, 5)]
    eclipse = []
    for R in ranges:
        lost = 0.0
        for p in range(L):
            st = T[p] + 2 * R / C
            for tq in ts:
                o = min(tq + tau, st + tau) - max(tq, st)
                if o > 0:
                    lost += o
        eclipse.append(min(lost / (L * tau), 1.0))
    t_lo, t_hi = -tau, min(pattern) + 2 * tau
    sweeps = []
    for R in ranges[:20]:
        per = []
        for p in range(3 * L):
            d = sorted(T[q] + 2 * R / C - T[p] for q in T if q <= p and t_lo < T[q] + 2 * R / C - T[p] < t_hi)
            per.append(d)
        sweeps.append({"range_m": R, "delays_s": per})
    geom.append({"pattern": pattern, "tau_s": tau, "ranges_m": ranges, "eclipsed_fraction": eclipse,
                 "record_s": [t_lo, t_hi], "sweeps": sweeps})
    print(f"geometry {pattern}: {len(ranges)} ranges, eclipsed fraction {min(eclipse):.3f} .. {max(eclipse):.3f}")
out["geometry"] = geom

with open("cases.json", "w") as f:
    json.dump(out, f, indent=1)
