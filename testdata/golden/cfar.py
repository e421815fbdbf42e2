#!/usr/bin/python3
"""Golden CA-CFAR multipliers for correlated training cells.

    /usr/bin/python3 cfar.py  -> cfar.json

For complex Gaussian noise whose training cells have the correlation matrix
R (N cells), a square-law cell-averaging CFAR with threshold (alpha/N)*sum
has Pfa = E[exp(-alpha*S/N)] = 1/det(I + (alpha/N) R) (moment-generating
function of a Gaussian quadratic form). alpha is solved here with
numpy.linalg.eigvalsh and scipy.optimize.brentq, independently of the Go
code. When the cell under test shares noise with its training cells
(guard cells shorter than the correlation), the exact Pfa of the test
|z0|^2 > (alpha/N) sum |z_i|^2 follows from the eigenvalues mu of
S^(1/2) Q S^(1/2), S the covariance of [cut, training cells],
Q = diag(1, -alpha/N, ...): one is positive (mu+), and
Pfa = prod_j 1/(1 + |mu_j|/mu+) over the others (a weighted sum of
independent exponentials). Each case gives "alpha" (det formula, cell under
test independent) and "alpha_cut" (exact, with the cell under test's
correlation), both solved with brentq; the latter computed here with
numpy.linalg.eigh on the full matrix, not with the Go code's secular
equation.

Cases:
- "sinc": rho(m) = sinc(m/os) (flat noise band B at fs = os*B),
  os = 1, 2, 3, 4; 16 training cells, 2 guard cells, Pfa 1e-6.
  os = 1 is Richards eq. 6.135 (independent cells): 21.942.
- "lfm": the compressed-noise correlation of a sampled LFM matched
  reference, h[n] = exp(j*pi*k*(t-tau/2)^2), t = n/fs, k = B/tau, B = 1 MHz,
  tau = 20 us, fs = 2 MHz (40 samples): rho(m) = sum h[n] conj(h[n+m]) /
  sum |h|^2; 16 cells, 2 guard; and at the window's edge (only the 8 cells
  on one side).
- "map": a 2-D window (range guard 1, range training 4, Doppler guard 1,
  Doppler training 2, cell under test at bin 0) over 8 pulses with a Hann
  Doppler window (symmetric, 8 points) and no MTI; range correlation
  sinc(m/2); Doppler covariance C = A A^H with A the windowed, scaled
  8-point DFT (bins in fftshift order), normalised by C[d,d].
"""
import json

import numpy
import scipy
from scipy.optimize import brentq


def alpha_for(r, n, pfa):
    lam = numpy.linalg.eigvalsh(r)
    return brentq(lambda a: -numpy.sum(numpy.log1p(a * lam / n)) - numpy.log(pfa), 1e-9, 1e9, xtol=1e-13, rtol=1e-14)


def pfa_cut(a, s, n):
    q = numpy.diag(numpy.r_[1.0, -a / n * numpy.ones(n)])
    w, v = numpy.linalg.eigh(s)
    sh = v @ numpy.diag(numpy.sqrt(numpy.maximum(w, 0))) @ v.conj().T
    mu = numpy.linalg.eigvalsh(sh @ q @ sh)
    mp = mu.max()
    rest = numpy.delete(mu, mu.argmax())
    return numpy.prod(1 / (1 + numpy.abs(rest) / mp))


def alpha_cut(s, n, pfa):
    return brentq(lambda a: numpy.log(pfa_cut(a, s, n)) - numpy.log(pfa), 1e-6, 1e6, xtol=1e-12, rtol=1e-13)


def offsets(guard, train):
    half = train // 2
    o = numpy.arange(guard + 1, guard + half + 1)
    return numpy.r_[-o[::-1], o]


def lag_matrix(offs, rho):
    d = offs[None, :] - offs[:, None]  # R_ij = rho(o_j - o_i)
    r = numpy.zeros(d.shape, complex)
    for i in range(d.shape[0]):
        for j in range(d.shape[1]):
            m = d[i, j]
            if abs(m) < len(rho):
                r[i, j] = rho[m] if m >= 0 else numpy.conj(rho[-m])
    return r


out = {"numpy": numpy.__version__, "scipy": scipy.__version__, "sinc": [], "lfm": [], "map": []}
offs = offsets(2, 16)
for os in [1, 2, 3, 4]:
    r = numpy.sinc((offs[None, :] - offs[:, None]) / os)
    o0 = numpy.r_[0, offs]
    s = numpy.sinc((o0[None, :] - o0[:, None]) / os)
    for pfa in [1e-6, 1e-3]:
        out["sinc"].append({"oversampling": os, "guard": 2, "train": 16, "pfa": pfa, "alpha": alpha_for(r, 16, pfa),
                            "alpha_cut": alpha_cut(s, 16, pfa)})

B, tau, fs = 1e6, 20e-6, 2e6
t = numpy.arange(int(round(tau * fs))) / fs
h = numpy.exp(1j * numpy.pi * B / tau * (t - tau / 2) ** 2)
rho = numpy.array([numpy.sum(h[: len(h) - m] * numpy.conj(h[m:])) for m in range(len(h))]) / numpy.sum(abs(h) ** 2)
for name, o in [("both", offs), ("one_side", offs[offs > 0])]:
    for pfa in [1e-6, 1e-3]:
        r = lag_matrix(o, rho)
        s = lag_matrix(numpy.r_[0, o], rho)
        out["lfm"].append({"cells": name, "offsets": o.tolist(), "pfa": pfa, "alpha": alpha_for(r, len(o), pfa),
                           "alpha_cut": alpha_cut(s, len(o), pfa)})

npulse = 8
w = numpy.hanning(npulse)  # symmetric Hann: 0.5 - 0.5 cos(2 pi k/(N-1))
scale = 1 / numpy.sqrt(numpy.sum(w ** 2))
k = numpy.arange(npulse)
a = numpy.exp(-2j * numpy.pi * numpy.outer(k, k) / npulse) * w[None, :] * scale
a = numpy.fft.fftshift(a, axes=0)
cd = a @ a.conj().T
gr, tr, gd, td = 1, 4, 1, 2
cells = []
for dk in range(-(gr + tr // 2), gr + tr // 2 + 1):
    for dd in range(-(gd + td // 2), gd + td // 2 + 1):
        if abs(dk) <= gr and abs(dd) <= gd:
            continue
        cells.append((dk, dd))
d0 = 0
n = len(cells)
r = numpy.zeros((n, n), complex)
for i, (ai, bi) in enumerate(cells):
    for j, (aj, bj) in enumerate(cells):
        r[i, j] = numpy.sinc((aj - ai) / 2) * cd[(d0 + bi) % npulse, (d0 + bj) % npulse] / cd[d0, d0].real
cut = [(0, 0)] + cells
s = numpy.zeros((n + 1, n + 1), complex)
for i, (ai, bi) in enumerate(cut):
    for j, (aj, bj) in enumerate(cut):
        s[i, j] = numpy.sinc((aj - ai) / 2) * cd[(d0 + bi) % npulse, (d0 + bj) % npulse] / cd[d0, d0].real
for pfa in [1e-6, 1e-3]:
    out["map"].append({"pulses": npulse, "window": "hann", "guard_r": gr, "train_r": tr, "guard_d": gd, "train_d": td,
                       "bin": d0, "range_rho": "sinc(m/2)", "pfa": pfa, "cells": n, "alpha": alpha_for(r, n, pfa),
                       "alpha_cut": alpha_cut(s, n, pfa)})

with open("cfar.json", "w") as f:
    json.dump(out, f, indent=1)
    f.write("\n")
