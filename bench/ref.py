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
  ref.py evaluate SCENE REPS [GO_DIR]  the scene as docs/detection.md and
                                       docs/detection-probability.md §7 define
                                       it: the record and blanking, echoes,
                                       noise, compression, the CA-CFAR with
                                       correlated cells, every target's
                                       threshold, Pd (echoes in its cell
                                       included), pd_alone, required SNR,
                                       margins, status, masked_by, CNR/SCR,
                                       clutter breakthrough; GO_DIR: gobench's
                                       series and report, compared field by
                                       field
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
#
# The single-pulse scene of docs/detection.md (§1 record and blanking, §2
# responses, §5 the CA-CFAR with correlated cells, §6 threshold, Pd and
# statuses, §7 masked_by, §8 series, §10 clutter) and the Pd figures of
# docs/detection-probability.md §7 (the tested SNR, the CA-CFAR series
# with M cells, the scene's raise r, echoes sharing the tested cell with
# uniform independent phases), written from those documents in NumPy and
# SciPy. It covers what bench/scene-large.json holds: an LFM pulse with a
# Taylor or no receive window, steady point targets, volume targets,
# CA-CFAR; anything else is refused (assert) rather than modelled wrongly.

from scipy.optimize import brentq
from scipy.special import betainc, gammaln, xlogy

DEFAULT_RADAR = {"carrier_hz": 9.5e9, "peak_power_w": 1000, "antenna_gain_dbi": 30,
                 "noise_figure_db": 3, "system_loss_db": 3, "pri_s": 1e-3,
                 "beamwidth_az_deg": 2, "beamwidth_el_deg": 2}
PFA, GUARD, TRAIN = 1e-6, 2, 16  # the scenario format's CA-CFAR defaults
PD_REQUIRED = 0.9  # the scenario format's default pd_required
FLOOR = -100.0  # the plots' floor, dB


def db(p):
    with np.errstate(divide="ignore"):
        return np.maximum(10 * np.log10(p), FLOOR)


def ca_alpha(cnt):
    """CA-CFAR multiplier on the mean of cnt independent cells:
    cnt (Pfa^(-1/cnt) - 1) (Richards eq. 6.135)."""
    cnt = np.asarray(cnt, dtype=float)
    return cnt * (PFA ** (-1 / cnt) - 1)


def training(k, n):
    half = TRAIN // 2
    return (np.maximum(k - GUARD - half, 0), np.maximum(k - GUARD, 0),
            np.minimum(k + GUARD + 1, n), np.minimum(k + GUARD + 1 + half, n))


def ca_cfar(p):
    """CA-CFAR threshold of every cell of the power p (independent cells,
    fewer at the ends): the trials' reference below."""
    n = len(p)
    c = np.concatenate(([0.0], np.cumsum(p)))
    k = np.arange(n)
    lo1, hi1, lo2, hi2 = training(k, n)
    cnt = hi1 - lo1 + hi2 - lo2
    s = c[hi1] - c[lo1] + c[hi2] - c[lo2]
    return ca_alpha(cnt) * np.maximum(s, 0) / cnt


def ceil9(x):
    """ceil, taking x within 1e-9 (relative) of a whole number as that number."""
    r = round(x)
    return int(r) if abs(x - r) <= 1e-9 * max(1.0, abs(x)) else int(math.ceil(x))


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
        assert r.get("pulses", 1) == 1 and not doc.get("receiver", {}).get("front_end")
        self.pd_req = det.get("pd_required", PD_REQUIRED)
        self.r, self.targets, self.seed = r, doc["targets"], doc.get("seed", 1)
        for t in self.targets:
            assert t["kind"] in ("point", "volume")
        # The scenario format's default sample rate: 2 B (docs/scenario-format.md).
        self.fs = r.get("sample_rate_hz", 2 * w["bandwidth_hz"])
        self.tau, self.B = w["pulse_width_s"], w["bandwidth_hz"]
        self.slope = self.B / self.tau
        self.lam = C / r["carrier_hz"]
        self.t0 = 2 * r["window_start_m"] / C
        self.n = int((r["window_stop_m"] - r["window_start_m"]) * 2 / C * self.fs) + 1
        self.np = ceil9(self.tau * self.fs)  # pulse samples; a matched reference as long
        self.nrec = self.n + self.np - 1  # the raw record (docs/detection.md §1)
        self.unamb = C * r["pri_s"] / 2
        self.noise_w = KB * T0 * 10 ** (r["noise_figure_db"] / 10) * self.fs
        g = 10 ** (r["antenna_gain_dbi"] / 10)
        self.k0 = r["peak_power_w"] * g * g * self.lam ** 2 / ((4 * math.pi) ** 3 * 10 ** (r["system_loss_db"] / 10))
        # Blanking: every transmit interval [q PRI, q PRI + tau) over the record.
        pri, blank = r["pri_s"], np.zeros(self.nrec, bool)
        q = 0
        while q * pri < self.t0 + self.nrec / self.fs:
            lo, hi = ceil9((q * pri - self.t0) * self.fs), ceil9((q * pri + self.tau - self.t0) * self.fs)
            blank[min(max(lo, 0), self.nrec):min(max(hi, 0), self.nrec)] = True
            q += 1
        self.blank = blank
        self.processed = ~blank[:self.n]
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


# ---- the CA-CFAR with correlated cells (docs/detection.md §5)

OFFS = np.r_[np.arange(-(GUARD + TRAIN // 2), -GUARD), np.arange(GUARD + 1, GUARD + TRAIN // 2 + 1)]


def alpha_exact(offs, rho):
    """alpha (on the mean of the N cells at offsets offs) with the exact Pfa
    of |z0|^2 > (alpha/N) sum |z_i|^2 equal to PFA, the cell under test
    included: Sigma_ab = rho(o_b - o_a), the eigenvalues mu of
    Sigma^1/2 Q Sigma^1/2, Q = diag(1, -alpha/N, ...), Pfa = prod over the
    negative ones of 1/(1 + |mu_j|/mu+). brentq on ln alpha."""
    o = np.r_[0, offs]
    d = o[None, :] - o[:, None]
    sig = np.where(d >= 0, rho[np.abs(d)], np.conj(rho[np.abs(d)]))
    w, v = np.linalg.eigh(sig)
    sh = (v * np.sqrt(np.maximum(w, 0))) @ v.conj().T
    nn = len(offs)

    def f(la):
        q = np.full(nn + 1, -math.exp(la) / nn)
        q[0] = 1
        mu = np.linalg.eigvalsh(sh @ (q[:, None] * sh))
        return -np.sum(np.log1p(np.abs(mu[:-1]) / mu[-1])) - math.log(PFA)

    # Bracket around the independent cells' alpha (Richards eq. 6.135).
    lo, hi = math.log(float(ca_alpha(nn))) - 1, math.log(float(ca_alpha(nn))) + 1
    while f(lo) < 0:
        lo -= 1
    while f(hi) > 0:
        hi += 1
    return math.exp(brentq(f, lo, hi, xtol=1e-13, rtol=1e-15))


def cfar_levels(s, S, rho):
    """Per gate: the training cells' mask (16 offsets, in the window and
    processed), their count, the exact alpha of that set and the scene
    level alpha mean(1 + S) (+inf with no cell)."""
    n, h = s.n, GUARD + TRAIN // 2
    pp = np.concatenate((np.zeros(h, bool), s.processed, np.zeros(h, bool)))  # processed gates in the window
    sp = np.concatenate((np.zeros(h), 1 + S, np.zeros(h))) * pp
    valid = np.empty((len(OFFS), n), bool)
    acc, key = np.zeros(n), np.zeros(n, np.int64)
    for j, o in enumerate(OFFS):
        valid[j] = pp[h + o:h + o + n]
        acc += sp[h + o:h + o + n]
        key |= valid[j].astype(np.int64) << j
    cnt = valid.sum(axis=0)
    keys, inv = np.unique(key, return_inverse=True)
    alphas = np.array([alpha_exact(OFFS[(kk >> np.arange(len(OFFS))) & 1 == 1], rho) if kk else np.inf
                       for kk in keys])
    alpha = alphas[inv]
    with np.errstate(invalid="ignore", divide="ignore"):
        level = np.where(cnt > 0, alpha * acc / np.maximum(cnt, 1), np.inf)
    return valid, cnt, alpha, level


# ---- Pd (docs/detection-probability.md §3 and §7)

class CAPd:
    """Pd of a steady target behind a CA-CFAR of M independent cells at
    PFA, one square-law test, against r times the nominal threshold (the
    nominal detector at Pfa (1 + r c)^-M, c = PFA^(-1/M) - 1, i.e. the
    multiplier r c on the reference sum): the exact series
    Pd = sum_k Poisson(k; chi) I_y(M, 1 + k), y = 1/(1 + r c)
    (scipy.special.betainc), vectorised over chi."""

    def __init__(self, m):
        self.m, self.c = m, PFA ** (-1.0 / m) - 1

    def __call__(self, chi, r=1.0):
        chi = np.atleast_1d(np.asarray(chi, dtype=float))
        assert -self.m * math.log1p(r * self.c) >= math.log(1e-300)  # else the averaged form (not needed here)
        cmin, cmax = float(chi.min()), float(chi.max())
        k = np.arange(max(int(cmin - 12 * math.sqrt(cmin) - 12), 0), int(cmax + 12 * math.sqrt(cmax) + 30))
        g = betainc(self.m, 1.0 + k, 1.0 / (1.0 + r * self.c))
        lw = xlogy(k[None, :], chi[:, None]) - chi[:, None] - gammaln(k + 1.0)[None, :]
        return np.clip(np.exp(lw) @ g, 0.0, 1.0)

    def required_snr_db(self, req):
        """The SNR (dB) at which Pd = req against noise alone (brentq; the
        same for every target behind this detector, so kept)."""
        if getattr(self, "req", None) != req:
            f = lambda d: float(self(10 ** (d / 10))[0]) - req
            hi = 0.0
            while f(hi) < 0:
                hi += 10
            self.req, self.req_db = req, brentq(f, hi - 40, hi, xtol=1e-11, rtol=1e-15)
        return self.req_db


def pd_in_cell(pdf, steady, gauss, r):
    """Echoes sharing the tested cell (detection-probability.md §7): the
    steady phasors' amplitudes (the target's among them) with independent
    uniform phases, Gaussian echoes of total power gauss, unit noise,
    against r times the nominal threshold. The strongest phasor is the
    phase reference, the next two have their relative phase averaged (the
    trapezoid rule on [0, pi], where the integrand is even and periodic,
    intervals doubled until two estimates agree within 1e-10), weaker ones
    join the Gaussian power v."""
    a = np.sort(np.asarray(steady, dtype=float))[::-1]
    a = a[a > 0]
    v = 1.0 + gauss + float(np.sum(a[3:] ** 2))
    ph = a[1:3]
    if len(ph) == 0:
        return float(pdf(a[0] ** 2 / v, r / v)[0])
    prev = None
    nint = 8
    while True:
        t = np.exp(1j * np.pi * np.arange(nint + 1) / nint)
        w = np.full(nint + 1, 1.0 / nint)
        w[[0, -1]] /= 2
        z = a[0] + ph[0] * t
        if len(ph) == 2:  # the third phasor's phase relative to the first two's resultant
            z = (np.abs(z)[:, None] + ph[1] * t[None, :]).ravel()
            w = np.outer(w, w).ravel()
        val = float(w @ pdf(np.abs(z) ** 2 / v, r / v))
        if prev is not None and abs(val - prev) < 1e-10:
            return val
        prev, nint = val, 2 * nint


def evaluate(s, nrec=None):
    """The scene (docs/detection.md). nrec: the raw samples to keep each
    point's echo over for the trials (default: the record, n + m - 1)."""
    n, fs = s.n, s.fs
    nrec = nrec or s.nrec
    assert nrec == s.nrec
    rng = np.random.default_rng(s.seed)
    np_ = s.np
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

    x = np.zeros(nrec, dtype=complex)  # noise-free raw record
    pts = [t for t in s.targets if t["kind"] == "point"]
    bufs = np.zeros((len(pts), nloc), dtype=complex)
    kl = np.arange(nloc)
    info = []
    points, rains = [], []  # for trials: each point's echo samples; each volume's density and Doppler
    unbl = []  # (row, echo unblanked) of the echoes blanking touched
    for i, t in enumerate(pts):
        R = t["range_m"]
        fd = -2 * t.get("range_rate_mps", 0) / s.lam
        assert abs(fd) < fs / 2  # no receiver-band filtering here
        folds = math.floor(R / s.unamb)
        apparent = R - folds * s.unamb
        sigma = 10 ** (t["rcs_dbsm"] / 10)
        amp = math.sqrt(s.k0 * sigma / R ** 4 / s.noise_w)
        a = amp * np.exp(-4j * np.pi * math.fmod(R / s.lam, 1))
        delay = 2 * apparent / C - s.t0
        b = math.floor(delay * fs) - m
        k = b + kl
        e = echo(s, delay, fd, a, k)
        inrec = (k >= 0) & (k < nrec)
        e[~inrec] = 0
        bl = np.zeros(nloc, bool)
        bl[inrec] = s.blank[k[inrec]]
        nin, nb = np.count_nonzero(e), np.count_nonzero(e[bl])
        if nb:
            unbl.append((i, e.copy()))
        e[bl] = 0
        bufs[i] = e
        x[k[inrec]] += e[inrec]
        info.append((t, b, apparent, folds, nin, nb))
        points.append((i, k[inrec], e[inrec], t.get("fluctuation", "none")))
    pw = compress_local(bufs)
    pu = {}
    if unbl:
        pwu = compress_local(np.array([e for _, e in unbl]))
        for (i, _), p in zip(unbl, pwu):
            lo, hi = max(info[i][1], 0), min(info[i][1] + nloc, n)
            pu[i] = float(p[lo - info[i][1]:hi - info[i][1]].max()) if lo < hi else 0.0
    total = np.zeros(n)
    resp = []  # (target, first gate, response over gates, apparent range)
    own = []  # (target, first gate, response, extra)
    for j, ((t, b, apparent, folds, nin, nb), p) in enumerate(zip(info, pw)):
        lo, hi = max(b, 0), min(b + nloc, n)
        r = p[lo - b:hi - b] if lo < hi else np.zeros(0)
        total[lo:lo + len(r)] += r
        resp.append((t, lo, r, apparent))
        own.append(dict(t=t, lo=lo, r=r, apparent=apparent, folds=folds, nin=nin, nb=nb, pu=pu.get(j), clutter=False))
    # Volume targets: expected density on the gate grid (processed gates
    # only), its expected compressed power, and one complex Gaussian
    # realisation of the scatterers.
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
            keep = (w > 0) & s.processed[k] & (rk > 0)
            beam = np.pi * rk ** 2 * az * el / (8 * math.log(2))
            dens[k[keep]] += (s.k0 / s.noise_w * eta * beam * w / rk ** 4)[keep]
        nz = np.nonzero(dens)[0]
        role = t.get("role", "clutter")
        if len(nz) == 0:
            resp.append((t, 0, np.zeros(0), a0))
            own.append(dict(t=t, lo=0, r=np.zeros(0), apparent=a0, folds=0, nin=0, nb=0, pu=None, clutter=role == "clutter"))
            continue
        lo, hi = nz[0], nz[-1]
        q = dens[lo:hi + 1]
        kern = compress_local(echo(s, m / fs, fd, 1, kl))
        pwv = ss.fftconvolve(q, kern)  # lands on gate lo + t - m
        olo, ohi = max(lo - m, 0), min(hi + nloc - m, n)
        r = pwv[olo - (lo - m):ohi - (lo - m)]
        total[olo:ohi] += r
        resp.append((t, olo, r, a0))
        own.append(dict(t=t, lo=olo, r=r, apparent=a0, folds=0, nin=0, nb=0, pu=None, clutter=role == "clutter"))
        rains.append((lo, q, fd))
        rho_ = np.sqrt(q) * (rng.standard_normal(len(q)) + 1j * rng.standard_normal(len(q))) * math.sqrt(0.5)
        c = ss.fftconvolve(rho_, pulse)
        kk = lo + np.arange(len(c))
        ok = kk < nrec
        x[kk[ok]] += c[ok] * np.exp(2j * np.pi * fd * kk[ok] / fs)
    # Noise, blanking, compression of the record.
    xn = x + (rng.standard_normal(nrec) + 1j * rng.standard_normal(nrec)) * math.sqrt(0.5)
    xn[s.blank] = 0
    y = ss.correlate(xn, ref, mode="full", method="fft")[m - 1:m - 1 + n]
    # The noise correlation rho(m) = sum h[i] conj(h[i+m]) / G, m >= 0.
    span = 2 * (GUARD + TRAIN // 2) + 1
    rho = np.array([np.vdot(ref[j:], ref[:m - j]) for j in range(min(span, m))] + [0] * max(span - m, 0)) / noise_gain
    valid, cnt, alpha, level = cfar_levels(s, total, rho)
    unp = ~s.processed
    profile = db((y.real ** 2 + y.imag ** 2) / noise_gain)
    clean, threshold = db(total), db(level)
    profile[unp] = clean[unp] = threshold[unp] = FLOOR
    # Per-gate full responses of every object (for cells, masked_by and breakthrough).
    def at(o, k):
        """Object o's power at gate k (an int) or gates k (an array)."""
        r, i = o["r"], k - o["lo"]
        if np.isscalar(i):
            return float(r[i]) if 0 <= i < len(r) else 0.0
        ok = (i >= 0) & (i < len(r))
        v = np.zeros(len(i))
        v[ok] = r[i[ok]]
        return v

    # Per target: docs/detection.md §6, §7, §10; detection-probability.md §7.
    rep = []
    rw = s.r
    pdfs = {}
    clutter_at = lambda k: sum(float(at(o, k)) for o in own if o["clutter"])
    for j, o in enumerate(own):
        t = o["t"]
        rec = {"id": t["id"]}
        r = o["r"]
        point = t["kind"] == "point"
        rp = np.where(s.processed[o["lo"]:o["lo"] + len(r)], r, -1.0) if len(r) else r
        pstar, ks = 0.0, None
        if len(rp) and rp.max() > 0:
            jj = int(np.argmax(rp > rp.max() / (1 + 1e-9)))  # the first within 1e-9 of the largest
            pstar, ks = float(r[jj]), o["lo"] + jj
        rec["range_m"] = t["range_m"] if point else (float(s.range_of(ks)) if ks is not None else t["range_start_m"])
        if point:
            outw = not (rw["window_start_m"] <= o["apparent"] <= rw["window_stop_m"])
        else:
            outw = t["range_start_m"] >= s.unamb or ks is None
        touched = o["nb"] > 0
        if outw:
            rec["status"] = "out_of_window"
        elif point and o["folds"] > 0:
            rec["status"] = "folded"
            assert False, "folded targets are not modelled here"
        elif point and touched and (o["nb"] == o["nin"] or pstar == 0):
            rec["status"] = "eclipsed"
        elif pstar == 0:
            rec["status"] = "out_of_window"
        if "status" in rec:
            rep.append(rec)
            continue
        L, Ln, M = float(level[ks]), float(alpha[ks]), int(cnt[ks])
        others = [float(at(q, ks)) for i, q in enumerate(own) if i != j]
        Cc = float(sum(others))
        T = max(L, Cc)
        cl = clutter_at(ks)
        if cl > 1e-10:
            rec["cnr_db"] = 10 * math.log10(cl)
        if o["clutter"]:
            rec["status"] = "clutter"
            rep.append(rec)
            continue
        if cl > 1e-10:
            rec["scr_db"] = 10 * math.log10(pstar / cl)
        if math.isfinite(T):
            rec["threshold_margin_db"] = 10 * math.log10(pstar / T)
        req = s.pd_req
        if point and M > 0:
            # The LFM's noise correlation spans the pulse, so the cell under
            # test shares noise with its training cells: Pd as if the M cells
            # were independent, the raise taken as a ratio to the scene's own
            # noise-only level (detection-probability.md §7).
            if M not in pdfs:
                pdfs[M] = CAPd(M)
            pdf = pdfs[M]
            rec["decided_on"] = "pd"
            pd_noise = float(pdf(pstar)[0])
            pd_scene = float(pdf(pstar, T / Ln)[0])
            pd_status, in_cell = pd_scene, False
            if 0 < Cc < L:
                pd_own = pd_scene  # against L (T = L here) without the echoes
                steady = [math.sqrt(pstar)] + [math.sqrt(v) for i, v in enumerate(others)
                                               if not own[i if i < j else i + 1]["clutter"] and v > 0]
                gauss = sum(v for i, v in enumerate(others) if own[i if i < j else i + 1]["clutter"])
                pd_scene = pd_in_cell(pdf, steady, gauss, L / Ln)
                pd_status = min(pd_scene, pd_own)
                in_cell = pd_own >= req and pd_scene < req
            rec["pd"] = pd_scene
            own_tr = np.nonzero(valid[:, ks])[0]
            l_alone = float(np.mean(1 + at(o, ks + OFFS[own_tr])))
            rec["pd_alone"] = float(pdf(pstar, max(l_alone, 1.0))[0])
            req_db = pdf.required_snr_db(req)
            rec["snr_required_db"] = req_db
            rec["margin_db"] = 10 * math.log10(pstar) - req_db
            rec["detection_range_m"] = t["range_m"] * 10 ** ((10 * math.log10(pstar) - req_db) / 40)
            if pd_status >= req:
                st = "detected"
            elif touched and o["pu"] and float(pdf(o["pu"])[0]) >= req:
                st = "eclipsed"
            elif pd_noise < req:
                st = "too_weak"
            else:
                st = "masked"
        else:  # distributed targets of role target: the threshold decides
            rec["decided_on"] = "threshold"
            in_cell = False
            if pstar >= T:
                st = "detected"
            elif touched and o["pu"] and o["pu"] >= Ln:
                st = "eclipsed"
            elif pstar < Ln:
                st = "too_weak"
            else:
                st = "masked"
        rec["status"] = st
        if st == "masked":
            if Cc >= L or in_cell:
                contrib = [float(at(q, ks)) if i != j else -1.0 for i, q in enumerate(own)]
            else:
                cells = ks + OFFS[valid[:, ks]]
                contrib = [float(np.sum(at(q, cells))) for q in own]
            best = int(np.argmax(contrib))
            if contrib[best] > 0:
                rec["masked_by"] = own[best]["t"]["id"]
        if st in ("eclipsed",):
            rec.pop("threshold_margin_db", None)
        rep.append(rec)
    # Clutter breakthrough: gates where the dominant object is clutter and
    # the scene's power reaches the level.
    # Only gates where some clutter object has power can break through.
    cols = np.unique(np.concatenate([o["lo"] + np.nonzero(o["r"] > 0)[0] for o in own if o["clutter"]] + [np.zeros(0, int)]))
    allp = np.array([at(o, cols) for o in own]).reshape(len(own), len(cols))
    dom = np.argmax(allp, axis=0)  # the first on ties
    isc = np.array([o["clutter"] for o in own])
    br = s.processed[cols] & (allp.max(axis=0) > 0) & isc[dom] & (total[cols] >= level[cols])
    for i, (rec, o) in enumerate(zip(rep, own)):
        if o["clutter"] and rec["status"] == "clutter":
            rec["breakthrough_cells"] = int(np.count_nonzero(br & (dom == i)))
    return {"x": x, "ref": ref, "noise_gain": noise_gain, "profile": profile, "clean": clean,
            "threshold": threshold, "targets": rep, "resp": resp, "total": total,
            "points": points, "rains": rains, "pulse": pulse}


CHECKED = {  # report field: absolute tolerance (dB fields in dB, pd as a probability, range in m)
    "range_m": 1e-6, "threshold_margin_db": 1e-6, "margin_db": 1e-6, "snr_required_db": 1e-6,
    "detection_range_m": 1e-3, "cnr_db": 1e-6, "scr_db": 1e-6, "pd": 2e-6, "pd_alone": 2e-6}


def check_evaluate(s, res, go_dir):
    """Compare with the Go side's series and report; returns a dict of figures."""
    d = {}
    ge = np.fromfile(go_dir + "/go_echo.cf64", dtype="<c16")
    gp, gc, gt = (np.fromfile(go_dir + "/go_%s_db.f64" % k, dtype="<f8") for k in ("profile", "clean", "threshold"))
    m = len(res["ref"])
    assert len(ge) == s.nrec, "gobench's record has %d samples, the documents say %d" % (len(ge), s.nrec)
    # 1. Compression: the Go profile against scipy on the Go record.
    y = ss.correlate(ge, res["ref"], mode="full", method="fft")[m - 1:m - 1 + s.n]
    p = db((y.real ** 2 + y.imag ** 2) / res["noise_gain"])
    p[~s.processed] = FLOOR
    d["profile_max_db_err"] = float(np.max(np.abs(p - gp)[gp > -60]))
    # 2. Noise-free scene and CFAR threshold.
    d["clean_max_db_err"] = float(np.max(np.abs(res["clean"] - gc)[gc > -60]))
    d["threshold_max_db_err"] = float(np.max(np.abs(res["threshold"] - gt)))
    # 3. Echo synthesis: Go record minus our noise-free record is unit-power
    # noise away from the rain (whose realisation differs by generator) and
    # the blanked samples, and compressing it leaves no target behind.
    keep = ~s.blank.copy()
    for t, lo, r, _ in res["resp"]:
        if t["kind"] != "point":
            keep[max(lo - 2 * m, 0):lo + len(r) + 2 * m] = False
    resid = ge - res["x"]
    resid[s.blank] = 0
    z = ss.correlate(resid, res["ref"], mode="full", method="fft")[m - 1:m - 1 + s.n]
    zp = (z.real ** 2 + z.imag ** 2) / res["noise_gain"]
    d["residual_power"] = float(np.mean(np.abs(resid[keep]) ** 2))
    d["residual_peak_db"] = float(10 * np.log10(np.max(zp[keep[:s.n]])))
    # 4. Per target, field by field: status, decided_on, masked_by exactly;
    # the figures of CHECKED within their tolerances; a field present on
    # one side only is a mismatch.
    gt_ = {t["id"]: t for t in json.load(open(go_dir + "/go_targets.json"))}
    bad, worst = [], {}
    for t in res["targets"]:
        g = dict(gt_[t["id"]])
        if "breakthrough" in g:
            g["breakthrough_cells"] = g["breakthrough"]["cells"]
        for f in ("status", "decided_on", "masked_by", "breakthrough_cells"):
            if g.get(f) != t.get(f):
                bad.append("%s.%s go %s ref %s" % (t["id"], f, g.get(f), t.get(f)))
        for f, tol in CHECKED.items():
            if (f in g) != (f in t):
                bad.append("%s.%s go %s ref %s" % (t["id"], f, g.get(f), t.get(f)))
            elif f in g:
                e = abs(g[f] - t[f])
                worst[f] = max(worst.get(f, 0.0), e)
                if e > tol:
                    bad.append("%s.%s go %r ref %r" % (t["id"], f, g[f], t[f]))
    d["targets_checked"] = len(res["targets"])
    d["targets_mismatched"] = bad
    d["fields_max_err"] = {f: float("%.3g" % v) for f, v in worst.items()}
    d["check_ok"] = bool(d["profile_max_db_err"] < 1e-6 and d["clean_max_db_err"] < 1e-6 and
                         d["threshold_max_db_err"] < 1e-6 and 0.95 < d["residual_power"] < 1.05 and
                         d["residual_peak_db"] < 16 and not bad)
    return d


def evaluate_cmd(scene, reps, go_dir=None):
    s = Setup(json.load(open(scene)))
    # The report's Pd here is a steady target's (the trials draw fluctuations themselves).
    assert all(t.get("fluctuation", "none") == "none" for t in s.targets)
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
    targets' powers (each keeps the carrier phase its range gives) and a
    new realisation of each volume target's scatterers, compressed and tested by the CA-CFAR. A target is
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
            # Each fluctuating echo's power is drawn; its carrier phase is
            # the one its range gives (f holds it), as the trials define a
            # single pulse's trial (the page's window for the trial's seed).
            # Echoes sharing a cell keep their relative phase: a uniform
            # phase here is Go's --random-phase, another model.
            for f, fl in self.fluct:
                if fl in ("swerling1", "swerling2"):  # exponential power, mean 1
                    g = np.sqrt(rng.exponential(1.0, B))
                else:  # chi-square with 4 degrees of freedom, mean 1
                    g = np.sqrt(rng.gamma(2.0, 0.5, B))
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
