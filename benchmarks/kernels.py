"""Throughput of the kernels on a million points (median of several runs).

    python benchmarks/kernels.py [--points N] [--repeat R]

Prints points per second for ``semi_infinite`` and for ``gap`` with both methods.
"""

import argparse
import statistics
import time

import numpy as np

import harbor


def bench(fn, repeat):
    times = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return statistics.median(times)


def main(argv=None):
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--points", type=int, default=1_000_000)
    ap.add_argument("--repeat", type=int, default=5)
    args = ap.parse_args(argv)
    n = int(np.sqrt(args.points))
    L = 50.0
    x, y = np.meshgrid(np.linspace(-10 * L, 10 * L, n), np.linspace(-5 * L, 15 * L, n))
    cases = [
        ("semi_infinite", lambda: harbor.semi_infinite(x, y, L, 60.0)),
        ("gap superposition B=2L", lambda: harbor.gap(x, y, L, 60.0, 2 * L, method="superposition")),
        ("gap exact B=0.5L", lambda: harbor.gap(x, y, L, 60.0, 0.5 * L, method="exact")),
        ("gap exact B=2L", lambda: harbor.gap(x, y, L, 60.0, 2 * L, method="exact")),
    ]
    print(f"{x.size} points, median of {args.repeat} runs")
    for name, fn in cases:
        t = bench(fn, args.repeat)
        print(f"{name:28s} {t:8.3f} s  {x.size / t / 1e6:8.2f} M points/s")


if __name__ == "__main__":
    main()
