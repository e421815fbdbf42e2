#!/usr/bin/python3
"""Seeded generator of the differential cases: random waveform cases (every
kind, window and filter at 1, 1.5, 2, 2.5, 3, 4, 5 and 8 samples per 1/B,
each with one Doppler-shifted target) and random single-pulse scenes (1-4
point targets, Doppler, fixed / CA-CFAR / OS-CFAR detectors), with the
report fields the independent model (model.py) expects.

    cd testdata/diffmodel && /usr/bin/python3 gen.py   -> cases.json

Read by scenarios/diff_test.go. Deterministic for SEED.
"""
import json
import math
import sys
import time

import numpy as np
import scipy

import clutter
import model

SEED = 20261202
N_WAVE = 320
N_SCENE = 210
RATES = [1, 1.5, 2, 2.5, 3, 4, 5, 8]
C = model.C
KINDS = ["rect", "lfm", "nlfm", "barker", "mps", "mls", "frank", "p1", "p2", "p3", "p4",
         "zadoff_chu", "costas", "phase_code"]
WINDOWS = ["none", "hann", "hamming", "blackman", "blackman_harris", "taylor", "chebyshev",
           "kaiser", "gaussian"]
COSTAS = [2, 4, 6, 10, 12, 16, 18, 22, 28, 30]


def sig3(rng, lo, hi):
    """a random value log-uniform in [lo, hi], rounded to 3 significant
    digits (chip lengths such as 1.3e-6 s exercise exact chip sampling)."""
    v = math.exp(rng.uniform(math.log(lo), math.log(hi)))
    e = math.floor(math.log10(v)) - 2
    return float(f"{round(v / 10 ** e)}e{e}")


def random_waveform(rng, kind, small=False):
    w = {"kind": kind}
    if kind == "rect":
        w["pulse_width_s"] = sig3(rng, 2e-7, 2e-5)
    elif kind == "lfm":
        bt = math.exp(rng.uniform(math.log(2), math.log(60 if small else 400)))
        B = sig3(rng, 1e6, 2e7)
        w["pulse_width_s"] = float(f"{bt / B:.3g}")
        w["bandwidth_hz"] = B
        if rng.random() < 0.5:
            w["sweep"] = "down"
    elif kind == "nlfm":
        bt = math.exp(rng.uniform(math.log(60), math.log(300)))
        B = sig3(rng, 1e6, 1e7)
        w["pulse_width_s"] = float(f"{bt / B:.3g}")
        w["bandwidth_hz"] = B
        w["design_sidelobe_db"] = float(round(rng.uniform(-45, -20), 1))
    elif kind == "barker":
        w["length"] = int(rng.choice([2, 3, 4, 5, 7, 11, 13]))
    elif kind == "mps":
        w["length"] = int(rng.integers(2, 26 if small else 51))
    elif kind == "mls":
        w["degree"] = int(rng.integers(2, 6 if small else 9))
    elif kind in ("frank", "p1"):
        m = int(rng.integers(2, 6 if small else 13))
        w["length"] = m * m
    elif kind == "p2":
        m = int(rng.choice([2, 4] if small else [2, 4, 6, 8, 10]))
        w["length"] = m * m
    elif kind in ("p3", "p4"):
        w["length"] = int(rng.integers(2, 30 if small else 300))
    elif kind == "zadoff_chu":
        n = int(rng.integers(2, 30 if small else 300))
        roots = [u for u in range(1, n) if math.gcd(u, n) == 1]
        w["length"] = n
        w["root"] = int(rng.choice(roots))
    elif kind == "costas":
        w["length"] = int(rng.choice(COSTAS[:6] if small else COSTAS))
    elif kind == "phase_code":
        n = int(rng.integers(1, 30))
        r = rng.random()
        if r < 0.15:
            w["binary"] = "+" * n if rng.random() < 0.5 else "-" * n
        elif r < 0.5:
            w["binary"] = "".join(rng.choice(["+", "-"], n))
        else:
            w["phases_deg"] = [float(round(x, 1)) for x in rng.uniform(-180, 360, n)]
    if kind not in ("rect", "lfm", "nlfm"):
        w["chip_s"] = sig3(rng, 1e-7, 5e-6) if kind != "costas" else sig3(rng, 1e-6, 2e-5)
    return w


def random_window(rng, kind):
    w = {"kind": kind}
    if kind == "taylor":
        w["sidelobe_db"] = float(round(rng.uniform(-50, -25), 1))
        w["nbar"] = int(rng.integers(3, 9))
    elif kind == "chebyshev":
        w["sidelobe_db"] = float(round(rng.uniform(-70, -30), 1))
    elif kind == "kaiser":
        w["beta"] = float(round(rng.uniform(0, 10), 2))
    elif kind == "gaussian":
        w["sigma"] = float(round(rng.uniform(0.2, 0.8), 3))
    return w


def bandwidth(w):
    if w["kind"] == "rect":
        return 1 / w["pulse_width_s"]
    if w["kind"] in ("lfm", "nlfm"):
        return w["bandwidth_hz"]
    if w["kind"] == "costas":
        return w["length"] / w["chip_s"]
    return 1 / w["chip_s"]


def pulse_width(w):
    if w["kind"] in ("rect", "lfm", "nlfm"):
        return w["pulse_width_s"]
    n = {"mls": lambda: 2 ** w["degree"] - 1,
         "phase_code": lambda: len(w.get("binary") or w.get("phases_deg"))}.get(w["kind"], lambda: w["length"])()
    return n * w["chip_s"]


def chips(w):
    return round(pulse_width(w) / w["chip_s"])


def doppler_target(rng, w, fs, tid, r, rcs):
    """a point target whose Doppler is a random fraction of min(0.3 B,
    0.45 fs); the carrier is chosen so the range rate stays within 1e4 m/s."""
    B = bandwidth(w)
    fmax = min(0.3 * B, 0.45 * fs)
    if w["kind"] not in ("lfm", "nlfm"):
        # codes and rect pulses: within a few tenths of 1/tau, where the
        # peak is still one peak (beyond it the response breaks up into
        # near-equal humps and the argmax is a coin toss)
        fmax = min(fmax, 0.3 / pulse_width(w))
    fd = float(rng.uniform(-1, 1)) * fmax * (rng.random() < 0.85)
    return fd


def carrier_for(fdmax):
    # lambda <= 2e4 / fdmax so that |range_rate| <= 1e4 m/s; also <= 9.5 GHz default
    f = max(9.5e9, fdmax * C / 2e4 * 1.01)
    return float(f"{min(f, 3e11):.4g}")


def rate_for(rate, B):
    """rate x B rounded to 6 significant digits, never below B."""
    fs = float(f"{rate * B:.6g}")
    return fs if fs >= B else rate * B


def waveform_case(rng, i):
    kind = KINDS[i % len(KINDS)]
    rate = RATES[(i // len(KINDS)) % len(RATES)]
    filt = "matched"
    phase = kind in model.PHASE_CODES
    r = rng.random()
    if phase and r < 0.22:
        filt = "least_squares"
    elif phase and r < 0.34:
        filt = "minimax"
    w = random_waveform(rng, kind, small=(filt == "minimax"))
    rx = {}
    if filt == "matched":
        win = WINDOWS[int(rng.integers(0, len(WINDOWS)))] if rng.random() < 0.7 else "none"
        if win != "none":
            rx["window"] = random_window(rng, win)
    else:
        rx["filter"] = filt
        n = chips(w)
        fmax = 8 if filt == "least_squares" else max(1, min(8, 128 // n))
        rx["filter_length_factor"] = int(rng.integers(1, fmax + 1))
    B = bandwidth(w)
    fs = rate_for(rate, B)
    tau = pulse_width(w)
    blind = C * tau / 2
    fd = doppler_target(rng, w, fs, "t", 0, 0)
    carrier = carrier_for(abs(fd))
    lam = C / carrier
    rr = float(f"{-fd * lam / 2:.6g}")
    start = float(round(blind + 1000 + rng.uniform(0, 2000)))
    rng_t = float(round(start + 300 + rng.uniform(0, 1000), 2))
    stop = float(round(rng_t + 300 + blind))
    sc = {"version": 2, "name": f"wave-{i:03d}",
          "radar": {"carrier_hz": carrier, "sample_rate_hz": fs, "pri_s": 2e-4 if blind < 1e4 else 1e-3,
                    "window_start_m": start, "window_stop_m": stop},
          "waveform": w}
    if rx:
        sc["receiver"] = rx
    sc["targets"] = [{"id": "t", "kind": "point", "range_m": rng_t, "rcs_dbsm": 20.0, "range_rate_mps": rr}]
    return sc


SCENE_KINDS = ["lfm", "lfm", "lfm", "rect", "barker", "mps", "p4", "frank", "mls", "nlfm", "costas", "zadoff_chu"]


def scene_case(rng, i):
    kind = SCENE_KINDS[i % len(SCENE_KINDS)]
    w = random_waveform(rng, kind, small=True)
    rx = {}
    if kind in model.PHASE_CODES and rng.random() < 0.25:
        rx["filter"] = "least_squares"
        rx["filter_length_factor"] = int(rng.integers(1, 4))
    elif rng.random() < 0.5:
        win = WINDOWS[int(rng.integers(1, len(WINDOWS)))]
        rx["window"] = random_window(rng, win)
    dk = ["fixed", "ca_cfar", "os_cfar"][i % 3]
    det = {"kind": dk, "pfa": float(f"{10 ** rng.uniform(-9, -3):.2g}")}
    if dk != "fixed":
        g = int(rng.integers(0, 5))
        tr = 2 * int(rng.integers(2, 17))
        det["guard_cells"] = g
        det["training_cells"] = tr
        if dk == "os_cfar":
            det["rank"] = int(rng.integers(1, tr + 1))
    rx["detector"] = det
    B = bandwidth(w)
    tau = pulse_width(w)
    rate = RATES[int(rng.integers(0, len(RATES)))]
    fs = rate_for(rate, B)
    blind = C * tau / 2
    # short PRI so that the window can reach the next pulse
    pri = float(f"{max(4 * tau, 2e-6 * rng.uniform(8, 40)):.3g}")
    runamb = C * pri / 2
    full = rng.random() < 0.5
    if full:
        start, stop = 0.0, None
    else:
        start = float(round(rng.uniform(0, 0.5) * blind))
        stop = float(round(min(runamb * rng.uniform(0.6, 1.0), start + 6000 + 3 * blind)))
    wstop = stop if stop is not None else runamb
    # the gate count must stay small
    ngates = (wstop - start) * 2 / C * fs
    if ngates > 20000:
        wstop = start + 20000 * C / (2 * fs)
        stop = float(round(wstop))
    nt = int(rng.integers(1, 5))
    targets = []
    base = rng.uniform(start + 0.3 * blind, wstop)
    fdmax = min(0.3 * B, 0.45 * fs)
    if w["kind"] not in ("lfm", "nlfm"):
        fdmax = min(fdmax, 0.3 / tau)
    fds = [float(rng.uniform(-1, 1)) * fdmax * (rng.random() < 0.7) for _ in range(nt)]
    carrier = carrier_for(max(abs(f) for f in fds) if fds else 0)
    lam = C / carrier
    for j in range(nt):
        r = rng.random()
        if r < 0.35 and j > 0:  # near a previous target: masking
            R = targets[-1]["range_m"] + rng.uniform(-1, 1) * rng.choice([1, 3, 10]) * C / (2 * B)
        elif r < 0.5:  # near the blind range: partial eclipsing
            R = blind * rng.uniform(0.6, 1.3)
        elif r < 0.6:  # near the next pulse
            R = runamb - blind * rng.uniform(-0.2, 1.3)
        elif r < 0.65:  # beyond the window or folded
            R = wstop + rng.uniform(0, 2) * runamb * 0.3
        else:
            R = base + rng.uniform(-1, 1) * 2000
        R = float(round(max(R, 10.0), 2))
        # SNR spread around the detection threshold
        rcs = float(round(rng.uniform(-25, 25), 1))
        rr = float(f"{-fds[j] * lam / 2:.6g}")
        t = {"id": f"t{j}", "kind": "point", "range_m": R, "rcs_dbsm": rcs}
        if rr:
            t["range_rate_mps"] = rr
        targets.append(t)
    radar = {"carrier_hz": carrier, "sample_rate_hz": fs, "pri_s": pri, "window_start_m": start,
             "peak_power_w": float(f"{10 ** rng.uniform(0, 4):.3g}")}
    if stop is not None:
        radar["window_stop_m"] = stop
    sc = {"version": 2, "name": f"scene-{i:03d}", "radar": radar, "waveform": w, "receiver": rx,
          "targets": targets}
    return sc


def band_cases(rng, count=12):
    """Scenes whose targets' Doppler lies at or beyond the receiver band
    |fd| >= fs/2 (docs/detection.md §2): narrow-band pulses, fs 1-2 B."""
    out = []
    for i in range(count):
        if i % 2 == 0:
            B = sig3(rng, 5e4, 2e5)
            w = {"kind": "lfm", "pulse_width_s": float(f"{rng.uniform(2, 6) / B:.3g}"), "bandwidth_hz": B}
        else:
            w = {"kind": "rect", "pulse_width_s": sig3(rng, 5e-6, 3e-5)}
            B = 1 / w["pulse_width_s"]
        fs = rate_for(float(rng.choice([1, 1.5, 2])), B)
        tau = pulse_width(w)
        start = float(round(C * tau / 2 + 2000))
        targets = []
        for j in range(int(rng.integers(1, 4))):
            fd = float(rng.choice([-1, 1]) * rng.uniform(0.3, 1.6) * fs)
            rr = float(f"{-fd * (C / 9.5e9) / 2:.6g}")
            targets.append({"id": f"b{j}", "kind": "point", "range_m": float(round(start + rng.uniform(2000, 18000), 1)),
                            "rcs_dbsm": float(round(rng.uniform(0, 30), 1)), "range_rate_mps": rr})
        sc = {"version": 2, "name": f"band-{i:03d}",
              "radar": {"sample_rate_hz": fs, "pri_s": 1e-3, "window_start_m": start, "window_stop_m": start + 20000},
              "waveform": w, "receiver": {"detector": {"kind": ["fixed", "ca_cfar", "os_cfar"][i % 3]}},
              "targets": targets}
        out.append(sc)
    return out


def issue_cases():
    """The reproducers of issue 12, as scenarios."""
    base = {"version": 2}
    out = []

    def add(name, w, rx=None, radar=None, targets=None):
        sc = dict(base, name=name, waveform=w)
        sc["radar"] = dict({"window_start_m": 3000.0, "window_stop_m": 9000.0, "pri_s": 2e-4}, **(radar or {}))
        if rx:
            sc["receiver"] = rx
        sc["targets"] = targets if targets is not None else [
            {"id": "t", "kind": "point", "range_m": 6000.0, "rcs_dbsm": 10.0}]
        out.append(sc)
    add("issue-barker13-1.3us", {"kind": "barker", "length": 13, "chip_s": 1.3e-6})
    add("issue-p4-100-6.98us", {"kind": "p4", "length": 100, "chip_s": 6.98e-6},
        radar={"pri_s": 2e-3, "window_start_m": 110000.0, "window_stop_m": 120000.0},
        targets=[{"id": "t", "kind": "point", "range_m": 115000.0, "rcs_dbsm": 30.0}])
    add("issue-rect", {"kind": "rect", "pulse_width_s": 1e-6})
    add("issue-lfm-hann-bt3", {"kind": "lfm", "pulse_width_s": 1e-6, "bandwidth_hz": 3e6}, {"window": {"kind": "hann"}})
    add("issue-one-chip", {"kind": "phase_code", "binary": "+", "chip_s": 1e-6})
    add("issue-equal-chips", {"kind": "phase_code", "binary": "++++", "chip_s": 1e-6})
    for spc in (1.5, 2, 2.5, 3):
        add(f"issue-barker13-{spc}spc", {"kind": "barker", "length": 13, "chip_s": 1e-6},
            radar={"sample_rate_hz": spc * 1e6})
    add("issue-barker4-1spc", {"kind": "barker", "length": 4, "chip_s": 1e-6}, radar={"sample_rate_hz": 1e6})
    add("issue-rect-hamming", {"kind": "rect", "pulse_width_s": 1e-6}, {"window": {"kind": "hamming"}})
    add("issue-minimax-2spc", {"kind": "barker", "length": 13, "chip_s": 1e-6}, {"filter": "minimax", "filter_length_factor": 3})
    add("issue-minimax-barker3", {"kind": "barker", "length": 3, "chip_s": 1e-6},
        {"filter": "minimax", "filter_length_factor": 2}, radar={"sample_rate_hz": 1e6})
    add("issue-2-sample-hann", {"kind": "rect", "pulse_width_s": 1e-6}, {"window": {"kind": "hann"}},
        radar={"sample_rate_hz": 1e6})
    # a target just inside the unambiguous range: next-pulse eclipsing
    add("issue-next-pulse", {"kind": "lfm", "pulse_width_s": 1e-5, "bandwidth_hz": 5e6},
        radar={"pri_s": 1e-4, "window_start_m": 0.0, "window_stop_m": 14990.0},
        targets=[{"id": "t", "kind": "point", "range_m": 14500.0, "rcs_dbsm": 10.0}])
    # a target nearer than c tau / 2 with most of its echo heard
    add("issue-partial-eclipse", {"kind": "lfm", "pulse_width_s": 1e-5, "bandwidth_hz": 5e6},
        radar={"pri_s": 1e-4, "window_start_m": 0.0, "window_stop_m": 6000.0},
        targets=[{"id": "t", "kind": "point", "range_m": 1490.0, "rcs_dbsm": 10.0}])
    # an eclipsed target beside a detected one (blanked gates are no training cells)
    add("issue-eclipsed-neighbour", {"kind": "lfm", "pulse_width_s": 1e-5, "bandwidth_hz": 5e6},
        radar={"pri_s": 1e-4, "window_start_m": 0.0, "window_stop_m": 6000.0},
        targets=[{"id": "near", "kind": "point", "range_m": 1200.0, "rcs_dbsm": 40.0},
                 {"id": "far", "kind": "point", "range_m": 1560.0, "rcs_dbsm": -10.0}])
    # window-end: an echo running past window_stop_m
    add("issue-window-end", {"kind": "lfm", "pulse_width_s": 2e-5, "bandwidth_hz": 5e6},
        radar={"window_start_m": 3000.0, "window_stop_m": 7402.0},
        targets=[{"id": "t", "kind": "point", "range_m": 7400.0, "rcs_dbsm": 0.0}])
    return out


def expect(sc):
    try:
        wf, ts = model.scene(sc)
    except model.NoEnergy as e:
        return {"error": str(e)}, {}
    return ({"waveform": strip(wf), "targets": [strip(t) for t in ts]},
            {"peak_gate": [t["_peak_gate"] for t in ts], "masked_via": [t.get("_masked_via", "") for t in ts],
             "level_db": [t.get("_level_db") for t in ts], "noise_level_db": [t.get("_noise_level_db") for t in ts],
             "peak_db": [t.get("_P_db") for t in ts]})


def strip(d):
    return {k: v for k, v in d.items() if not k.startswith("_")}


def self_check():
    """The model against published values before it writes anything."""
    def fig(w, rx=None, fs=None):
        sc = {"waveform": w, "receiver": rx or {}}
        if fs:
            sc["radar"] = {"sample_rate_hz": fs}
        return model.waveform_figures(sc)[0]
    b13 = fig({"kind": "barker", "length": 13, "chip_s": 1e-6})
    # Levanon & Mozeson 2004 (Barker PSL 1/13); width 2(1 - 1/sqrt 2) chip
    assert abs(b13["pslr_db"] - 20 * math.log10(1 / 13)) < 1e-9
    assert abs(b13["mainlobe_3db_m"] - 2 * (1 - 2 ** -0.5) * 1e-6 * C / 2) < 1e-6
    # Barker 4 two-sided code ISL 4 over 16 (published code ISL)
    assert abs(fig({"kind": "barker", "length": 4, "chip_s": 1e-6})["islr_db"] - 10 * math.log10(4 / 16)) < 1e-9
    # Frank 1963 closed form 20 log10(1/(N sin(pi/M)))
    fr = fig({"kind": "frank", "length": 256, "chip_s": 1e-6})["pslr_db"]
    assert abs(fr - 20 * math.log10(1 / (256 * math.sin(math.pi / 16)))) < 1e-9
    # LFM sampled at 1/B and 1/(2B): worst straddle of a sinc 3.92 and 0.91 dB
    # (Richards 2014 p. 375 for the 3.92 dB); B tau = 100
    l1 = fig({"kind": "lfm", "pulse_width_s": 1e-5, "bandwidth_hz": 1e7}, fs=1e7)
    l2 = fig({"kind": "lfm", "pulse_width_s": 1e-5, "bandwidth_hz": 1e7}, fs=2e7)
    assert abs(l1["straddle_loss_max_db"] - 3.92) < 0.01 and abs(l2["straddle_loss_max_db"] - 0.91) < 0.01
    assert abs(l1["pslr_db"] + 13.39) < 0.02  # unweighted B tau = 100 (Richards 2014 p. 285: 13.5 dB)
    # minimax optimum of Barker 3, factor 2 (scipy linprog, testdata/golden/minimax.py)
    mm = fig({"kind": "barker", "length": 3, "chip_s": 1e-6}, {"filter": "minimax", "filter_length_factor": 2})
    assert abs(mm["pslr_db"] + 19.55) < 0.01
    # CA-CFAR alpha for 16 correlated cells, 2 guard, rho(m) = sinc(m/2): 31.45
    offs = np.array([o for o in range(-10, 11) if abs(o) > 2])
    lam = np.linalg.eigvalsh(np.sinc((offs[None, :] - offs[:, None]) / 2))
    assert abs(model.ca_alpha(lam, 16, 1e-6) - 31.448) < 0.01
    assert abs(model.ca_alpha(np.ones(16), 16, 1e-6) - 16 * (1e-6 ** (-1 / 16) - 1)) < 1e-6
    # with the cell under test in the covariance (docs/detection.md §5):
    # 28.325 at 1e-6 and 9.772 at 1e-3 for the same cells
    o = np.concatenate([[0], offs])
    sig = np.sinc((o[None, :] - o[:, None]) / 2)
    assert abs(model.ca_alpha_cut(sig, 1e-6) - 28.325) < 0.001
    assert abs(model.ca_alpha_cut(sig, 1e-3) - 9.772) < 0.001
    # Pd of a steady target, one pulse, Pfa 1e-6: 0.9 at 13.18 dB (numerical
    # Marcum Q; Richards, Fundamentals of Radar Signal Processing, 2nd ed.,
    # eq. 6.79) and 0.54 when the signal power equals the threshold
    db = lambda x: 10 * math.log10(x)
    assert abs(db(model.required_snr(lambda c: model.pd_fixed(c, 1e-6), 0.9)) - 13.18) < 0.005
    assert abs(model.pd_fixed(-math.log(1e-6), 1e-6) - 0.54) < 0.005
    # CA-CFAR with M independent cells: the Swerling 1 closed form
    # Pd = (1 + alpha/M/(1 + SNR))^-M (Richards eq. 6.137) is the mean of
    # the steady Pd over the target's exponential power; check pd_ca's
    # integration on it (M = 16, 20 dB: 0.806)
    sw1 = lambda chi, m, pfa: (1 + (pfa ** (-1 / m) - 1) / (1 + chi)) ** -m
    steady_avg = integrate_sw1(lambda c: model.pd_ca(c, 1e-6, 16), 100.0)
    assert abs(steady_avg - sw1(100.0, 16, 1e-6)) < 2e-4, steady_avg
    # the correlated-cell form with equal eigenvalues is the CA form
    assert abs(model.pd_corr(30.0, 1e-6, [1 + 1e-3 * i for i in range(16)]) - model.pd_ca(30.0, 1e-6, 16)) < 2e-3


def integrate_sw1(pd_steady, mean_snr):
    """The Pd of a Swerling 1 target of mean SNR mean_snr from a steady
    Pd: its mean over an exponential SNR (scipy quad)."""
    from scipy import integrate
    v, _ = integrate.quad(lambda s: pd_steady(s) * math.exp(-s / mean_snr) / mean_snr, 0, 40 * mean_snr, limit=200)
    return v


N_CLUTTER = 48


def clutter_expect(sc):
    wf, ts, rep = clutter.clutter_scene(sc)
    return {"waveform": wf, "targets": ts, **rep}


def write_clutter():
    """The clutter cases (clutter.json): their own seed and file, so that
    `gen.py clutter` regenerates them alone."""
    clutter.check()
    rng = np.random.default_rng(SEED + 15)
    t0 = time.time()
    cases = []
    for i in range(N_CLUTTER):
        sc = clutter.clutter_case(rng, i)
        cases.append({"scenario": sc, "expected": clutter_expect(sc)})
    out = {"generator": "testdata/diffmodel/gen.py (clutter.py)", "seed": SEED + 15, "numpy": np.__version__,
           "scipy": scipy.__version__, "cases": cases}
    with open("clutter.json", "w") as f:
        json.dump(out, f, separators=(",", ":"))
        f.write("\n")
    print(len(cases), "clutter cases in %.0f s" % (time.time() - t0), file=sys.stderr)


def main():
    if sys.argv[1:] == ["clutter"]:
        write_clutter()
        return
    self_check()
    rng = np.random.default_rng(SEED)
    cases = []
    t0 = time.time()
    only = sys.argv[1] if len(sys.argv) > 1 else None
    gens = [waveform_case(rng, i) for i in range(N_WAVE)]
    gens += [scene_case(rng, i) for i in range(N_SCENE)]
    gens += issue_cases()
    gens += band_cases(rng)
    for sc in gens:
        if only and sc["name"] != only:
            continue
        exp, info = expect(sc)
        cases.append({"scenario": sc, "expected": exp, "info": info})
    out = {"generator": "testdata/diffmodel/gen.py", "seed": SEED, "numpy": np.__version__,
           "scipy": scipy.__version__, "cases": cases}
    name = "cases.json" if not only else "/tmp/diff_" + only + ".json"
    with open(name, "w") as f:
        json.dump(out, f, separators=(",", ":"))
        f.write("\n")
    print(len(cases), "cases in %.0f s" % (time.time() - t0), file=sys.stderr)
    if not only:
        write_clutter()


if __name__ == "__main__":
    main()
