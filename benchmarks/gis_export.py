"""Time the GIS export of a map run against the NetCDF and GeoJSON writers, side by side.

    python3 benchmarks/gis_export.py [--spacing 1.0] [--repeat 3]

Solves the demo's regular sea once (5 m grid), then writes, for that result and for the
same result resampled onto a finer grid (``--spacing`` m; outputs never look at the
physics, so a resampled field is a fair load), grid.nc, the GeoJSON isolines and the GIS
files (two COG rasters and the GeoPackage). Prints the best of ``--repeat`` wall-clock
times for each writer.
"""

from __future__ import annotations

import argparse
import tempfile
import time
from pathlib import Path

import numpy as np

from harbor.outputs.export import write_geojson_isolines, write_netcdf
from harbor.outputs.gis import write_gis
from harbor.solver.assemble import solve
from harbor.study.scenario import load_scenario

ROOT = Path(__file__).resolve().parents[1]


def best(fn, repeat):
    t = []
    for _ in range(repeat):
        t0 = time.perf_counter()
        fn()
        t.append(time.perf_counter() - t0)
    return min(t)


def main():
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--spacing", type=float, default=1.0)
    ap.add_argument("--repeat", type=int, default=3)
    a = ap.parse_args()
    sc = load_scenario(ROOT / "scenarios" / "demo.toml")
    res = solve(sc, sea="swell NW")
    x, y = res["x"].values, res["y"].values
    fine = res.interp(x=np.arange(x[0], x[-1] + 1e-9, a.spacing),
                      y=np.arange(y[0], y[-1] + 1e-9, a.spacing), method="linear")
    fine.attrs = dict(res.attrs)
    with tempfile.TemporaryDirectory() as d:
        d = Path(d)
        print(f"{'grid':>14} {'grid.nc':>9} {'geojson':>9} {'GIS (2 tif + gpkg)':>19}")
        for label, r in (("demo 5 m", res), (f"{a.spacing:g} m", fine)):
            n = f"{r.sizes['x']}x{r.sizes['y']}"
            t_nc = best(lambda: write_netcdf(r, d / "grid.nc"), a.repeat)
            t_gj = best(lambda: write_geojson_isolines(r, "swell NW", d / "i.geojson"),
                        a.repeat)
            t_gis = best(lambda: write_gis(r, d), a.repeat)
            print(f"{label + ' ' + n:>14} {t_nc:8.2f}s {t_gj:8.2f}s {t_gis:18.2f}s")


if __name__ == "__main__":
    main()
