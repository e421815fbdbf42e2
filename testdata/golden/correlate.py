#!/usr/bin/python3
"""Golden fast-correlation vectors from scipy.signal.correlate.

Run from this folder: /usr/bin/python3 correlate.py  -> correlate.json

For x of length n and ref h of length m, scipy's full correlation
z = correlate(x, h, mode="full") satisfies z[j + m - 1] = sum_k x[j+k] conj(h[k]),
so package dsp's y[j] (j = 0..n-1) is z[m-1 : m-1+n]; the file stores that slice.
Inputs are complex Gaussian from numpy's PCG64 with a fixed seed.
"""
import json

import numpy
import scipy
from scipy import signal

rng = numpy.random.Generator(numpy.random.PCG64(20240611))
cases = []
for n, m in [(1, 1), (7, 3), (64, 13), (300, 37), (400, 400), (1500, 129)]:
    x = rng.standard_normal(n) + 1j * rng.standard_normal(n)
    h = rng.standard_normal(m) + 1j * rng.standard_normal(m)
    z = signal.correlate(x, h, mode="full", method="direct")
    zf = signal.correlate(x, h, mode="full", method="fft")
    assert numpy.max(numpy.abs(z - zf)) < 1e-9 * numpy.max(numpy.abs(z))
    y = z[m - 1:m - 1 + n]
    cases.append({
        "n": n, "m": m,
        "x_re": x.real.tolist(), "x_im": x.imag.tolist(),
        "h_re": h.real.tolist(), "h_im": h.imag.tolist(),
        "y_re": y.real.tolist(), "y_im": y.imag.tolist(),
    })
out = {"generator": "testdata/golden/correlate.py", "scipy": scipy.__version__,
       "numpy": numpy.__version__, "cases": cases}
with open("correlate.json", "w") as f:
    json.dump(out, f)
    f.write("\n")
print("wrote correlate.json:", len(cases), "cases, scipy", scipy.__version__)
