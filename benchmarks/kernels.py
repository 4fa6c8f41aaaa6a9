"""Throughput of the kernels on a million points (median of several runs).

    python benchmarks/kernels.py [--points N] [--repeat R]

Prints points per second for ``semi_infinite`` and for ``gap`` with both methods. For
``semi_infinite`` and the superposition it runs, side by side in the same process, the
compiled single-pass evaluation (now the default), the former numpy path of the same
algorithm (``harbor.solver.kernels.sommerfeld.FUSED = False``: tabulated Fresnel
amplitude, complex temporaries) and a plain numpy/scipy baseline of the same formula
(scipy's Fresnel integrals, no table).

Measured (2 cores shared with other jobs, load average about 4; 1e6 points, median of 5):
semi_infinite 0.44 s numpy path -> 0.05-0.07 s compiled (6-8x; the issue's target
was 3x). See the README's performance section for the latest full table.
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
    from harbor.solver.kernels import sommerfeld

    def plain_semi_infinite():
        # the same closed form with scipy's Fresnel integrals and numpy temporaries
        from scipy import special

        a = np.radians(60.0)
        k = 2 * np.pi / L
        r = np.hypot(x, y)
        th = np.mod(np.arctan2(-y, x), 2 * np.pi)
        tot = 0
        for psi in (th - (np.pi - a), th + (np.pi - a)):
            S, C = special.fresnel(np.sqrt(2 * k * r) * np.cos(psi / 2) * np.sqrt(2 / np.pi))
            tot = tot + np.exp(-1j * k * r * np.cos(psi)) * np.sqrt(np.pi / 2) * (
                (0.5 + C) + 1j * (0.5 + S))
        return np.exp(-0.25j * np.pi) / np.sqrt(np.pi) * tot

    def old(fn):
        def run():
            sommerfeld.FUSED = False
            try:
                return fn()
            finally:
                sommerfeld.FUSED = True
        return run

    si = lambda: harbor.semi_infinite(x, y, L, 60.0)  # noqa: E731
    sup = lambda: harbor.gap(x, y, L, 60.0, 2 * L, method="superposition")  # noqa: E731
    cases = [
        ("semi_infinite plain scipy", plain_semi_infinite),
        ("semi_infinite numpy (old)", old(si)),
        ("semi_infinite compiled", si),
        ("gap superposition old B=2L", old(sup)),
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
