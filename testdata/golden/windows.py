#!/usr/bin/python3
"""Golden window coefficients from scipy.signal.windows (symmetric form).

Run from this folder with Debian's python3 + python3-scipy:

    /usr/bin/python3 windows.py

Writes windows.json. Parameter mapping to package dsp:
  taylor(M, nbar, sll=-SidelobeDB, norm=True)  <- dsp.Taylor{NBar, SidelobeDB}
  chebwin(M, at=-SidelobeDB)                    <- dsp.Chebyshev{SidelobeDB}
  kaiser(M, beta)                               <- dsp.Kaiser{Beta}
  gaussian(M, std=Sigma*(M-1)/2)                <- dsp.Gaussian{Sigma}
"""
import json

import numpy
import scipy
from scipy.signal import windows

LENGTHS = [2, 3, 8, 13, 64, 101, 256]
cases = []


def add(kind, params, m, w):
    cases.append({"kind": kind, "params": params, "n": m,
                  "w": [float(v) for v in w]})


for m in LENGTHS:
    for nbar, sll in [(4, -30), (5, -35), (8, -40), (10, -60)]:
        add("taylor", {"nbar": nbar, "sidelobe_db": sll}, m,
            windows.taylor(m, nbar=nbar, sll=-sll, norm=True, sym=True))
    for sll in [-30, -50, -80]:
        add("chebyshev", {"sidelobe_db": sll}, m,
            windows.chebwin(m, at=-sll, sym=True))
    for beta in [0.0, 2.5, 6.283185307179586, 10.0]:
        add("kaiser", {"beta": beta}, m, windows.kaiser(m, beta, sym=True))
    for sigma in [0.3, 0.5, 1.2]:
        add("gaussian", {"sigma": sigma}, m,
            windows.gaussian(m, std=sigma * (m - 1) / 2, sym=True))



# Highest sidelobe (dB re the mainlobe peak) of long windows, read on a
# 256x zero-padded numpy FFT beyond the first minimum next to the mainlobe.
def hsll(w, pad=256):
    mag = numpy.abs(numpy.fft.rfft(w, len(w) * pad))
    mag /= mag[0]
    i = 1
    while mag[i + 1] < mag[i]:
        i += 1
    return float(20 * numpy.log10(mag[i:].max()))


sidelobes = []
for nbar, sll in [(4, -30), (5, -30), (4, -35), (5, -35), (6, -40), (8, -40),
                  (8, -45), (8, -50), (6, -50), (10, -60)]:
    w = windows.taylor(4096, nbar=nbar, sll=-sll, norm=True, sym=True)
    sidelobes.append({"kind": "taylor", "params": {"nbar": nbar, "sidelobe_db": sll},
                      "n": 4096, "periodic": False, "hsll_db": hsll(w)})
for name, w in [("hann", windows.hann(2049)[:2048]),
                ("hamming", windows.hamming(2049)[:2048]),
                ("blackman", windows.blackman(2049)[:2048]),
                ("blackmanharris", windows.blackmanharris(2049)[:2048])]:
    sidelobes.append({"kind": name, "params": {}, "n": 2048, "periodic": True,
                      "hsll_db": hsll(w)})

out = {
    "generator": "testdata/golden/windows.py",
    "scipy": scipy.__version__,
    "numpy": numpy.__version__,
    "cases": cases,
    "sidelobes": sidelobes,
}
with open("windows.json", "w") as f:
    json.dump(out, f, indent=0)
    f.write("\n")
print("wrote windows.json:", len(cases), "cases, scipy", scipy.__version__)
