#!/usr/bin/python3
"""Golden least-squares (minimum integrated sidelobe) mismatched filters
for Barker-13 at one sample per chip, solved with numpy.linalg.lstsq.

    /usr/bin/python3 lsfilter.py  -> lsfilter.json

Problem (as package dsp's LeastSquaresFilter): A is the (N+L-1) x L full
convolution matrix A[r][m] = c[r-(L-1)+m], e a unit delta at row
(N+L-2)//2; g = argmin ||A g - e||^2 and the filter is h = conj(g)
(real here). lead = L-1-centre. Figures are read on the samples.
"""
import json

import numpy
import scipy

code = numpy.array([1, 1, 1, 1, 1, -1, -1, 1, 1, -1, 1, -1, 1], float)
n = len(code)
cases = []
for length in [13, 39, 45, 65]:
    rows = n + length - 1
    a = numpy.zeros((rows, length))
    for r in range(rows):
        for m in range(length):
            i = r - (length - 1) + m
            if 0 <= i < n:
                a[r, m] = code[i]
    centre = (n + length - 2) // 2
    e = numpy.zeros(rows)
    e[centre] = 1
    g = numpy.linalg.lstsq(a, e, rcond=None)[0]
    y = a @ g
    peak = abs(y[centre])
    side = numpy.delete(y, centre)
    cases.append({
        "length": length,
        "lead": length - 1 - centre,
        "h": g.tolist(),
        "pslr_db": float(20 * numpy.log10(numpy.abs(side).max() / peak)),
        "mismatch_loss_db": float(-10 * numpy.log10((g @ a[centre]) ** 2 / ((code @ code) * (g @ g)))),
    })
out = {"generator": "testdata/golden/lsfilter.py", "numpy": numpy.__version__,
       "scipy": scipy.__version__, "code": "barker13", "cases": cases}
with open("lsfilter.json", "w") as f:
    json.dump(out, f, indent=0)
    f.write("\n")
for c in cases:
    print(c["length"], "PSLR %.3f dB, loss %.4f dB" % (c["pslr_db"], c["mismatch_loss_db"]))
