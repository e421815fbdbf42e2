#!/usr/bin/python3
"""Independent NumPy/SciPy model of Pulsewright's waveform figures and
single-pulse scene reports, written from the definitions (docs/figures.md,
docs/detection.md, the scenario and report formats), not from the Go code.

Conventions (the format's):
  * u(t), 0 <= t < tau, t from the leading edge; a Doppler shift f_d
    multiplies an echo by exp(+j 2 pi f_d t), f_d = -2 range_rate / lambda.
  * the filter output for an echo x is chi(D) = int x(t + D) conj(h(t)) dt
    (the correlation convention: an echo whose leading edge is at delay d
    peaks at output delay d, shifted by the filter's lead for mismatched
    filters).
  * waveform figures are continuous-time: rect-chip codes with chip-constant
    filters are evaluated exactly (chi is linear between chip lags); every
    other waveform/filter on a fine midpoint grid (MODEL_SPB samples per 1/B,
    far finer than the engine's internal rate) with the lags on the grid.

Usage as a library: figures(scenario) -> dict of waveform report fields,
scene(scenario) -> dict of target report fields. Run directly on a scenario
file to print both.
"""
import json
import math
import os
import sys

import numpy as np
import scipy
import scipy.signal
from scipy.optimize import linprog, minimize_scalar
from scipy.special import i0

C = 299792458.0
KB = 1.380649e-23
T0 = 290.0
HERE = os.path.dirname(os.path.abspath(__file__))

# Fine-grid density of the model for non-exact cases (samples per 1/B).
MODEL_SPB = 32
# A response level below this fraction of the peak (power) counts as a null
# (docs/figures.md §3: 1e-9 of the peak magnitude on the exact path, 1e-5 on
# the interpolated one).
NULL_REL = 1e-18
EXACT_NULL = 1e-18
GRID_NULL = 1e-10

# ---------------------------------------------------------------- codes

BARKER = {  # Richards 2014 p. 304; Levanon & Mozeson 2004 Table 6.1
    2: "+-", 3: "++-", 4: "++-+", 5: "+++-+", 7: "+++--+-",
    11: "+++---+--+-", 13: "+++++--++-+-+",
}

# Optimal peak sidelobe of binary codes by length (Richards 2014 p. 309,
# citing Keel 2010; Nunn & Coxson for PSL 4 up to N = 82).
def mps_optimum(n):
    if n in (2, 3, 4, 5, 7, 11, 13):
        return 1
    if n in (6, 8, 9, 10, 12) or 14 <= n <= 21 or n in (25, 28):
        return 2
    if 22 <= n <= 24 or n in (26, 27) or 29 <= n <= 48 or n == 51:
        return 3
    if n in (49, 50) or 52 <= n <= 82:
        return 4
    return 5


def _binary(s):
    return np.array([0.0 if ch == "+" else math.pi for ch in s])


def _hex_phases(hx, n):
    v = int(hx, 16)
    bits = [(v >> (n - 1 - i)) & 1 for i in range(n)]
    return np.array([0.0 if b else math.pi for b in bits])


_MPS = None


def mps(n):
    global _MPS
    if _MPS is None:
        with open(os.path.join(HERE, "mps_codes.json")) as f:
            _MPS = json.load(f)["codes"]
    e = _MPS[str(n)]
    ph = _hex_phases(e["hex"], n)
    c = np.exp(1j * ph)
    r = np.correlate(c, c, "full")
    psl = np.abs(r[:n - 1]).max() if n > 1 else 0
    assert round(psl) == mps_optimum(n), ("mps table", n, psl)
    return ph


# XAPP052 (Alfke 1996) Table 3 taps: b[k] = XOR_{t in taps} b[k - t],
# all-ones start; bit b -> phase b*pi.
MLS_TAPS = {2: [2, 1], 3: [3, 2], 4: [4, 3], 5: [5, 3], 6: [6, 5], 7: [7, 6],
            8: [8, 6, 5, 4], 9: [9, 5], 10: [10, 7], 11: [11, 9],
            12: [12, 6, 4, 1], 13: [13, 4, 3, 1], 14: [14, 5, 3, 1],
            15: [15, 14], 16: [16, 15, 13, 4]}


def mls(deg):
    n = 2 ** deg - 1
    taps = MLS_TAPS[deg]
    b = [1] * deg
    for k in range(deg, n):
        v = 0
        for t in taps:
            v ^= b[k - t]
        b.append(v)
    b = np.array(b[:n])
    ph = b * math.pi
    # property check: two-valued periodic autocorrelation
    c = np.exp(1j * ph)
    pr = np.fft.ifft(np.abs(np.fft.fft(c)) ** 2).real
    assert abs(pr[0] - n) < 1e-6 and np.all(np.abs(pr[1:] + 1) < 1e-6), ("mls", deg)
    return ph


def frank(n):  # Frank 1963: phi = 2 pi p q / M
    m = int(round(math.sqrt(n)))
    p, q = np.divmod(np.arange(n), m)
    return 2 * math.pi * p * q / m


def p1(n):  # Lewis & Kretschmer 1982
    m = int(round(math.sqrt(n)))
    j, i = np.divmod(np.arange(n), m)
    j, i = j + 1, i + 1
    return -(math.pi / m) * (m - (2 * j - 1)) * ((j - 1) * m + (i - 1))


def p2(n):  # Lewis & Kretschmer 1982
    m = int(round(math.sqrt(n)))
    j, i = np.divmod(np.arange(n), m)
    j, i = j + 1, i + 1
    return ((math.pi / 2) * (m - 1) / m - (math.pi / m) * (i - 1)) * (m + 1 - 2 * j)


def p3(n):  # Lewis & Kretschmer 1981
    i = np.arange(n)
    return math.pi * i * i / n


def p4(n):
    i = np.arange(n)
    return math.pi * i * i / n - math.pi * i


def zadoff_chu(n, u):  # Chu 1972, q = 0
    k = np.arange(n)
    return -math.pi * u * k * (k + (n % 2)) / n


def welch_costas(n):  # Welch construction, smallest primitive root
    p = n + 1
    for g in range(2, p):
        if len({pow(g, i, p) for i in range(1, p)}) == p - 1:
            break
    else:
        g = 1  # p = 2
    return np.array([pow(g, i, p) - 1 for i in range(1, p)])


def code_phases(w):
    k = w["kind"]
    if k == "barker":
        return _binary(BARKER[w["length"]])
    if k == "mps":
        return mps(w["length"])
    if k == "mls":
        return mls(w["degree"])
    if k == "frank":
        return frank(w["length"])
    if k == "p1":
        return p1(w["length"])
    if k == "p2":
        return p2(w["length"])
    if k == "p3":
        return p3(w["length"])
    if k == "p4":
        return p4(w["length"])
    if k == "zadoff_chu":
        return zadoff_chu(w["length"], w["root"])
    if k == "phase_code":
        if w.get("binary"):
            return _binary(w["binary"])
        return np.radians(np.array(w["phases_deg"], float))
    raise ValueError(k)


PHASE_CODES = ("barker", "mps", "mls", "frank", "p1", "p2", "p3", "p4", "zadoff_chu", "phase_code")

# ---------------------------------------------------------------- waveform


class Wave:
    """The transmitted pulse: tau, B, and either rect chips (chips, tc) or a
    function u(t)."""

    def __init__(self, w):
        self.kind = k = w["kind"]
        self.chips = None
        if k == "rect":
            self.tau = w["pulse_width_s"]
            self.B = 1 / self.tau
            self.chips = np.ones(1, complex)
            self.tc = self.tau
        elif k in ("lfm", "nlfm"):
            self.tau = w["pulse_width_s"]
            self.B = w["bandwidth_hz"]
            if k == "lfm":
                s = -1.0 if w.get("sweep", "up") == "down" else 1.0
                kk = s * self.B / self.tau
                tau = self.tau
                self.u = lambda t: np.exp(1j * math.pi * kk * (t - tau / 2) ** 2)
            else:
                self.nlfm = NLFM(self.tau, self.B, w.get("design_sidelobe_db", -40.0))
                self.u = self.nlfm.at
        elif k == "costas":
            n = w["length"]
            self.tc = w["chip_s"]
            self.tau = n * self.tc
            self.B = n / self.tc
            order = welch_costas(n)
            f = (order - (n - 1) / 2) / self.tc
            tc = self.tc

            def u(t, f=f, n=n, tc=tc):
                i = np.clip(np.floor(t / tc + 1e-12).astype(int), 0, n - 1)
                return np.exp(2j * math.pi * f[i] * t)
            self.u = u
            self.order = order
        else:
            ph = code_phases(w)
            self.chips = np.exp(1j * ph)
            self.tc = w["chip_s"]
            self.tau = len(ph) * self.tc
            self.B = 1 / self.tc

    def sample_mid(self, fs, n):
        """u at the midpoints (m + 1/2)/fs, m = 0..n-1 (n = tau*fs)."""
        t = (np.arange(n) + 0.5) / fs
        if self.chips is not None:
            idx = np.minimum((np.arange(n) * len(self.chips)) // n, len(self.chips) - 1)
            return self.chips[idx]
        return self.u(t)


class NLFM:
    """Stationary-phase NLFM as documented on dsp.NLFM: Taylor taper W over
    -B/2..B/2 (n̄ = ceil(2A²+1/2) bounded 4..12), group delay T(f) = tau *
    cumint(W)/int(W), inverted to f(t), phase = 2 pi int f dt, zero at the
    centre. For B tau <= 2000 the taper is deepened in 2.5 dB steps (up to
    15 dB) until the matched-filter PSLR (autocorrelation sampled at 4B)
    reaches the design level."""

    def __init__(self, tau, B, sll):
        self.tau, self.B, self.sll = tau, B, sll
        bt = B * tau
        self.taper = sll
        if bt > 2000:
            self._build(sll)
            return
        # Stopping rule documented on dsp.NLFM: try design, design - 2.5 dB,
        # ... (at most 6 steps, never below -70 dB); stop at the first whose
        # PSLR (autocorrelation sampled at 4B) reaches the design; if none
        # does, keep the shallowest whose PSLR is within 0.5 dB of the best.
        trials = []
        for step in range(7):
            taper = sll - 2.5 * step
            if taper < -70:
                break
            self._build(taper)
            p = self._pslr4()
            trials.append((taper, p))
            if p <= sll:
                break
        pick = trials[-1]
        if pick[1] > sll:
            best = min(p for _, p in trials)
            pick = next(tr for tr in trials if tr[1] <= best + 0.5)
        if pick[0] != trials[-1][0]:
            self._build(pick[0])
        self.taper = pick[0]

    def _build(self, taper_db):
        a = math.acosh(10 ** (abs(taper_db) / 20)) / math.pi
        nbar = min(max(math.ceil(2 * a * a + 0.5), 4), 12)
        self.nbar = nbar
        nf = 20001
        f = np.linspace(-self.B / 2, self.B / 2, nf)
        W = taylor_cont(nbar, taper_db, (f + self.B / 2) / self.B)
        cum = np.concatenate([[0], np.cumsum((W[1:] + W[:-1]) / 2)])
        T = self.tau * cum / cum[-1]
        npts = max(int(16 * self.B * self.tau), 4096) + 1
        self.t = np.linspace(0, self.tau, npts)
        self.f = np.interp(self.t, T, f)
        dt = self.t[1] - self.t[0]
        ph = np.concatenate([[0], np.cumsum((self.f[1:] + self.f[:-1]) / 2 * dt)]) * 2 * math.pi
        ph -= np.interp(self.tau / 2, self.t, ph)
        self.ph = ph

    def at(self, t):
        # cubic Hermite on the phase with f as derivative
        t = np.asarray(t, float)
        dt = self.t[1] - self.t[0]
        i = np.clip(np.floor(t / dt).astype(int), 0, len(self.t) - 2)
        s = t / dt - i
        p0, p1_ = self.ph[i], self.ph[i + 1]
        d0, d1 = 2 * math.pi * self.f[i] * dt, 2 * math.pi * self.f[i + 1] * dt
        h00 = 2 * s ** 3 - 3 * s ** 2 + 1
        h10 = s ** 3 - 2 * s ** 2 + s
        h01 = -2 * s ** 3 + 3 * s ** 2
        h11 = s ** 3 - s ** 2
        return np.exp(1j * (h00 * p0 + h10 * d0 + h01 * p1_ + h11 * d1))

    def _pslr4(self):
        # sampled at exactly fs = 4B, ceil(tau fs) samples (dsp.SampleLen)
        fs = 4 * self.B
        x = self.tau * fs
        n = int(round(x)) if abs(x - round(x)) <= 1e-9 * x else int(math.ceil(x))
        u = self.at(np.arange(n) / fs)
        r = np.abs(scipy.signal.fftconvolve(u, np.conj(u[::-1])))
        c = n - 1
        k = c
        while k + 1 < len(r) and r[k + 1] < r[k]:
            k += 1
        side = r[k:].max() if k < len(r) else 0
        return 20 * math.log10(side / r[c])


# ---------------------------------------------------------------- windows


def taylor_fm(nbar, sll):
    """Taylor coefficients F_m, m = 1..nbar-1 (scipy.signal.windows.taylor's
    construction, Taylor 1955)."""
    B = 10 ** (-sll / 20)
    A = math.acosh(B) / math.pi
    s2 = nbar ** 2 / (A ** 2 + (nbar - 0.5) ** 2)
    ma = np.arange(1, nbar)
    Fm = np.empty(nbar - 1)
    signs = np.empty_like(ma)
    signs[::2] = 1
    signs[1::2] = -1
    m2 = ma * ma
    for mi in range(len(ma)):
        numer = signs[mi] * np.prod(1 - m2[mi] / s2 / (A ** 2 + (ma - 0.5) ** 2))
        denom = 2 * np.prod(1 - m2[mi] / m2[:mi]) * np.prod(1 - m2[mi] / m2[mi + 1:])
        Fm[mi] = numer / denom
    return Fm


def taylor_cont(nbar, sll, x):
    Fm = taylor_fm(nbar, sll)
    m = np.arange(1, nbar)
    w = 1 + 2 * np.cos(2 * math.pi * np.outer(np.asarray(x) - 0.5, m)) @ Fm
    return w / (1 + 2 * Fm.sum())


def window_cont(win, x):
    """Continuous window at x = t/tau in [0, 1] (the large-N limit of the
    symmetric N-point window at x = n/(N-1)), peak 1."""
    k = win.get("kind", "none")
    x = np.asarray(x, float)
    c = lambda m: np.cos(2 * math.pi * m * x)
    if k == "none":
        return np.ones_like(x)
    if k == "hann":
        return 0.5 - 0.5 * c(1)
    if k == "hamming":
        return 0.54 - 0.46 * c(1)
    if k == "blackman":
        return 0.42 - 0.5 * c(1) + 0.08 * c(2)
    if k == "blackman_harris":
        return 0.35875 - 0.48829 * c(1) + 0.14128 * c(2) - 0.01168 * c(3)
    if k == "taylor":
        return taylor_cont(win.get("nbar", 5), win.get("sidelobe_db", -35.0), x)
    if k == "kaiser":
        b = win.get("beta", 6.0)
        return i0(b * np.sqrt(np.maximum(0, 1 - (2 * x - 1) ** 2))) / i0(b)
    if k == "gaussian":
        s = win.get("sigma", 0.4)
        return np.exp(-0.5 * ((x - 0.5) * 2 / s) ** 2)
    raise ValueError(k)


def window_samples(win, n, wave=None):
    """The window over n samples of the fine grid (midpoints). Chebyshev:
    the symmetric n_i-point window of the engine's interpolated grid
    (fs_i = max(8B, 64/tau), n_i = ceil(tau fs_i)), sample i held over its
    interval [i/n_i, (i+1)/n_i) of x = t/tau (docs/figures.md §4.3: the
    engine's n_i midpoint samples are a midpoint rule for exactly that
    held window). Not interpolated linearly: a Chebyshev window of a few
    hundred points and more ends in narrow spikes, whose energy linear
    interpolation onto a finer grid changes (0.12 dB of mismatch loss for
    an NLFM of B tau = 190 at -35 dB)."""
    x = (np.arange(n) + 0.5) / n
    if win.get("kind") == "chebyshev":
        # the engine's n_i = ceil(max(8 B tau, 64)) midpoint samples carry
        # the symmetric n_i-point window (docs/figures.md §4.3)
        ni = int(math.ceil(max(8 * wave.B * wave.tau, 64) - 1e-9))
        cw = scipy.signal.windows.chebwin(ni, at=-win.get("sidelobe_db", -50.0), sym=True)
        return cw[np.minimum((x * ni).astype(int), ni - 1)]
    return window_cont(win, x)


# ---------------------------------------------------------------- filters


def full_matrix(code, length):
    n = len(code)
    rows = n + length - 1
    a = np.zeros((rows, length), complex)
    for r in range(rows):
        for i in range(length):
            k = r - (length - 1) + i
            if 0 <= k < n:
                a[r, i] = code[k]
    return a


def ls_taps(code, length):
    """Least-squares mismatched filter, one tap per chip: g = argmin
    ||A g - e||², e a unit delta at row (N+L-2)//2; returns (g, lead) where
    the filter output is y = A g and h = conj(g)."""
    a = full_matrix(code, length)
    centre = (len(code) + length - 2) // 2
    e = np.zeros(a.shape[0], complex)
    e[centre] = 1
    g = np.linalg.lstsq(a, e, rcond=None)[0]
    return g, length - 1 - centre


def minimax_taps(code, length, faces=128):
    """Peak-sidelobe-optimal filter by linear programming (HiGHS): minimise t
    with |y_r| <= t off the centre row, y_centre = 1. Real codes: exact
    constraints; complex codes: |y_r| bounded by a regular polygon."""
    a = full_matrix(code, length)
    rows = a.shape[0]
    c = (len(code) + length - 2) // 2
    real = np.all(np.abs(code.imag) < 1e-12)
    side = [r for r in range(rows) if r != c]
    if real:
        ar = a.real
        nv = length + 1
        A1 = np.hstack([ar[side], -np.ones((len(side), 1))])
        A2 = np.hstack([-ar[side], -np.ones((len(side), 1))])
        aub = np.vstack([A1, A2])
        aeq = [np.append(ar[c], 0)]
        beq = [1]
    else:
        nv = 2 * length + 1
        re = np.hstack([a.real, -a.imag])
        im = np.hstack([a.imag, a.real])
        blocks = []
        for f in range(faces):
            th = 2 * math.pi * f / faces
            blocks.append(np.hstack([math.cos(th) * re[side] + math.sin(th) * im[side],
                                     -np.ones((len(side), 1))]))
        aub = np.vstack(blocks)
        aeq = [np.append(re[c], 0), np.append(im[c], 0)]
        beq = [1, 0]
    cost = np.zeros(nv)
    cost[-1] = 1
    res = linprog(cost, A_ub=aub, b_ub=np.zeros(aub.shape[0]), A_eq=np.array(aeq), b_eq=beq,
                  bounds=[(None, None)] * nv, method="highs")
    assert res.success, res.message
    x = res.x
    g = x[:length] + (1j * x[length:2 * length] if not real else 0)
    return g, length - 1 - c


class Filter:
    """The receive filter h(t) for a Wave: chip taps g (h = conj(g) per
    chip, starting lead chips before the code) or a function."""

    def __init__(self, wave, rx):
        self.wave = wave
        self.kind = rx.get("filter", "matched")
        self.win = rx.get("window", {"kind": "none"})
        self.lead = 0
        self.taps = None  # chip taps of h (conjugated already: h value per chip)
        if self.kind == "matched":
            if wave.chips is not None and self.win.get("kind", "none") == "none":
                self.taps = wave.chips.copy()
        else:
            L = rx.get("filter_length_factor", 3) * len(wave.chips)
            fn = ls_taps if self.kind == "least_squares" else minimax_taps
            g, self.lead = fn(wave.chips, L)
            self.taps = np.conj(g)
        self.exact = self.taps is not None and wave.chips is not None


# ---------------------------------------------------------------- responses


def exact_response(c, h):
    """chi at segment lags for segment-constant u (values c) and h (values
    h): chi(m ts) = ts * r_m, r_m = sum_i c[m + i] conj(h_i); returns (lags
    (segments), r), zero-padded one lag beyond each end."""
    # full correlation y[k] = sum_i c[k+i] conj(h[i]), k = -(L-1)..N-1
    r = scipy.signal.correlate(c, h, "full", method="direct" if len(c) * len(h) < 4e6 else "fft")
    lags = np.arange(-(len(h) - 1), len(c))
    # pad zero at both ends (chi goes to zero linearly beyond)
    r = np.concatenate([[0], r, [0]])
    lags = np.concatenate([[lags[0] - 1], lags, [lags[-1] + 1]])
    return lags, r


def grid_setup(wave, spb=MODEL_SPB, win=None):
    """Fine midpoint grid: fs and number of samples n = tau*fs (an integer
    number of samples per chip for codes and Costas hops)."""
    if wave.chips is not None or wave.kind == "costas":
        nchips = len(wave.chips) if wave.chips is not None else len(wave.order)
        spc = max(int(math.ceil(spb * wave.B * wave.tc)), 8)
        if nchips * spc > 400000:
            spc = max(8, 400000 // nchips)
        return spc / wave.tc, nchips * spc
    n = int(math.ceil(spb * wave.B * wave.tau))
    if win is not None and win.get("kind") == "chebyshev":
        # a whole number of fine samples per held Chebyshev sample
        # (window_samples), so that the held window is exact on the grid
        ni = int(math.ceil(max(8 * wave.B * wave.tau, 64) - 1e-9))
        n = ni * max(1, -(-n // ni))
    n = min(n, 2 ** 20)
    return n / wave.tau, n


def filter_samples(wave, filt, fs, n):
    """h on the fine grid; returns (h, lead_samples)."""
    if filt.taps is not None:
        spc = n // (len(wave.chips))
        return np.repeat(filt.taps, spc), filt.lead * spc
    u = wave.sample_mid(fs, n)
    return u * window_samples(filt.win, n, wave), 0


def grid_response(wave, filt, fd=0.0, spb=MODEL_SPB):
    """chi on the fine grid at lags k/fs; returns (delay s, chi), chi in
    units of seconds (int dt)."""
    fs, n = grid_setup(wave, spb, getattr(filt, "win", None))
    u = wave.sample_mid(fs, n)
    if fd:
        u = u * np.exp(2j * math.pi * fd * (np.arange(n) + 0.5) / fs)
    h, lead = filter_samples(wave, filt, fs, n)
    y = scipy.signal.correlate(u, h, "full", method="fft") / fs
    k = np.arange(-(len(h) - 1), n) + lead
    return k / fs, y


def _first_min(p, i0, step, tol):
    """Walk from peak index i0 in direction step while p decreases; returns
    the index of the first local minimum (or null)."""
    i = i0
    n = len(p)
    while 0 <= i + step < n:
        if p[i] <= tol:
            return i
        if p[i + step] > p[i]:
            return i
        i += step
    return i


def _parabola(y, i):
    if 0 < i < len(y) - 1:
        a, b, c = y[i - 1], y[i], y[i + 1]
        d = a - 2 * b + c
        if d < 0:
            off = 0.5 * (a - c) / d
            return i + off, b - 0.25 * (a - c) * off
    return float(i), y[i]


def figures_grid(wave, filt):
    t, y = grid_response(wave, filt)
    p = np.abs(y) ** 2
    a = np.abs(y)
    ip = int(np.argmax(p))
    _, apk = _parabola(a, ip)
    ppk = apk ** 2
    tol = NULL_REL * ppk
    lo = _first_min(p, ip, -1, tol)
    hi = _first_min(p, ip, 1, tol)
    dt = t[1] - t[0]
    out = {}
    side = np.concatenate([p[:lo], p[hi + 1:]])
    if side.size and side.max() > GRID_NULL * ppk:
        # peak sidelobe refined by parabola on |chi|
        j = int(np.argmax(np.where((np.arange(len(p)) < lo) | (np.arange(len(p)) > hi), p, -1)))
        _, sa = _parabola(a, j)
        out["pslr_db"] = 20 * math.log10(sa / apk)
        main = np.trapz(p[lo:hi + 1], dx=dt)
        total = np.trapz(p, dx=dt)
        out["islr_db"] = 10 * math.log10((total - main) / main)
    half = ppk / 2
    # half-power crossing by linear interpolation of |chi|² (refined to a
    # local quadratic where the slope bends)
    def cross(step):
        i = ip
        while p[i + step] >= half:
            i += step
        x0, x1 = p[i], p[i + step]
        return i + step * (x0 - half) / (x0 - x1)
    w = (cross(1) - cross(-1)) * dt
    out["mainlobe_3db_m"] = w * C / 2
    Eu = wave.tau
    fs, n = grid_setup(wave, win=getattr(filt, "win", None))
    h, _ = filter_samples(wave, filt, fs, n)
    Eh = np.sum(np.abs(h) ** 2) / fs
    out["mismatch_loss_db"] = max(0.0, 10 * math.log10(Eu * Eh / ppk))
    out["_peak_delay_s"] = t[ip]
    return out


def held(wave, filt):
    """Segment-constant (held) form of u and h: (u values, h values,
    segment length s, lead in segments). Exact for rect-chip codes with
    chip-constant filters; for windowed codes the window is held over
    sub-chip segments of K per chip (the model's K is finer than the
    engine's, except for Chebyshev, which has no continuous form and is
    evaluated as the engine defines it: the symmetric N·K-point window with
    K = max(8, ceil(256/N)))."""
    if filt.taps is not None:
        return wave.chips, filt.taps, wave.tc, filt.lead
    n = len(wave.chips)
    if filt.win.get("kind") == "chebyshev":
        k = max(8, math.ceil(256 / n))
        u = np.repeat(wave.chips, k)
        w = scipy.signal.windows.chebwin(n * k, at=-filt.win.get("sidelobe_db", -50.0), sym=True)
    else:
        k = max(64, math.ceil(4096 / n))
        k = min(k, max(8, 200000 // n))
        u = np.repeat(wave.chips, k)
        w = window_cont(filt.win, (np.arange(n * k) + 0.5) / (n * k))
    return u, u * w, wave.tc / k, 0


def figures_exact(wave, filt):
    c, h, tc, lead = held(wave, filt)
    lags, r = exact_response(c, h)
    p = np.abs(r) ** 2
    ip = int(np.argmax(p))
    ppk = p[ip]
    tol = EXACT_NULL * ppk

    def seg_min(a, b):
        """minimiser s in [0,1] of |a + (b-a)s|²."""
        d = b - a
        dd = abs(d) ** 2
        if dd == 0:
            return 0.0
        return min(1.0, max(0.0, -(a.conjugate() * d).real / dd))

    def edge(step):
        """continuous main-lobe edge: (index of the near point of the segment
        holding the minimum, s in [0,1])."""
        i = ip
        while 0 <= i + step < len(r):
            if p[i] <= tol:
                return i, 0.0
            s = seg_min(r[i], r[i + step])
            if s < 1.0:
                return i, s
            i += step
        return i, 0.0

    lo_i, lo_s = edge(-1)
    hi_i, hi_s = edge(1)
    out = {}

    def seg_int(a, b, s0=0.0, s1=1.0):
        """int_{s0}^{s1} |a + (b-a)s|² ds."""
        d = b - a
        A = abs(d) ** 2
        Bc = 2 * (a.conjugate() * d).real
        Cc = abs(a) ** 2
        F = lambda s: A * s ** 3 / 3 + Bc * s ** 2 / 2 + Cc * s
        return F(s1) - F(s0)

    total = sum(seg_int(r[i], r[i + 1]) for i in range(len(r) - 1))
    # main lobe integral from lo edge to hi edge
    main = 0.0
    # lo side: segment (lo_i -> lo_i-1) holds the edge at s=lo_s from lo_i
    i = lo_i
    main += seg_int(r[i], r[i - 1], 0, lo_s) if lo_s > 0 else 0.0
    main += sum(seg_int(r[j], r[j + 1]) for j in range(lo_i, hi_i))
    main += seg_int(r[hi_i], r[hi_i + 1], 0, hi_s) if hi_s > 0 else 0.0
    # sidelobe peak: the chip lags outside the main lobe (|chi|² is convex on
    # each segment, so its maximum lies on a chip lag)
    idx = np.arange(len(r))
    outside = (idx < lo_i - (1 if lo_s > 0 else 0)) | (idx > hi_i + (1 if hi_s > 0 else 0))
    # the far ends of the edge segments are outside too
    if lo_s > 0:
        outside[lo_i - 1] = True
    if hi_s > 0:
        outside[hi_i + 1] = True
    side = p[outside]
    if side.size and side.max() > tol:
        out["pslr_db"] = 10 * math.log10(side.max() / ppk)
        out["islr_db"] = 10 * math.log10(max(total - main, 0) / main) if total - main > 0 else None
        if out["islr_db"] is None:
            del out["islr_db"]
    half = ppk / 2

    def cross(step):
        i = ip
        while p[i + step] >= half:
            i += step
        a, b = r[i], r[i + step]
        d = b - a
        A = abs(d) ** 2
        Bc = 2 * (a.conjugate() * d).real
        Cc = abs(a) ** 2 - half
        if A == 0:
            s = 0.0
        else:
            disc = math.sqrt(max(Bc * Bc - 4 * A * Cc, 0))
            cands = [(-Bc + disc) / (2 * A), (-Bc - disc) / (2 * A)]
            cands = [s for s in cands if -1e-12 <= s <= 1 + 1e-12]
            s = min(cands) if cands else (a.real and 0.5)
        return i + step * s

    w = (cross(1) - cross(-1)) * tc
    out["mainlobe_3db_m"] = w * C / 2
    N = len(c)
    Eh = np.sum(np.abs(h) ** 2)
    out["mismatch_loss_db"] = max(0.0, 10 * math.log10(N * Eh / ppk))
    out["_peak_delay_s"] = (lags[ip] + lead) * tc
    return out


def waveform_figures(sc):
    """The waveform report fields of scenario sc (decoded defaults filled)."""
    w = sc["waveform"]
    wave = Wave(w)
    filt = Filter(wave, sc.get("receiver", {}))
    f = figures_exact(wave, filt) if wave.chips is not None else figures_grid(wave, filt)
    radar = sc.get("radar", {})
    pri = radar.get("pri_s", 1e-3)
    lam = C / radar.get("carrier_hz", 9.5e9)
    out = {
        "kind": w["kind"],
        "pulse_width_s": wave.tau,
        "bandwidth_hz": wave.B,
        "time_bandwidth": wave.B * wave.tau,
        "compression_gain_db": 10 * math.log10(wave.B * wave.tau),
        "blind_range_m": C * wave.tau / 2,
        "unambiguous_range_m": C * pri / 2,
        "unambiguous_velocity_mps": lam / (4 * pri),
    }
    out.update({k: v for k, v in f.items() if not k.startswith("_")})
    fs = radar.get("sample_rate_hz") or 2 * wave.B
    if wave.B * wave.tau * fs / wave.B <= 4096 * 8:
        mx, mn = straddle(wave, filt, fs, out["mismatch_loss_db"])
        out["straddle_loss_max_db"] = mx
        out["straddle_loss_mean_db"] = mn
    return out, wave, filt


# ---------------------------------------------------------------- Doppler


def doppler_response(wave, filt, fd):
    """(loss dB >= 0, shift s) of the continuous cross-ambiguity: peak of
    |chi(D, fd)| over D against the zero-Doppler peak, and where it sits."""
    if fd == 0:
        return 0.0, 0.0
    t0, y0 = grid_response(wave, filt, 0.0, spb=64)
    t1, y1 = grid_response(wave, filt, fd, spb=64)
    a0, a1 = np.abs(y0), np.abs(y1)
    i0_, i1 = int(np.argmax(a0)), int(np.argmax(a1))
    x0, p0 = _parabola(a0, i0_)
    x1, p1_ = _parabola(a1, i1)
    if wave.chips is not None:  # the apex of a rect-chip response is a kink on the grid
        x0, p0 = i0_, a0[i0_]
        x1, p1_ = i1, a1[i1]
    dt = t0[1] - t0[0]
    return max(0.0, 20 * math.log10(p0 / p1_)), (x1 - x0) * dt


# ---------------------------------------------------------------- sampling at fs


def sample_len(tau, fs):
    """ceil(tau fs), a value within 1e-9 (relative) of a whole number taken
    as that number."""
    x = tau * fs
    r = round(x)
    if abs(x - r) <= 1e-9 * max(1.0, abs(x)):
        return int(r)
    return int(math.ceil(x))


def exact_floor_div(num_n, fs, delta, T):
    """k = floor(q), q = (n/fs - delta)/T, where a q within rounding of a
    whole number r (|q - r| <= 16 * 2^-52 * ((|n/fs| + |delta|)/T + |q| + 1))
    counts as r (docs/figures.md §7: a sample on a chip boundary in the
    decimal values a user types is in the later chip)."""
    n = np.asarray(num_n, float)
    q = (n / fs - delta) / T
    r = np.round(q)
    eps = 16 * 2.0 ** -52 * ((np.abs(n / fs) + abs(delta)) / T + np.abs(q) + 1)
    return np.where(np.abs(q - r) <= eps, r, np.floor(q)).astype(np.int64)


def sample_wave(wave, fs, n, delta):
    """u(n/fs - delta) for integer array n (zero outside the pulse)."""
    n = np.asarray(n)
    t = n / fs - delta
    out = np.zeros(len(n), complex)
    if wave.chips is not None or wave.kind == "costas":
        nch = len(wave.chips) if wave.chips is not None else len(wave.order)
        k = exact_floor_div(n, fs, delta, wave.tc)
        ok = (k >= 0) & (k < nch)
        if wave.chips is not None:
            out[ok] = wave.chips[k[ok]]
        else:
            f = (wave.order - (nch - 1) / 2) / wave.tc
            out[ok] = np.exp(2j * math.pi * f[k[ok]] * t[ok])
        return out
    ok = (t >= 0) & (t < wave.tau)
    out[ok] = wave.u(t[ok])
    return out


def window_sym(win, n):
    """The symmetric n-point window (scipy.signal.windows), peak 1."""
    k = win.get("kind", "none")
    W = scipy.signal.windows
    if k == "none" or n == 1:
        return np.ones(n)
    if k == "hann":
        return W.hann(n, sym=True)
    if k == "hamming":
        return W.hamming(n, sym=True)
    if k == "blackman":
        return W.blackman(n, sym=True)
    if k == "blackman_harris":
        return W.blackmanharris(n, sym=True)
    if k == "taylor":
        return W.taylor(n, nbar=win.get("nbar", 5), sll=-win.get("sidelobe_db", -35.0), norm=True, sym=True)
    if k == "chebyshev":
        return W.chebwin(n, at=-win.get("sidelobe_db", -50.0), sym=True)
    if k == "kaiser":
        return W.kaiser(n, beta=win.get("beta", 6.0), sym=True)
    if k == "gaussian":
        return W.gaussian(n, std=win.get("sigma", 0.4) * (n - 1) / 2, sym=True)
    raise ValueError(k)


def reference_at(wave, filt, fs):
    """The receive reference as the scene uses it (docs/figures.md §2):
    (ref samples, lead in samples)."""
    if filt.kind == "matched":
        n = sample_len(wave.tau, fs)
        u = sample_wave(wave, fs, np.arange(n), 0.0)
        return u * window_sym(filt.win, n), 0
    T = wave.tc
    L = len(filt.taps)
    ell = filt.lead
    x = ell * T * fs
    lead = int(round(x)) if abs(x - round(x)) <= 1e-9 * max(1.0, x) else int(math.ceil(x))
    m_n = lead + sample_len(L * T - ell * T, fs) + 2
    i = np.arange(m_n)
    # h(t) = c_m for (m - ell) T <= t < (m - ell + 1) T, t = (i - lead)/fs
    k = exact_floor_div(i - lead, fs, 0.0, T) + ell
    ref = np.zeros(m_n, complex)
    ok = (k >= 0) & (k < L)
    ref[ok] = filt.taps[k[ok]]
    return ref, lead


class NoEnergy(Exception):
    """The reference sampled at fs has no energy (a window that is zero at
    both ends of a 2-sample pulse): the scenario must be refused."""


def straddle(wave, filt, fs, mismatch_db):
    """(worst, mean) straddle loss in dB over d = j/64 samples
    (docs/figures.md §6)."""
    ref, _ = reference_at(wave, filt, fs)
    eref = np.sum(np.abs(ref) ** 2)
    if eref <= 1e-20 * len(ref):
        raise NoEnergy("reference has no energy at this sample rate")
    snr_c = wave.tau * 10 ** (-mismatch_db / 10)
    n = np.arange(sample_len(wave.tau, fs) + 3)
    loss = []
    for j in range(64):
        x = sample_wave(wave, fs, n, (j / 64) / fs)
        y = scipy.signal.correlate(x, ref, "full")
        snr_s = np.max(np.abs(y) ** 2) / (fs * eref)
        loss.append(10 * math.log10(snr_c / snr_s))
    return max(loss), float(np.mean(loss))


# ---------------------------------------------------------------- scenes


def radar_defaults(sc, wave):
    r = {"carrier_hz": 9.5e9, "peak_power_w": 1000.0, "antenna_gain_dbi": 30.0,
         "noise_figure_db": 3.0, "system_loss_db": 3.0, "pri_s": 1e-3, "pulses": 1,
         "window_start_m": 0.0}
    r.update(sc.get("radar", {}))
    if not r.get("sample_rate_hz"):
        r["sample_rate_hz"] = 2 * wave.B
    if not r.get("window_stop_m"):
        r["window_stop_m"] = C * r["pri_s"] / 2
    return r


def detector_defaults(rx):
    d = dict(rx.get("detector", {"kind": "ca_cfar"}))
    k = d.get("kind", "ca_cfar")
    d.setdefault("pfa", 1e-6)
    d.setdefault("pd_required", 0.9)  # common practice, no source (docs/scenario-format.md)
    if k != "fixed":
        d.setdefault("guard_cells", 2)
        d.setdefault("training_cells", 16)
    if k == "os_cfar":
        d.setdefault("rank", 12)
    return d


def ca_alpha(lam, n, pfa):
    """alpha with prod 1/(1 + alpha lam_i / n) = pfa (bisection on log)."""
    target = -math.log(pfa)
    f = lambda a: np.sum(np.log1p(a * lam / n)) - target
    lo, hi = 1e-12, 1.0
    while f(hi) < 0:
        hi *= 2
    for _ in range(200):
        mid = math.sqrt(lo * hi)
        if f(mid) < 0:
            lo = mid
        else:
            hi = mid
    return math.sqrt(lo * hi)


def ca_alpha_cut(Sigma, pfa):
    """alpha (on the mean of the N training cells) for which the test
    |z0|² > (alpha/N) sum |z_i|² has false-alarm probability pfa, z complex
    Gaussian with covariance Sigma over [cell under test, training cells]
    (docs/detection.md §5): with Q = diag(1, -beta, ..., -beta), beta =
    alpha/N, the eigenvalues of Sigma^1/2 Q Sigma^1/2 are one positive mu+
    and N others mu_j, and Pfa = prod 1/(1 + |mu_j|/mu+)."""
    n = Sigma.shape[0] - 1
    Lc = np.linalg.cholesky(Sigma)

    def logpfa(a):
        q = np.full(n + 1, -a / n)
        q[0] = 1
        mu = np.linalg.eigvalsh(Lc.conj().T @ (q[:, None] * Lc))
        mp = mu[-1]
        rest = mu[:-1]
        return -np.sum(np.log1p(np.abs(rest) / mp))
    target = math.log(pfa)
    lo, hi = 1e-9, 1.0
    while logpfa(hi) > target:
        hi *= 2
    for _ in range(100):
        mid = math.sqrt(lo * hi)
        if logpfa(mid) > target:
            lo = mid
        else:
            hi = mid
    return math.sqrt(lo * hi)


def os_alpha(n, r, pfa):
    f = lambda a: sum(math.log((n - i) / (n - i + a)) for i in range(r)) - math.log(pfa)
    lo, hi = 1e-12, 1.0
    while f(hi) > 0:
        hi *= 2
    for _ in range(200):
        mid = math.sqrt(lo * hi)
        if f(mid) > 0:
            lo = mid
        else:
            hi = mid
    return math.sqrt(lo * hi)


# ------------------------------------------------ probability of detection
#
# docs/detection-probability.md §7 and docs/detection.md §6, for steady
# (non-fluctuating) point targets, the only kind the cases hold. One
# square-law test of the target (SNR chi at its cell, unit noise): X =
# |sqrt(chi) + n|^2, n ~ CN(0, 1), so P(X > x) = Q_1(sqrt(2 chi), sqrt(2 x)),
# the non-central chi-square with 2 degrees of freedom (scipy's ncx2). The
# threshold is r times the detector's nominal one (r = the scene's
# threshold over the noise-only one, >= 1):
#   fixed: x = r T, T = -ln pfa;
#   CA-CFAR, M cells treated as independent: x = (r alpha / M) Z,
#     Z ~ Gamma(M, 1), alpha = M (pfa^(-1/M) - 1);
#   CA-CFAR, correlated cells independent of the cell under test: Z =
#     sum lambda_j E_j over the eigenvalues of the cells' covariance and
#     alpha from prod 1/(1 + alpha lambda_j / M) = pfa;
#   OS-CFAR: x = r alpha X_(k), the k-th smallest of N unit exponentials,
#     alpha from Rohling's Pfa (os_alpha).
# Averages over X by Simpson's rule (scipy) of the reference's CDF
# (gamma, binomial); the correlated case in closed form (hypoexponential
# Z, the MGF of X) with mpmath at 250 digits.

from scipy import integrate, optimize, stats
from scipy.special import gammainc, i0e
import mpmath


def marcum_q1(chi, x):
    """P(X > x) = Q_1(sqrt(2 chi), sqrt(2 x)): scipy's ncx2 survival
    function, or beyond a = sqrt(2 chi) = 1000 (where boost's series
    gives up) the normal limit 0.5 erfc((b - a)/sqrt 2), whose error is
    O(1/a)."""
    if chi <= 0:
        return math.exp(-x)
    if chi > 5e5:
        a, b = math.sqrt(2 * chi), math.sqrt(2 * x)
        return 0.5 * math.erfc((b - a) / math.sqrt(2))
    return float(stats.ncx2.sf(2 * x, 2, 2 * chi))


def pd_fixed(chi, pfa, r=1.0):
    return marcum_q1(chi, r * -math.log(pfa))


def _over_x(chi, G):
    """E over the test statistic X of G(X) = P(threshold < X): X has the
    density exp(-(x + chi)) I0(2 sqrt(x chi)); in u = sqrt(x) that is
    2u exp(-(u - sqrt chi)^2) i0e(2 u sqrt chi), a bump of unit width,
    integrated by Simpson's rule over sqrt(chi) +- 10."""
    sc = math.sqrt(chi)
    u = np.linspace(max(0.0, sc - 10), sc + 10, 4001)
    w = 2 * u * np.exp(-(u - sc) ** 2) * i0e(2 * u * sc)
    v = integrate.simpson(w * G(u * u), x=u)
    return min(max(float(v), 0.0), 1.0)


def pd_ca(chi, pfa, m, r=1.0):
    """The reference Z ~ Gamma(M): P(a Z < x) = P(M, x/a), the regularized
    lower incomplete gamma (scipy.special.gammainc)."""
    a = r * (pfa ** (-1.0 / m) - 1)  # r alpha / M
    return _over_x(chi, lambda x: gammainc(m, x / a))


def pd_os(chi, pfa, n, k, r=1.0):
    """P(r alpha X_(k) < x): the k-th smallest of n unit exponentials is
    below y when at least k of them are, a binomial tail in 1 - e^-y."""
    a = r * os_alpha(n, k, pfa)
    return _over_x(chi, lambda x: stats.binom.sf(k - 1, n, -np.expm1(-x / a)))


def corr_alpha(pfa, lam):
    m = len(lam)
    f = lambda a: -sum(math.log1p(a * l / m) for l in lam) - math.log(pfa)
    lo, hi = 1e-12, 1.0
    while f(hi) > 0:
        hi *= 2
    for _ in range(200):
        mid = math.sqrt(lo * hi)
        if f(mid) > 0:
            lo = mid
        else:
            hi = mid
    return math.sqrt(lo * hi)


def pd_corr(chi, pfa, lam, r=1.0):
    m = len(lam)
    alpha = corr_alpha(pfa, lam)
    # Repeated eigenvalues (a covariance with identical blocks) have no
    # partial fractions: spread them by 1e-7 relative (Pd moves by about
    # that much) and carry 250 digits through the cancellation.
    with mpmath.workdps(250):
        a = mpmath.mpf(r * alpha / m)
        ls = [mpmath.mpf(l) * (1 + mpmath.mpf(1e-7) * j) for j, l in enumerate(sorted(x for x in lam if x > 1e-12))]
        out = mpmath.mpf(0)
        for j, lj in enumerate(ls):
            c = mpmath.mpf(1)
            for k, lk in enumerate(ls):
                if k != j:
                    c *= lj / (lj - lk)
            sj = 1 / (a * lj)
            out += c * (1 - mpmath.exp(-sj * chi / (1 + sj)) / (1 + sj))
        return min(max(float(out), 0.0), 1.0)


def pd_in_cell(pdf, phasors, r):
    """docs/detection-probability.md §7, "Echoes sharing the tested cell":
    the cell holds the target's and the other echoes' steady phasors (the
    model's targets are all steady) with independent uniform carrier
    phases, plus unit noise, against r times the nominal threshold. The
    strongest phasor is the phase reference; at most two relative phases
    are integrated (the weaker phasors beyond are Gaussian of their power:
    noise of power v = 1 + their sum, and the steady part tested at
    |sum|^2/v against the threshold scaled by 1/v). The phases by
    scipy.integrate.quad over [0, pi] (the integrand is even in each)."""
    ph = sorted((p for p in phasors if p > 0), reverse=True)
    v = 1.0 + sum(ph[3:])
    amps = [math.sqrt(p) for p in ph[:3]]
    f = lambda a2: pdf(a2 / v, r / v)
    if len(amps) == 1:
        return f(amps[0] ** 2)

    def over(i, z):
        if i == len(amps):
            return f(abs(z) ** 2)
        g = lambda th: over(i + 1, z + amps[i] * complex(math.cos(th), math.sin(th)))
        val, _ = integrate.quad(g, 0, math.pi, epsabs=1e-10, epsrel=1e-10, limit=200)
        return val / math.pi

    return over(1, complex(amps[0], 0))


# ------------------------------------------ non-coherent integration
#
# docs/detection.md §17 (receiver.integration noncoherent, scenario format
# 3): N pulses compressed, square-law detected and summed per gate; the
# gate's tested value is the mean over the pulses (noise mean 1). Under
# noise alone the sum X is Gamma(N, 1). A target of per-pulse SNR chi
# gives X | lambda = a non-central chi-square with 2N degrees of freedom
# over 2, non-centrality 2 lambda (the total energy lambda); steady:
# lambda = N chi; Swerling 1 to 4: lambda ~ Gamma(K, N chi / K), K = 1, N,
# 2, 2N (1 and 3 constant over the pulses, 2 and 4 from pulse to pulse).
# Fixed threshold on the mean: T / N with Q(N, T) = pfa (scipy's
# gammainccinv). CA-CFAR: M independent cells on the ordered statistic's
# lattice, each the mean of N pulses; the reference sum of M N unit
# exponentials is Gamma(M N); the multiplier c on that sum gives
# pfa = P(Gamma(N) > c Gamma(M N)) = I_{1/(1+c)}(M N, N) (scipy's
# betaincinv), alpha = M c on the mean of the cells. Pd by quadrature
# (scipy.integrate.quad) over lambda and, behind the CFAR, over X, never
# by the series the engine uses.

from scipy.special import betaincinv, gammaincc, gammainccinv

NCI_K = {"none": None, "swerling1": lambda n: 1, "swerling2": lambda n: n,
         "swerling3": lambda n: 2, "swerling4": lambda n: 2 * n}


def nci_T(pfa, n):
    """Q(n, T) = pfa: the threshold on the sum of n unit exponentials."""
    return float(gammainccinv(n, pfa))


def nci_c(pfa, n, m):
    """The CA-CFAR multiplier c on the sum of m cells of n pulses each."""
    y = float(betaincinv(m * n, n, pfa))
    return (1 - y) / y


def _nci_steady_sf(lam, n, x):
    """P(X > x) for total energy lam: scipy's ncx2 survival function."""
    if lam <= 0:
        return float(gammaincc(n, x))
    if lam > 5e5:  # beyond boost's series: the normal limit, as marcum_q1
        a, b = math.sqrt(2 * lam), math.sqrt(2 * x)
        return 0.5 * math.erfc((b - a) / math.sqrt(2))
    return float(stats.ncx2.sf(2 * x, 2 * n, 2 * lam))


def _over_lambda(f, chi, n, fluct):
    """E over the target's energy lambda of f(lambda) (steady: f(n chi))."""
    kf = NCI_K[fluct or "none"]
    if kf is None:
        return f(n * chi)
    k = kf(n)
    th = n * chi / k
    dist = stats.gamma(k, scale=th)
    lo, hi = dist.ppf(1e-14), dist.isf(1e-14)
    v, _ = integrate.quad(lambda l: f(l) * dist.pdf(l), lo, hi, limit=200, epsabs=1e-12, epsrel=1e-10,
                          points=[dist.mean()])
    return min(max(v, 0.0), 1.0)


def pd_nci_fixed(chi, n, fluct, pfa, r=1.0):
    """Pd of n pulses against r times the fixed threshold T(pfa, n)."""
    x = r * nci_T(pfa, n)
    if fluct == "swerling2":  # each pulse CN(0, 1 + chi): X ~ Gamma(n, 1 + chi), closed form
        return float(gammaincc(n, x / (1 + chi)))
    return _over_lambda(lambda l: _nci_steady_sf(l, n, x), chi, n, fluct)


def pd_nci_ca(chi, n, fluct, pfa, m, r=1.0):
    """Pd of n pulses behind an m-cell CA-CFAR, threshold r c Z on the sum,
    Z ~ Gamma(m n): E over X of P(Z < X / (r c)) (scipy's gammainc).
    Steady and Swerling 2 only (the cases the generator draws)."""
    a = r * nci_c(pfa, n, m)
    if fluct == "swerling2":
        dist = stats.gamma(n, scale=1 + chi)
    elif not fluct or fluct == "none":
        lam = n * chi
        if lam > 5e5:  # X within a few sqrt(lam) of its mean lam + n: the CDF there
            return float(gammainc(m * n, (lam + n) / a))
        dist = stats.ncx2(2 * n, 2 * lam, scale=0.5)
    else:
        raise ValueError("pd_nci_ca: steady and swerling2 only")
    lo, hi = dist.ppf(1e-13), dist.isf(1e-13)
    v, _ = integrate.quad(lambda x: gammainc(m * n, x / a) * dist.pdf(x), lo, hi, limit=200,
                          epsabs=1e-12, epsrel=1e-10, points=[dist.mean()])
    return min(max(v, 0.0), 1.0)


def required_snr(pd_of, req):
    """SNR (linear) at which pd_of(chi) = req (brentq on dB), or None
    beyond 200 dB."""
    g = lambda d: pd_of(10 ** (d / 10)) - req
    if g(200.0) < 0:
        return None
    return 10 ** (optimize.brentq(g, -30.0, 200.0, xtol=1e-7) / 10)


def band_limited(wave, fs, nraw, t0, delta, amp, fd):
    """The echo a*u(t - delta')*exp(j2 pi fd t) at the raw samples after the
    receiver's ideal band [-fs/2, fs/2) (docs/detection.md §2): computed
    on a grid M times finer, filtered by FFT (zero-padded on both sides by
    the record's length), sampled at fs. Returns (samples, E_in/E)."""
    M = max(16, int(math.ceil(16 * (abs(fd) + 4 * wave.B) / fs)))
    F = M * fs
    pad = max(nraw, sample_len(wave.tau, fs)) * M
    q = np.arange(-pad, nraw * M + pad)
    t = t0 + q / F
    # u(n/F - delta) with n = q: the same delay in seconds as at fs
    e = sample_wave(wave, F, q, delta) * amp * np.exp(2j * math.pi * fd * t)
    X = np.fft.fft(e)
    f = np.fft.fftfreq(len(e), 1 / F)
    keep = (f >= -fs / 2) & (f < fs / 2)
    E = np.sum(np.abs(X) ** 2)
    Ein = np.sum(np.abs(X[keep]) ** 2)
    X[~keep] = 0
    y = np.fft.ifft(X)
    return y[pad:pad + nraw * M:M], (Ein / E if E > 0 else 0.0)


def scene(sc):
    """Target report fields of a single-pulse scene of point targets
    (docs/detection.md)."""
    wf, wave, filt = waveform_figures(sc)
    rx = sc.get("receiver", {})
    rd = radar_defaults(sc, wave)
    det = detector_defaults(rx)
    fs = rd["sample_rate_hz"]
    pri = rd["pri_s"]
    lam = C / rd["carrier_hz"]
    ws, we = rd["window_start_m"], rd["window_stop_m"]
    t0 = 2 * ws / C
    n = int((we - ws) * 2 / C * fs) + 1
    ref, lead = reference_at(wave, filt, fs)
    # trim trailing zero taps of a mismatched reference (they change nothing)
    L = len(ref)
    G = float(np.sum(np.abs(ref) ** 2))
    E = L - 1 - lead
    nraw = n + E
    jr = np.arange(nraw)
    traw = t0 + jr / fs
    tau = wave.tau

    # transmit intervals in samples (docs/detection.md §1):
    # [ceil((m PRI - t0) fs), ceil((m PRI + tau - t0) fs)), a value within
    # 1e-9 (relative) of a whole number taken as that number
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
        # y[k] = sum_i x[k - lead + i] conj(h[i]), k = 0..n-1
        xp = np.concatenate([np.zeros(lead, complex), x])
        y = scipy.signal.correlate(xp, ref, "full", method="fft" if len(xp) * L > 1e6 else "direct")
        # full index of lag 0 is L-1
        return y[L - 1:L - 1 + n]

    G0 = 10 ** (rd["antenna_gain_dbi"] / 10)
    F = 10 ** (rd["noise_figure_db"] / 10)
    Ls = 10 ** (rd["system_loss_db"] / 10)
    runamb = C * pri / 2
    targets = []
    for t in sc.get("targets", []):
        R = t["range_m"]
        sigma = 10 ** (t["rcs_dbsm"] / 10)
        rr = t.get("range_rate_mps", 0.0)
        fd = -2 * rr / lam
        snr_eq = rd["peak_power_w"] * tau * G0 ** 2 * lam ** 2 * sigma / ((4 * math.pi) ** 3 * R ** 4 * KB * T0 * F * Ls) if R > 0 else float("inf")
        folds = math.floor(R / runamb)
        Ra = R - folds * runamb
        delta = 2 * Ra / C - t0
        amp = math.sqrt(snr_eq / (tau * fs)) if math.isfinite(snr_eq) else 0.0
        x = sample_wave(wave, fs, jr, delta) * amp
        inpulse = np.abs(x) > 0
        band = None
        if abs(fd) >= fs / 2:
            x, band = band_limited(wave, fs, nraw, t0, delta, amp, fd)
        else:
            x = x * np.exp(2j * math.pi * fd * traw)
        P_u = np.abs(compress(x)) ** 2 / G
        nb = np.count_nonzero(inpulse & blank)
        nin = np.count_nonzero(inpulse)
        xb = np.where(blank, 0, x)
        P = np.abs(compress(xb)) ** 2 / G
        Pp = np.where(processed, P, -1.0)
        # first index on ties (docs/detection.md §2), ties within 1e-9:
        # a plateau (a rect pulse with a window zero at both ends) is flat
        # to rounding
        kstar = int(np.argmax(Pp >= Pp.max() * (1 - 1e-9))) if Pp.max() > 0 else int(np.argmax(Pp))
        dl, shift = doppler_response(wave, filt, fd)
        targets.append(dict(t=t, R=R, Ra=Ra, folds=folds, fd=fd, snr_eq=snr_eq, P=P, Pu=P_u, band=band,
                            kstar=kstar, Pstar=max(P[kstar], 0.0) if processed[kstar] else 0.0, Pustar=P_u.max(), nb=nb, nin=nin,
                            dl=dl, shift=shift))
    S = np.zeros(n)
    for d in targets:
        S += d["P"]
    # noise correlation of the compressed noise
    hh = ref
    acf = scipy.signal.correlate(hh, hh, "full")  # acf[L-1+m] = sum h[n+m] conj(h[n])
    def rho(m):
        m = np.asarray(m)
        out = np.zeros(m.shape, complex)
        ok = np.abs(m) < L
        # rho(m) = sum_n h[n] conj(h[n+m]) / G = conj(acf[L-1+m]) / G
        out[ok] = np.conj(acf[L - 1 + m[ok]]) / G
        return out
    kind = det["kind"]
    pfa = det["pfa"]
    cache = {}
    # non-coherent integration (docs/detection.md §17): nci > 1 pulses
    nci = rd["pulses"] if rx.get("integration") == "noncoherent" and rd["pulses"] > 1 else 1

    def train_offsets(k):
        g, tr = det["guard_cells"], det["training_cells"]
        offs = [o for o in range(-(g + tr // 2), g + tr // 2 + 1) if abs(o) > g]
        if kind == "os_cfar" or nci > 1:
            span = 2 * (g + tr // 2)
            s_ = 1
            while s_ <= span:
                js = np.arange(1, span // s_ + 1)
                if np.all(np.abs(rho(js * s_)) <= 0.1):
                    break
                s_ += 1
            offs = [o for o in offs if o % s_ == 0]
        return [o for o in offs if 0 <= k + o < n and processed[k + o]]

    def level(k, power):
        """(detector level with training cells 1 + power, with 1 only,
        offsets)."""
        if kind == "fixed":
            v = -math.log(pfa) if nci == 1 else nci_T(pfa, nci) / nci
            return v, v, []
        offs = train_offsets(k)
        N = len(offs)
        if N == 0:
            return float("inf"), float("inf"), offs
        vals = 1 + power[np.array(offs) + k]
        if kind == "ca_cfar" and nci > 1:
            a = N * nci_c(pfa, nci, N)
            return a * vals.mean(), a, offs
        if kind == "ca_cfar":
            key = tuple(offs)
            if key not in cache:
                o = np.array([0] + list(offs))
                Sig = rho(o[None, :] - o[:, None])  # Sigma_ab = rho(o_b - o_a)
                Sig = (Sig + Sig.conj().T) / 2
                cache[key] = ca_alpha_cut(Sig + 1e-12 * np.eye(len(o)), pfa)
            a = cache[key]
            return a * vals.mean(), a, offs
        tr = det["training_cells"]
        r = int(math.floor(det["rank"] * N / tr + 0.5))
        r = min(max(r, 1), N)
        a = os_alpha(N, r, pfa)
        return a * np.sort(vals)[r - 1], a, offs

    out = []
    for j, d in enumerate(targets):
        t = d["t"]
        k = d["kstar"]
        Pstar = d["Pstar"]
        Lk, Lnoise, offs = level(k, S)
        Cc = sum(e["P"][k] for i, e in enumerate(targets) if i != j)
        T = max(Lk, Cc)
        ecl = None
        if 0 < d["nb"] < d["nin"] and Pstar > 0:  # P* over processed gates (§2)
            # a loss: an echo that peaks beyond the last gate can show a
            # larger blanked partial overlap than unblanked (out_of_window)
            ecl = max(0.0, 10 * math.log10(d["Pustar"] / Pstar))
        band = d["band"]
        rejected = band is not None and band <= 1e-12
        band_db = -10 * math.log10(band) if band is not None and not rejected else None
        snr = 10 * math.log10(d["snr_eq"]) - wf["mismatch_loss_db"] - d["dl"] - (ecl or 0.0) - (band_db or 0.0)
        rec = {
            "id": t["id"], "range_m": d["R"], "snr_db": max(snr, -100.0),
            "doppler_hz": d["fd"], "doppler_loss_db": d["dl"], "range_shift_m": d["shift"] * C / 2,
        }
        if ecl is not None:
            rec["eclipsing_loss_db"] = ecl
        if band_db is not None:
            rec["band_loss_db"] = band_db
        margin = 10 * math.log10(Pstar / T) if Pstar > 0 and math.isfinite(T) else None
        touched = d["nb"] > 0
        req = det["pd_required"]
        # Pd of the target's test (docs/detection.md §6; point targets
        # behind fixed, CA and OS detectors with at least one training
        # cell), as a function of its SNR chi and the raise r >= 1
        pdf = None
        sceneok = lambda r: True
        fl = t.get("fluctuation", "none")
        if not rejected and Pstar > 0 and math.isfinite(Lnoise) and Lnoise > 0 and nci > 1:
            if kind == "fixed":
                pdf = lambda chi, r=1.0: pd_nci_fixed(chi, nci, fl, pfa, r)
            elif kind == "ca_cfar" and offs:
                pdf = lambda chi, r=1.0, M=len(offs): pd_nci_ca(chi, nci, fl, pfa, M, r)
        elif not rejected and Pstar > 0 and math.isfinite(Lnoise) and Lnoise > 0:
            if kind == "fixed":
                pdf = lambda chi, r=1.0: pd_fixed(chi, pfa, r)
            elif kind == "ca_cfar" and offs:
                M = len(offs)
                Lr = min(2 * (det["guard_cells"] + det["training_cells"] // 2) + 1, L)
                far = all(abs(o) >= Lr for o in offs)
                near = any(b - a < Lr for a, b in zip(offs, offs[1:]))
                if far and near and Lr >= 2:
                    o = np.array(offs)
                    R = rho(o[None, :] - o[:, None])
                    lam = [max(float(e), 0.0) for e in np.linalg.eigvalsh((R + R.conj().T) / 2)]
                    pdf = lambda chi, r=1.0, lam=lam: pd_corr(chi, pfa, lam, r)
                else:
                    pdf = lambda chi, r=1.0, M=M: pd_ca(chi, pfa, M, r)
                    cc = pfa ** (-1.0 / M) - 1
                    sceneok = lambda r, M=M, cc=cc: -M * math.log1p(r * cc) >= math.log(1e-300)
            elif kind == "os_cfar" and offs:
                N = len(offs)
                kk = min(max(int(math.floor(det["rank"] * N / det["training_cells"] + 0.5)), 1), N)
                pdf = lambda chi, r=1.0, N=N, kk=kk: pd_os(chi, pfa, N, kk, r)
                a0 = os_alpha(N, kk, pfa)
                sceneok = lambda r, N=N, kk=kk, a0=a0: sum(math.log((N - i) / (N - i + r * a0)) for i in range(kk)) >= math.log(1e-300)
        infold = d["folds"] > 0 and ws <= d["Ra"] <= we
        rule = None
        pd_noise = pd_scene = None
        in_cell = False
        pd_status = None
        if pdf is not None:
            rr = max(T / Lnoise, 1.0)
            pd_noise = pdf(Pstar)
            pd_scene = pdf(Pstar, rr) if sceneok(rr) else None
            if 0 < Cc < Lk and math.isfinite(Lk) and sceneok(rr) and nci == 1:
                # the others' power in the cell, under the level, adds to
                # the echo (detection-probability.md §7): pd = the crossing
                # probability of the sum; the status is decided on the
                # smaller of it and the target's own Pd
                pd_own = pd_scene
                pd_scene = pd_in_cell(pdf, [Pstar] + [e["P"][k] for i, e in enumerate(targets) if i != j], rr)
                pd_status = min(pd_scene, pd_own)
                in_cell = pd_own >= req and pd_scene < req
        if not (ws <= d["Ra"] <= we):
            st = "out_of_window"
        elif infold:
            st = "folded"
        elif touched and (d["nb"] == d["nin"] or Pstar == 0):
            st = "eclipsed"
        elif rejected:
            st = "too_weak"
        elif Pstar == 0:
            st = "out_of_window"
        elif pdf is not None:
            rule = "pd"
            if pd_status is None:
                pd_status = pd_scene
            detected = pd_status >= req if pd_status is not None else Pstar >= T
            if detected:
                st = "detected"
            elif touched and d["Pustar"] > 0 and pdf(d["Pustar"]) >= req:
                st = "eclipsed"
            elif pd_noise < req:
                st = "too_weak"
            else:
                st = "masked"
        else:
            rule = "threshold"
            if Pstar >= T:
                st = "detected"
            elif touched and d["Pustar"] >= Lnoise:
                st = "eclipsed"
            elif Pstar < Lnoise:
                st = "too_weak"
            else:
                st = "masked"
        if st == "masked":
            by_cell = Cc >= Lk or in_cell
            if by_cell:
                contrib = [e["P"][k] if i != j else -1 for i, e in enumerate(targets)]
            else:
                o = np.array(offs) + k
                contrib = [float(np.sum(e["P"][o])) for e in targets]
            best = int(np.argmax(contrib))
            if contrib[best] > 0:
                rec["masked_by"] = targets[best]["t"]["id"]
            rec["_masked_via"] = "cell" if by_cell else "cfar"
        rec["status"] = st
        if rule is not None:
            rec["decided_on"] = rule
        if st not in ("eclipsed", "out_of_window", "folded") and margin is not None:
            rec["threshold_margin_db"] = margin
        if pdf is not None and (rule is not None or st == "folded"):
            if pd_scene is not None:
                rec["pd"] = pd_scene
            chi_req = required_snr(pdf, req)
            if chi_req is not None:
                rec["snr_required_db"] = 10 * math.log10(chi_req)
                rec["margin_db"] = 10 * math.log10(Pstar) - rec["snr_required_db"]
        rec["_peak_gate"] = k
        rec["_P_db"] = 10 * math.log10(Pstar) if Pstar > 0 else None
        rec["_level_db"] = 10 * math.log10(Lk) if math.isfinite(Lk) else None
        rec["_noise_level_db"] = 10 * math.log10(Lnoise) if math.isfinite(Lnoise) else None
        rec["_cell_db"] = 10 * math.log10(Cc) if Cc > 0 else None
        rec["_cells"] = len(offs)
        rec["_nproc"] = int(np.count_nonzero(processed))
        rec["_corr_len"] = float(np.sum(np.abs(acf) ** 2)) / G ** 2
        out.append(rec)
    return wf, out


def main():
    sc = json.load(open(sys.argv[1]))
    wf, ts = scene(sc)
    print(json.dumps({"waveform": wf, "targets": ts}, indent=1))


if __name__ == "__main__":
    main()
