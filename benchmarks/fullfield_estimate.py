"""Calibration of HarbourModel.estimate: estimated against measured cost of real solves.

Run:  python3 benchmarks/fullfield_estimate.py [case ...]

Each case runs in its own process (so that its peak resident memory is its own) and
prints, side by side, the estimate (made before anything is meshed) and the measured
unknowns, factor non-zeros, factor bytes (16 per complex non-zero + indices, as SuperLU
stores them), seconds of mesh + assembly, of the factorisation and of 36
back-substitutions, and the peak resident memory. Cases: the demo harbour at T = 10, 7
and 5 s, and an open square of 6, 9 and 12 wavelengths round a detached breakwater
(T = 8 s, h = 10 m). Wall-clock seconds on a shared machine.
"""

from __future__ import annotations

import json
import resource
import subprocess
import sys
import time

import numpy as np

CASES = ["demo10", "demo7", "demo5", "sq6", "sq9", "sq12"]


def _model(case):
    import harbor
    from harbor.geometry.layout import Arm, Layout
    from harbor.solver.assemble import grid_coordinates
    from harbor.solver.fullfield import HarbourModel
    from harbor.waves.dispersion import wavelength

    if case.startswith("demo"):
        sc = harbor.load_scenario("scenarios/demo.toml")
        gx, gy = grid_coordinates(sc.grid)
        pts = np.array([p.at for p in sc.points])
        m = HarbourModel(sc.layout, sc.site.depth, points=pts, grid=(gx, gy), g=sc.site.g)
        return m, float(case[4:])
    n = float(case[2:])
    T, h = 8.0, 10.0
    half = 0.5 * n * wavelength(T, h)
    arm = Arm("detached", np.array([[-0.2 * half, 0.0], [0.2 * half, 0.0]]))
    return HarbourModel(Layout(arms=(arm,)), h,
                        points=np.array([[-half, -half], [half, half]])), T


def run_case(case):
    m, T = _model(case)
    e = m.estimate([T], n_directions=36)
    t0 = time.perf_counter()
    info = m.frequency(T)
    t1 = time.perf_counter()
    m.directions(T, np.linspace(0.0, 350.0, 36))
    t2 = time.perf_counter()
    s = m._setup(T).solver
    L, U = s.lu.L, s.lu.U
    fbytes = (L.data.nbytes + L.indices.nbytes + U.data.nbytes + U.indices.nbytes)
    out = dict(case=case, est_unknowns=int(e.unknowns[0]), unknowns=info["unknowns"],
               est_fill=float(e.factor_bytes[0] / 20.0), fill=info["fill"],
               est_factor_bytes=float(e.factor_bytes[0]), factor_bytes=float(fbytes),
               est_seconds=float(e.seconds[0]), seconds=t2 - t0,
               setup_s=info["mesh_s"] + info["assemble_s"], factor_s=info["factor_s"],
               solve36_s=t2 - t1, est_peak_bytes=float(e.peak_bytes[0]),
               peak_bytes=resource.getrusage(resource.RUSAGE_SELF).ru_maxrss * 1024.0)
    print(json.dumps(out), flush=True)


def main(argv=None):
    argv = sys.argv[1:] if argv is None else argv
    if argv and argv[0] == "--one":
        run_case(argv[1])
        return
    cases = argv or CASES
    print(f"{'case':>7} {'unknowns est/meas':>20} {'factor MB est/meas':>19} "
          f"{'peak MB est/meas':>17} {'seconds est/meas':>17} "
          f"{'setup':>6} {'factor':>6} {'36 solves':>9}")
    for c in cases:
        r = subprocess.run([sys.executable, __file__, "--one", c], capture_output=True,
                           text=True)
        if r.returncode:
            print(c, "failed:", r.stderr[-500:])
            continue
        d = json.loads(r.stdout.strip().splitlines()[-1])
        print(f"{c:>7} {d['est_unknowns']:>9d}/{d['unknowns']:<9d} "
              f"{d['est_factor_bytes'] / 1e6:8.0f}/{d['factor_bytes'] / 1e6:<8.0f} "
              f"{d['est_peak_bytes'] / 1e6:7.0f}/{d['peak_bytes'] / 1e6:<7.0f}  "
              f"{d['est_seconds']:7.1f}/{d['seconds']:<7.1f}  "
              f"{d['setup_s']:6.1f} {d['factor_s']:6.1f} {d['solve36_s']:9.1f}", flush=True)
        print("   ", json.dumps(d), flush=True)


if __name__ == "__main__":
    main()
