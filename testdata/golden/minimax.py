#!/usr/bin/env python3
"""Peak-sidelobe-optimal (minimax) mismatched filters by linear programming.

Reference for dsp/minimax_test.go: scipy.optimize.linprog solves
  minimise t  s.t.  |y_r| <= t for every lag r but the centre,  y_centre = 1,
with y = A g the full correlation of the code with the filter (the same
matrix as LeastSquaresFilter). Real codes use the exact constraints
+-y_r <= t; complex codes bound |y_r| by a 64-sided polygon (0.01 dB).
Writes minimax.json with the PSLR in dB of each case.
"""
import json

import numpy as np
import scipy
from scipy.optimize import linprog


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


def minimax(code, length, faces=64):
    code = np.asarray(code, complex)
    a = full_matrix(code, length)
    rows = a.shape[0]
    c = (len(code) + length - 2) // 2
    real = np.all(code.imag == 0)
    side = [r for r in range(rows) if r != c]
    if real:
        ar = a.real
        nv = length + 1
        g_rows = []
        for r in side:
            g_rows.append(np.append(ar[r], -1))
            g_rows.append(np.append(-ar[r], -1))
        a_eq = [np.append(ar[c], 0)]
        b_eq = [1]
    else:
        nv = 2 * length + 1
        re = np.hstack([a.real, -a.imag])
        im = np.hstack([a.imag, a.real])
        g_rows = []
        for r in side:
            for f in range(faces):
                th = 2 * np.pi * f / faces
                g_rows.append(np.append(np.cos(th) * re[r] + np.sin(th) * im[r], -1))
        a_eq = [np.append(re[c], 0), np.append(im[c], 0)]
        b_eq = [1, 0]
    cost = np.zeros(nv)
    cost[-1] = 1
    res = linprog(cost, A_ub=np.array(g_rows), b_ub=np.zeros(len(g_rows)),
                  A_eq=np.array(a_eq), b_eq=b_eq, bounds=[(None, None)] * nv, method="highs")
    assert res.success, res.message
    x = res.x
    g = x[:length] + (1j * x[length:2 * length] if not real else 0)
    y = a @ g
    mag = np.abs(y)
    peak = mag[c]
    mag[c] = 0
    return 20 * np.log10(mag.max() / peak)


def main():
    barker13 = [1, 1, 1, 1, 1, -1, -1, 1, 1, -1, 1, -1, 1]
    barker3 = [1, 1, -1]
    barker7 = [1, 1, 1, -1, -1, 1, -1]
    barker11 = [1, 1, 1, -1, -1, -1, 1, -1, -1, 1, -1]
    n = 16
    p4 = [np.exp(1j * (np.pi * i * i / n - np.pi * i)) for i in range(n)]
    cases = [
        # Issue 12's reproducer: Barker 3 at twice its length, one tap per chip.
        {"code": "barker3", "length": 6, "pslr_db": minimax(barker3, 6)},
        {"code": "barker7", "length": 14, "pslr_db": minimax(barker7, 14)},
        {"code": "barker11", "length": 33, "pslr_db": minimax(barker11, 33)},
        {"code": "barker13", "length": 39, "pslr_db": minimax(barker13, 39)},
        {"code": "barker13", "length": 45, "pslr_db": minimax(barker13, 45)},
        {"code": "p4-16", "length": 48, "pslr_db": minimax(p4, 48)},
    ]
    out = {"numpy": np.__version__, "scipy": scipy.__version__, "cases": cases}
    with open("minimax.json", "w") as f:
        json.dump(out, f, indent=1)
    print(json.dumps(out, indent=1))


if __name__ == "__main__":
    main()
