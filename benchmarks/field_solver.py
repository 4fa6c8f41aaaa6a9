"""Time the full-field Helmholtz solver on a 12 x 12 wavelength region.

Run:  python3 benchmarks/field_solver.py [points_per_wavelength ...]

Prints, for each resolution, the number of complex unknowns, the number of triangles and
the wall-clock seconds for mesh + assembly + sparse LU solve, and for evaluating the total
field on a 241 x 241 grid. The layout is an invented entrance between two arms with
non-collinear heads and a detached breakwater, so that the mesh has several tips and a
corner to grade and conform to.
"""

from __future__ import annotations

import sys
import time

import numpy as np

from harbor.solver.field import solve_field


def main(argv=None):
    argv = sys.argv[1:] if argv is None else argv
    resolutions = [float(a) for a in argv] or [8.0, 10.0, 12.0]
    L = 50.0  # m; the region is 12 L x 12 L = 600 m x 600 m
    region = (0.0, 0.0, 12 * L, 12 * L)
    barriers = [
        np.array([[-100.0, 300.0], [250.0, 300.0]]),              # west arm, runs out
        np.array([[700.0, 260.0], [420.0, 330.0], [380.0, 420.0]]),  # east arm, dog-leg
        np.array([[200.0, 120.0], [400.0, 140.0]]),               # detached breakwater
    ]
    print(f"region 12 x 12 wavelengths (L = {L:g} m), direction 70 deg")
    print(f"{'ppw':>5} {'unknowns':>9} {'triangles':>9} {'solve s':>8} {'grid s':>7}")
    for ppw in resolutions:
        t0 = time.perf_counter()
        sol = solve_field(barriers, L, 70.0, region, points_per_wavelength=ppw)
        t1 = time.perf_counter()
        xs = np.linspace(region[0], region[2], 241)
        ys = np.linspace(region[1], region[3], 241)
        sol.grid(xs, ys)
        t2 = time.perf_counter()
        print(f"{ppw:5.1f} {sol.n_unknowns:9d} {sol.n_triangles:9d} {t1 - t0:8.2f} "
              f"{t2 - t1:7.2f}")


if __name__ == "__main__":
    main()
