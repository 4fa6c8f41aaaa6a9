"""Tests of the output layer: maps, sheets, GeoJSON, NetCDF-CF, CSV, terminal table.

The result used here is a synthetic Dataset with the contract of ``harbor.solve`` and a
smooth invented K' field (it decays into the basin behind the entrance); outputs never
compute physics, so none is needed. The site is invented: open water in the Bay of
Biscay (about 4.5 W, 44.5 N), far from any harbour, in UTM zone 30N.

The checks are against outside readers and standards: xarray/netCDF4 read the NetCDF,
the json module reads the GeoJSON, pyproj converts coordinates independently, the CF
conventions (version 1.8, sections 4 and 5.6) name the coordinate and grid-mapping
attributes, and RFC 7946 (Butler et al., 2016) fixes GeoJSON to WGS 84 lon/lat.
"""

from __future__ import annotations

import csv
import io
import json
import math
import os
from pathlib import Path

import numpy as np
import pyproj
import pytest
import shapely
import xarray as xr

from harbor.cautions import CAUTION_SHORT, CAUTIONS
from harbor.geometry.layout import Arm, Land, Layout, Point
from harbor.geometry.site import Site
from harbor.outputs import export, maps, sheet
from harbor.outputs import diagram
from harbor.study.scenario import GridSpec, Scenario, Sea

# An invented site in open water (Bay of Biscay), UTM 30N.
LON0, LAT0 = -4.5, 44.5
E0, N0 = pyproj.Transformer.from_crs(4326, 32630, always_xy=True).transform(LON0, LAT0)
E0, N0 = round(E0, -1), round(N0, -1)


def make_scenario():
    site = Site("EPSG:32630", (E0, N0), depth=8.0)
    west = Arm("west arm", np.array([[E0 - 300, N0 - 20], [E0 - 300, N0 + 400],
                                     [E0 - 60, N0 + 460]]), rooted_start=True)
    east = Arm("east arm", np.array([[E0 + 320, N0 - 20], [E0 + 320, N0 + 380],
                                     [E0 + 60, N0 + 440]]), rooted_start=True)
    shore = Land("Punta Ficticia shore", shapely.Polygon(
        [(E0 - 700, N0 - 400), (E0 + 700, N0 - 400), (E0 + 700, N0 - 10),
         (E0 + 200, N0 + 20), (E0 - 200, N0 + 10), (E0 - 700, N0 - 30)]))
    points = (Point("fish quay", (E0 - 150, N0 + 120), 0.3),
              Point("ferry berth", (E0 + 150, N0 + 250), 0.5),
              Point("slipway", (E0 + 30, N0 + 60), None),
              Point("fuel pontoon", (E0 + 180, N0 + 100), 0.4))
    seas = (Sea("storm SW", "random", 2.0, 8.0, 225.0, 10.0),
            Sea("swell N", "regular", 1.2, 12.0, 355.0))
    return Scenario(path="fictional-harbour.toml", title="Porto Inventato - preliminary layout",
                    site=site, layout=Layout(arms=(west, east), lands=(shore,)),
                    seas=seas, points=points,
                    grid=GridSpec(20.0, (E0 - 700, N0 - 200, E0 + 700, N0 + 900)))


def synthetic_kd(X, Y, scenario):
    """A smooth K'-like field (not physics): about 1 at sea with a ripple along the arms,
    decaying with distance from the entrance inside the basin enclosed by the arms."""
    arms = [np.asarray(a.line, float) for a in scenario.layout.arms]
    basin = shapely.Polygon(np.vstack([arms[0], arms[1][::-1]]))
    inside = shapely.contains_xy(basin, X, Y)
    entrance = 0.5 * (arms[0][-1] + arms[1][-1])
    dx, dy = X - entrance[0], Y - entrance[1]
    r = np.hypot(dx, dy)
    spread = np.exp(-(np.arctan2(dx, -dy) / 0.7) ** 2)
    k_in = np.exp(-r / 400.0) * (0.2 + 0.8 * spread)
    d_arm = shapely.distance(shapely.MultiLineString(arms), shapely.points(X, Y))
    k_out = 1.0 + 0.35 * np.exp(-d_arm / 50.0) * np.cos(d_arm / 25.0)
    return np.where(inside, k_in, k_out)


def make_result(scenario, spacing=20.0, with_points=True):
    x0, y0, x1, y1 = scenario.grid.bounds
    x = np.arange(x0, x1 + spacing / 2, spacing)
    y = np.arange(y0, y1 + spacing / 2, spacing)
    X, Y = np.meshgrid(x, y)
    k = synthetic_kd(X, Y, scenario)
    land = shapely.contains_xy(scenario.layout.lands[0].outline, X, Y)
    k = np.where(land, np.nan, k)
    seas = scenario.seas
    kd = np.stack([k * (1.0 if s.kind == "random" else 0.9) for s in seas])
    h = np.stack([kd[i] * s.height for i, s in enumerate(seas)])
    pr = np.stack([np.where(np.isnan(k), np.nan, 0.9 + 0.1 * k) if s.kind == "random"
                   else np.full_like(k, np.nan) for s in seas])
    pts = scenario.points if with_points else ()
    px = np.array([p.at[0] for p in pts], float)
    py = np.array([p.at[1] for p in pts], float)
    pk = synthetic_kd(px, py, scenario)[None, :] * np.array(
        [1.0 if s.kind == "random" else 0.9 for s in seas])[:, None]
    ph = pk * np.array([s.height for s in seas])[:, None]
    ppr = np.where(np.array([s.kind == "random" for s in seas])[:, None], 0.95, np.nan) \
        * np.ones_like(pk)
    site = scenario.site
    ds = xr.Dataset(
        {"kd": (("sea", "y", "x"), kd), "height": (("sea", "y", "x"), h),
         "period_ratio": (("sea", "y", "x"), pr),
         "point_x": ("point", px), "point_y": ("point", py),
         "point_limit": ("point", np.array([np.nan if p.limit is None else p.limit
                                            for p in pts], float)),
         "point_kd": (("sea", "point"), pk), "point_height": (("sea", "point"), ph),
         "point_period_ratio": (("sea", "point"), ppr),
         "sea_kind": ("sea", [s.kind for s in seas]),
         "sea_height": ("sea", [s.height for s in seas]),
         "sea_period": ("sea", [s.period for s in seas]),
         "sea_from": ("sea", [s.from_deg for s in seas]),
         "sea_spreading": ("sea", [s.spreading if s.kind == "random" else np.nan
                                   for s in seas]),
         "sea_method": ("sea", ["geometric optics + head diffraction (general layout)"] * len(seas)),
         "sea_wavelength": ("sea", [80.0, 110.0][:len(seas)])},
        coords={"sea": [s.name for s in seas], "x": x, "y": y,
                "point": [p.name for p in pts]},
        attrs={"title": scenario.title, "scenario": scenario.path, "crs": "EPSG:32630",
               "crs_wkt": site.work_crs.to_wkt(), "convergence_deg": site.convergence_deg,
               "depth": 8.0,
               "warnings": "Point 'slipway' is less than one wavelength from a head: "
                           "near-field values are approximate.\nA test warning.",
               "cautions": "\n".join(CAUTIONS), "harbor_version": "0.1.0",
               "created": "2026-01-15T10:30:00+00:00",
               "method": "geometric optics + head diffraction (general layout)"})
    return ds


@pytest.fixture(scope="module")
def case():
    sc = make_scenario()
    return sc, make_result(sc)
