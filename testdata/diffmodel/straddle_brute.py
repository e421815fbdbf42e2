"""Brute-force straddle loss (docs/figures.md §6), written apart from
model.py and from the engine, for one case: Barker 11 (chip 4.98e-7 s)
under a Gaussian window (sigma 0.213) at fs = 3 012 050 Hz (1.5 B), the
waveform of train.json's stagger-047.

Exact rational chip index (docs/figures.md §7: Fractions), the continuous
peak |chi_peak|^2/E_h by a midpoint rule on 200 000 points and a search of
the delay, the reference the pulse sampled at fs times the symmetric
window of that many points (ceil(tau fs) = 17), and for d = j/64 the best
output sample over ALL lags of the full correlation (numpy.correlate).

Run: /usr/bin/python3 straddle_brute.py  (about 20 s). Prints
  mismatch 4.230478 dB, straddle max 1.597984 dB, mean 0.865819 dB
and which lag wins at each d (a sidelobe lag for d >= 1/2 sample).
"""
import math
from fractions import Fraction as F

import numpy as np

CODE = np.array([1, 1, 1, -1, -1, -1, 1, -1, -1, 1, -1], float)  # Barker 11
T = F("4.98e-7")
FS = F(3012050)
N = len(CODE)
TAU = N * T
SIGMA = 0.213


def u(t):
    """The pulse at the exact rational time t."""
    if t < 0 or t >= TAU:
        return 0.0
    return CODE[int(t // T)]


def continuous_snr():
    m = 200000
    dt = float(TAU) / m
    t = (np.arange(m) + 0.5) * dt
    ut = CODE[np.minimum((t / float(T)).astype(int), N - 1)]
    h = ut * np.exp(-0.5 * ((2 * t / float(TAU) - 1) / SIGMA) ** 2)
    eh = np.sum(h * h) * dt

    def chi(delta):
        k = np.floor((t + delta) / float(T)).astype(int)
        ok = (k >= 0) & (k < N)
        v = np.zeros(m)
        v[ok] = CODE[k[ok]]
        return abs(np.sum(v * h) * dt)

    peak = max(chi(d) for d in np.linspace(-0.2, 0.2, 401) * float(T))
    return peak * peak / eh


def main():
    snr_c = continuous_snr()
    nref = math.ceil(TAU * FS)
    n = np.arange(nref)
    w = np.exp(-0.5 * ((n - (nref - 1) / 2) / (SIGMA * (nref - 1) / 2)) ** 2)
    ref = np.array([u(F(int(i)) / FS) for i in n]) * w
    eref = np.sum(ref ** 2)
    losses = []
    for j in range(64):
        d = F(j, 64)
        x = np.array([u(F(m) / FS - d / FS) for m in range(nref + 3)])
        y = np.correlate(x, ref, "full")  # lag k - (nref - 1)
        snr_s = np.max(np.abs(y) ** 2) / (float(FS) * eref)
        losses.append(10 * math.log10(snr_c / snr_s))
        if j % 8 == 0:
            print(f"d = {j}/64: best lag {int(np.argmax(np.abs(y))) - (nref - 1)}, loss {losses[-1]:.6f} dB")
    print(f"mismatch {10 * math.log10(float(TAU) / snr_c):.6f} dB, "
          f"straddle max {max(losses):.6f} dB, mean {np.mean(losses):.6f} dB")


if __name__ == "__main__":
    main()
