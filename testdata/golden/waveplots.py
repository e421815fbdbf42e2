#!/usr/bin/python3
"""Golden pulse spectra and occupied bandwidths for scenarios/waveplots.go.

Samples each pulse from its published definition, independently of the Go
code, takes its energy spectrum with numpy's FFT (zero-padded to the
transform length the Go code uses, written out so the test can check it),
and finds the occupied bandwidth: the band outside which lies 0.5 % of the
energy on each side (ITU Radio Regulations No. 1.153; Recommendation
ITU-R SM.328), reading the edges off the cumulative energy with each bin's
energy spread evenly over its width.

Pulses (t = i/fs, i = 0 .. ceil(tau*fs)-1):
  rect: u = 1
  lfm (up-chirp, phase zero at the pulse centre):
      u = exp(j*pi*(B/tau)*(t - tau/2)**2)

Run: cd testdata/golden && /usr/bin/python3 waveplots.py
"""
import json
import math
import os

import numpy as np


def fft_len(n):
    """Smallest integer >= n whose prime factors are 2, 3 and 5."""
    best = 1
    while best < n:
        best *= 2
    p5 = 1
    while p5 < best:
        p35 = p5
        while p35 < best:
            m = p35
            while m < n:
                m *= 2
            best = min(best, m)
            p35 *= 3
        p5 *= 5
    return best


def pulse(kind, tau, bw, fs):
    n = int(round(tau * fs)) if abs(tau * fs - round(tau * fs)) <= 1e-9 * tau * fs else math.ceil(tau * fs)
    t = np.arange(n) / fs
    if kind == "rect":
        return np.ones(n, dtype=complex)
    return np.exp(1j * np.pi * (bw / tau) * (t - tau / 2) ** 2)


def occupied(p, frac=0.99):
    total = p.sum()
    tail = (1 - frac) / 2 * total
    c = np.concatenate(([0.0], np.cumsum(p)))  # c[i] = energy below bin i - 1/2
    # lower edge: position x (in bins, bin i spans [i-1/2, i+1/2)) where
    # the cumulative energy reaches tail
    i = int(np.searchsorted(c, tail, side="left")) - 1
    lo = i - 0.5 + (tail - c[i]) / p[i]
    r = np.concatenate(([0.0], np.cumsum(p[::-1])))
    j = int(np.searchsorted(r, tail, side="left")) - 1
    hi = (len(p) - 1 - j) + 0.5 - (tail - r[j]) / p[len(p) - 1 - j]
    return lo, hi


CASES = [
    # name, kind, tau (s), B (Hz, lfm), fs (Hz)
    ("rect-3.2us", "rect", 3.2e-6, 0, 20e6),
    ("lfm-20us-10MHz", "lfm", 20e-6, 10e6, 20e6),
    ("lfm-10us-2MHz", "lfm", 10e-6, 2e6, 8e6),
    ("lfm-50us-20MHz", "lfm", 50e-6, 20e6, 40e6),
]

out = {"numpy": np.__version__, "source": "testdata/golden/waveplots.py", "cases": []}
for name, kind, tau, bw, fs in CASES:
    u = pulse(kind, tau, bw, fs)
    L = fft_len(max(len(u), 4096))
    p = np.abs(np.fft.fftshift(np.fft.fft(u, L))) ** 2
    lo, hi = occupied(p)
    df = fs / L
    h = L // 2
    out["cases"].append({
        "name": name, "kind": kind, "pulse_width_s": tau, "bandwidth_hz": bw, "sample_rate_hz": fs,
        "samples": len(u), "fft_len": L,
        "occupied_lo_hz": (lo - h) * df, "occupied_hi_hz": (hi - h) * df,
        "occupied_bw_hz": (hi - lo) * df,
        # a few spectrum values, dB re peak, at bins h + k
        "spectrum_db": {str(k): float(10 * np.log10(max(p[h + k] / p.max(), 1e-8)))
                        for k in (0, 7, 64, 200, 500, 1000) if h + k < L},
    })

path = os.path.join(os.path.dirname(os.path.abspath(__file__)), "waveplots.json")
with open(path, "w") as f:
    json.dump(out, f, indent=1)
    f.write("\n")
print("wrote", path)
