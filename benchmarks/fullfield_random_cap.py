"""What the cap on a random sea's band meshes (max_unknowns) costs in accuracy and time.

Run:  python3 benchmarks/fullfield_random_cap.py [cap ...] [--ndir 12]

A directional random sea (Bretschneider-Mitsuyasu, T1/3 = 6 s, s_max = 25, 6 x 12
components, principal direction 90 deg) through a 30 m gap in a long straight thin wall
at 5 m depth. The reference is Goda's sum over the exact aperture solution of every
component at its own wavelength (harbor.solver.kernels.gap.gap_exact, Morse &
Rubenstein 1938; components that travel towards the wall from the lee side use the
mirrored solution): no cap, no mesh. The engine is run with each cap, with the capped
bands' directions merged onto those of one band (the default) and without; printed: the
capped bands, their energy, the largest mesh, seconds, and the error in K_eff and in
the T_m02 ratio at 48 points behind the gap.
"""

from __future__ import annotations

import sys
import time

import numpy as np

from harbor.geometry.layout import Arm, Layout
from harbor.solver.fullfield import HarbourModel
from harbor.solver.kernels.gap import gap_exact
from harbor.waves.dispersion import wavelength
from harbor.waves.spectra import random_components


def case(h=5.0, t13=6.0, s_max=25.0, B=30.0, n_freq=6, n_dir=12, principal=90.0,
         nx=8, ny=6, extent=(40.0, 50.0)):
    """The gap, the points behind it, the components and the exact Goda reference."""
    arms = (Arm("w", np.array([[-1e4, 0.0], [-B / 2, 0.0]]), rooted_start=True),
            Arm("e", np.array([[B / 2, 0.0], [1e4, 0.0]]), rooted_end=True))
    X, Y = np.meshgrid(np.linspace(-extent[0], extent[0], nx),
                       np.linspace(0.2 * extent[1], extent[1], ny))
    pts = np.column_stack([X.ravel(), Y.ravel()])
    comp = random_components(1.0, t13, s_max, n_freq=n_freq, n_dir=n_dir)
    e0 = np.zeros(len(pts))
    e2 = np.zeros(len(pts))
    for f, w, a in zip(comp.frequency, comp.weight, comp.angle):
        th = (principal + np.degrees(a)) % 360.0
        L = wavelength(1.0 / f, h)
        if 0.0 < th < 180.0:
            u = gap_exact(pts[:, 0], pts[:, 1], L, th, B)
        elif 180.0 < th < 360.0:
            # from the lee side: the mirror image of a wave into +y
            u = gap_exact(pts[:, 0], -pts[:, 1], L, 360.0 - th, B)
        else:
            continue  # along the wall: a set of measure zero (Gauss nodes avoid it)
        e0 += w * np.abs(u) ** 2
        e2 += w * f * f * np.abs(u) ** 2
    inc0 = comp.weight.sum()
    inc2 = np.sum(comp.weight * comp.frequency ** 2)
    kd = np.sqrt(e0 / inc0)
    ratio = np.sqrt((e0 / e2) / (inc0 / inc2))
    return Layout(arms=arms), h, pts, comp, principal, kd, ratio


def main(argv=None):
    argv = list(sys.argv[1:] if argv is None else argv)
    n_dir = 12
    if "--ndir" in argv:
        i = argv.index("--ndir")
        n_dir = int(argv[i + 1])
        del argv[i:i + 2]
    caps = [int(float(v)) for v in argv] or [45_000, 70_000, 120_000]
    layout, h, pts, comp, principal, kd, ratio = case(n_dir=n_dir)
    print(f"6 x {n_dir} components")
    print(f"reference (exact gap, all bands): K_eff {kd.min():.3f}-{kd.max():.3f}")
    print(f"{'cap':>8} {'merged':>6} {'capped':>7} {'energy %':>8} {'T_c s':>6} {'largest':>8} "
          f"{'s':>6} {'max dK':>7} {'mean dK':>8} {'max dratio':>10}")
    for cap, merge in [(c, mg) for c in caps for mg in (True, False)]:
        m = HarbourModel(layout, h, points=pts)
        t0 = time.perf_counter()
        r = m.random(comp, principal, max_unknowns=cap, merge_capped=merge)
        sec = time.perf_counter() - t0
        capped = r.info["capped_periods"]
        bands = 1.0 / np.unique(comp.frequency)
        wc = sum(comp.weight[np.isclose(1.0 / comp.frequency, t)].sum() for t in capped)
        tc = max(r.info["solve_periods"][i] for i in range(len(bands))
                 if bands[i] in capped) if capped else float("nan")
        big = max(b["unknowns"] for b in r.info["bands"])
        dk = np.abs(r.kd_points - kd)
        dr = np.abs(r.ratio_points - ratio)
        print(f"{cap:8d} {str(merge):>6} {len(capped):7d} {100 * wc:8.2f} {tc:6.2f} {big:8d} {sec:6.1f} "
              f"{dk.max():7.4f} {dk.mean():8.4f} {dr.max():10.4f}", flush=True)


if __name__ == "__main__":
    main()
