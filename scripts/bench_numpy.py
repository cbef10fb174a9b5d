#!/usr/bin/python3
"""numpy anchor for `npm run bench`: median milliseconds of numpy.linalg.lstsq on the same data
(column-major x as written by bench/perf.test.ts, plus an intercept column). Run single-threaded
(OPENBLAS_NUM_THREADS=1 is set by the caller)."""
import sys
import time

import numpy as np

fx, fy, m, k, reps = sys.argv[1], sys.argv[2], int(sys.argv[3]), int(sys.argv[4]), int(sys.argv[5])
x = np.fromfile(fx, dtype="<f8").reshape(k, m).T
y = np.fromfile(fy, dtype="<f8")
X = np.column_stack([np.ones(m), x])
ts = []
for _ in range(reps):
    t = time.perf_counter()
    b = np.linalg.lstsq(X, y, rcond=None)[0]
    ts.append(time.perf_counter() - t)
ts.sort()
print(ts[len(ts) // 2] * 1000)
