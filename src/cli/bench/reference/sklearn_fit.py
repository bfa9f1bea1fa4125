"""Reference timing for `npm run bench`: scikit-learn LogisticRegression without penalty on a synthetic data set.

Loads the float64 files written by src/cli/bench/synth.ts (same values as the CSV) BEFORE the timer, then times
LogisticRegression(penalty=None, solver=..., tol=..., max_iter=...).fit(X, y) only. Prints one JSON line.
Usage: python3 sklearn_fit.py X_BIN Y_BIN N P SOLVER TOL REPEATS
"""
import json
import resource
import sys
import time
import warnings

import numpy as np
import sklearn
from sklearn.linear_model import LogisticRegression
from threadpoolctl import threadpool_info


def main():
    x_bin, y_bin, n, p, solver, tol, repeats = sys.argv[1:8]
    n, p, tol, repeats = int(n), int(p), float(tol), int(repeats)
    X = np.ascontiguousarray(np.fromfile(x_bin, dtype="<f8").reshape(p, n).T)
    y = np.fromfile(y_bin, dtype="<f8")
    seconds, cpu, caught = [], [], []
    for _ in range(repeats):
        m = LogisticRegression(penalty=None, solver=solver, tol=tol, max_iter=10000)
        with warnings.catch_warnings(record=True) as w:
            warnings.simplefilter("always")
            c0, t0 = time.process_time(), time.perf_counter()
            m.fit(X, y)
            seconds.append(time.perf_counter() - t0)
            cpu.append(time.process_time() - c0)
        caught = [str(x.message).splitlines()[0] for x in w]
    beta = [float(m.intercept_[0])] + [float(b) for b in m.coef_[0]]
    blas = [f"{i['internal_api']} {i['version']} threads={i['num_threads']}" for i in threadpool_info()]
    print(json.dumps({
        "library": f"scikit-learn {sklearn.__version__} LogisticRegression(penalty=None, solver='{solver}', tol={tol})",
        "seconds": seconds, "cpuSeconds": cpu, "iterations": int(m.n_iter_[0]), "beta": beta, "warnings": caught, "threads": blas,
        "maxRssBytes": resource.getrusage(resource.RUSAGE_SELF).ru_maxrss * 1024,
    }))


main()
