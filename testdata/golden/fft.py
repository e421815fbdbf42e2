#!/usr/bin/python3
"""Golden DFTs from numpy.fft.fft, for package dsp's FFT kernels.

Run from this folder: /usr/bin/python3 fft.py  -> fft.json

Each case is a length n and X = numpy.fft.fft(x) of the integer-valued input
x[t] = ((7919·t) mod 97 − 48) + j·((104729·t) mod 89 − 44), t = 0 … n−1, which
the Go test rebuilds exactly (so the file stores only the outputs). The
lengths cover every kernel path: powers of two from 1 (radix-4 levels, a
radix-2 bottom level for odd powers, the depth-first levels above 1 024
points: 2 048) and lengths with factors 3 and 5 (the Stockham plan). Values
are stored to 15 significant digits.
"""
import json

import numpy

cases = []
for n in [1, 2, 4, 8, 16, 32, 64, 128, 256, 512, 1024, 2048,
          3, 5, 6, 12, 15, 45, 60, 1000, 1215]:
    t = numpy.arange(n)
    x = ((7919 * t) % 97 - 48) + 1j * ((104729 * t) % 89 - 44)
    X = numpy.fft.fft(x.astype(numpy.complex128))
    # 15 significant digits: the tests' tolerance is 1e-12 of the norm.
    r15 = lambda v: [float("%.15g" % a) for a in v]
    cases.append({"n": n, "re": r15(X.real), "im": r15(X.imag)})
out = {"generator": "testdata/golden/fft.py", "numpy": numpy.__version__, "cases": cases}
with open("fft.json", "w") as f:
    json.dump(out, f)
    f.write("\n")
print("wrote fft.json:", len(cases), "cases, numpy", numpy.__version__)
