#!/usr/bin/env python3
"""Times scipy.optimize.nnls on a CSV problem, for `cargo xtask bench-solver`.

usage: scipy_nnls_time.py A.csv y.csv REPEATS
Prints one JSON object: median seconds per solve (matrix already in memory, as `traycast nnls --repeat`
measures), the objective ||Ax - y||^2, and the SciPy version. maxiter = 50n as recommended for SciPy >= 1.16.
"""
import json
import statistics
import sys
import time

import numpy as np
import scipy
from scipy.optimize import nnls

a = np.loadtxt(sys.argv[1], delimiter=",", ndmin=2)
y = np.loadtxt(sys.argv[2], delimiter=",", ndmin=1)
reps = int(sys.argv[3])
n = a.shape[1]
times = []
for _ in range(reps):
    start = time.perf_counter()
    x, rnorm = nnls(a, y, maxiter=50 * n)
    times.append(time.perf_counter() - start)
print(json.dumps({"solve_seconds_median": statistics.median(times), "objective": float(rnorm ** 2),
                  "scipy": scipy.__version__, "numpy": np.__version__}))
