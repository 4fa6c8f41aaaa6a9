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
from pathlib import Path

import numpy as np
import pyproj
import pytest
import shapely
import xarray as xr

from harbor.cautions import CAUTIONS
from harbor.geometry.layout import Arm, Land, Layout, Point
from harbor.geometry.site import Site
from harbor.outputs import export, maps
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
    pts = shapely.points(X, Y)
    d_arm = shapely.distance(shapely.MultiLineString(arms), pts)
    k_out = 1.0 + 0.35 * np.exp(-d_arm / 50.0) * np.cos(d_arm / 25.0)
    # Continuous across the entrance (open water), discontinuous only across the arms.
    d_gap = shapely.distance(shapely.LineString([arms[0][-1], arms[1][-1]]), pts)
    k_basin = k_out + (k_in - k_out) * (1.0 - np.exp(-d_gap / 40.0))
    return np.where(inside, k_basin, k_out)


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
    # the layout and the CRS travel in the result, as harbor.solve puts them there
    from harbor.solver.assemble import layout_variables, with_crs

    ds = ds.assign(layout_variables(scenario.layout))
    ds.attrs.update(scenario_crs=site.crs_code, scenario_crs_is_lonlat=int(site.is_lonlat))
    return with_crs(ds, site.work_crs, site.work_to_lonlat)


@pytest.fixture(scope="module")
def case():
    sc = make_scenario()
    return sc, make_result(sc)


@pytest.fixture(scope="module")
def run(case, tmp_path_factory):
    """One complete write_all run shared by the file checks below."""
    sc, res = case
    out = tmp_path_factory.mktemp("run") / "out"
    written = export.write_all(res, out)
    return sc, res, out, written


# --------------------------------------------------------------------------- write_all

def test_write_all_names_and_files(run):
    sc, res, out, written = run
    names = sorted(p.name for p in written)
    assert names == sorted(["map-storm-sw.png", "sheet-storm-sw.pdf", "isolines-storm-sw.geojson",
                            "map-swell-n.png", "sheet-swell-n.pdf", "isolines-swell-n.geojson",
                            "grid.nc", "points.csv", "report.pdf",
                            # GIS files (harbor.outputs.gis)
                            "kd-storm-sw.tif", "height-storm-sw.tif", "kd-swell-n.tif",
                            "height-swell-n.tif", "harbor.gpkg"])
    assert sorted(p.name for p in out.iterdir()) == names
    # No staging directory or temporary file left beside or inside the output.
    assert [p.name for p in out.parent.iterdir()] == ["out"]
    assert not [p for p in out.iterdir() if p.name.startswith(".")]


def test_png_opens_at_a4_landscape(run):
    import matplotlib.image as mpimg

    *_, out, _ = run
    img = mpimg.imread(out / "map-storm-sw.png")
    h, w = img.shape[:2]
    # A4 landscape is 297 x 210 mm (ISO 216): aspect 1.414; readable at >= 150 dpi.
    assert w / h == pytest.approx(297 / 210, rel=0.01)
    assert w >= 297 / 25.4 * 150


def test_pdf_is_one_page(run):
    *_, out, _ = run
    data = (out / "sheet-storm-sw.pdf").read_bytes()
    assert data.startswith(b"%PDF-") and data.rstrip().endswith(b"%%EOF")
    # ISO 32000-1 section 7.7.3: one page object (/Type /Page, not /Pages).
    import re

    assert len(re.findall(rb"/Type\s*/Page(?![a-z])", data)) == 1


# --------------------------------------------------------------------------- GeoJSON

def test_geojson_rfc7946_lonlat_near_site(run):
    sc, res, out, _ = run
    doc = json.loads((out / "isolines-storm-sw.geojson").read_text())
    assert doc["type"] == "FeatureCollection"
    assert "crs" not in doc  # RFC 7946 section 4: no crs member, WGS 84 only
    assert doc["features"]
    to_work = pyproj.Transformer.from_crs(4326, 32630, always_xy=True)
    for f in doc["features"]:
        assert f["type"] == "Feature"
        g = f["geometry"]
        assert g["type"] in ("LineString", "MultiLineString")
        parts = [g["coordinates"]] if g["type"] == "LineString" else g["coordinates"]
        for part in parts:
            a = np.asarray(part, float)
            assert a.shape[1] == 2 and len(a) >= 2
            lon, lat = a[:, 0], a[:, 1]
            # lon first (RFC 7946 section 3.1.1), within 2 km of the invented site.
            assert np.all(np.abs(lon - LON0) < 0.03) and np.all(np.abs(lat - LAT0) < 0.02)
            # Independent check: back in UTM with pyproj, every vertex lies on the K'
            # level of the smooth field that was sampled. Tolerance 0.08: linear
            # interpolation over a 20 m grid of a field whose gradient reaches about
            # 0.004 per metre. A spurious line along an arm (where K' jumps by ~1 across
            # the structure) or a lat/lon swap would fail by far more.
            x, y = to_work.transform(lon, lat)
            k = synthetic_kd(np.asarray(x), np.asarray(y), sc)
            assert np.max(np.abs(k - f["properties"]["level"])) < 0.08
        p = f["properties"]
        assert p["quantity"] == "kd" and p["sea"] == "storm SW"


def test_geojson_levels_present(run):
    *_, out, _ = run
    doc = json.loads((out / "isolines-storm-sw.geojson").read_text())
    levels = sorted(f["properties"]["level"] for f in doc["features"])
    # The synthetic field spans about 0.12 ... 1.35 on water, so 0.2 ... 1.0 all occur.
    assert levels == pytest.approx([0.2, 0.3, 0.4, 0.5, 0.6, 0.7, 0.8, 0.9, 1.0])
    assert doc["harbor"]["levels_requested"] == pytest.approx(
        [0.1, 0.2, 0.3, 0.4, 0.5, 0.6, 0.7, 0.8, 0.9, 1.0])
    assert doc["harbor"]["cautions"] == list(CAUTIONS)
    assert len(doc["harbor"]["warnings"]) == 2


# --------------------------------------------------------------------------- NetCDF

def test_netcdf_cf_attributes(run):
    sc, res, out, _ = run
    with xr.open_dataset(out / "grid.nc") as ds:
        assert ds.attrs["Conventions"] == "CF-1.8"
        # CF-1.8 section 4 / 5.6: projection coordinates and the grid mapping.
        assert ds["x"].attrs["standard_name"] == "projection_x_coordinate"
        assert ds["y"].attrs["standard_name"] == "projection_y_coordinate"
        assert ds["x"].attrs["units"] == "m" and ds["y"].attrs["units"] == "m"
        for v, units in (("kd", "1"), ("height", "m"), ("period_ratio", "1")):
            assert ds[v].attrs["units"] == units
            assert ds[v].attrs["long_name"]
            assert ds[v].attrs["grid_mapping"] == "crs"
        gm = ds["crs"].attrs
        assert gm["grid_mapping_name"] == "transverse_mercator"
        assert pyproj.CRS.from_wkt(gm["crs_wkt"]).to_epsg() == 32630
        # UTM 30N: central meridian 3 W, scale 0.9996, false easting 500 km (EPSG:32630).
        assert gm["longitude_of_central_meridian"] == pytest.approx(-3.0)
        assert gm["scale_factor_at_central_meridian"] == pytest.approx(0.9996)
        assert gm["false_easting"] == pytest.approx(500000.0)
        for key in ("title", "source", "history", "date_created", "scenario", "method",
                    "warnings", "cautions", "institution"):
            assert ds.attrs[key], key
        assert "harbor 0.1.0" in ds.attrs["source"]
        assert CAUTIONS[0] in ds.attrs["cautions"]
        assert ds.attrs["scenario"] == "fictional-harbour.toml"
        # The auxiliary lon/lat agree with pyproj's own inverse at a corner.
        lon, lat = pyproj.Transformer.from_crs(32630, 4326, always_xy=True).transform(
            float(ds["x"][0]), float(ds["y"][-1]))
        assert float(ds["lon"][-1, 0]) == pytest.approx(lon, abs=1e-9)
        assert float(ds["lat"][-1, 0]) == pytest.approx(lat, abs=1e-9)
        assert ds["lon"].attrs["units"] == "degrees_east"
        # Values survive the round trip (NaN on land stays missing).
        np.testing.assert_array_equal(ds["kd"].values, res["kd"].values)
        assert list(ds["sea"].values) == ["storm SW", "swell N"]


def test_netcdf_raw_reader_sees_grid_mapping(run):
    import netCDF4

    *_, out, _ = run
    with netCDF4.Dataset(out / "grid.nc") as nc:
        assert nc.variables["kd"].grid_mapping == "crs"
        assert "crs_wkt" in nc.variables["crs"].ncattrs()
        assert nc.getncattr("Conventions") == "CF-1.8"


def test_netcdf_without_points(case, tmp_path):
    sc, _ = case
    res = make_result(sc, spacing=50.0, with_points=False)
    p = export.write_netcdf(res, tmp_path / "g.nc")
    with xr.open_dataset(p) as ds:
        assert "point" not in ds.dims
        assert ds["kd"].shape == res["kd"].shape


# --------------------------------------------------------------------------- CSV, table

def test_points_csv(run):
    sc, res, out, _ = run
    text = (out / "points.csv").read_text()
    # the contract columns of DESIGN.md sect. 6 first, then the verdict columns, then
    # the method of the sea state (issue 14: every output names it)
    assert text.splitlines()[0] == "sea,point,x,y,kd,height,period_ratio,limit,ok,valid,method"
    rows = list(csv.DictReader(io.StringIO(text)))
    assert len(rows) == len(sc.seas) * len(sc.points)
    limits = {p.name: p.limit for p in sc.points}
    for r in rows:
        h = float(r["height"])
        lim = limits[r["point"]]
        if lim is None:
            assert r["limit"] == "" and r["ok"] == ""
        else:
            assert float(r["limit"]) == pytest.approx(lim)
            assert r["ok"] == ("true" if h <= lim else "false")
        kind = sc.sea(r["sea"]).kind
        assert (r["period_ratio"] == "") == (kind == "regular")
        at = next(p.at for p in sc.points if p.name == r["point"])
        assert float(r["x"]) == pytest.approx(at[0]) and float(r["y"]) == pytest.approx(at[1])
        assert r["method"] == str(res["sea_method"].sel(sea=r["sea"]).values)
    # pandas reads it as a plain table with the same columns.
    import pandas as pd

    df = pd.read_csv(out / "points.csv")
    assert list(df.columns) == list(export.CSV_COLUMNS)


def test_point_table_lists_points_and_cautions(case):
    sc, res = case
    t = export.point_table(res)
    for p in sc.points:
        assert p.name in t
    assert "OVER" in t and "ok" in t
    for c in CAUTIONS:
        assert c in t
    # The over-limit verdict for the fish quay (0.61 m > 0.30 m) appears on its line.
    line = next(l for l in t.splitlines() if l.startswith("fish quay"))
    assert "0.30" in line and "OVER" in line


# --------------------------------------------------------------------------- whole or nothing

def _cheap(path, *a, **k):
    Path(path).write_bytes(b"x")
    return Path(path)


def test_failed_run_leaves_nothing(case, tmp_path, monkeypatch):
    sc, res = case
    out = tmp_path / "out"
    # Cheap stand-ins for the plots, then a failure after every per-sea file is staged.
    monkeypatch.setattr("harbor.outputs.maps.sheltering_map",
                        lambda r, sea, p, show="kd": _cheap(p))
    monkeypatch.setattr("harbor.outputs.sheet.pdf_sheet", lambda r, sea, p, *a, **k: _cheap(p))

    def boom(result, path):
        Path(path).write_bytes(b"half a NetCDF")
        raise RuntimeError("disk full")

    monkeypatch.setattr(export, "write_netcdf", boom)
    with pytest.raises(RuntimeError, match="disk full"):
        export.write_all(res, out)
    assert not out.exists()
    assert list(tmp_path.iterdir()) == []


def test_failed_run_keeps_previous_outputs(case, tmp_path, monkeypatch):
    sc, res = case
    out = tmp_path / "out"
    out.mkdir()
    (out / "points.csv").write_text("previous,complete,file\n")

    def boom(*a, **k):
        raise RuntimeError("plotting failed")

    monkeypatch.setattr("harbor.outputs.sheet.pdf_sheet", boom)
    with pytest.raises(RuntimeError):
        export.write_all(res, out)
    assert sorted(p.name for p in out.iterdir()) == ["points.csv"]
    assert (out / "points.csv").read_text() == "previous,complete,file\n"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["out"]


def test_single_writer_is_atomic(case, tmp_path, monkeypatch):
    sc, res = case
    target = tmp_path / "g.nc"
    target.write_bytes(b"old complete file")

    def broken(self, path, *a, **k):
        Path(path).write_bytes(b"partial")
        raise OSError("interrupted")

    monkeypatch.setattr(xr.Dataset, "to_netcdf", broken)
    with pytest.raises(OSError):
        export.write_netcdf(res, target)
    assert target.read_bytes() == b"old complete file"
    assert [p.name for p in tmp_path.iterdir()] == ["g.nc"]


# --------------------------------------------------------------------------- map details

def test_slugs():
    from harbor.outputs._atomic import slug, unique_slugs

    assert slug("storm SW") == "storm-sw"
    assert slug("Tempête  Nord/Ouest") == "tempete-nord-ouest"
    assert slug("***") == "sea"
    assert unique_slugs(["Storm SW", "storm-sw", "x"]) == ["storm-sw", "storm-sw-2", "x"]


def test_north_arrow_points_to_true_north_by_pyproj(case):
    """The arrow's direction agrees with where pyproj puts a point 1 km due north."""
    sc, _ = case
    to_utm = pyproj.Transformer.from_crs(4326, 32630, always_xy=True)
    for lon, lat in ((-4.5, 44.5), (-1.2, 60.0), (-5.9, 10.0)):
        x0, y0 = to_utm.transform(lon, lat)
        x1, y1 = to_utm.transform(lon, lat + 0.009)  # about 1 km north
        d = np.array([x1 - x0, y1 - y0]) / math.hypot(x1 - x0, y1 - y0)
        site = Site("EPSG:32630", (x0, y0), depth=8.0)
        u = maps.true_north_vector(site.convergence_deg)
        assert np.degrees(np.arccos(np.clip(u @ d, -1, 1))) < 0.01
    # West of the central meridian in the north, true north leans east of grid north.
    assert maps.true_north_vector(sc.site.convergence_deg)[0] > 0


def test_standard_scales():
    # ISO 5455 reduction scales (1-2-5 series) and the intermediate scales of a metric
    # scale rule, 1:1250, 1:1500, 1:2500, 1:3000, 1:4000, 1:6000, 1:7500 (common practice).
    assert maps.standard_scale(9300) == 10000
    assert maps.standard_scale(1800) == 2000
    assert maps.standard_scale(2100) == 2500
    assert maps.standard_scale(2600) == 3000
    assert maps.standard_scale(1000) == 1000
    assert maps.standard_scale(1001) == 1250
    assert maps.standard_scale(6100) == 7500
    assert maps.standard_scale(12200) == 12500


def test_map_without_scenario_and_height(case, tmp_path):
    sc, _ = case
    res = make_result(sc, spacing=50.0)
    p = maps.sheltering_map(res, "swell N", tmp_path / "m.png", show="height", dpi=60)
    assert p.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"


def test_unknown_sea_is_an_input_error(case, tmp_path):
    from harbor.errors import InputError

    sc, res = case
    with pytest.raises(InputError, match="no sea state 'calm'"):
        maps.sheltering_map(res, "calm", tmp_path / "m.png")
    assert list(tmp_path.iterdir()) == []


# --------------------------------------------------------------------------- diagrams

def _diagram_ds(case_name="gap", alpha=70.0, width=2.0, n=121):
    """A plane wave (exact phase 2 pi (x cos a + y sin a)) with a smooth K' ramp."""
    x = np.linspace(-3, 3, n)
    y = np.linspace(-1.5, 4, n)
    X, Y = np.meshgrid(x, y)
    a = math.radians(alpha)
    phase = np.angle(np.exp(2j * np.pi * (X * math.cos(a) + Y * math.sin(a))))
    kd = np.where(Y > 0, np.exp(-(X / (1 + 0.5 * Y)) ** 2), 1.0)
    return xr.Dataset({"kd": (("y_over_l", "x_over_l"), kd),
                       "phase": (("y_over_l", "x_over_l"), phase)},
                      coords={"x_over_l": x, "y_over_l": y},
                      attrs={"case": case_name, "direction_deg": alpha, "width_over_l": width,
                             "sea_kind": "regular", "method": "test field"})


def test_crest_lines_of_a_plane_wave():
    """Crests of exp(i k (x cos a + y sin a)) are the lines x cos a + y sin a = n L."""
    import contourpy

    ds = _diagram_ds()
    z = diagram.crest_field(ds["phase"].values)
    x, y = ds["x_over_l"].values, ds["y_over_l"].values
    lines = contourpy.contour_generator(x, y, z).lines(0.0)
    assert lines
    a = math.radians(70.0)
    s = np.concatenate([l[:, 0] * math.cos(a) + l[:, 1] * math.sin(a) for l in lines])
    # Distance to the nearest whole wavelength: crests only, no troughs (which sit at
    # half wavelengths); tolerance: linear interpolation over a 0.05 L grid.
    assert np.max(np.abs(s - np.round(s))) < 0.01
    # Every crest in the window is found.
    assert set(np.round(s).astype(int)) == set(range(-2, 5))


@pytest.mark.parametrize("case_name,suffix", [("gap", ".png"), ("semi-infinite", ".pdf")])
def test_diagram_files(tmp_path, case_name, suffix):
    p = diagram.plot_diagram(_diagram_ds(case_name), tmp_path / f"d{suffix}")
    head = p.read_bytes()[:8]
    assert head == b"\x89PNG\r\n\x1a\n" if suffix == ".png" else head.startswith(b"%PDF-")
    assert [q.name for q in tmp_path.iterdir()] == [p.name]


# --------------------------------------------------------------------------- map legibility

def _srgb_to_lab(rgb):
    """CIE L*a*b* (D65) of sRGB colours in [0, 1], by the published formulas: IEC
    61966-2-1:1999 (sRGB transfer curve and matrix) and CIE 15:2004 (L*a*b*)."""
    c = np.asarray(rgb, float)[..., :3]
    lin = np.where(c <= 0.04045, c / 12.92, ((c + 0.055) / 1.055) ** 2.4)
    m = np.array([[0.4124, 0.3576, 0.1805], [0.2126, 0.7152, 0.0722],
                  [0.0193, 0.1192, 0.9505]])
    xyz = lin @ m.T / np.array([0.95047, 1.0, 1.08883])
    f = np.where(xyz > (6 / 29) ** 3, np.cbrt(xyz), xyz / (3 * (6 / 29) ** 2) + 4 / 29)
    return np.stack([116 * f[..., 1] - 16, 500 * (f[..., 0] - f[..., 1]),
                     200 * (f[..., 1] - f[..., 2])], axis=-1)


def test_land_cannot_be_mistaken_for_any_kd_class():
    """Every K' fill class differs from the land colour by a large colour difference:
    CIE76 delta E above 30, where about 2.3 is just noticeable (Sharma, G. (2003).
    Digital Color Imaging Handbook, CRC Press, ch. 1) and 10 or more reads as another
    colour (common practice). A tan land (#e6dcc3) fails this: delta E 26 from the
    khaki class of K' = 1 to 1.25. Land is hatched as well."""
    import matplotlib as mpl
    from matplotlib import colors as mcolors

    fill = maps.KD_FILL
    norm = mcolors.BoundaryNorm(fill, mpl.colormaps[maps.CMAP].N, extend="max")
    centres = np.append(0.5 * (fill[:-1] + fill[1:]), fill[-1] + 0.5)
    classes = mpl.colormaps[maps.CMAP](norm(centres))
    land = _srgb_to_lab(mcolors.to_rgb(maps.LAND_FACE))
    de = np.linalg.norm(_srgb_to_lab(classes) - land, axis=-1)
    assert de.min() > 30.0
    assert maps.LAND_HATCH_STYLE


def test_kd_isolines_only_in_the_sheltered_range():
    fill, lines, _ = maps.fill_levels(np.array([0.0, 1.8]), "kd", 1.0)
    assert lines.max() == pytest.approx(0.9) and lines.min() == pytest.approx(0.1)
    # The fill classes do not depend on the field, so one colour is one K' on every map.
    np.testing.assert_array_equal(fill, maps.fill_levels(np.array([0.2, 0.6]), "kd", 1.0)[0])


def test_open_sea_mask_separates_ripples_from_shelter():
    """A partial standing wave 1 + 0.3 cos(2 k y) seaward (y > 0) over a lee that decays
    smoothly from 0.8: isolines are left out seaward, kept a wavelength into the lee."""
    L, h = 80.0, 5.0
    x = np.arange(0.0, 400.0 + h / 2, h)
    y = np.arange(-400.0, 400.0 + h / 2, h)
    X, Y = np.meshgrid(x, y)
    f = np.where(Y > 0, 1.0 + 0.3 * np.cos(4 * np.pi * Y / L), 0.8 * np.exp(Y / 200.0))
    m = maps.open_sea_mask(f, x, y, L, 1.0)
    assert m[Y > 0].all()
    assert not m[Y < -L].any()


def test_point_labels_clear_the_arms(case):
    """No point label's box crosses a breakwater arm (display coordinates)."""
    from matplotlib.text import Annotation

    sc, res = case
    fig = maps.new_figure()
    drawn = maps.draw_map(fig, (0.75, 1.2, 8.0, 6.2), res, "storm SW")
    ax = drawn["ax"]
    renderer = fig.canvas.get_renderer()
    labels = [t for t in ax.texts if isinstance(t, Annotation)]
    assert len(labels) == len(sc.points)
    arms = [shapely.LineString(ax.transData.transform(np.asarray(a.line, float)))
            for a in sc.layout.arms]
    for t in labels:
        bb = t.get_bbox_patch().get_window_extent(renderer)
        box = shapely.box(bb.x0, bb.y0, bb.x1, bb.y1)
        assert not any(box.intersects(arm) for arm in arms), t.get_text()


def test_point_table_lists_every_point(case):
    sc, res = case
    fig = maps.new_figure()
    drawn = maps.draw_map(fig, (0.75, 1.2, 8.0, 6.2), res, "storm SW")
    n = len(fig.texts)
    used = maps.draw_point_table(fig, drawn, (9.0, 7.0), 2.5)
    text = " ".join(t.get_text() for t in fig.texts[n:])
    assert used > 0
    for p in sc.points:
        assert p.name in text
    assert "OVER" in text or "ok" in text


# --------------------------------------------------------------------------- deliverables

def _pdf_pages(path):
    # matplotlib writes one "/Type /Page" object per page (and "/Type /Pages" once)
    data = Path(path).read_bytes()
    return data.count(b"/Type /Page") - data.count(b"/Type /Pages")


def test_report_has_cover_sheets_warnings_and_cautions(run):
    sc, res, out, _ = run
    # cover, one sheet per sea state, the warnings page, the cautions page
    assert _pdf_pages(out / "report.pdf") == 1 + len(sc.seas) + 2


def test_every_warning_is_printed_on_the_sheet(case):
    # 30 long warnings for one sea state cannot fit beside the map: they continue on a
    # second page rather than being cut to "+n more"
    from harbor.cautions import Notice
    from harbor.outputs.sheet import sheet_pages
    from harbor.solver.assemble import notices, notices_variables

    sc, res = case
    name = str(res.sea.values[0])
    many = [Notice(f"w{i}", f"warning {i}: " + "a long explanation of the problem " * 3,
                   sea=name) for i in range(30)]
    r = res.drop_vars([v for v in res if v.startswith("notice_")], errors="ignore")
    r = r.assign(notices_variables(many))
    assert len(notices(r, sea=name)) == 30
    pages = sheet_pages(r, name)
    assert len(pages) >= 2
    text = " ".join(t.get_text() for fig in pages for t in fig.texts)
    for i in range(30):
        assert f"warning {i}:" in text


def test_a_flagged_point_is_never_a_plain_ok(case):
    # a point whose value is outside its method's validity keeps its verdict but always
    # with the flag beside it: '?' in the terminal table, valid=false in the CSV
    sc, res = case
    r = res.copy()
    pv = np.ones((r.sizes["sea"], r.sizes["point"]), bool)
    pv[:, 0] = False
    r["point_valid"] = (("sea", "point"), pv)
    name = str(r.point.values[0])
    line = next(ln for ln in export.point_table(r).splitlines() if ln.startswith(name))
    assert "ok?" in line or "OVER?" in line
    rows = list(csv.DictReader(io.StringIO(export.points_csv_text(r))))
    assert {row["valid"] for row in rows if row["point"] == name} == {"false"}
    assert {row["valid"] for row in rows if row["point"] != name} == {"true"}


def test_outputs_need_nothing_but_the_result_file(run, tmp_path):
    # grid.nc carries the layout, CRS, points and warnings: a map and the point table
    # are drawn from it alone (no scenario object anywhere)
    sc, res, out, _ = run
    with xr.open_dataset(out / "grid.nc") as nc:
        assert nc["arm_wkt"].sizes["arm"] == len(sc.layout.arms)
        assert nc["crs"].attrs["crs_wkt"] == res["crs"].attrs["crs_wkt"]
        p = maps.sheltering_map(nc, str(nc.sea.values[0]), tmp_path / "again.png", dpi=40)
        assert p.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
        assert export.point_table(nc) == export.point_table(res)
