#!/usr/bin/python3
"""Times scipy.signal.correlate(method="fft") on the sizes of the Go
benchmark BenchmarkCorrelator (package dsp), for comparison.

    /usr/bin/python3 bench_correlate.py

Complex128 input x of n samples, reference h of m samples, mode "full"
(n+m-1 outputs; package dsp returns the n of them starting at m-1).
Prints the median of several runs, measured inside this process.
"""
import statistics
import time

import numpy
import scipy
from scipy import signal

rng = numpy.random.Generator(numpy.random.PCG64(3))
print("scipy", scipy.__version__, "numpy", numpy.__version__)
for n, m, runs in [(65536, 5000, 21), (1048576, 50000, 7)]:
    x = rng.standard_normal(n) + 1j * rng.standard_normal(n)
    h = rng.standard_normal(m) + 1j * rng.standard_normal(m)
    signal.correlate(x, h, mode="full", method="fft")  # warm up
    times = []
    for _ in range(runs):
        t0 = time.perf_counter()
        signal.correlate(x, h, mode="full", method="fft")
        times.append(time.perf_counter() - t0)
    print(f"n={n} m={m}: median {statistics.median(times) * 1e3:.2f} ms "
          f"(min {min(times) * 1e3:.2f}, runs {runs})")
