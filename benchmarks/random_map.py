"""Directional random sea through a collinear entrance over a 500 x 500 grid.

    python benchmarks/random_map.py [--n 500] [--repeat 3] [--plain-components 8]
                                    [--arm-wavelengths 4]

The arms reach ``--arm-wavelengths`` peak wavelengths beyond the heads (rooted there), so
the grid, 12 x 12 wavelengths, has points outside the basin where the general method runs,
as on a real layout (with ``--arm-wavelengths 0`` the arms reach 1e6 m and every point is
in the basin: the gap kernels alone). The former per-component numpy path
(``harbor.solver.random.FUSED = False``) is timed once beside the fused one.

Times the whole random-sea map (B = 2 L, s_max = 10, default discretisation) with
harbor's solver, median of several runs, and prints component-points per second. Side by
side, in the same run, it measures the plain approach -- the Penney & Price superposition
evaluated per component over the whole grid with scipy's Fresnel integrals and numpy
temporaries -- on a few components (the full plain map would take minutes) and reports
its throughput and the ratio.
"""

import argparse
import statistics
import time

import numpy as np

import harbor
from harbor.geometry.layout import Arm, Layout
from harbor.solver.kernels.fresnel import amplitude_reference
from harbor.solver.kernels.sommerfeld import sommerfeld_terms
from harbor.solver.random import random_sea_field
from harbor.waves import random_components

DEPTH = 12.0
T13 = 8.0


def plain_semi_infinite(x, y, L, direction):
    """Sommerfeld's solution with scipy's Fresnel integrals (no reuse across components)."""
    a = np.deg2rad(direction)
    k = 2 * np.pi / L
    lit1, lit2, d = sommerfeld_terms(x, y, k, a, amplitude=amplitude_reference)
    inc = np.exp(1j * k * (x * np.cos(a) + y * np.sin(a)))
    ref = np.exp(1j * k * (x * np.cos(a) - y * np.sin(a)))
    return np.where(lit1, inc, 0) + np.where(lit2, ref, 0) + d


def plain_component(x, y, L, direction, B):
    a = np.deg2rad(direction)
    k = 2 * np.pi / L
    b = B / 2
    right = np.exp(1j * k * b * np.cos(a)) * plain_semi_infinite(x - b, y, L, direction)
    left = np.exp(-1j * k * b * np.cos(a)) * plain_semi_infinite(-x - b, y, L, 180 - direction)
    return np.abs(right + left - np.exp(1j * k * (x * np.cos(a) + y * np.sin(a)))) ** 2


def main(argv=None):
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--n", type=int, default=500, help="grid points per side (default 500)")
    ap.add_argument("--repeat", type=int, default=3)
    ap.add_argument("--plain-components", type=int, default=8)
    ap.add_argument("--arm-wavelengths", type=float, default=4.0)
    args = ap.parse_args(argv)

    Lp = harbor.wavelength(1.05 * T13, DEPTH)
    B = 2.0 * Lp
    far = 1e6 if args.arm_wavelengths <= 0 else B / 2 + args.arm_wavelengths * Lp
    layout = Layout(arms=(Arm("left", np.array([[-far, 0.0], [-B / 2, 0.0]]), rooted_start=True),
                          Arm("right", np.array([[far, 0.0], [B / 2, 0.0]]), rooted_start=True)))
    x = np.linspace(-6 * Lp, 6 * Lp, args.n)
    y = np.linspace(-2 * Lp, 10 * Lp, args.n)
    X, Y = np.meshgrid(x, y)
    comps = random_components(1.0, T13, s_max=10.0)
    n_comp = len(comps)
    cp = X.size * n_comp

    random_sea_field(layout, X[:2, :2], Y[:2, :2], comps, DEPTH, np.pi / 2)   # compile, warm caches
    times = []
    for _ in range(args.repeat):
        t0 = time.perf_counter()
        res = random_sea_field(layout, X, Y, comps, DEPTH, np.pi / 2)
        times.append(time.perf_counter() - t0)
    t = statistics.median(times)
    print(f"grid {args.n} x {args.n}, {n_comp} components (s_max 10), B = 2 L = {B:.1f} m")
    print(f"harbor: {t:.2f} s per map (median of {args.repeat}), "
          f"{cp / t / 1e6:.1f} M component-points/s; methods {sorted(res.methods)}")
    from harbor.solver import random as _random

    _random.FUSED = False
    try:
        t0 = time.perf_counter()
        old = random_sea_field(layout, X, Y, comps, DEPTH, np.pi / 2)
        t_old = time.perf_counter() - t0
    finally:
        _random.FUSED = True
    print(f"former numpy path: {t_old:.2f} s per map ({t_old / t:.1f}x slower), "
          f"max |dK| {np.max(np.abs(old.kd - res.kd)):.1e}")

    rng = np.random.default_rng(1)
    pick = rng.choice(n_comp, size=args.plain_components, replace=False)
    t0 = time.perf_counter()
    for j in pick:
        L = harbor.wavelength(comps.period[j], DEPTH)
        direction = 90 + np.degrees(comps.angle[j])
        if 0 < direction < 180:
            plain_component(X, Y, L, direction, B)
    tp = time.perf_counter() - t0
    plain_rate = X.size * args.plain_components / tp
    print(f"plain (scipy Fresnel per component): {plain_rate / 1e6:.2f} M component-points/s "
          f"(measured on {args.plain_components} components; a whole map would take "
          f"{cp / plain_rate:.0f} s)")
    print(f"speed-up: {cp / t / plain_rate:.1f}x")


if __name__ == "__main__":
    main()
