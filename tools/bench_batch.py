"""Benchmark of the command-line tool's --batch, end to end (process start, reading the
CSV, solving, writing the CSV), measured in one run against a plain Python loop calling
scipy.optimize.brentq on the same cases:

* given-K flashes, n = 10 (Rachford-Rice only): time per row of each, and the ratio;
* T-P flashes of a three-component library mixture: rows per second.

    python tools/bench_batch.py [rows] [path/to/flashduty]

Defaults: 1,000,000 rows and target/release/flashduty (build it with
`cargo build --release`). Needs numpy and scipy (versions in
bindings/python/requirements-ci.txt). The cases are invented, drawn from a fixed seed.
"""

import os
import pathlib
import subprocess
import sys
import tempfile
import time

import numpy as np

# The same Python loop as the package's benchmark (this folder is on the import path when
# the script is run).
from bench_python import rr_brentq

ROOT = pathlib.Path(__file__).resolve().parents[1]


def run(tool, path, out):
    start = time.perf_counter()
    subprocess.run([str(tool), "flash", "--batch", str(path), "--output", str(out)], check=True)
    return time.perf_counter() - start


def main(rows=1_000_000, tool=ROOT / "target" / "release" / "flashduty"):
    rng = np.random.default_rng(20261203)
    z = rng.uniform(0.05, 1.0, size=(rows, 10))
    z /= z.sum(axis=1, keepdims=True)
    k = np.exp(rng.uniform(np.log(0.01), np.log(100.0), size=(rows, 10)))
    with tempfile.TemporaryDirectory() as d:
        d = pathlib.Path(d)
        given_k = d / "given_k.csv"
        with open(given_k, "w") as f:
            f.write("command,z,K\n")
            for zr, kr in zip(z, k):
                f.write("flash," + ";".join(repr(float(v)) for v in zr) + "," + ";".join(repr(float(v)) for v in kr) + "\n")
        batch = run(tool, given_k, d / "out.csv") / rows
        loop_rows = min(rows, 5_000)
        start = time.perf_counter()
        for r in range(loop_rows):
            rr_brentq(z[r], k[r])
        loop = (time.perf_counter() - start) / loop_rows
        print(f"given-K n = 10, {rows} rows: flashduty --batch {batch * 1e6:.2f} us/row end to end; "
              f"Python loop + brentq {loop * 1e6:.2f} us/row ({loop_rows} rows); ratio {loop / batch:.1f}x")

        tp_rows = max(rows // 5, 1)
        tp = d / "tp.csv"
        t = rng.uniform(330.0, 400.0, size=tp_rows)
        p = rng.uniform(0.8e5, 2.0e5, size=tp_rows)
        with open(tp, "w") as f:
            f.write("command,components,z,T,P\n")
            for tr, pr in zip(t, p):
                f.write(f"flash,n-hexane;n-heptane;toluene,0.3;0.4;0.3,{float(tr)!r},{float(pr)!r}\n")
        seconds = run(tool, tp, d / "tp_out.csv")
        print(f"T-P flashes, {tp_rows} rows: {tp_rows / seconds:,.0f} rows/s end to end ({os.cpu_count()} cores)")


if __name__ == "__main__":
    rows = int(sys.argv[1]) if len(sys.argv) > 1 else 1_000_000
    tool = pathlib.Path(sys.argv[2]) if len(sys.argv) > 2 else ROOT / "target" / "release" / "flashduty"
    main(rows, tool)
