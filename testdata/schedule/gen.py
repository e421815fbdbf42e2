#!/usr/bin/python3
"""Independent check of PRF-schedule unfolding and M-of-N detection.

Written from docs/detection.md §11 (not from the Go code): for random
schedules it computes

* the unfolded ranges: the folds a_1 + i*R_1 of the first detecting CPI
  in [0, R_u), kept when they fold to within one gate of every other
  CPI's apparent range (circular distance), merged when closer than a gate,
  R_u = c*lcm(PRI)/2 -- in exact integer arithmetic on the gate grid (PRIs
  are whole multiples of a grid Delta with Delta*fs whole), so no
  rounding enters; the true range, found by the Chinese remainder theorem
  (own extended-Euclid solver), must be among them;
* the unfolded range rates: the same rule with centred folding by
  lambda/(2*PRI), tolerance the two widest half Doppler bins, within
  +-lambda/(4*Delta) (at most 1e4 m/s), in floating point;
* the M-of-N probability: enumerating all 2^N outcomes of independent
  CPIs.

Writes cases.json, read by scenarios/schedule_diff_test.go. Run with
Debian's /usr/bin/python3 (numpy): cd testdata/schedule && /usr/bin/python3 gen.py
"""
import itertools
import json
import math
import random

import numpy as np

C = 299792458.0
SEED = 20261202


def egcd(a, b):
    if b == 0:
        return a, 1, 0
    g, x, y = egcd(b, a % b)
    return g, y, x - (a // b) * y


def crt(res, mods):
    """Smallest x >= 0 with x = r_i (mod m_i), and lcm(m_i); None if none."""
    x, m = 0, 1
    for r, n in zip(res, mods):
        g, p, _ = egcd(m, n)
        if (r - x) % g:
            return None, None
        t = ((r - x) // g * p) % (n // g)
        x += m * t
        m = m // g * n
        x %= m
    return x, m


def lcm(v):
    out = 1
    for n in v:
        out = out * n // math.gcd(out, n)
    return out


def range_case(rng):
    n = rng.randint(2, 4)
    fs = rng.choice([1e6, 2e6, 2.5e6, 4e6, 5e6, 1e7])
    D = 1 if rng.random() < 0.3 else rng.randint(2, 40)  # Delta in samples: Delta = D / fs
    delta = D / fs
    while True:
        mult = rng.sample(range(5, 40), n)
        if lcm(mult) * D < 3_000_000:  # keeps the enumeration small
            break
    pris = [m * delta for m in mult]
    gate = C / (2 * fs)
    L = [m * D for m in mult]        # unambiguous ranges in gates
    lim_g = lcm(L)                   # combined, in gates
    r = rng.randrange(lim_g)         # true range in gates
    a = [r % l for l in L]           # measured apparent gates
    # Candidates per the docs, in integers: folds of CPI 1, within one
    # gate of every other CPI's measurement, merged within a gate.
    # The search stops at R_u or 1e8 m, whichever is nearer.
    top = min(lim_g, math.ceil(1e8 / gate))
    cands = []
    for x in range(a[0], top, L[0]):
        if all(min((x - ai) % li, (ai - x) % li) <= 1 for ai, li in zip(a[1:], L[1:])):
            if not cands or x - cands[-1] > 1:
                cands.append(x)
    x0, m = crt(a, L)
    assert m == lim_g and x0 == r and (r in cands or r >= top), (a, L, r, cands)
    return {
        "pri_s": pris, "gate_m": gate,
        "apparent_m": [ai * gate for ai in a],
        "true_m": r * gate,
        "limit_m": min(lim_g * gate, 1e8),
        "candidates_m": [x * gate for x in cands],
    }


def rate_case(rng):
    n = rng.randint(2, 4)
    lam = C / rng.uniform(1e9, 10e9)
    delta = rng.uniform(2e-6, 20e-6)
    mult = rng.sample(range(5, 30), n)
    pris = [m * delta for m in mult]
    bins = [rng.choice([8, 16, 32, 64]) for _ in pris]
    vb = [lam / (2 * p) for p in pris]
    # The grid is the largest Delta that every PRI is a whole multiple of.
    first = lam / (2 * delta * math.gcd(*mult))
    lim = min(first / 2, 1e4)
    v = rng.uniform(-0.95 * lim, 0.95 * lim)

    def fold(x, p):  # centred: [-p/2, p/2)
        return (x + p / 2) % p - p / 2

    app, tols = [], []
    for p, nb, b in zip(pris, bins, vb):
        w = b / nb  # bin width in m/s, lambda/(2*PRI*bins)
        app.append(w * round(fold(v, b) / w))  # the bin's centre
        tols.append(w / 2)
    st = sorted(tols)
    tol = st[-1] + st[-2]

    def dist(x, a, p):
        d = abs(fold(x, p) - a)
        return min(d, p - d)
    cands = []
    k = math.floor((-lim - app[0]) / vb[0])
    while app[0] + k * vb[0] <= lim + tol:
        x = app[0] + k * vb[0]
        k += 1
        if x < -lim - tol:
            continue
        if all(dist(x, a, b) <= tol for a, b in zip(app[1:], vb[1:])):
            if not cands or x - cands[-1] > tol:
                cands.append(x)
    assert any(abs(c - v) <= tol for c in cands), (v, cands)
    return {"pri_s": pris, "lambda_m": lam, "apparent_mps": app, "tol_mps": tols,
            "true_mps": v, "limit_mps": lim, "candidates_mps": cands}


def mofn_case(rng):
    n = rng.randint(1, 8)
    p = [rng.choice([0.0, 1.0, rng.random()]) if rng.random() < 0.2 else rng.random() for _ in range(n)]
    m = rng.randint(0, n + 1)
    total = 0.0
    for out in itertools.product([0, 1], repeat=n):
        if sum(out) >= m:
            total += np.prod([pi if o else 1 - pi for pi, o in zip(p, out)])
    return {"p": p, "m": m, "pd": float(total)}


def main():
    rng = random.Random(SEED)
    out = {
        "numpy": np.__version__, "seed": SEED,
        "ranges": [range_case(rng) for _ in range(150)],
        "rates": [rate_case(rng) for _ in range(150)],
        "mofn": [mofn_case(rng) for _ in range(100)],
    }
    multi = sum(len(c["candidates_m"]) > 1 for c in out["ranges"])
    vmulti = sum(len(c["candidates_mps"]) > 1 for c in out["rates"])
    print(f"ranges: {multi} of 150 ambiguous; rates: {vmulti} of 150 ambiguous")
    with open("cases.json", "w") as f:
        json.dump(out, f, indent=None)
        f.write("\n")


if __name__ == "__main__":
    main()
