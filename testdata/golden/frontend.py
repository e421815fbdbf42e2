#!/usr/bin/python3
"""Golden values for the receiver front-end models of package dsp
(dsp/frontend.go), computed here independently of the Go code.

phase_noise: a phase-noise profile L(f) in dBc/Hz, linear in log10(f)
  between points, flat below the first and above the last point.
  integral  = integral of 10**(L/10) df, by scipy.integrate.quad on each
              segment (not the closed form the Go code uses);
  echo_band = integral of 10**(L/10) * 4 sin^2(pi f T) df, the spectrum of
              phi(t - T) - phi(t), by quad over every period 1/T of the
              oscillating factor (exact, without the Go code's mean-of-2
              replacement above 8/T).
clip: an up-chirp u = exp(j pi (B/tau) (t - tau/2)^2), t = i/fs,
  i = 0 .. ceil(tau fs) - 1 (tau fs within 1e-9 of a whole number taken as
  that number), scaled to
  a peak channel amplitude `drive` times full scale (1), each of I and Q
  clipped to +-1, correlated with the unclipped chirp by
  numpy.correlate ("full"); the compressed peak re the unclipped echo's
  the highest sidelobe (outside +-2 samples of the peak) re the peak, the
  highest beyond +-10 samples ("far") and the summed sidelobe power
  outside +-2 samples (islr), each re the peak.
iq: a complex tone exp(j 2 pi k0 i / N) through y = I + j g (Q cos p - I sin p),
  g = 10**(gain_db/20); the image rejection read off numpy's FFT, bins
  +k0 and -k0, and the closed form (1 + 2 g cos p + g^2)/(1 - 2 g cos p + g^2).

quantiser: a mid-rise quantiser (levels (i + 1/2) step, step =
  2 full_scale / 2^bits, clipped to the outermost) of a zero-mean Gaussian
  input: the Bussgang gain E[x Q(x)]/sigma^2 and the noise ratio
  E[Q^2]/(gain^2 sigma^2) - 1, by quad over each level's interval.

Run: cd testdata/golden && /usr/bin/python3 frontend.py
"""
import json
import math

import numpy as np
import scipy
from scipy import integrate

PROFILE = {"offset_hz": [1e3, 1e4, 1e5, 1e6, 1e7], "dbc_hz": [-80.0, -100.0, -110.0, -130.0, -140.0]}


def level(f):
    x, y = PROFILE["offset_hz"], PROFILE["dbc_hz"]
    if f <= x[0]:
        return y[0]
    if f >= x[-1]:
        return y[-1]
    return float(np.interp(math.log10(f), np.log10(x), y))


def lin(f):
    return 10 ** (level(f) / 10)


def integral(f1, f2):
    edges = [f1] + [x for x in PROFILE["offset_hz"] if f1 < x < f2] + [f2]
    return sum(integrate.quad(lin, a, b, limit=200, epsrel=1e-12)[0] for a, b in zip(edges[:-1], edges[1:]))


def echo_band(f1, f2, T):
    g = lambda f: lin(f) * 4 * math.sin(math.pi * f * T) ** 2
    per = 1 / T
    edges = sorted(set([f1, f2] + [x for x in PROFILE["offset_hz"] if f1 < x < f2] +
                       [k * per for k in range(int(f1 / per) + 1, int(f2 / per) + 1) if f1 < k * per < f2]))
    return sum(integrate.quad(g, a, b, limit=200, epsrel=1e-11)[0] for a, b in zip(edges[:-1], edges[1:]))


def clip_case(tau, B, fs, drive):
    n = int(round(tau * fs)) if abs(tau * fs - round(tau * fs)) < 1e-9 * tau * fs else int(math.ceil(tau * fs))
    t = np.arange(n) / fs
    u = np.exp(1j * math.pi * (B / tau) * (t - tau / 2) ** 2)
    x = drive * u
    c = np.clip(x.real, -1, 1) + 1j * np.clip(x.imag, -1, 1)
    y0 = np.correlate(x, u, "full")
    y = np.correlate(c, u, "full")
    p0 = np.abs(y0) ** 2
    p = np.abs(y) ** 2
    k = int(np.argmax(p))
    side = np.concatenate([p[: max(k - 2, 0)], p[k + 3:]])
    far = np.concatenate([p[: max(k - 10, 0)], p[k + 11:]])
    far0 = np.concatenate([p0[: max(k - 10, 0)], p0[k + 11:]])
    return {"far_sidelobe_db": float(10 * np.log10(far.max() / p[k])),
            "far_sidelobe_unclipped_db": float(10 * np.log10(far0.max() / p0.max())),
            "islr_db": float(10 * np.log10(side.sum() / p[k])),
            "tau_s": tau, "bandwidth_hz": B, "fs_hz": fs, "drive": drive,
            "peak_loss_db": float(10 * np.log10(p0.max() / p[k])),
            "pslr_db": float(10 * np.log10(side.max() / p[k])),
            "pslr_unclipped_db": float(10 * np.log10(np.concatenate([p0[: max(k - 2, 0)], p0[k + 3:]]).max() / p0.max()))}


def iq_case(gain_db, phase_deg, n=1000, k0=100):
    g = 10 ** (gain_db / 20)
    p = math.radians(phase_deg)
    x = np.exp(2j * math.pi * k0 * np.arange(n) / n)
    y = x.real + 1j * g * (x.imag * math.cos(p) - x.real * math.sin(p))
    Y = np.fft.fft(y)
    measured = 10 * math.log10(abs(Y[k0]) ** 2 / abs(Y[n - k0]) ** 2)
    formula = 10 * math.log10((1 + 2 * g * math.cos(p) + g * g) / (1 - 2 * g * math.cos(p) + g * g))
    return {"gain_db": gain_db, "phase_deg": phase_deg, "irr_fft_db": measured, "irr_formula_db": formula}


def gaussian_quantiser(bits, full_scale, sigma):
    """Mid-rise quantiser, levels (i + 1/2) step, clipped to the outermost,
    of a N(0, sigma^2) input: E[x Q(x)] / sigma^2 and
    E[Q^2] / (gain^2 sigma^2) - 1, by quad over each level's interval."""
    step = 2 * full_scale / 2 ** bits
    top = 2 ** (bits - 1) - 0.5
    f = lambda x: math.exp(-x * x / (2 * sigma * sigma)) / (sigma * math.sqrt(2 * math.pi))
    exq = eq2 = 0.0
    l = 0.5
    while l <= top:
        lo = (l - 0.5) * step
        hi = math.inf if l == top else (l + 0.5) * step
        if lo > 40 * sigma:
            break
        exq += 2 * l * step * integrate.quad(lambda x: x * f(x), lo, hi)[0]
        eq2 += 2 * (l * step) ** 2 * integrate.quad(f, lo, hi)[0]
        l += 1
    gain = exq / sigma ** 2
    return {"bits": bits, "full_scale": full_scale, "sigma": sigma, "gain": gain, "ratio": eq2 / (gain * gain * sigma * sigma) - 1}


def main():
    out = {"numpy": np.__version__, "scipy": scipy.__version__, "profile": PROFILE,
           "integral": [], "echo_band": [], "clip": [], "iq": [], "quantiser": []}
    for f1, f2 in [(0, 5e6), (100, 2e7), (5e3, 5e4), (0, 1e3)]:
        out["integral"].append({"f1": f1, "f2": f2, "value": integral(f1, f2)})
    for f1, f2, T in [(0, 5e6, 2 * 10e3 / 299792458.0), (0, 5e6, 2 * 1e3 / 299792458.0), (500, 1e6, 2 * 30e3 / 299792458.0)]:
        out["echo_band"].append({"f1": f1, "f2": f2, "delay_s": T, "value": echo_band(f1, f2, T)})
    for drive in [1.0, 2.0, 10.0, 100.0]:
        out["clip"].append(clip_case(10e-6, 5e6, 10e6, drive))
    for gdb, pdeg in [(0.1, 1.0), (0.5, 3.0), (0.0, 0.5)]:
        out["iq"].append(iq_case(gdb, pdeg))
    s = math.sqrt(0.5)
    for bits, fsc in [(8, 1000.0), (8, 100.0), (12, 100.0), (4, 3.0), (10, 2.0)]:
        out["quantiser"].append(gaussian_quantiser(bits, fsc, s))
    with open("frontend.json", "w") as f:
        json.dump(out, f, indent=1)
        f.write("\n")


if __name__ == "__main__":
    main()
