"""Benchmark: the Python package's NumPy batch Rachford-Rice call against a plain Python
loop calling scipy.optimize.brentq on the same n = 10 given-K cases, in one run. Prints the
time per flash of each and the ratio.

    python tools/bench_python.py [cases]       # default 20,000 cases

Needs the package built into the environment (`maturin develop --release -m
bindings/python/Cargo.toml`), numpy and scipy (versions in bindings/python/requirements-ci.txt).
"""

import sys
import time

import numpy as np
from scipy.optimize import brentq

import flashduty


def rr_brentq(z, k):
    f = lambda b: np.sum(z * (k - 1) / (1 + b * (k - 1)))  # noqa: E731
    if f(0.0) <= 0:
        return 0.0
    if f(1.0) >= 0:
        return 1.0
    lo, hi = 1 / (1 - k.max()), 1 / (1 - k.min())
    return brentq(f, max(0.0, lo + 1e-12), min(1.0, hi - 1e-12), xtol=1e-15)


def main(rows=20_000):
    rng = np.random.default_rng(20261203)
    z = rng.uniform(0.05, 1.0, size=(rows, 10))
    z /= z.sum(axis=1, keepdims=True)
    k = np.exp(rng.uniform(np.log(0.01), np.log(100.0), size=(rows, 10)))
    loop_rows = min(rows, 2_000)
    start = time.perf_counter()
    reference = [rr_brentq(z[r], k[r]) for r in range(loop_rows)]
    loop = (time.perf_counter() - start) / loop_rows
    best = float("inf")
    for _ in range(5):
        start = time.perf_counter()
        out = flashduty.rachford_rice_batch(z, k)
        best = min(best, (time.perf_counter() - start) / rows)
    worst = float(np.max(np.abs(out["vapour_fraction"][:loop_rows] - np.array(reference))))
    print(f"python loop + brentq: {loop * 1e6:.2f} us/flash ({loop_rows} cases)")
    print(f"flashduty.rachford_rice_batch: {best * 1e6:.3f} us/flash ({rows} cases, best of 5)")
    print(f"ratio: {loop / best:.0f}x; worst |d beta| against brentq {worst:.1e}")
    return loop / best


if __name__ == "__main__":
    main(int(sys.argv[1]) if len(sys.argv) > 1 else 20_000)
