"""GIS export of a map run: Cloud-Optimised GeoTIFF rasters and the GeoPackage.

The files are read back with outside readers (rasterio and pyogrio over GDAL, xarray
over netCDF4) and compared with the run's own ``grid.nc`` and with the scenario as
written (parsed with tomllib, not with harbor), and coordinates with pyproj. The
harbour is invented: open water in the Bay of Biscay (about 45.0 N, 5.4 W), where no
harbour stands.
"""

from __future__ import annotations

import math
try:  # Python >= 3.11
    import tomllib
except ModuleNotFoundError:  # pragma: no cover - Python 3.10
    import tomli as tomllib

import numpy as np
import pyogrio
import pyproj
import pytest
import rasterio
import shapely
import xarray as xr
from pyogrio import raw
from scipy.interpolate import RegularGridInterpolator

from harbor.cli import main
from harbor.outputs.export import write_netcdf
from harbor.outputs.gis import write_gis
from harbor.solver.assemble import solve
from harbor.study.scenario import load_scenario

SCENARIO = """
title = "Cove of Tarrow (invented test harbour)"
[site]
crs = "EPSG:32630"
depth = 8.0
[[arm]]
name = "north arm"
line = [[310003.0, 4990000.0], [310003.0, 4990203.0], [310073.0, 4990203.0]]
[[arm]]
name = "south arm"
line = [[310297.0, 4990000.0], [310297.0, 4990150.0], [310133.0, 4990203.0]]
[[land]]
name = "beach"
outline = [[309800.0, 4990010.0], [310500.0, 4990010.0], [310500.0, 4989800.0],
           [309800.0, 4989800.0]]
[[sea]]
name = "swell"
kind = "regular"
height = 1.2
period = 7.0
from = 10.0
[[point]]
name = "quay"
at = [310150.0, 4990100.0]
limit = 0.4
[[point]]
name = "outer mark"
at = [310150.0, 4990350.0]
[grid]
spacing = 10.0
bounds = [309950.0, 4989950.0, 310350.0, 4990400.0]
"""


@pytest.fixture(scope="module")
def run(tmp_path_factory):
    # grid.nc and the GIS files as `harbor map` writes them (write_all calls the same
    # two writers; tests/test_cli.py checks that a map run lists these files)
    d = tmp_path_factory.mktemp("gis")
    sc = d / "cove.toml"
    sc.write_text(SCENARIO)
    res = solve(load_scenario(sc))
    out = d / "maps"
    out.mkdir()
    write_netcdf(res, out / "grid.nc")
    names = write_gis(res, out)
    assert names == ["kd-swell.tif", "height-swell.tif", "harbor.gpkg"]
    return tomllib.loads(SCENARIO), out


@pytest.mark.parametrize("quantity", ["kd", "height"])
def test_geotiff_carries_crs_transform_and_grid_values(run, quantity):
    _, out = run
    nc = xr.open_dataset(out / "grid.nc")
    z = nc[quantity].sel(sea="swell").transpose("y", "x").values
    x, y = nc["x"].values, nc["y"].values
    with rasterio.open(out / f"{quantity}-swell.tif") as src:
        # CRS: the scenario's own EPSG code, read by GDAL
        assert src.crs.to_epsg() == 32630
        # a Cloud-Optimised GeoTIFF as GDAL's COG driver lays it out
        assert src.tags(ns="IMAGE_STRUCTURE").get("LAYOUT") == "COG"
        assert src.tags()["QUANTITY"] == quantity and src.tags()["SEA"] == "swell"
        assert (src.width, src.height) == (x.size, y.size)
        # pixel centres on the grid nodes, north up (row 0 = largest y)
        cols = np.arange(src.width)
        rows = np.arange(src.height)
        cx, _ = rasterio.transform.xy(src.transform, np.zeros_like(cols), cols)
        _, cy = rasterio.transform.xy(src.transform, rows, np.zeros_like(rows))
        np.testing.assert_allclose(cx, x, atol=1e-6)
        np.testing.assert_allclose(cy, y[::-1], atol=1e-6)
        band = src.read(1, masked=True)
    band = band[::-1]  # back to grid.nc's row order (y ascending)
    # land (NaN in grid.nc) is nodata in the raster
    assert np.all(band.mask[np.isnan(z)])
    # everywhere else the raster holds grid.nc's value (float32 rounding only)
    good = ~band.mask
    np.testing.assert_allclose(band.data[good], z[good], rtol=2e-7, atol=1e-7)
    # cells an arm crosses are nodata: sample each arm every metre (the arms lie off
    # the grid's node lines, one segment oblique, so that this is the crossing rule at
    # work, not NaN nodes on the arms)
    with rasterio.open(out / f"{quantity}-swell.tif") as src:
        for arm in run[0]["arm"]:
            line = shapely.LineString(arm["line"])
            for s in np.arange(0.0, line.length, 1.0):
                p = line.interpolate(s)
                r, c = src.index(p.x, p.y)
                if 0 <= r < src.height and 0 <= c < src.width:
                    assert band.mask[src.height - 1 - r, c], (arm["name"], s)
    # the raster has values at most wet nodes: nodata is only land and arm cells
    assert good.sum() > 0.6 * np.isfinite(z).sum()


def test_geopackage_layers_and_attributes(run):
    scen, out = run
    path = out / "harbor.gpkg"
    layers = dict(pyogrio.list_layers(path))
    assert layers == {"isolines": "MultiLineString", "points": "Point",
                      "arms": "LineString", "land": "Polygon"}
    for name in layers:
        assert pyogrio.read_info(path, layer=name)["crs"] == "EPSG:32630"

    meta, _, geoms, values = raw.read(path, layer="points")
    f = dict(zip(meta["fields"], values))
    assert list(meta["fields"]) == ["sea", "name", "kd", "height_m", "period_ratio",
                                    "limit_m", "ok", "status", "method", "method_reason"]
    pts = {p["name"]: p for p in scen["point"]}
    nc = xr.open_dataset(out / "grid.nc")
    for i, g in enumerate(shapely.from_wkb(geoms)):
        p = pts[f["name"][i]]
        # the point where the scenario put it (to 1 mm)
        assert math.hypot(g.x - p["at"][0], g.y - p["at"][1]) < 1e-3
        h = float(nc["point_height"].sel(sea=f["sea"][i], point=f["name"][i]))
        assert f["height_m"][i] == pytest.approx(h, rel=1e-12)
        if "limit" in p:
            assert f["limit_m"][i] == p["limit"]
            assert bool(f["ok"][i]) == (h <= p["limit"])
            assert f["status"][i] == ("ok" if h <= p["limit"] else "over")
        else:  # no limit: null limit and null pass/fail
            assert np.isnan(f["limit_m"][i]) and np.isnan(f["ok"][i])
            assert f["status"][i] == ""

    meta, _, geoms, values = raw.read(path, layer="isolines")
    f = dict(zip(meta["fields"], values))
    assert {"sea", "level", "height_m", "quantity", "method"} <= set(meta["fields"])
    np.testing.assert_allclose(f["height_m"], f["level"] * 1.2)
    # an isoline's vertices on a cell edge lie where K', linear along that edge between
    # grid.nc's nodes, equals its level (marching squares; vertices inside a cell are
    # on the diagonal of a cell with a masked corner and are left out here)
    kd = nc["kd"].sel(sea="swell").transpose("y", "x").values
    gx, gy = nc["x"].values, nc["y"].values
    interp = RegularGridInterpolator((gy, gx), kd, bounds_error=False, fill_value=np.nan)
    checked = total = 0
    for g, lv in zip(shapely.from_wkb(geoms), f["level"]):
        xy = shapely.get_coordinates(g)
        fx = (xy[:, 0] - gx[0]) / 10.0
        fy = (xy[:, 1] - gy[0]) / 10.0
        on_edge = (np.abs(fx - np.round(fx)) < 1e-6) | (np.abs(fy - np.round(fy)) < 1e-6)
        v = interp(np.column_stack([xy[:, 1], xy[:, 0]]))
        ok = on_edge & np.isfinite(v)
        np.testing.assert_allclose(v[ok], lv, atol=1e-9)
        checked += int(ok.sum())
        total += len(xy)
    assert checked > 0.8 * total

    meta, _, geoms, values = raw.read(path, layer="arms")
    f = dict(zip(meta["fields"], values))
    want = {a["name"]: np.array(a["line"]) for a in scen["arm"]}
    for g, n in zip(shapely.from_wkb(geoms), f["name"]):
        np.testing.assert_allclose(shapely.get_coordinates(g), want[n], atol=1e-3)
    # both arms start on the beach: rooted there, free heads at their ends
    assert list(f["rooted_start"]) == [True, True]
    assert list(f["rooted_end"]) == [False, False]


def test_result_geopackage_imports_back_to_the_same_layout(run, tmp_path):
    scen, out = run
    target = tmp_path / "again.toml"
    code = main(["import", str(out / "harbor.gpkg"), "--arms", "arms", "--land", "land",
                 "--points", "points:sea=swell", "--limit-field", "limit_m",
                 "--out", str(target), "--depth", "8"])
    assert code == 0
    back = tomllib.loads(target.read_text())
    for a, b in zip(scen["arm"], back["arm"]):
        assert a["name"] == b["name"]
        np.testing.assert_allclose(b["line"], a["line"], atol=1e-3)
    assert [(p["name"], p["at"], p.get("limit")) for p in back["point"]] == \
        [(p["name"], p["at"], p.get("limit")) for p in scen["point"]]
    ring = shapely.Polygon(back["land"][0]["outline"])
    want = shapely.Polygon(scen["land"][0]["outline"])
    assert ring.symmetric_difference(want).area < 1e-3


LONLAT = """
title = "Invented lon/lat test cove"
[site]
crs = "EPSG:4326"
depth = 10.0
[[arm]]
name = "west arm"
line = [[-12.0030, 57.0000], [-12.0030, 57.0018], [-12.0006, 57.0023]]
[[arm]]
name = "east arm"
line = [[-11.9970, 57.0000], [-11.9970, 57.0018], [-11.9994, 57.0023]]
[[land]]
name = "shore"
outline = [[-12.0080, 57.0001], [-11.9920, 57.0001], [-11.9920, 56.9970],
           [-12.0080, 56.9970]]
[[sea]]
name = "north swell"
kind = "regular"
height = 1.0
period = 8.0
from = 0.0
[[point]]
name = "inner berth"
at = [-12.0000, 57.0010]
limit = 0.4
[grid]
spacing = 25.0
"""


def solve_and_export(text, tmp_path):
    """grid.nc and the GIS files of a scenario, through the Python API."""
    sc = tmp_path / "scenario.toml"
    sc.write_text(text)
    res = solve(load_scenario(sc))
    out = tmp_path / "gis"
    out.mkdir()
    write_netcdf(res, out / "grid.nc")
    names = write_gis(res, out)
    return out, names


def test_lonlat_scenario_raster_in_work_frame_gpkg_in_lonlat(tmp_path):
    # Open Atlantic west of the Rockall Trough (57.0 N, 12.0 W): no harbour stands there.
    out, names = solve_and_export(LONLAT, tmp_path)
    assert names == ["kd-north-swell.tif", "height-north-swell.tif", "harbor.gpkg"]
    nc = xr.open_dataset(out / "grid.nc")
    with rasterio.open(out / "kd-north-swell.tif") as src:
        # a regular metre grid is not regular in lon/lat: the raster keeps the work
        # frame (a projected CRS in metres), and says so
        crs = pyproj.CRS.from_wkt(src.crs.to_wkt())
        assert crs.is_projected and crs.axis_info[0].unit_name == "metre"
        assert "work frame" in src.tags()["RASTER_CRS"]
        # the raster's CRS places a node where the grid's lon/lat coordinates do
        # (pyproj, independently of harbor)
        r, c = src.height // 2, src.width // 3
        x, y = rasterio.transform.xy(src.transform, r, c)
        lon, lat = pyproj.Transformer.from_crs(crs, "EPSG:4326", always_xy=True) \
            .transform(x, y)
        j = src.height - 1 - r
        assert lon == pytest.approx(float(nc["lon"].values[j, c]), abs=1e-8)
        assert lat == pytest.approx(float(nc["lat"].values[j, c]), abs=1e-8)
    path = out / "harbor.gpkg"
    assert pyogrio.read_info(path, layer="points")["crs"] == "EPSG:4326"
    _, _, geoms, _ = raw.read(path, layer="points")
    p = shapely.from_wkb(geoms[0])
    # 1e-8 degree is about 1 mm
    assert (p.x, p.y) == pytest.approx((-12.0, 57.0010), abs=1e-8)
    _, _, geoms, _ = raw.read(path, layer="arms")
    np.testing.assert_allclose(shapely.get_coordinates(shapely.from_wkb(geoms[0])),
                               tomllib.loads(LONLAT)["arm"][0]["line"], atol=1e-8)


# An invented cove in a CRS in US survey feet (NAD83 / California zone 3, EPSG:2227),
# placed inland in the Central Valley (37.3 N, 120.3 W), where no harbour stands.
_FT = 1200.0 / 3937.0  # m per US survey foot (definition)
_E, _N = (round(v, -1) for v in pyproj.Transformer.from_crs(
    4326, 2227, always_xy=True).transform(-120.3, 37.3))


def _ft(dx, dy):
    return f"[{_E + dx:.1f}, {_N + dy:.1f}]"


FEET = f"""
title = "Invented cove in feet"
[site]
crs = "EPSG:2227"
depth = 6.0
[[arm]]
name = "long arm"
line = [{_ft(0, 0)}, {_ft(0, 700)}, {_ft(230, 700)}]
[[land]]
name = "bank"
outline = [{_ft(-400, 30)}, {_ft(1200, 30)}, {_ft(1200, -600)}, {_ft(-400, -600)}]
[[sea]]
name = "north"
kind = "regular"
height = 1.0
period = 6.0
from = 20.0
[grid]
spacing = 10.0
bounds = [{_E - 300:.1f}, {_N + 60:.1f}, {_E + 900:.1f}, {_N + 1300:.1f}]
"""


def test_feet_scenario_raster_in_the_scenario_crs(tmp_path):
    out, _ = solve_and_export(FEET, tmp_path)
    nc = xr.open_dataset(out / "grid.nc")
    with rasterio.open(out / "kd-north.tif") as src:
        # the metre work frame is the same projection rescaled: the raster keeps the
        # scenario's own CRS, pixels 10 m = 10 / 0.3048006 US survey feet
        assert src.crs.to_epsg() == 2227
        assert src.tags()["RASTER_CRS"] == "scenario CRS EPSG:2227"
        assert src.transform.a == pytest.approx(10.0 / _FT, rel=1e-9)
        assert src.transform.e == pytest.approx(-10.0 / _FT, rel=1e-9)
        # a node placed by the raster (feet) and by grid.nc's lon/lat agree (pyproj)
        r, c = src.height // 3, src.width // 2
        x, y = rasterio.transform.xy(src.transform, r, c)
        lon, lat = pyproj.Transformer.from_crs(2227, 4326, always_xy=True).transform(x, y)
        j = src.height - 1 - r
        assert lon == pytest.approx(float(nc["lon"].values[j, c]), abs=1e-8)
        assert lat == pytest.approx(float(nc["lat"].values[j, c]), abs=1e-8)
        band = src.read(1, masked=True)[::-1]
    z = nc["kd"].sel(sea="north").transpose("y", "x").values
    good = ~band.mask
    np.testing.assert_allclose(band.data[good], z[good], rtol=2e-7, atol=1e-7)
    # the GeoPackage is in feet as well: the arm where the scenario put it
    _, _, geoms, _ = raw.read(out / "harbor.gpkg", layer="arms")
    np.testing.assert_allclose(shapely.get_coordinates(shapely.from_wkb(geoms[0])),
                               tomllib.loads(FEET)["arm"][0]["line"], atol=1e-3 / _FT)
