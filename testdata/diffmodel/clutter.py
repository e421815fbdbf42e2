#!/usr/bin/python3
"""The clutter part of the independent model: single-pulse scenes with
extended and volume targets beside point targets, from the definitions of
docs/detection.md (§2 distributed targets, §5 levels, §10 clutter) and the
formats (docs/scenario-format.md "Surface clutter", docs/report-format.md
"False alarms and clutter"), never from the Go code.

It reuses model.py's waveform, filter and sampling functions and writes
its own scene: the model's scene() is for point targets only.

Fields computed: per target range_m, snr_db (distributed), status
(distributed), role, cnr_db, scr_db, cell_rcs_dbsm, sigma0_db,
grazing_deg, breakthrough {cells, spans}; per report false_alarms and
clutter.
"""
import math

import numpy as np
import scipy.signal

import model

C = model.C
EARTH = 6371e3  # m, mean Earth radius (scenario-format.md, Surface clutter)
AE = 4.0 / 3.0 * EARTH


def grazing(h, r):
    """(psi, ok) on the smooth 4/3 Earth: law of cosines in the triangle
    centre, antenna (a + h), surface point (a):
    (a + h)^2 = a^2 + r^2 + 2 a r sin(psi)."""
    if r < h:
        return 0.0, False
    s = ((AE + h) ** 2 - AE ** 2 - r ** 2) / (2 * AE * r)
    if s <= 0:
        return 0.0, False
    return math.asin(min(s, 1.0)), True


def sigma0(t, rd, r):
    """(sigma0 linear, psi, ok) of an extended target given by sigma0_db or
    gamma_db at slant range r."""
    h = rd.get("antenna_height_m", 0.0)
    psi = 0.0
    if h > 0:
        psi, ok = grazing(h, r)
        if not ok:
            return 0.0, 0.0, False
    if "gamma_db" in t:
        return 10 ** (t["gamma_db"] / 10) * math.sin(psi), psi, True  # constant gamma
    return 10 ** (t["sigma0_db"] / 10), psi, True


def per_metre(t, rd, lam, r):
    """cross-section per metre of range (m^2/m) at range r."""
    az = rd.get("beamwidth_az_deg", 2.0) * math.pi / 180
    el = rd.get("beamwidth_el_deg", 2.0) * math.pi / 180
    if t["kind"] == "volume":
        z = 10 ** (t["reflectivity_dbz"] / 10) * 1e-18  # m^6/m^3
        eta = math.pi ** 5 * 0.93 * z / lam ** 4
        return eta * math.pi * r * r * az * el / (8 * math.log(2))  # Gaussian beam (Probert-Jones)
    if "sigma0_db" in t or "gamma_db" in t:
        s0, psi, ok = sigma0(t, rd, r)
        if not ok:
            return 0.0
        return s0 * r * az / math.cos(psi)  # pulse-limited patch per metre of depth
    return 10 ** (t["rcs_dbsm_per_m"] / 10)


def is_clutter(t):
    return t["kind"] != "point" and t.get("role", "clutter") == "clutter"


def first_argmax(p):
    """first index within 1e-9 (relative) of the maximum (docs/detection.md §2)."""
    mx = p.max()
    if mx <= 0:
        return int(np.argmax(p))
    return int(np.argmax(p >= mx * (1 - 1e-9)))


def clutter_scene(sc):
    wf, wave, filt = model.waveform_figures(sc)
    rx = sc.get("receiver", {})
    rd = model.radar_defaults(sc, wave)
    rd.setdefault("beamwidth_az_deg", 2.0)
    rd.setdefault("beamwidth_el_deg", 2.0)
    det = model.detector_defaults(rx)
    fs, pri, tau = rd["sample_rate_hz"], rd["pri_s"], wave.tau
    lam = C / rd["carrier_hz"]
    ws, we = rd["window_start_m"], rd["window_stop_m"]
    t0 = 2 * ws / C
    n = int((we - ws) * 2 / C * fs) + 1
    dr = C / (2 * fs)
    ref, lead = model.reference_at(wave, filt, fs)
    L = len(ref)
    G = float(np.sum(np.abs(ref) ** 2))
    nraw = n + L - 1 - lead
    jr = np.arange(nraw)
    traw = t0 + jr / fs

    def ceil9(x):
        r = round(x)
        return int(r) if abs(x - r) <= 1e-9 * max(1.0, abs(x)) else int(math.ceil(x))
    blank = np.zeros(nraw, bool)
    m = max(math.floor(t0 / pri) - 1, 0)
    while m * pri < t0 + nraw / fs:
        lo, hi = ceil9((m * pri - t0) * fs), ceil9((m * pri + tau - t0) * fs)
        blank[max(lo, 0):max(min(hi, nraw), 0)] = True
        m += 1
    processed = ~blank[:n]

    def compress(x):
        xp = np.concatenate([np.zeros(lead, complex), x])
        y = scipy.signal.correlate(xp, ref, "full", method="fft" if len(xp) * L > 1e6 else "direct")
        return y[L - 1:L - 1 + n]

    G0 = 10 ** (rd["antenna_gain_dbi"] / 10)
    F = 10 ** (rd["noise_figure_db"] / 10)
    Ls = 10 ** (rd["system_loss_db"] / 10)
    noise_w = model.KB * model.T0 * F * fs
    k0 = rd["peak_power_w"] * G0 ** 2 * lam ** 2 / ((4 * math.pi) ** 3 * Ls) / noise_w
    gate_r = ws + np.arange(n) * dr
    objs = []
    for t in sc.get("targets", []):
        fd = -2 * t.get("range_rate_mps", 0.0) / lam
        if t["kind"] == "point":
            # echo at its exact delay (no folding, in band in these cases)
            R = t["range_m"]
            snr_eq = rd["peak_power_w"] * tau * G0 ** 2 * lam ** 2 * 10 ** (t["rcs_dbsm"] / 10) / (
                (4 * math.pi) ** 3 * R ** 4 * model.KB * model.T0 * F * Ls)
            amp = math.sqrt(snr_eq / (tau * fs))
            x = model.sample_wave(wave, fs, jr, 2 * R / C - t0) * amp * np.exp(2j * math.pi * fd * traw)
            x = np.where(blank, 0, x)
            P = np.abs(compress(x)) ** 2 / G
        else:
            # expected density per gate: scatterers of the gate's slab
            # [r_k - dr/2, r_k + dr/2) within the target, processed gates only
            a, b = t["range_start_m"], t["range_stop_m"]
            dens = np.zeros(n)
            for k in range(n):
                rk = gate_r[k]
                s0, s1 = max(rk - dr / 2, a), min(rk + dr / 2, b)
                if s1 > s0 and processed[k] and rk > 0:
                    dens[k] = k0 * per_metre(t, rd, lam, rk) * (s1 - s0) / rk ** 4
            # |response|^2 of a unit echo whose leading edge is a raw
            # sample, Doppler-shifted: K[o], o = gate - that sample
            npulse = model.sample_len(tau, fs)
            pad = L + 2
            buf = np.zeros(pad + npulse + L + 2, complex)
            jj = np.arange(npulse)
            buf[pad:pad + npulse] = model.sample_wave(wave, fs, jj, 0.0) * np.exp(2j * math.pi * fd * jj / fs)
            xp = np.concatenate([np.zeros(lead, complex), buf])
            y = scipy.signal.correlate(xp, ref, "full")[L - 1:L - 1 + len(buf)]
            K = np.abs(y) ** 2 / G  # K[g] for an echo starting at buffer sample pad
            # P[k] = sum_i dens[i] K[k - i + pad]
            full = np.convolve(dens, K)
            P = np.zeros(n)
            top = min(n, len(full) - pad)
            P[:top] = full[pad:pad + top]
        Pp = np.where(processed, P, -1.0)
        ks = first_argmax(Pp)
        objs.append(dict(t=t, fd=fd, P=P, k=ks, Pstar=max(P[ks], 0.0) if processed[ks] else 0.0))
    S = np.zeros(n)
    for o in objs:
        S += o["P"]
    clutter_pow = np.zeros(n)
    for o in objs:
        if is_clutter(o["t"]):
            clutter_pow += o["P"]

    # detector levels (docs/detection.md §5), as model.scene defines them
    acf = scipy.signal.correlate(ref, ref, "full")

    def rho(mm):
        mm = np.asarray(mm)
        out = np.zeros(mm.shape, complex)
        ok = np.abs(mm) < L
        out[ok] = np.conj(acf[L - 1 + mm[ok]]) / G
        return out
    kind, pfa = det["kind"], det["pfa"]
    cache = {}

    def offsets(k):
        g, trn = det["guard_cells"], det["training_cells"]
        offs = [o for o in range(-(g + trn // 2), g + trn // 2 + 1) if abs(o) > g]
        if kind == "os_cfar":
            span = 2 * (g + trn // 2)
            s_ = 1
            while s_ <= span:
                js = np.arange(1, span // s_ + 1)
                if np.all(np.abs(rho(js * s_)) <= 0.1):
                    break
                s_ += 1
            offs = [o for o in offs if o % s_ == 0]
        return [o for o in offs if 0 <= k + o < n and processed[k + o]]

    def level(k, power):
        if kind == "fixed":
            return -math.log(pfa)
        offs = offsets(k)
        N = len(offs)
        if N == 0:
            return float("inf")
        vals = 1 + power[np.array(offs) + k]
        if kind == "ca_cfar":
            key = tuple(offs)
            if key not in cache:
                o = np.array([0] + list(offs))
                Sig = rho(o[None, :] - o[:, None])
                Sig = (Sig + Sig.conj().T) / 2
                cache[key] = model.ca_alpha_cut(Sig + 1e-12 * np.eye(len(o)), pfa)
            return cache[key] * vals.mean()
        r = int(math.floor(det["rank"] * N / det["training_cells"] + 0.5))
        r = min(max(r, 1), N)
        return model.os_alpha(N, r, pfa) * np.sort(vals)[r - 1]

    # breakthrough: processed gates where S reaches the scene level and a
    # clutter object holds the most power (first on ties)
    cells = [0] * len(objs)
    gates = [[] for _ in objs]
    if any(is_clutter(o["t"]) for o in objs):
        for k in range(n):
            if not processed[k]:
                continue
            pw = [o["P"][k] for o in objs]
            j = int(np.argmax(pw))
            if pw[j] <= 0 or not is_clutter(objs[j]["t"]):
                continue
            if S[k] >= level(k, S):
                cells[j] += 1
                gates[j].append(k)

    B = wave.B
    out = []
    unamb = C * pri / 2
    for j, o in enumerate(objs):
        t, k = o["t"], o["k"]
        rec = {"id": t["id"]}
        if t["kind"] == "point":
            rec["range_m"] = t["range_m"]
        else:
            a, b = t["range_start_m"], t["range_stop_m"]
            rec["range_m"] = float(gate_r[k]) if o["Pstar"] > 0 else a
            R = rec["range_m"]
            sigma = per_metre(t, rd, lam, R) * C / (2 * B) if R > 0 else 0.0
            dl, _ = model.doppler_response(wave, filt, o["fd"])
            rec["snr_db"] = -100.0
            if R > 0 and sigma > 0:
                snr = rd["peak_power_w"] * tau * G0 ** 2 * lam ** 2 * sigma / (
                    (4 * math.pi) ** 3 * R ** 4 * model.KB * model.T0 * F * Ls)
                rec["snr_db"] = max(10 * math.log10(snr) - wf["mismatch_loss_db"] - dl, -100.0)
            rec["role"] = "clutter" if is_clutter(t) else "target"
            if R > 0:
                rec["cell_rcs_dbsm"] = 10 * math.log10(sigma) if sigma > 1e-10 else -100.0
                if "sigma0_db" in t or "gamma_db" in t:
                    s0, psi, ok = sigma0(t, rd, R)
                    if ok:
                        rec["sigma0_db"] = 10 * math.log10(s0) if s0 > 1e-10 else -100.0
                        rec["grazing_deg"] = psi * 180 / math.pi
            # status (docs/detection.md §6 and §10)
            lo_k = max(int(math.floor((2 * a / C - t0) * fs)), 0)
            hi_k = min(int(math.ceil((2 * b / C - t0) * fs)), n - 1)
            blind = b <= C * tau / 2 or (lo_k <= hi_k and not processed[lo_k:hi_k + 1].any())
            if a >= unamb or b < ws or a > we:
                st = "out_of_window"
            elif blind:
                st = "eclipsed"
            elif o["Pstar"] <= 0:
                st = "out_of_window"
            elif is_clutter(t):
                st = "clutter"
            else:
                Lk = level(k, S)
                Cc = S[k] - o["P"][k]
                T = max(Lk, Cc)
                if o["Pstar"] >= T:
                    st = "detected"
                elif o["Pstar"] < level(k, np.zeros(n)):
                    st = "too_weak"  # version 1: below_noise
                else:
                    st = "masked"
            rec["status"] = st
            if st == "clutter":
                spans = []
                g = gates[j]
                i = 0
                while i < len(g) and len(spans) < 64:
                    e = i
                    while e + 1 < len(g) and g[e + 1] == g[e] + 1:
                        e += 1
                    spans.append({"start_m": float(gate_r[g[i]]), "stop_m": float(gate_r[g[e]])})
                    i = e + 1
                rec["breakthrough"] = {"cells": cells[j], "spans": spans}
        if any(is_clutter(q["t"]) for q in objs) and processed[k] and o["Pstar"] > 0:
            cc = sum(q["P"][k] for i, q in enumerate(objs) if is_clutter(q["t"]) and (i != j or is_clutter(t)))
            if cc > 1e-10:  # below -100 dB re noise a cell holds no clutter (report format)
                rec["cnr_db"] = 10 * math.log10(cc)
                if not is_clutter(t):
                    rec["scr_db"] = 10 * math.log10(o["Pstar"] / cc)
        out.append(rec)

    nproc = int(np.count_nonzero(processed))
    corr_len = float(np.sum(np.abs(acf) ** 2)) / G ** 2  # sum over all lags of |rho(m)|^2
    indep = min(nproc / corr_len, nproc)
    rep = {"false_alarms": {"pfa": pfa, "tested_cells": nproc, "independent_cells": indep, "look_s": pri,
                            "cells_per_s": indep / pri, "rate_per_s": pfa * indep / pri}}
    if any(is_clutter(o["t"]) for o in objs):
        cp = np.where(processed, clutter_pow, 0.0)
        kk = int(np.argmax(cp))
        cl = {"breakthrough_cells": int(sum(cells))}
        if cp[kk] > 1e-10:
            cl["cnr_peak_db"] = 10 * math.log10(cp[kk])
            cl["cnr_peak_range_m"] = float(gate_r[kk])
        rep["clutter"] = cl
    return wf, out, rep


# ---------------------------------------------------------------- cases


def clutter_case(rng, i):
    """A random single-pulse scene with 1-2 extended or volume targets and
    0-2 point targets inside the window, beyond the blind range, in band."""
    kind = ["lfm", "rect", "barker", "p4", "lfm"][i % 5]
    if kind == "lfm":
        B = float(f"{rng.uniform(1e6, 5e6):.3g}")
        w = {"kind": "lfm", "pulse_width_s": float(f"{rng.uniform(2e-6, 2e-5):.3g}"), "bandwidth_hz": B}
        tau = w["pulse_width_s"]
    elif kind == "rect":
        tau = float(f"{rng.uniform(2e-7, 2e-6):.3g}")
        w = {"kind": "rect", "pulse_width_s": tau}
        B = 1 / tau
    else:
        n = 13 if kind == "barker" else int(rng.integers(8, 40))
        chip = float(f"{rng.uniform(2e-7, 1e-6):.3g}")
        w = {"kind": kind, "length": n, "chip_s": chip}
        tau, B = n * chip, 1 / chip
    rx = {}
    if rng.random() < 0.5 and kind != "rect":
        rx["window"] = {"kind": ["hamming", "taylor", "hann"][int(rng.integers(0, 3))]}
    dk = ["fixed", "ca_cfar", "os_cfar"][i % 3]
    det = {"kind": dk, "pfa": float(f"{10 ** rng.uniform(-8, -3):.2g}")}
    if dk != "fixed":
        tr = 2 * int(rng.integers(4, 17))
        det["guard_cells"] = int(rng.integers(1, 5))
        det["training_cells"] = tr
        if dk == "os_cfar":
            det["rank"] = int(rng.integers(tr // 2, tr + 1))
    rx["detector"] = det
    fs = B * [1, 1.5, 2, 3][int(rng.integers(0, 4))]
    blind = C * tau / 2
    start = float(round(blind + rng.uniform(100, 2000)))
    stop = float(round(start + rng.uniform(4000, 12000)))
    ngates = (stop - start) * 2 / C * fs
    if ngates > 6000:
        stop = float(round(start + 6000 * C / (2 * fs)))
    pri = float(f"{2 * stop / C * rng.uniform(1.2, 3):.3g}")
    radar = {"carrier_hz": float(f"{rng.uniform(2e9, 10e9):.3g}"), "peak_power_w": float(f"{10 ** rng.uniform(2, 4):.3g}"),
             "antenna_gain_dbi": float(round(rng.uniform(25, 38), 1)), "sample_rate_hz": fs, "pri_s": pri,
             "window_start_m": start, "window_stop_m": stop,
             "beamwidth_az_deg": float(round(rng.uniform(0.8, 3), 2))}
    height = rng.random() < 0.6
    if height:
        radar["antenna_height_m"] = float(round(10 ** rng.uniform(0.7, 2.5), 1))
    lam = C / radar["carrier_hz"]
    targets = []
    for j in range(int(rng.integers(1, 3))):
        a = float(round(rng.uniform(start, stop - 500)))
        b = float(round(min(a + rng.uniform(300, 5000), stop + 200)))
        t = {"id": f"c{j}", "range_start_m": a, "range_stop_m": b,
             "range_rate_mps": float(round(rng.uniform(-5, 5), 2))}
        if rng.random() < 0.3:
            t["kind"] = "volume"
            t["reflectivity_dbz"] = float(round(rng.uniform(15, 50), 1))
        else:
            t["kind"] = "extended"
            f = rng.random()
            if f < 0.33:
                t["rcs_dbsm_per_m"] = float(round(rng.uniform(-35, -5), 1))
            elif f < 0.66 or not height:
                t["sigma0_db"] = float(round(rng.uniform(-45, -10), 1))
            else:
                t["gamma_db"] = float(round(rng.uniform(-25, -5), 1))
        if rng.random() < 0.25:
            t["role"] = "target"
        targets.append(t)
    for j in range(int(rng.integers(0, 3))):
        R = float(rng.uniform(start + 200, stop - 200))
        if rng.random() < 0.5:  # inside or at the edge of the first clutter
            R = float(rng.uniform(targets[0]["range_start_m"] - 300, targets[0]["range_stop_m"]))
            R = min(max(R, start + 100), stop - 100)
        targets.append({"id": f"p{j}", "kind": "point", "range_m": R,
                        "rcs_dbsm": float(round(rng.uniform(-10, 30), 1)),
                        "range_rate_mps": float(round(rng.uniform(-60, 60), 1))})
    sc = {"version": 1, "name": f"clutter-{i:03d}", "radar": radar, "waveform": w, "receiver": rx, "targets": targets}
    assert max(abs(2 * t.get("range_rate_mps", 0) / lam) for t in targets) < fs / 2
    return sc


def check():
    """Check values before any case is written."""
    # sigma_c = sigma0 R theta dR sec psi (Skolnik, low grazing angle):
    # -20 dB, 10 km, 1 deg, 15 m -> 14.18 dBsm
    v = 10 * math.log10(0.01 * 1e4 * math.pi / 180 * 15)
    assert abs(v - 14.18) < 0.005, v
    # 4/3 Earth horizon for 10 m: 4.12 sqrt(10) km (rule of thumb)
    h = 10.0
    rh = math.sqrt(2 * AE * h + h * h)
    assert abs(rh / 1e3 - 4.12 * math.sqrt(h)) < 0.02
    assert grazing(h, rh * 1.001)[1] is False and grazing(h, rh * 0.999)[1] is True
