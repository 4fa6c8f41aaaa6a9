"""Unknowns, factorisation time and memory of the full-field engine as the domain grows.

Run:  python3 benchmarks/fullfield_scaling.py [12 24 40] [--old]

For a square area of N x N wavelengths (an invented detached breakwater in the middle,
constant depth), prints the unknowns, the factor's non-zeros (x 16 bytes = its memory),
the seconds of mesh, assembly and factorisation, with the METIS nested-dissection
ordering and, for comparison, SuperLU's own minimum-degree ordering on the same matrix;
with --old, today's solver (harbor.solver.field.solve_field) on the same area in the same
process. Wall-clock seconds on a shared machine.
"""

from __future__ import annotations

import resource
import sys
import time

import numpy as np

from harbor.geometry.layout import Arm, Layout
from harbor.solver.fullfield import HarbourModel
from harbor.solver.fullfield.engine import FrequencySolver
from harbor.waves.dispersion import wavelength


def main(argv=None):
    argv = sys.argv[1:] if argv is None else argv
    old = "--old" in argv
    mmd = "--mmd" in argv
    sizes = [float(v) for v in argv if not v.startswith("--")] or [12.0, 24.0, 40.0]
    T, h = 8.0, 10.0
    L = wavelength(T, h)
    print(f"T = {T:g} s, depth {h:g} m, L = {L:.1f} m, 10 elements per wavelength")
    print(f"{'N':>4} {'unknowns':>9} {'fill nnz':>10} {'MB':>6} {'mesh s':>7} "
          f"{'asm s':>6} {'metis s':>8} {'mmd s':>7} {'old unk':>8} {'old s':>6}")
    for n in sizes:
        half = 0.5 * n * L
        arm = Arm("detached", np.array([[-0.2 * half, 0.0], [0.2 * half, 0.0]]))
        pts = np.array([[-half, -half], [half, half]])
        m = HarbourModel(Layout(arms=(arm,)), h, points=pts)
        info = m.frequency(T)
        s = m._setup(T)
        mmd_s = float("nan")
        if mmd:
            t0 = time.perf_counter()
            FrequencySolver.build(s.solver.space, T, lambda x, y: np.full(np.shape(x), h),
                                  h, ordering="mmd")
            mmd_s = time.perf_counter() - t0
        old_unk, old_s = 0, float("nan")
        if old:
            from harbor.solver.field import solve_field

            t0 = time.perf_counter()
            sol = solve_field([arm.line], L, 70.0, (-half, -half, half, half))
            old_s = time.perf_counter() - t0
            old_unk = sol.n_unknowns
        print(f"{n:4.0f} {info['unknowns']:9d} {info['fill']:10d} "
              f"{info['fill'] * 16 / 1e6:6.0f} {info['mesh_s']:7.1f} "
              f"{info['assemble_s']:6.1f} {info['factor_s']:8.1f} {mmd_s:7.1f} "
              f"{old_unk:8d} {old_s:6.1f}", flush=True)
        del m, s
    print(f"peak resident memory {resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024:.0f} MB")


if __name__ == "__main__":
    main()
