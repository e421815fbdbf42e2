#!/usr/bin/python3
"""Golden values for dsp/binomial.go: exact (Clopper-Pearson) two-sided
confidence intervals of a binomial proportion, from
scipy.stats.binomtest(k, n).proportion_ci(confidence_level, method="exact"),
which computes them from the beta distribution (Clopper & Pearson,
Biometrika 26(4):404-413, 1934).

Run: cd testdata/golden && /usr/bin/python3 binomial.py   (writes binomial.json)
"""
import json

import numpy as np
import scipy
from scipy import stats

CASES = [(0, 10, 0.95), (1, 10, 0.95), (5, 10, 0.95), (10, 10, 0.95),
         (0, 2000, 0.95), (3, 2000, 0.95), (1800, 2000, 0.95), (1000, 2000, 0.95),
         (54, 100, 0.99), (39, 100, 0.9), (999999, 1000000, 0.95), (7, 1000000, 0.95)]

out = {"numpy": np.__version__, "scipy": scipy.__version__, "cases": []}
for k, n, conf in CASES:
    ci = stats.binomtest(k, n).proportion_ci(confidence_level=conf, method="exact")
    out["cases"].append({"k": k, "n": n, "conf": conf, "lo": float(ci.low), "hi": float(ci.high)})
with open("binomial.json", "w") as f:
    json.dump(out, f, indent=1)
    f.write("\n")
