#!/usr/bin/python3
"""Reference work for bench/run, in NumPy/SciPy (Debian python3-numpy,
python3-scipy), written the way an engineer would script it.

  ref.py compress X H REPS [GO_OUT]    scipy.signal.correlate(method="fft")
  ref.py fftw X H REPS BLOCK [GO_OUT]  the same correlation on FFTW 3 (pyfftw,
                                       Debian python3-pyfftw): plans made once
                                       outside the timed loop (FFTW_MEASURE,
                                       2 threads); BLOCK is "full" (one
                                       transform of next_fast_len(n+m-1)), a
                                       power of two (overlap-save blocks of
                                       that length) or "pick" (time every
                                       power-of-two block and print the best)
                                       FFTW_WISDOM=FILE: wisdom read before
                                       planning and written after (planning
                                       with FFTW_MEASURE takes seconds to
                                       minutes on a loaded machine)
  ref.py evaluate SCENE REPS [GO_DIR]  the scene: echoes, noise, compression,
                                       CA-CFAR, per-target peak and threshold
  ref.py fftwcold X H REPS BLOCK FLAG  FFTW cold: every repetition makes the
                                       plans (planner flag FLAG, e.g.
                                       FFTW_ESTIMATE, or FFTW_MEASURE with the
                                       wisdom of FFTW_WISDOM), the reference's
                                       spectrum, and correlates once
  ref.py trials SCENE N REPS [GO_JSON] Monte Carlo trials of the scene,
                                       vectorised, on 2 processes: N trials
                                       per repetition; GO_JSON: gobench's
                                       trials line, whose detection counts
                                       are compared with ours

Each command times REPS repetitions inside the process after one untimed
warm-up and prints one JSON line: times_ms, maxrss_kib, and the result of
the cross-check against the Go side's output when given (check_ok and the
figures compared). Inputs: raw little-endian complex128 files (cf64) and
the scenario JSON that the Go side evaluates.
"""
import json
import math
import os
import resource
import sys
import time

import numpy as np
import scipy
import scipy.fft as sfft
import scipy.signal as ss
import scipy.signal.windows as sw

C = 299792458.0  # m/s
KB = 1.380649e-23  # J/K
T0 = 290.0  # K


def out(d):
    d["maxrss_kib"] = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss
    d["versions"] = "numpy %s scipy %s" % (np.__version__, scipy.__version__)
    print(json.dumps(d))


def timed(f, reps):
    res = f()  # warm-up; its result is the one checked
    times, cpu = [], []
    for _ in range(reps):
        t, c = time.perf_counter(), time.process_time()
        f()
        times.append((time.perf_counter() - t) * 1e3)
        cpu.append((time.process_time() - c) * 1e3)
    return res, (times, cpu)


# ---------------------------------------------------------------- compress

def compress(xf, hf, reps, go_out=None):
    x = np.fromfile(xf, dtype="<c16")
    h = np.fromfile(hf, dtype="<c16")
    m = len(h)

    def run():
        # y[k] = sum_i x[k+i] conj(h[i]), k = 0 .. n-1
        return ss.correlate(x, h, mode="full", method="fft")[m - 1:m - 1 + len(x)]

    y, (times, cpu) = timed(run, reps)
    d = {"times_ms": times, "cpu_ms": cpu}
    if go_out:
        g = np.fromfile(go_out, dtype="<c16")
        err = float(np.max(np.abs(g - y)) / np.max(np.abs(y)))
        d["check_max_rel_err"] = err
        d["check_ok"] = bool(len(g) == len(y) and err < 1e-9)
    out(d)


# ---------------------------------------------------------------- FFTW

FFTW_THREADS = int(os.environ.get("FFTW_THREADS", "2"))  # bench/run: 2 unless told
FFTW_FLAGS = ("FFTW_MEASURE", "FFTW_DESTROY_INPUT")  # fftwcold may change the planner flag


class FFTWCorrelator:
    """y[k] = sum_i x[k+i] conj(h[i]), k < n, on FFTW plans of length L made
    once (FFTW_MEASURE): one block when L >= n+m-1, else overlap-save blocks
    of L-m+1 outputs. Buffers are aligned and reused; the 1/L of the inverse
    is folded into the reference spectrum."""

    def __init__(self, h, n, L):
        import pyfftw
        m = len(h)
        self.n, self.m, self.L, self.step = n, m, L, L - m + 1
        self.a = pyfftw.empty_aligned(L, dtype="complex128")
        self.b = pyfftw.empty_aligned(L, dtype="complex128")
        flags = FFTW_FLAGS
        self.fwd = pyfftw.FFTW(self.a, self.b, direction="FFTW_FORWARD", flags=flags, threads=FFTW_THREADS)
        self.inv = pyfftw.FFTW(self.b, self.a, direction="FFTW_BACKWARD", flags=flags, threads=FFTW_THREADS)
        self.a[:] = 0
        self.a[:m] = h
        self.fwd.execute()
        self.spec = np.conj(self.b) / L
        self.y = np.empty(n, dtype="complex128")

    def __call__(self, x):
        n, L, step, a, b = self.n, self.L, self.step, self.a, self.b
        for s in range(0, n, step):
            seg = x[s:s + L]
            a[:len(seg)] = seg
            a[len(seg):] = 0
            self.fwd.execute()
            np.multiply(b, self.spec, out=b)
            self.inv.execute()
            k = min(step, n - s)
            self.y[s:s + k] = a[:k]
        return self.y


def fftw_full_len(n, m):
    try:
        from pyfftw import next_fast_len
    except ImportError:
        next_fast_len = sfft.next_fast_len
    return next_fast_len(n + m - 1)


def fftw_pick(x, h):
    """The fastest power-of-two overlap-save block, by the median of 5
    timed calls per candidate (plans made before timing), among the first
    four powers of two above m, stopping at the first that holds the whole
    window (planning longer ones with FFTW_MEASURE takes minutes here)."""
    n, m = len(x), len(h)
    L, best = 1, None
    while L < m + 1:
        L *= 2
    res = {}
    for _ in range(4):
        c = FFTWCorrelator(h, n, L)
        _, (times, _) = timed(lambda: c(x), 5)
        res[L] = sorted(times)[len(times) // 2]
        if best is None or res[L] < res[best]:
            best = L
        if L >= n + m - 1:
            break
        L *= 2
    return best, res


def fftw(xf, hf, reps, block, go_out=None):
    import os
    import pickle
    import pyfftw
    wf = os.environ.get("FFTW_WISDOM")
    if wf and os.path.exists(wf):
        with open(wf, "rb") as f:
            pyfftw.import_wisdom(pickle.load(f))
    x = np.fromfile(xf, dtype="<c16")
    h = np.fromfile(hf, dtype="<c16")
    n, m = len(x), len(h)
    d = {}
    if block == "pick":
        L, cands = fftw_pick(x, h)
        d["block"] = L
        d["candidates_ms"] = " ".join("%d:%.2f" % kv for kv in sorted(cands.items()))
    else:
        L = fftw_full_len(n, m) if block == "full" else int(block)
        d["block"] = L
    t = time.perf_counter()
    c = FFTWCorrelator(h, n, L)
    d["plan_ms"] = (time.perf_counter() - t) * 1e3
    if wf:
        with open(wf, "wb") as f:
            pickle.dump(pyfftw.export_wisdom(), f)
    y, (times, cpu) = timed(lambda: c(x), reps)
    d.update({"times_ms": times, "cpu_ms": cpu})
    # Correctness against SciPy (and Go's output when given), outside the timing.
    want = ss.correlate(x, h, mode="full", method="fft")[m - 1:m - 1 + n]
    scale = float(np.max(np.abs(want)))
    d["check_vs_scipy"] = float(np.max(np.abs(y - want)) / scale)
    ok = d["check_vs_scipy"] < 1e-9
    if go_out:
        g = np.fromfile(go_out, dtype="<c16")
        d["check_go_vs_fftw"] = float(np.max(np.abs(g - y)) / scale)
        ok = ok and len(g) == n and d["check_go_vs_fftw"] < 1e-9
    d["check_ok"] = bool(ok)
    d["fftw"] = "pyfftw %s, %d threads, FFTW_MEASURE" % (pyfftw.__version__, FFTW_THREADS)
    out(d)


# ---------------------------------------------------------------- evaluate

DEFAULT_RADAR = {"carrier_hz": 9.5e9, "peak_power_w": 1000, "antenna_gain_dbi": 30,
                 "noise_figure_db": 3, "system_loss_db": 3, "pri_s": 1e-3,
                 "beamwidth_az_deg": 2, "beamwidth_el_deg": 2}
PFA, GUARD, TRAIN = 1e-6, 2, 16  # the scenario format's CA-CFAR defaults


def db(p):
    with np.errstate(divide="ignore"):
        return np.maximum(10 * np.log10(p), -100.0)


def ca_alpha(cnt):
    """CA-CFAR multiplier on the mean of cnt cells: cnt (Pfa^(-1/cnt) - 1)."""
    cnt = np.asarray(cnt, dtype=float)
    return cnt * (PFA ** (-1 / cnt) - 1)


def training(k, n):
    half = TRAIN // 2
    return (np.maximum(k - GUARD - half, 0), np.maximum(k - GUARD, 0),
            np.minimum(k + GUARD + 1, n), np.minimum(k + GUARD + 1 + half, n))


def ca_cfar(p):
    """CA-CFAR threshold of every cell of the power p (fewer cells at the ends)."""
    n = len(p)
    c = np.concatenate(([0.0], np.cumsum(p)))
    k = np.arange(n)
    lo1, hi1, lo2, hi2 = training(k, n)
    cnt = hi1 - lo1 + hi2 - lo2
    s = c[hi1] - c[lo1] + c[hi2] - c[lo2]
    alpha = np.full(n, ca_alpha(TRAIN))  # fewer cells only near the ends
    edge = cnt != TRAIN
    alpha[edge] = ca_alpha(cnt[edge])
    return alpha * np.maximum(s, 0) / cnt


class Setup:
    """Scene geometry and radar constants from the scenario document."""

    def __init__(self, doc):
        r = dict(DEFAULT_RADAR)
        r.update(doc["radar"])
        w = doc["waveform"]
        self.window = doc.get("receiver", {}).get("window", {}).get("kind", "none")
        det = doc.get("receiver", {}).get("detector", {})
        assert w["kind"] == "lfm" and self.window in ("taylor", "none")
        assert det.get("kind", "ca_cfar") == "ca_cfar" and det.get("pfa", PFA) == PFA
        assert det.get("guard_cells", GUARD) == GUARD and det.get("training_cells", TRAIN) == TRAIN
        self.r, self.targets, self.seed = r, doc["targets"], doc.get("seed", 1)
        # The scenario format's default sample rate: 2 B (docs/scenario-format.md).
        self.fs = r.get("sample_rate_hz", 2 * w["bandwidth_hz"])
        self.tau, self.B = w["pulse_width_s"], w["bandwidth_hz"]
        self.slope = self.B / self.tau
        self.lam = C / r["carrier_hz"]
        self.t0 = 2 * r["window_start_m"] / C
        self.n = int((r["window_stop_m"] - r["window_start_m"]) * 2 / C * self.fs) + 1
        self.unamb = C * r["pri_s"] / 2
        self.noise_w = KB * T0 * 10 ** (r["noise_figure_db"] / 10) * self.fs
        g = 10 ** (r["antenna_gain_dbi"] / 10)
        self.k0 = r["peak_power_w"] * g * g * self.lam ** 2 / ((4 * math.pi) ** 3 * 10 ** (r["system_loss_db"] / 10))
        self.blank_end = int(min(max(math.ceil((self.tau - self.t0) * self.fs), 0), self.n))

    def range_of(self, k):
        return C * (self.t0 + k / self.fs) / 2


def lfm(s, t):
    """LFM envelope at times t (s) from the leading edge, zero outside [0, tau)."""
    x = t - s.tau / 2
    return np.where((t >= 0) & (t < s.tau), np.exp(1j * np.pi * s.slope * x * x), 0)


def echo(s, delay, fd, amp, k):
    """amp u(k/fs - delay) exp(j 2 pi fd k/fs) at sample indices k."""
    return amp * lfm(s, k / s.fs - delay) * np.exp(2j * np.pi * fd * k / s.fs)


def evaluate(s, nrec=None):
    """nrec: raw samples recorded for the trials (gates n plus the
    reference's m-1 beyond the last: every gate compressed whole, as the
    Go engine records them); each point's echo over them is kept in
    "points". The evaluation's own window is the n gates."""
    n, fs = s.n, s.fs
    nrec = nrec or n
    rng = np.random.default_rng(s.seed)
    np_ = int(round(s.tau * fs))
    pulse = lfm(s, np.arange(np_) / fs)
    ref = pulse * sw.taylor(np_, nbar=5, sll=35, norm=False) if s.window == "taylor" else pulse
    m = len(ref)
    noise_gain = float(np.vdot(ref, ref).real)
    # Local buffers hold one echo and its whole compressed response.
    nloc = np_ + 2 * m + 2
    lfft = sfft.next_fast_len(nloc + m - 1)
    ref_spec = np.conj(sfft.fft(ref, lfft))

    def compress_local(bufs):
        y = sfft.ifft(sfft.fft(bufs, lfft, axis=-1) * ref_spec, axis=-1)[..., :nloc]
        return (y.real ** 2 + y.imag ** 2) / noise_gain

    x = np.zeros(n, dtype=complex)  # noise-free receive window
    pts = [t for t in s.targets if t["kind"] == "point"]
    bufs = np.zeros((len(pts), nloc), dtype=complex)
    kl = np.arange(nloc)
    info = []
    points, rains = [], []  # for trials: each point's echo samples; each volume's density and Doppler
    for i, t in enumerate(pts):
        R = t["range_m"]
        fd = -2 * t.get("range_rate_mps", 0) / s.lam
        apparent = R - math.floor(R / s.unamb) * s.unamb
        sigma = 10 ** (t["rcs_dbsm"] / 10)
        amp = math.sqrt(s.k0 * sigma / R ** 4 / s.noise_w)
        a = amp * np.exp(-4j * np.pi * math.fmod(R / s.lam, 1))
        delay = 2 * apparent / C - s.t0
        b = math.floor(delay * fs) - m
        k = b + kl
        e = echo(s, delay, fd, a, k)
        e[(k < s.blank_end) | (k >= nrec)] = 0
        bufs[i] = e
        ok = (k >= 0) & (k < n)
        x[k[ok]] += e[ok]
        info.append((t, b, apparent, fd))
        ok = (k >= 0) & (k < nrec)
        points.append((i, k[ok], e[ok], t.get("fluctuation", "none")))
    pw = compress_local(bufs)
    total = np.zeros(n)
    resp = []
    for (t, b, apparent, fd), p in zip(info, pw):
        lo, hi = max(b, 0), min(b + nloc, n)
        r = p[lo - b:hi - b] if lo < hi else np.zeros(0)
        total[lo:lo + len(r)] += r
        resp.append((t, lo, r, apparent))
    # Volume targets: expected density on the window grid, its expected
    # compressed power, and one complex Gaussian realisation.
    dr = C / (2 * fs)
    az, el = (math.radians(s.r["beamwidth_az_deg"]), math.radians(s.r["beamwidth_el_deg"]))
    for t in s.targets:
        if t["kind"] != "volume":
            continue
        fd = -2 * t.get("range_rate_mps", 0) / s.lam
        eta = math.pi ** 5 * 0.93 * 10 ** (t["reflectivity_dbz"] / 10) * 1e-18 / s.lam ** 4
        a0, b0 = t["range_start_m"], t["range_stop_m"]
        dens = np.zeros(n)
        for f in range(int(a0 // s.unamb), int(b0 // s.unamb) + 1):
            base = f * s.unamb
            ra, rb = max(a0, base + s.range_of(0)), min(b0, base + s.range_of(n - 1 + 0.5))
            if ra >= rb:
                continue
            ka = int(max(0, math.floor((2 * (ra - base) / C - s.t0) * fs)))
            kb = int(min(n - 1, math.ceil((2 * (rb - base) / C - s.t0) * fs)))
            k = np.arange(ka, kb + 1)
            rk = s.range_of(k) + base
            w = np.minimum(rk + dr / 2, b0) - np.maximum(rk - dr / 2, a0)
            keep = (w > 0) & (k >= s.blank_end) & (rk > 0)
            beam = np.pi * rk ** 2 * az * el / (8 * math.log(2))
            dens[k[keep]] += (s.k0 / s.noise_w * eta * beam * w / rk ** 4)[keep]
        nz = np.nonzero(dens)[0]
        if len(nz) == 0:
            continue
        lo, hi = nz[0], nz[-1]
        q = dens[lo:hi + 1]
        kern = compress_local(echo(s, m / fs, fd, 1, kl))
        pw = np.convolve(q, kern)  # lands on window sample lo + t - m
        olo, ohi = max(lo - m, 0), min(hi + nloc - m, n)
        r = pw[olo - (lo - m):ohi - (lo - m)]
        total[olo:ohi] += r
        resp.append((t, olo, r, a0))
        rains.append((lo, q, fd))
        rho = np.sqrt(q) * (rng.standard_normal(len(q)) + 1j * rng.standard_normal(len(q))) * math.sqrt(0.5)
        c = ss.fftconvolve(rho, pulse)
        kk = lo + np.arange(len(c))
        ok = kk < n
        x[kk[ok]] += c[ok] * np.exp(2j * np.pi * fd * kk[ok] / fs)
    # Noise, blanking, compression.
    xn = x + (rng.standard_normal(n) + 1j * rng.standard_normal(n)) * math.sqrt(0.5)
    xn[:s.blank_end] = 0
    y = ss.correlate(xn, ref, mode="full", method="fft")[m - 1:m - 1 + n]
    profile = db((y.real ** 2 + y.imag ** 2) / noise_gain)
    clean = db(total)
    threshold = db(ca_cfar(1 + total))
    profile[:s.blank_end] = clean[:s.blank_end] = -100
    # Per target: its own peak, the detector level with the rest of the
    # scene in the training cells, the others' power in its cell.
    rep = []
    rw = s.r
    for t, lo, r, apparent in resp:
        st, margin, rng_m = "out_of_window", None, t.get("range_m", t.get("range_start_m"))
        if len(r) and r.max() > 0:
            j = int(np.argmax(r))
            pk, kp = r[j], lo + j
            l1, h1, l2, h2 = (int(v) for v in training(kp, n))
            cells = np.concatenate((np.arange(l1, h1), np.arange(l2, h2)))
            i = cells - lo
            ok = (i >= 0) & (i < len(r))
            own = np.zeros(len(cells))
            own[ok] = r[i[ok]]
            others = np.maximum(total[cells] - own, 0)
            cnt = len(cells)
            noise_level = ca_alpha(cnt)
            scene_level = ca_alpha(cnt) * np.mean(1 + others)
            thr = max(scene_level, max(total[kp] - pk, 0))
            margin = float(10 * np.log10(pk / thr))
            if t["kind"] != "point":
                rng_m = float(s.range_of(kp))
            st = "detected" if pk >= thr else "below_noise" if pk < noise_level else "masked"
        if t["kind"] == "point":
            if t["range_m"] >= s.unamb or apparent < rw["window_start_m"] or apparent > rw["window_stop_m"]:
                st = "out_of_window"
            elif apparent < C * s.tau / 2:
                st = "eclipsed"
        rep.append({"id": t["id"], "status": st, "range_m": rng_m, "margin_db": margin})
    return {"x": x, "ref": ref, "noise_gain": noise_gain, "profile": profile, "clean": clean,
            "threshold": threshold, "targets": rep, "resp": resp, "total": total,
            "points": points, "rains": rains, "pulse": pulse}


def check_evaluate(s, res, go_dir):
    """Compare with the Go side's series and report; returns a dict of figures."""
    d = {}
    ge = np.fromfile(go_dir + "/go_echo.cf64", dtype="<c16")
    gp, gc, gt = (np.fromfile(go_dir + "/go_%s_db.f64" % k, dtype="<f8") for k in ("profile", "clean", "threshold"))
    m = len(res["ref"])
    # 1. Compression: the Go profile against scipy on the Go echo.
    y = ss.correlate(ge, res["ref"], mode="full", method="fft")[m - 1:m - 1 + s.n]
    p = db((y.real ** 2 + y.imag ** 2) / res["noise_gain"])
    p[:s.blank_end] = -100
    d["profile_max_db_err"] = float(np.max(np.abs(p - gp)[gp > -60]))
    # 2. Noise-free scene and CFAR threshold.
    d["clean_max_db_err"] = float(np.max(np.abs(res["clean"] - gc)[gc > -60]))
    d["threshold_max_db_err"] = float(np.max(np.abs(res["threshold"] - gt)))
    # 3. Echo synthesis: Go echo minus our noise-free echo is unit-power
    # noise away from the rain (whose realisation differs by generator),
    # and compressing it leaves no target behind.
    keep = np.ones(s.n, bool)
    for t, lo, r, _ in res["resp"]:
        if t["kind"] != "point":
            keep[max(lo - 2 * m, 0):lo + len(r) + 2 * m] = False
    resid = ge - res["x"]
    z = ss.correlate(resid, res["ref"], mode="full", method="fft")[m - 1:m - 1 + s.n]
    zp = (z.real ** 2 + z.imag ** 2) / res["noise_gain"]
    d["residual_power"] = float(np.mean(np.abs(resid[keep]) ** 2))
    d["residual_peak_db"] = float(10 * np.log10(np.max(zp[keep])))
    # 4. Per-target status, margin and range.
    gt_ = {t["id"]: t for t in json.load(open(go_dir + "/go_targets.json"))}
    bad = []
    worst = 0.0
    for t in res["targets"]:
        g = gt_[t["id"]]
        if g["status"] != t["status"] or abs(g["range_m"] - t["range_m"]) > 0.01:
            bad.append(t["id"])
        if (g["margin_db"] is None) != (t["margin_db"] is None):
            bad.append(t["id"])
        elif g["margin_db"] is not None:
            worst = max(worst, abs(g["margin_db"] - t["margin_db"]))
    d["targets_mismatched"] = bad
    d["margin_max_db_err"] = worst
    d["check_ok"] = bool(d["profile_max_db_err"] < 1e-6 and d["clean_max_db_err"] < 0.01 and
                         d["threshold_max_db_err"] < 0.01 and 0.95 < d["residual_power"] < 1.05 and
                         d["residual_peak_db"] < 16 and not bad and worst < 0.01)
    return d


def evaluate_cmd(scene, reps, go_dir=None):
    s = Setup(json.load(open(scene)))
    res, (times, cpu) = timed(lambda: evaluate(s), reps)
    d = {"times_ms": times, "cpu_ms": cpu}
    if go_dir:
        d.update(check_evaluate(s, res, go_dir))
    out(d)


# ---------------------------------------------------------------- FFTW cold

def fftwcold(xf, hf, reps, block, flag):
    """Every repetition plans afresh (planner flag FLAG; with
    FFTW_MEASURE, the wisdom of FFTW_WISDOM is imported once before the
    timing, so planning replays it), transforms the reference and
    correlates once: the like-for-like line for a Go plan built and
    applied once."""
    import os
    import pickle
    import pyfftw
    global FFTW_FLAGS
    FFTW_FLAGS = (flag, "FFTW_DESTROY_INPUT")
    wf = os.environ.get("FFTW_WISDOM")
    if flag != "FFTW_ESTIMATE" and wf and os.path.exists(wf):
        with open(wf, "rb") as f:
            pyfftw.import_wisdom(pickle.load(f))
    x = np.fromfile(xf, dtype="<c16")
    h = np.fromfile(hf, dtype="<c16")
    n, m = len(x), len(h)
    L = fftw_full_len(n, m) if block == "full" else int(block)
    y, (times, cpu) = timed(lambda: FFTWCorrelator(h, n, L)(x), reps)
    want = ss.correlate(x, h, mode="full", method="fft")[m - 1:m - 1 + n]
    err = float(np.max(np.abs(y - want)) / np.max(np.abs(want)))
    out({"block": L, "flag": flag, "times_ms": times, "cpu_ms": cpu, "check_vs_scipy": err, "check_ok": bool(err < 1e-9)})


# ---------------------------------------------------------------- trials

TRIAL_PROCS = 2


def pfa_cut(a, s, n):
    """Exact Pfa of |z0|^2 > (a/n) sum |z_i|^2 for complex Gaussian noise of
    covariance s over [cell under test, n training cells]: the eigenvalues
    mu of S^(1/2) Q S^(1/2), Q = diag(1, -a/n, ...), one positive (mu+),
    Pfa = prod 1/(1 + |mu_j|/mu+) over the others (docs/detection.md, the
    CA-CFAR with correlated cells; the same formula as
    testdata/golden/cfar.py)."""
    q = np.diag(np.r_[1.0, -a / n * np.ones(n)])
    w, v = np.linalg.eigh(s)
    sh = v @ np.diag(np.sqrt(np.maximum(w, 0))) @ v.conj().T
    mu = np.linalg.eigvalsh(sh @ q @ sh)
    mp = mu.max()
    rest = np.delete(mu, mu.argmax())
    return np.prod(1 / (1 + np.abs(rest) / mp))


def alpha_cut(offs, rho):
    """The CA-CFAR multiplier for training cells at offsets offs from the
    cell under test, compressed noise correlated as rho(m) (m >= 0), at the
    scenario's Pfa (scipy.optimize.brentq on pfa_cut)."""
    from scipy.optimize import brentq
    o = np.r_[0, offs]
    d = o[None, :] - o[:, None]
    s_ = np.where(np.abs(d) < len(rho), rho[np.minimum(np.abs(d), len(rho) - 1)], 0)
    s_ = np.where(d >= 0, s_, np.conj(s_))
    n = len(offs)
    return brentq(lambda a: np.log(pfa_cut(a, s_, n)) - np.log(PFA), 1e-6, 1e6, xtol=1e-12, rtol=1e-13)


def cfar_alphas(n, rho):
    """alpha per cell (the training cells available at each, fewer near the
    ends), for compressed noise correlated as rho."""
    k = np.arange(n)
    lo1, hi1, lo2, hi2 = training(k, n)
    alpha = np.zeros(n)
    memo = {}
    for i in range(n):
        key = (lo1[i] - i, hi1[i] - i, lo2[i] - i, hi2[i] - i)
        if key not in memo:
            offs = np.r_[np.arange(key[0], key[1]), np.arange(key[2], key[3])]
            memo[key] = alpha_cut(offs, rho)
        alpha[i] = memo[key]
    return alpha


def ca_cfar_rows(p, alpha):
    """The CA-CFAR threshold alpha/N * sum of every cell of every row of p
    (trials × cells), N the training cells available."""
    n = p.shape[1]
    c = np.concatenate((np.zeros((p.shape[0], 1)), np.cumsum(p, axis=1)), axis=1)
    k = np.arange(n)
    lo1, hi1, lo2, hi2 = training(k, n)
    cnt = hi1 - lo1 + hi2 - lo2
    return (alpha / cnt) * np.maximum(c[:, hi1] - c[:, lo1] + c[:, hi2] - c[:, lo2], 0)


class TrialScene:
    """A scene prepared for Monte Carlo trials from the definitions
    (docs/detection-probability.md §8): each trial is the receive window
    with new thermal noise, new Swerling draws of the fluctuating point
    targets' complex amplitudes and a new realisation of each volume
    target's scatterers, compressed and tested by the CA-CFAR. A target is
    detected in a trial when the compressed power at the cell of its own
    noise-free peak exceeds that cell's threshold; noise cells are those
    whose whole CFAR window holds less than 1e-3 of the noise in
    noise-free scene power. The CFAR's multiplier holds the Pfa for the
    compressed noise's correlation between cells (the reference's
    normalised autocorrelation), exactly, cell under test included
    (docs/detection.md)."""

    def __init__(self, s):
        m = int(round(s.tau * s.fs))
        self.nrec = nrec = s.n + m - 1
        res = evaluate(s, nrec)
        assert len(res["ref"]) == m
        self.s, n = s, s.n
        self.m, self.noise_gain = m, res["noise_gain"]
        self.L = sfft.next_fast_len(nrec)
        self.ref_spec = np.conj(sfft.fft(res["ref"], self.L))
        self.pulse = res["pulse"]
        h = res["ref"]
        span = GUARD + TRAIN // 2
        rho = np.array([np.sum(h[:m - j] * np.conj(h[j:])) for j in range(min(2 * span + 1, m))]) / np.sum(np.abs(h) ** 2)
        # y[k] = sum x[k+i] conj(h[i]): E[y_k conj(y_{k+j})] = sum_i h[i+j] conj(h[i]) = conj(rho(j)).
        self.alpha = cfar_alphas(n, np.conj(rho))
        self.ids = [t["id"] for t in s.targets]
        self.cells = {}
        for t, lo, r, _ in res["resp"]:
            if len(r) and r.max() > 0:
                self.cells[t["id"]] = int(lo) + int(np.argmax(r))
        # Steady point echoes summed once; fluctuating ones kept apart.
        self.steady = np.zeros(nrec, dtype=complex)
        self.fluct = []
        for _, k, e, fl in res["points"]:
            if fl == "none":
                self.steady[k] += e
            else:
                f = np.zeros(nrec, dtype=complex)
                f[k] = e
                self.fluct.append((f, fl))
        self.rains = res["rains"]
        span = GUARD + TRAIN // 2
        quiet = res["total"] <= 1e-3
        win = np.convolve((~quiet).astype(float), np.ones(2 * span + 1), mode="same") == 0
        win[:s.blank_end] = False  # compressed over blanked samples
        self.quiet = np.nonzero(win)[0]

    def run(self, count, seed, batch):
        """count trials in batches; returns (detections per id, false alarms, noise cells)."""
        s, n, nrec = self.s, self.s.n, self.nrec
        rng = np.random.default_rng(seed)
        det = {i: 0 for i in self.ids}
        fa = nc = 0
        kk = np.arange(nrec)
        idx = np.array([self.cells.get(i, 0) for i in self.ids])
        has = np.array([i in self.cells for i in self.ids])
        for b0 in range(0, count, batch):
            B = min(batch, count - b0)
            x = np.broadcast_to(self.steady, (B, nrec)).copy()
            for f, fl in self.fluct:
                if fl in ("swerling1", "swerling2"):  # exponential power, uniform phase
                    g = (rng.standard_normal(B) + 1j * rng.standard_normal(B)) * math.sqrt(0.5)
                else:  # chi-square with 4 degrees of freedom, mean 1
                    g = np.sqrt(rng.gamma(2.0, 0.5, B)) * np.exp(2j * np.pi * rng.random(B))
                x += g[:, None] * f
            for lo, q, fd in self.rains:
                rho = np.sqrt(q) * (rng.standard_normal((B, len(q))) + 1j * rng.standard_normal((B, len(q)))) * math.sqrt(0.5)
                c = ss.fftconvolve(rho, self.pulse[None, :], axes=1)
                hi = min(lo + c.shape[1], nrec)
                x[:, lo:hi] += c[:, :hi - lo] * np.exp(2j * np.pi * fd * kk[lo:hi] / s.fs)
            x += (rng.standard_normal((B, nrec)) + 1j * rng.standard_normal((B, nrec))) * math.sqrt(0.5)
            x[:, :s.blank_end] = 0
            y = sfft.ifft(sfft.fft(x, self.L, axis=1) * self.ref_spec, axis=1)[:, :n]
            p = (y.real ** 2 + y.imag ** 2) / self.noise_gain
            th = ca_cfar_rows(p, self.alpha)
            hit = p[:, idx] > th[:, idx]
            for j, i in enumerate(self.ids):
                if has[j]:
                    det[i] += int(hit[:, j].sum())
            fa += int((p[:, self.quiet] > th[:, self.quiet]).sum())
            nc += B * len(self.quiet)
        return det, fa, nc


_TRIAL_SCENE = None


def _trial_worker(args):
    count, seed, batch = args
    return _TRIAL_SCENE.run(count, seed, batch)


def trials_cmd(scene, count, reps, go_json=None):
    global _TRIAL_SCENE
    import multiprocessing as mp
    s = Setup(json.load(open(scene)))
    _TRIAL_SCENE = TrialScene(s)
    # Batches of about 2 M samples per array.
    batch = max(1, min(256, (1 << 21) // (s.n + int(round(s.tau * s.fs)))))
    ctx = mp.get_context("fork")
    with ctx.Pool(TRIAL_PROCS) as pool:  # started once, outside the timing
        rnd = [0]

        def run():
            rnd[0] += 1
            half = [count // TRIAL_PROCS + (1 if i < count % TRIAL_PROCS else 0) for i in range(TRIAL_PROCS)]
            parts = pool.map(_trial_worker, [(c, (s.seed, rnd[0], i), batch) for i, c in enumerate(half)])
            det = {i: sum(p[0][i] for p in parts) for i in _TRIAL_SCENE.ids}
            return det, sum(p[1] for p in parts), sum(p[2] for p in parts)

        res, (times, cpu) = timed(run, reps)
        # The counts checked are the warm-up's (count trials).
        tot = {i: res[0][i] for i in _TRIAL_SCENE.ids}
        fa, nc = res[1], res[2]
        # cpu_ms (process_time) counts this process only; the workers'
        # CPU is in children_cpu_s (all repetitions and the warm-up).
    ch = resource.getrusage(resource.RUSAGE_CHILDREN)
    d = {"times_ms": times, "cpu_ms": cpu, "trials_per_rep": count, "batch": batch,
         "children_cpu_s": ch.ru_utime + ch.ru_stime, "cells": _TRIAL_SCENE.cells,
         "check_trials": count, "detections": tot, "false_alarms": fa, "noise_cells": nc}
    if go_json:
        g = json.loads(go_json)["counts"]
        ng, nr = g["trials"], count
        worst, bad = 0.0, []
        for i, dg in zip(g["ids"], g["detections"]):
            pg, pr = dg / ng, tot[i] / nr
            pp = (dg + tot[i]) / (ng + nr)
            sd = math.sqrt(max(pp * (1 - pp), 0.25 / (ng + nr)) * (1 / ng + 1 / nr))
            z = abs(pg - pr) / sd
            worst = max(worst, z)
            if z > 4.5:
                bad.append("%s go %.3f ref %.3f" % (i, pg, pr))
        d["check_go_trials"] = ng
        d["check_worst_z"] = worst
        d["check_mismatched"] = bad
        d["check_ok"] = not bad
    out(d)


if __name__ == "__main__":
    cmd, a = sys.argv[1], sys.argv[2:]
    if cmd == "compress":
        compress(a[0], a[1], int(a[2]), a[3] if len(a) > 3 else None)
    elif cmd == "fftw":
        fftw(a[0], a[1], int(a[2]), a[3], a[4] if len(a) > 4 else None)
    elif cmd == "evaluate":
        evaluate_cmd(a[0], int(a[1]), a[2] if len(a) > 2 else None)
    elif cmd == "fftwcold":
        fftwcold(a[0], a[1], int(a[2]), a[3], a[4])
    elif cmd == "trials":
        trials_cmd(a[0], int(a[1]), int(a[2]), a[3] if len(a) > 3 else None)
    else:
        sys.exit("usage: ref.py compress X H REPS [GO_OUT] | fftw X H REPS BLOCK [GO_OUT] | evaluate SCENE REPS [GO_DIR]")
