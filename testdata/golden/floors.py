#!/usr/bin/python3
"""Golden curves for the dynamic-range view (scenarios/floors.go,
docs/detection.md section 15), computed here from the definitions,
independently of the Go code.

Every case is a whole scenario (written out below as JSON, read by
scenarios/floors_golden_test.go) with one point target placed on a
sample, so its echo's leading edge arrives exactly at window sample k0
and its compressed peak lies there (docs/detection.md section 1).

Levels are in dB re the thermal noise power at the compression filter's
output, the range profile's units:
  echo amplitude a: a^2 = Pr / (k T0 F fs), Pr = Pt G^2 lambda^2 sigma /
      ((4 pi)^3 R^4 L) (the radar equation; k = 1.380649e-23 J/K, T0 = 290 K);
  pulse u[n] = u(n/fs), n = 0 .. tau fs - 1: LFM exp(j pi (B/tau) (t - tau/2)^2),
      Barker 13 rect chips (+1/-1);
  reference h = u times the receive window (scipy.signal.windows.taylor,
      sym=True, norm=True), or u alone (matched filter);
  the response at window sample k0 + l:
      a^2 |sum_n x[n + l] conj(h[n])|^2 / sum |h|^2, by numpy.correlate,
      x = u times exp(j 2 pi fd n / fs) for a Doppler shift fd.

response_*: the target's own compressed response (main lobe and range
  sidelobes, the window's weighting and the Doppler mismatch included).
skirt: the phase-noise skirt of one echo for a piecewise profile L(f)
  (dBc/Hz, linear in log10 f between points, flat beyond): the second-
  order expectation  sum over offsets f of S(f) |chi(l, fd + f)|^2 df,
  S(f) = L(f) 4 sin^2(pi f T) (T = 2R/c: one oscillator transmits and
  receives; range correlation) on both sides of the carrier, for offsets
  from PRF/2 to fs/2 (a single pulse's fast-time noise), integrated with
  the trapezoid rule on 240 points per decade and at least 16 points per
  period 1/T of the 4 sin^2 factor (the engine's cells are an eighth of a
  decade, and it takes that factor's mean, 2, above 8/T); offsets where
  fd + f leaves the band +-fs/2 are dropped.
quantisation: the ADC's floor: a mid-rise quantiser (levels (i + 1/2) step,
  step = 2 A / 2^bits, beyond +-A the outermost level) on thermal noise of
  variance 1/2 per channel, split as Q(x) = g x + d (Bussgang): the floor
  is E[Q^2] / (g^2 sigma^2) - 1 of the thermal noise, with
  g = E[x Q(x)] / sigma^2, both by scipy.integrate.quad over each level's
  interval; A^2 = 10^(full_scale_db/10). The uniform model Delta^2/6
  (Kester, Analog Devices MT-001) is listed beside it.

Run: cd testdata/golden && /usr/bin/python3 floors.py
"""
import json
import math

import numpy as np
import scipy
from scipy import integrate
from scipy.signal import windows

C = 299792458.0
K = 1.380649e-23
T0 = 290.0

RADAR = {"carrier_hz": 9.5e9, "peak_power_w": 1000, "antenna_gain_dbi": 30, "noise_figure_db": 3,
         "system_loss_db": 3, "pri_s": 2e-4, "window_start_m": 3000, "window_stop_m": 12000}


def db(x):
    return 10 * np.log10(x)


def amp2(radar, fs, rcs_dbsm, r):
    lam = C / radar["carrier_hz"]
    g = 10 ** (radar["antenna_gain_dbi"] / 10)
    pr = radar["peak_power_w"] * g * g * lam * lam * 10 ** (rcs_dbsm / 10) / ((4 * math.pi) ** 3 * r ** 4 * 10 ** (radar["system_loss_db"] / 10))
    return pr / (K * T0 * 10 ** (radar["noise_figure_db"] / 10) * fs)


def on_sample(radar, fs, k0):
    """The range whose echo's leading edge arrives at window sample k0."""
    return radar["window_start_m"] + k0 * C / (2 * fs)


def lfm(tau, band, fs):
    n = int(round(tau * fs))
    t = np.arange(n) / fs
    return np.exp(1j * math.pi * (band / tau) * (t - tau / 2) ** 2)


def barker13(chip, fs):
    code = np.array([1, 1, 1, 1, 1, -1, -1, 1, 1, -1, 1, -1, 1], dtype=complex)
    n = int(round(13 * chip * fs))
    idx = np.floor(np.arange(n) / fs / chip + 1e-9).astype(int)
    return code[idx]


def response(x, h):
    """|sum_n x[n + l] conj(h[n])|^2 / sum |h|^2 for l = -(len(h)-1) .. len(x)-1."""
    c = np.correlate(x, h, "full")
    return np.abs(c) ** 2 / np.sum(np.abs(h) ** 2)


def doppler(u, fd, fs):
    return u * np.exp(2j * math.pi * fd * np.arange(len(u)) / fs)


def level(profile, f):
    x, y = profile["offset_hz"], profile["dbc_hz"]
    return np.interp(np.log10(f), np.log10(x), y)  # flat beyond the ends


def case_response(name, waveform, window, fs, u, h, k0, rcs, rate=0.0):
    r = on_sample(RADAR, fs, k0)
    lam = C / RADAR["carrier_hz"]
    fd = -2 * rate / lam
    a2 = amp2(RADAR, fs, rcs, r)
    y = a2 * response(doppler(u, fd, fs), h)
    lags = np.arange(-(len(h) - 1), len(u))
    target = {"id": "t", "kind": "point", "range_m": r, "rcs_dbsm": rcs}
    if rate:
        target["range_rate_mps"] = rate
    radar = dict(RADAR, sample_rate_hz=fs)
    scn = {"version": 2, "name": name, "radar": radar, "waveform": waveform,
           "receiver": {"window": window, "detector": {"kind": "fixed", "pfa": 1e-6}}, "targets": [target]}
    keep = y > y.max() * 1e-9
    return {"name": name, "scenario": scn, "curve": "response", "k0": k0,
            "lags": lags[keep].tolist(), "db": db(y[keep]).tolist(), "peak_db": float(db(y.max()))}


def case_skirt():
    fs, tau, band, k0, rcs = 4e7, 1e-5, 1e7, 800, 40.0
    profile = {"offset_hz": [1e4, 1e5, 1e6], "dbc_hz": [-90.0, -110.0, -125.0]}
    u = lfm(tau, band, fs)
    r = on_sample(RADAR, fs, k0)
    T = 2 * r / C
    a2 = amp2(RADAR, fs, rcs, r)
    lo, hi = 1 / (2 * RADAR["pri_s"]), fs / 2
    # 240 points per decade, and at least 16 per period 1/T of 4 sin^2.
    f = [lo]
    while f[-1] < hi:
        f.append(min(hi, f[-1] + min(f[-1] * (10 ** (1 / 240) - 1), 1 / (16 * T))))
    f = np.array(f)
    s = 10 ** (level(profile, f) / 10) * 4 * np.sin(math.pi * f * T) ** 2
    w = np.zeros_like(f)  # trapezoid weights
    w[1:] += np.diff(f) / 2
    w[:-1] += np.diff(f) / 2
    acc = 0
    for fi, si, wi in zip(f, s, w):
        for sgn in (1, -1):
            if abs(sgn * fi) >= fs / 2:
                continue
            acc = acc + si * wi * response(doppler(u, sgn * fi, fs), u)
    y = a2 * acc
    lags = np.arange(-(len(u) - 1), len(u))
    radar = dict(RADAR, sample_rate_hz=fs)
    scn = {"version": 2, "name": "skirt", "radar": radar,
           "waveform": {"kind": "lfm", "pulse_width_s": tau, "bandwidth_hz": band},
           "receiver": {"window": {"kind": "none"}, "detector": {"kind": "fixed", "pfa": 1e-6}},
           "front_end": {"phase_noise_offsets_hz": profile["offset_hz"], "phase_noise_dbc_hz": profile["dbc_hz"]},
           "targets": [{"id": "t", "kind": "point", "range_m": r, "rcs_dbsm": rcs}]}
    keep = y > y.max() * 1e-6
    return {"name": "skirt", "scenario": scn, "curve": "skirt", "k0": k0,
            "lags": lags[keep].tolist(), "db": db(y[keep]).tolist(), "peak_db": float(db(y.max())),
            "total_db": float(db(y.sum()))}


def quantiser(bits, fs_db):
    a = math.sqrt(10 ** (fs_db / 10))
    step = 2 * a / 2 ** bits
    top = 2 ** (bits - 1) - 0.5  # outermost level, steps
    sigma = math.sqrt(0.5)
    pdf = lambda x: math.exp(-x * x / (2 * sigma * sigma)) / (sigma * math.sqrt(2 * math.pi))
    exq = eq2 = 0.0
    lev = 0.5
    while lev <= top:
        lo = (lev - 0.5) * step
        hi = math.inf if lev == top else (lev + 0.5) * step
        if lo > 40 * sigma:
            break
        p = integrate.quad(pdf, lo, hi, epsabs=0, epsrel=1e-13, limit=200)[0]
        m = integrate.quad(lambda x: x * pdf(x), lo, hi, epsabs=0, epsrel=1e-13, limit=200)[0]
        exq += 2 * lev * step * m
        eq2 += 2 * (lev * step) ** 2 * p
        lev += 1
    g = exq / sigma ** 2
    return {"bits": bits, "full_scale_db": fs_db, "floor_db": float(db(eq2 / (g * g * sigma * sigma) - 1)),
            "uniform_db": float(db(step * step / 6)), "gain": g}


def main():
    fs = 4e7
    u = lfm(1e-5, 1e7, fs)
    taylor = windows.taylor(len(u), nbar=5, sll=35, norm=True, sym=True)
    lfm_wave = {"kind": "lfm", "pulse_width_s": 1e-5, "bandwidth_hz": 1e7}
    tw = {"kind": "taylor", "sidelobe_db": -35, "nbar": 5}
    cases = [
        case_response("lfm_taylor", lfm_wave, tw, fs, u, u * taylor, 600, 20.0),
        # A Doppler shift of 200 kHz (range rate -3156 m/s): the peak moves
        # by fd tau / B = 8 samples and loses about 20 log10(1 - fd/B) dB.
        case_response("lfm_taylor_doppler", lfm_wave, tw, fs, u, u * taylor, 600, 20.0, rate=-2e5 * C / 9.5e9 / 2),
    ]
    bfs = 2e6
    b = barker13(1e-6, bfs)
    cases.append(case_response("barker13", {"kind": "barker", "length": 13, "chip_s": 1e-6}, {"kind": "none"}, bfs, b, b, 100, 10.0))
    cases.append(case_skirt())
    quant = [quantiser(bits, fsdb) for bits in (4, 8, 12) for fsdb in (10.0, 30.0, 60.0)]
    out = {"generator": "testdata/golden/floors.py", "numpy": np.__version__, "scipy": scipy.__version__,
           "cases": cases, "quantisation": quant}
    with open("floors.json", "w") as f:
        json.dump(out, f, indent=1)
        f.write("\n")


if __name__ == "__main__":
    main()
