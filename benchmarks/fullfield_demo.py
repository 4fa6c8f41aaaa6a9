"""Full-field engine on the demo harbour: regular sea over the grid, and a random sea.

Run:  python3 benchmarks/fullfield_demo.py [--random NAME] [--nfreq 12 --ndir 36]

Prints unknowns, mesh / assembly / factorisation / back-substitution seconds and the
peak resident memory, for the demo's regular sea over its whole grid; with today's
finite-element solver (harbor.solver.accuracy.field_method_solve, thin rigid walls, no
reflection coefficients) timed on the same points in the same process. With --random it
also runs a directional random sea of the scenario by Goda's method (one factorisation
per frequency band, one back-substitution per direction). The machine is shared: the
figures are wall-clock seconds under whatever load there is.
"""

from __future__ import annotations

import argparse
import resource
import time

import numpy as np

import harbor
from harbor.solver.assemble import grid_coordinates
from harbor.solver.fullfield import HarbourModel
from harbor.waves.spectra import random_components


def peak_mb():
    return resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024.0


def main(argv=None):
    ap = argparse.ArgumentParser()
    ap.add_argument("--scenario", default="scenarios/demo.toml")
    ap.add_argument("--random", default=None, help="name of a random sea to run")
    ap.add_argument("--nfreq", type=int, default=12)
    ap.add_argument("--ndir", type=int, default=36)
    ap.add_argument("--old", action="store_true", help="also time today's solver")
    ap.add_argument("--cap", type=float, default=None,
                    help="max_unknowns of the random sea (default: the engine's)")
    a = ap.parse_args(argv)
    sc = harbor.load_scenario(a.scenario)
    site = sc.site
    gx, gy = grid_coordinates(sc.grid)
    pts = np.array([p.at for p in sc.points])
    sea = next(s for s in sc.seas if s.kind == "regular")
    alpha = float(np.degrees(site.travel_angle(sea.from_deg)))
    t0 = time.perf_counter()
    model = HarbourModel(sc.layout, site.depth, points=pts, grid=(gx, gy), g=site.g)
    r = model.regular(sea.period, alpha)
    t1 = time.perf_counter()
    i = r.info
    print(f"regular sea '{sea.name}' T = {sea.period:g} s over the {gy.size} x {gx.size} grid")
    print(f"  new engine: {i['unknowns']} unknowns, {i['triangles']} triangles; mesh "
          f"{i['mesh_s']:.1f} s, assemble {i['assemble_s']:.1f} s, factor "
          f"{i['factor_s']:.1f} s; total {t1 - t0:.1f} s; peak memory {peak_mb():.0f} MB")
    print("  K' at points:", np.round(np.abs(r.points), 3))
    print("  notices:", [n.code for n in model.notices])
    if a.old:
        from harbor.solver.accuracy import field_method_solve

        t2 = time.perf_counter()
        try:
            X, Y = np.meshgrid(gx, gy)
            u = field_method_solve(sc, sea, np.concatenate([pts[:, 0], X.ravel()]),
                                   np.concatenate([pts[:, 1], Y.ravel()]))
            t3 = time.perf_counter()
            print(f"  today's solver: {t3 - t2:.1f} s; K' at points:",
                  np.round(np.abs(u[:len(pts)]), 3))
        except harbor.errors.InputError as e:
            print("  today's solver refuses:", e)
    if a.random:
        rs = sc.sea(a.random)
        comp = random_components(rs.height, rs.period, rs.spreading, n_freq=a.nfreq,
                                 n_dir=a.ndir)
        model2 = HarbourModel(sc.layout, site.depth, points=pts, grid=(gx, gy), g=site.g)
        kw = {} if a.cap is None else {"max_unknowns": int(a.cap) if a.cap > 0 else None}
        est = model2.estimate(1.0 / np.unique(comp.frequency), n_directions=a.ndir,
                              **({"max_unknowns": model2.random.__defaults__[1]} | kw))
        print(f"  estimate: {est.total_seconds:.0f} s, peak {est.max_peak_bytes / 1e9:.1f} GB, "
              f"{int(est.capped.sum())} bands capped at {est.solve_periods.min():.2f} s")
        t4 = time.perf_counter()

        def prog(done, total):
            print(f"    band {done}/{total}: {time.perf_counter() - t4:.0f} s, "
                  f"peak {peak_mb():.0f} MB", flush=True)

        res = model2.random(comp, float(np.degrees(site.travel_angle(rs.from_deg))),
                            progress=prog, **kw)
        t5 = time.perf_counter()
        nb = res.info["bands"]
        print(f"random sea '{rs.name}' ({a.nfreq} x {a.ndir}): {t5 - t4:.0f} s; largest "
              f"band {max(b['unknowns'] for b in nb)} unknowns; peak memory "
              f"{peak_mb():.0f} MB")
        print("  K_eff at points:", np.round(res.kd_points, 3))
        print("  T_m02 ratio at points:", np.round(res.ratio_points, 3))
        print("  notices:", [str(n) for n in model2.notices])


if __name__ == "__main__":
    main()
