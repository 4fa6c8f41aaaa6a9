"""What users run, timed: `harbor.solve` and `harbor map` on the demo, old and new code.

    python3 benchmarks/solve_map.py [--spacing 5 2.5 1.25] [--old-up-to 2.5] [--no-map]
                                    [--blas]

For every grid spacing it times, in one process and side by side:

* ``harbor.solve`` per sea state of the demo, split into stages: the general method
  (per-component numpy ``general_field`` before, the fused compiled
  ``general_components`` now), the gap kernels inside the basin and at the hand-over,
  the direction-free geometry (visibility, basin, blend), and the rest of ``solve``
  (grid, land mask, validity);
* ``harbor map`` end to end (``solve`` of every sea state + ``write_all``), with the
  output stage apart and the time spent in the arm mask;
* with ``--climate``, ``harbor climate`` on the demo's climate table (old, new, twice).

"old" is the code before the fused kernels, reached in the same process through the
switches it kept: ``harbor.solver.random.FUSED = False`` (per-component numpy path),
``harbor.solver.kernels.sommerfeld.FUSED = False``, BLAS left at its default thread
count (``SOLVER_BLAS_THREADS = None``) and the arm mask recomputed at each call. Old runs
are skipped above ``--old-up-to`` m (at 1.25 m the old random seas take minutes each).
``--blas`` also times the new random seas with BLAS left at its default threads.

Measured (``--climate --blas``, method screening; quiet 2-core machine, load 1.6-1.9;
old and new in the same process; the geometry shared by both paths is the new one):

    spacing  sea          old s   new s  speed-up  (new: general / gap / geometry / rest)
    5 m      storm N        7.57    1.75    4.3x     1.54 / 0.10 / 0.05 / 0.06
    5 m      ocean swell    7.92    1.85    4.3x     1.62 / 0.13 / 0.04 / 0.06
    2.5 m    storm N       29.23    6.94    4.2x     6.22 / 0.36 / 0.22 / 0.14
    2.5 m    ocean swell   29.26    6.73    4.3x     5.99 / 0.44 / 0.13 / 0.16
    1.25 m   storm N           -   24.92             22.28 / 1.27 / 0.88 / 0.49
    1.25 m   ocean swell       -   24.91             22.05 / 1.70 / 0.56 / 0.59
    new random seas with BLAS at its default threads: 2.48 / 2.53 s (5 m), 7.45 / 7.39 s
    (2.5 m), 25.56 / 26.43 s (1.25 m).
    harbor map 5 m: old 18.3 s (solve 14.7), new 7.6 s (solve 3.9, outputs 3.6);
    2.5 m: old 62.4 s (solve 57.9), new 17.3 s (solve 12.9, outputs 4.4);
    1.25 m: new 61.0 s (solve 53.6, outputs 7.4; 60.7 s in a second run).
    harbor climate, demo table: old 13.7 / 13.5 s, new 5.2 / 4.8 s.

Against the measurement that opened the work (18.0 / 18.8 s at 5 m, 60.8 / 61.6 s at
2.5 m, 214 / 218 s at 1.25 m, a busier machine) the new random seas are 10.3x / 10.2x,
8.8x / 9.2x and 8.6x / 8.75x faster. What is left is the fused kernel itself, about
110-120 ns per point and component on two threads on the demo (two bends, two heads,
four faces, ten obstacle segments). Single-thread shares (measured by switching parts
of the kernel off, 5 m grid): incident-wave ray tests 44 ns, reflections about 45 ns,
the two bends' wedge terms about 75 ns, the two heads about 35 ns, the cell-averaged
interference about 40 ns.
"""

import argparse
import contextlib
import dataclasses
import resource
import tempfile
import time
from collections import defaultdict

import numpy as np

import harbor
import harbor.cli
from harbor.solver.assemble import grid_coordinates
from harbor.outputs import export as _export
from harbor.outputs import gis as _gis
from harbor.outputs import maps as _maps
from harbor.outputs import read as _read
from harbor.solver import random as _random
from harbor.solver.kernels import _compiled
from harbor.solver.kernels import sommerfeld as _somm

STAGES = {
    "general": ["general_field", "general_components"],
    "gap": ["gap_exact_energy", "gap_superposition", "gap_field", "gap_exact_many"],
    "geometry": ["cached_head_visibility", "basin_mask", "entrance_blend"],
}

_clock = defaultdict(float)
_calls = defaultdict(int)


def _timed(stage, fn):
    def wrapper(*a, **k):
        t0 = time.perf_counter()
        try:
            return fn(*a, **k)
        finally:
            _clock[stage] += time.perf_counter() - t0
            _calls[stage] += 1
    return wrapper


def _instrument():
    for stage, names in STAGES.items():
        for n in names:
            setattr(_random, n, _timed(stage, getattr(_random, n)))
    plain_mask = _read.arm_mask
    for mod in (_export, _maps, _gis):
        mod.arm_mask = _timed("arm_mask", lambda r, _f=plain_mask: _f(r))


@contextlib.contextmanager
def code(old):
    """Switch between the former code paths and the new ones."""
    saved = (_random.FUSED, _somm.FUSED, _compiled.SOLVER_BLAS_THREADS)
    if old:
        _random.FUSED, _somm.FUSED, _compiled.SOLVER_BLAS_THREADS = False, False, None
    try:
        yield
    finally:
        _random.FUSED, _somm.FUSED, _compiled.SOLVER_BLAS_THREADS = saved


def _arm_cache(old):
    if old:
        _read._ARM_MASKS.clear()


def scenario_at(spacing):
    sc = harbor.load_scenario(harbor.cli.demo_path())
    return dataclasses.replace(sc, grid=dataclasses.replace(sc.grid, spacing=spacing,
                                                            ground_spacing=None))


def time_solve(sc, old, method="screening"):
    rows = []
    for sea in sc.seas:
        _clock.clear()
        _calls.clear()
        with code(old):
            t0 = time.perf_counter()
            harbor.solve(sc, sea=sea.name, method=method)
            wall = time.perf_counter() - t0
        parts = {s: _clock[s] for s in STAGES}
        parts["rest"] = wall - sum(parts.values())
        rows.append((sea.name, sea.kind, wall, parts))
    return rows


def time_map(sc, old, method="screening"):
    _clock.clear()
    _calls.clear()
    with code(old), tempfile.TemporaryDirectory() as tmp:
        _arm_cache(old)
        if old:
            # the former arm mask: computed at every call
            real = _read.arm_mask
            for mod in (_export, _maps, _gis):
                mod.arm_mask = _timed("arm_mask", lambda r, _f=real: (_read._ARM_MASKS.clear(),
                                                                       _f(r))[1])
        t0 = time.perf_counter()
        ds = harbor.solve(sc, method=method)
        t1 = time.perf_counter()
        _export.write_all(ds, tmp)
        t2 = time.perf_counter()
        if old:
            for mod in (_export, _maps, _gis):
                mod.arm_mask = _timed("arm_mask", lambda r, _f=real: _f(r))
    return t2 - t0, t1 - t0, t2 - t1, _calls["arm_mask"], _clock["arm_mask"]


def _demo_climate():
    from pathlib import Path

    return str(Path(__file__).resolve().parents[1] / "scenarios" / "demo-climate.csv")


def main(argv=None):
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--spacing", type=float, nargs="+", default=[5.0, 2.5, 1.25])
    ap.add_argument("--old-up-to", type=float, default=2.5,
                    help="run the old code only at spacings >= this (m)")
    ap.add_argument("--no-map", action="store_true", help="time harbor.solve only")
    ap.add_argument("--climate", action="store_true",
                    help="also time harbor climate on the demo table, old and new")
    ap.add_argument("--blas", action="store_true",
                    help="also time the new random seas with BLAS at its default threads")
    ap.add_argument("--method", default="screening",
                    help="method of every sea state (default screening: the kernels timed "
                         "here; auto: what the demo's commands do, the full-field method)")
    args = ap.parse_args(argv)
    import os

    _instrument()
    # compile and warm every kernel once (numba caches to disk; this loads them)
    warm = scenario_at(40.0)
    for old in (True, False):
        time_solve(warm, old, args.method)
    if not args.no_map:
        time_map(warm, False, args.method)       # first use of matplotlib, fonts, GDAL drivers
    print(f"method: {args.method}; load average at start: {os.getloadavg()[0]:.1f}")
    for h in args.spacing:
        sc = scenario_at(h)
        gx = grid_coordinates(sc.grid)
        print(f"\n== demo at {h:g} m: {gx[0].size} x {gx[1].size} nodes ==")
        runs = [False] + ([True] if h >= args.old_up_to else [])
        res = {old: time_solve(sc, old, args.method) for old in runs}
        print(f"{'sea':14s} {'kind':8s} {'code':4s} {'wall s':>8s} {'general':>8s} "
              f"{'gap':>7s} {'geom':>7s} {'rest':>7s} {'speed-up':>8s}")
        for i, (name, kind, wall, parts) in enumerate(res[False]):
            for old in runs:
                n, kd, w, p = res[old][i]
                up = res[True][i][2] / w if True in res else float("nan")
                print(f"{n:14s} {kd:8s} {'old' if old else 'new':4s} {w:8.2f} "
                      f"{p['general']:8.2f} {p['gap']:7.2f} {p['geometry']:7.2f} "
                      f"{p['rest']:7.2f} {'' if old else f'{up:7.1f}x'}")
        if args.blas:
            saved = _compiled.SOLVER_BLAS_THREADS
            _compiled.SOLVER_BLAS_THREADS = None
            try:
                for name, kind, wall, parts in time_solve(sc, False, args.method):
                    if kind == "random":
                        print(f"{name:14s} {kind:8s} new, BLAS default threads: {wall:.2f} s")
            finally:
                _compiled.SOLVER_BLAS_THREADS = saved
        if not args.no_map:
            for old in runs:
                tot, ts, to, n_mask, t_mask = time_map(sc, old, args.method)
                print(f"harbor map ({'old' if old else 'new'}): {tot:.1f} s = solve {ts:.1f} s "
                      f"+ outputs {to:.1f} s (arm mask: {n_mask} calls, {t_mask:.2f} s)")
        print(f"load average now: {os.getloadavg()[0]:.1f}")
    if args.climate:
        from harbor.study.climate import climate_downtime, read_climate

        sc = harbor.load_scenario(harbor.cli.demo_path())
        table = read_climate(_demo_climate())
        for old in (True, False, True, False):
            with code(old):
                t0 = time.perf_counter()
                climate_downtime(sc, table)
                print(f"harbor climate on the demo table ({'old' if old else 'new'}): "
                      f"{time.perf_counter() - t0:.1f} s")
    rss = resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024
    print(f"\npeak RSS of the whole run: {rss:.0f} MB")


if __name__ == "__main__":
    main()
