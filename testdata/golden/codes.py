#!/usr/bin/python3
"""Golden polyphase codes for package dsp (Frank, P1-P4, Zadoff-Chu).

Computes each code's phases from the published formulas, independently of
the Go code, and its aperiodic autocorrelation with scipy.signal.correlate
(direct method); writes codes.json next to this script.

Formulas (chips numbered as in the papers, 1-based unless noted):
  Frank (Frank, IEEE Trans. IT-9, 1963; Levanon & Mozeson 2004 ch. 6):
      phi[n,k] = 2*pi*(n-1)*(k-1)/M, group n, chip k in group, N = M^2
  P1 (Lewis & Kretschmer, IEEE Trans. AES-18(5), 1982):
      phi[j,i] = -(pi/M)*(M-(2j-1))*((j-1)M+(i-1)), group j, chip i
  P2 (same paper, M even):
      phi[j,i] = ((pi/2)(M-1)/M - (pi/M)(i-1))*(M+1-2j)
  P3, P4 (Lewis & Kretschmer, IEEE Trans. AES-17(3), 1981), i = 1..N:
      P3: pi*(i-1)^2/N;  P4: pi*(i-1)^2/N - pi*(i-1)
  Zadoff-Chu (Chu, IEEE Trans. IT-18, 1972), n = 0..N-1, q = 0:
      x_u(n) = exp(-j*pi*u*n*(n+cf)/N), cf = N mod 2

PSL = max_{k != 0} |r_k| with r_0 = N; PSLR = 20 log10(PSL/N);
ISLR = 10 log10(sum_{k != 0} |r_k|^2 / N^2) (two-sided).
Periodic ACF of ZC via numpy FFT (max |r_k|, k != 0, relative to N).

Run: /usr/bin/python3 testdata/golden/codes.py
"""
import json
import os

import numpy as np
import scipy
import scipy.signal


def frank(m):
    return np.array([2 * np.pi * (n - 1) * (k - 1) / m
                     for n in range(1, m + 1) for k in range(1, m + 1)])


def p1(m):
    return np.array([-(np.pi / m) * (m - (2 * j - 1)) * ((j - 1) * m + (i - 1))
                     for j in range(1, m + 1) for i in range(1, m + 1)])


def p2(m):
    assert m % 2 == 0
    return np.array([((np.pi / 2) * (m - 1) / m - (np.pi / m) * (i - 1)) * (m + 1 - 2 * j)
                     for j in range(1, m + 1) for i in range(1, m + 1)])


def p3(n):
    i = np.arange(1, n + 1)
    return np.pi * (i - 1) ** 2 / n


def p4(n):
    i = np.arange(1, n + 1)
    return np.pi * (i - 1) ** 2 / n - np.pi * (i - 1)


def zc(n, u):
    k = np.arange(n)
    cf = n % 2
    return -np.pi * u * k * (k + cf) / n


def metrics(ph):
    x = np.exp(1j * ph)
    n = len(x)
    r = scipy.signal.correlate(x, x, mode="full", method="direct")
    mag = np.abs(r)
    side = np.delete(mag, n - 1)
    psl = side.max()
    return {
        "psl": float(psl),
        "pslr_db": float(20 * np.log10(psl / n)),
        "islr_db": float(10 * np.log10(np.sum(side ** 2) / n ** 2)),
        "peak": float(mag[n - 1]),
    }


def periodic_max_sidelobe(ph):
    x = np.exp(1j * ph)
    r = np.fft.ifft(np.abs(np.fft.fft(x)) ** 2)
    return float(np.abs(r[1:]).max() / len(x))


def main():
    cases = []
    for m in (2, 4, 8, 10):
        cases.append(("frank", m * m, 0, frank(m)))
        cases.append(("p1", m * m, 0, p1(m)))
        if m % 2 == 0:
            cases.append(("p2", m * m, 0, p2(m)))
    for n in (16, 20, 64, 100, 1000):
        cases.append(("p3", n, 0, p3(n)))
        cases.append(("p4", n, 0, p4(n)))
    for n, u in ((63, 1), (64, 1), (101, 1), (101, 7), (63, 5), (13, 4)):
        cases.append(("zadoffchu", n, u, zc(n, u)))

    out = []
    for kind, n, root, ph in cases:
        assert len(ph) == n
        rec = {"kind": kind, "n": n, "root": root, "phases": [float(v) for v in ph]}
        rec.update(metrics(ph))
        if kind == "zadoffchu":
            rec["periodic_max_sidelobe"] = periodic_max_sidelobe(ph)
        out.append(rec)

    doc = {
        "generator": "testdata/golden/codes.py",
        "numpy": np.__version__,
        "scipy": scipy.__version__,
        "conventions": "phases in rad per chip; ACF by scipy.signal.correlate "
                       "(direct); PSLR 20log10(max|r_k|/N), ISLR two-sided",
        "codes": out,
    }
    path = os.path.join(os.path.dirname(os.path.abspath(__file__)), "codes.json")
    with open(path, "w") as f:
        json.dump(doc, f, indent=1)
        f.write("\n")
    for r in out:
        print(f'{r["kind"]:10s} N={r["n"]:5d} u={r["root"]:3d} PSLR {r["pslr_db"]:8.3f} dB  ISLR {r["islr_db"]:8.3f} dB')


if __name__ == "__main__":
    main()
