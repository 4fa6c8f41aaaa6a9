"""Maps, sheets and reports of a full-field result: depth contours, boundaries by
reflection coefficient, the reason for each sea state's method, and a print scale in
ground metres whatever the CRS.

The result is a real :func:`harbor.solve` of a small invented harbour (two arms and a
shore, in open water of the North Atlantic at 45 N, 30 W, where no harbour stands),
written in Web Mercator (EPSG:3857), whose scale factor there is about 1.41, solved by
a screening method for speed. The variables of a full-field result (a varying
``depth``, ``wall_*`` with mixed K_r, ``sea_method_reason``) are set on it here as
:func:`harbor.solve` writes them; outputs read only the result, so that is all they
need.

Outside references: pyproj gives the Web Mercator scale factor at the site (checked
against sec(latitude), Snyder 1987, eq. 7-3, for the sphere); pypdf reads the PDF text as
any PDF reader would; the depth contours are checked against a plane whose isobaths are
known in closed form.
"""

from __future__ import annotations

import json
import math
import re

import numpy as np
import pyproj
import pytest
import shapely

import harbor
from harbor.outputs import export, maps
from harbor.outputs.sheet import pdf_sheet, sheet_pages
from harbor.outputs.report import pdf_report
from harbor.outputs.style import REFLECTION_CLASSES, new_figure
from harbor.study.scenario import scenario_from_dict

LON0, LAT0 = -30.0, 45.0      # open North Atlantic: an invented site
CRS = "EPSG:3857"
REASON = ("auto: partly reflecting walls and a varying depth inside the basin are outside "
          "the screening methods' measured validity")
FF_METHOD = "full-field mild-slope finite elements"


def _to_crs(pts):
    """Ground metres east/north of the site -> Web Mercator (via WGS 84 lon/lat)."""
    local = pyproj.CRS.from_proj4(f"+proj=tmerc +lat_0={LAT0} +lon_0={LON0} +k=1 +x_0=0 "
                                  "+y_0=0 +datum=WGS84 +units=m +type=crs")
    to_ll = pyproj.Transformer.from_crs(local, "EPSG:4326", always_xy=True)
    to_c = pyproj.Transformer.from_crs("EPSG:4326", CRS, always_xy=True)
    lon, lat = to_ll.transform(*np.array(pts, float).T)
    x, y = to_c.transform(lon, lat)
    return [[float(a), float(b)] for a, b in zip(np.atleast_1d(x), np.atleast_1d(y))]


@pytest.fixture(scope="module")
def solved():
    """A real result of a small scenario (one regular sea, a coarse grid)."""
    lo, hi = _to_crs([(-700.0, -200.0), (700.0, 900.0)])
    data = {"title": "Porto Vento (invented)", "site": {"crs": CRS, "depth": 8.0},
            "arm": [{"name": "west arm", "rooted": "start",
                     "line": _to_crs([(-300, -20), (-300, 400), (-60, 460)])},
                    {"name": "east arm", "rooted": "start",
                     "line": _to_crs([(320, -20), (320, 380), (60, 440)])}],
            "land": [{"name": "shore", "outline": _to_crs(
                [(-700, -400), (700, -400), (700, -10), (-700, -10)])}],
            "sea": [{"name": "swell N", "kind": "regular", "height": 1.2, "period": 10.0,
                     "from": 0.0}],
            "point": [{"name": "fish quay", "at": _to_crs([(-150, 120)])[0], "limit": 0.3},
                      {"name": "ferry berth", "at": _to_crs([(150, 250)])[0], "limit": 0.5}],
            "grid": {"spacing": 25.0, "bounds": [lo[0], lo[1], hi[0], hi[1]]}}
    # a screening method by name: fast, and its result carries no full-field variables
    # of its own that would mask what the tests add
    return harbor.solve(scenario_from_dict(data, "porto-vento.toml"), method="general")


def _plane(result):
    """Depth rising 5 m -> 15 m from west to east across the grid (a plane: its
    isobaths are the lines x = const, known in closed form)."""
    x = result["x"].values
    a, b = 5.0, 10.0 / float(x.max() - x.min())
    d = a + b * (x[None, :] - x.min()) + 0.0 * result["y"].values[:, None]
    wet = np.isfinite(result["kd"].isel(sea=0).transpose("y", "x").values)
    return np.where(wet, d, np.nan), (a, b, float(x.min()))


def _walls(result, krs):
    """One wall per arm plus the shore outline, with the given K_r in that order."""
    lines = [str(w) for w in result["arm_wkt"].values]
    lines.append(shapely.from_wkt(str(result["land_wkt"].values[0])).exterior.wkt)
    owners = [str(a) for a in result["arm"].values] + ["shore"]
    return dict(wall_wkt=("wall", np.array(lines, object)),
                wall_reflection=("wall", np.array(krs, float)),
                wall_owner=("wall", np.array(owners, object)))


NEW_VARIABLES = ("depth", "wall_wkt", "wall_reflection", "wall_owner", "sea_method_reason")


def older(result):
    """The result as an older version wrote it: without the full-field variables."""
    r = result.drop_vars([v for v in NEW_VARIABLES if v in result])
    r.attrs.pop("full_field", None)
    return r


def full_field(result, depth=True, krs=(1.0, 0.45, 0.1), reason=True):
    """The result as the full-field method writes it (contract of issue 14)."""
    result = older(result)
    n = result.sizes["sea"]
    extra = dict(_walls(result, list(krs)),
                 sea_method=("sea", np.array([FF_METHOD] * n, object)))
    if depth:
        extra["depth"] = (("y", "x"), _plane(result)[0], {"units": "m", "constant": 0})
    if reason:
        extra["sea_method_reason"] = ("sea", np.array([REASON] * n, object))
    r = result.assign(extra)
    r.attrs["full_field"] = 1
    return r


def _draw(result):
    fig = new_figure()
    drawn = maps.draw_map(fig, (0.8, 0.8, 6.5, 6.5), result, 0)
    return fig, drawn


def _pdf_text(path):
    pypdf = pytest.importorskip("pypdf")
    text = " ".join(p.extract_text() or "" for p in pypdf.PdfReader(str(path)).pages)
    return re.sub(r"\s+", " ", text)


# ------------------------------------------------------------------ depth contours

def test_depth_contours_follow_the_isobaths_of_a_plane(solved):
    r = full_field(solved)
    fig, drawn = _draw(r)
    cs = drawn["depth_contours"]
    assert cs is not None
    a, b, x0 = _plane(r)[1]
    levels = np.asarray(cs.levels, float)
    # round depths strictly between 5 and 15 m (common practice: 1-2-5 steps)
    assert levels.min() > 5.0 and levels.max() < 15.0 and len(levels) >= 3
    assert all(abs(v / 2.0 - round(v / 2.0)) < 1e-9 for v in levels)
    h = float(abs(r["x"].values[1] - r["x"].values[0]))
    for level, path in zip(levels, cs.get_paths()):
        v = path.vertices
        if len(v) == 0:
            continue
        # on the plane d = a + b (x - x0) the isobath d is the line x = x0 + (d - a) / b;
        # the display smooths over about a cell, so within one grid cell of it
        assert np.allclose(v[:, 0], x0 + (level - a) / b, atol=1.0 * h), level
        assert np.median(np.abs(v[:, 0] - (x0 + (level - a) / b))) < 0.05 * h
    # labelled sparingly, in metres, never more labels than levels x 3
    labels = [t.get_text() for t in drawn["ax"].texts if t.get_text().endswith(" m")
              and t.get_text()[:-2].replace(".", "").isdigit()]
    assert 1 <= len(labels) <= 3 * len(levels)
    assert any("depth contour" in h.get_label() for h in drawn["handles"])


@pytest.mark.parametrize("how", ["absent", "flagged constant", "one value"])
def test_no_depth_contours_without_varying_depth(solved, how):
    r = full_field(solved, depth=False)
    if how == "flagged constant":
        d = np.where(np.isfinite(_plane(r)[0]), 8.0, np.nan)
        r = r.assign(depth=(("y", "x"), d, {"units": "m", "constant": 1}))
    elif how == "one value":
        d = np.where(np.isfinite(_plane(r)[0]), 8.0, np.nan)
        r = r.assign(depth=(("y", "x"), d, {"units": "m"}))
    fig, drawn = _draw(r)
    assert drawn["depth_contours"] is None
    assert not any("depth contour" in h.get_label() for h in drawn["handles"])


def test_a_result_without_the_new_variables_draws_as_before(solved, tmp_path):
    # the screening result and the same result carrying a constant depth and walls (the
    # walls drawn only for a full-field sea state) give the same picture, pixel for pixel
    from matplotlib.image import imread

    base = older(solved)
    plain = maps.sheltering_map(base, 0, tmp_path / "plain.png", dpi=60)
    d = np.where(np.isfinite(_plane(solved)[0]), 8.0, np.nan)
    extra = base.assign(_walls(solved, [1.0, 0.4, 0.1]))
    extra = extra.assign(depth=(("y", "x"), d, {"units": "m", "constant": 1}))
    other = maps.sheltering_map(extra, 0, tmp_path / "extra.png", dpi=60)
    assert np.array_equal(imread(plain), imread(other))


# ------------------------------------------------------------- reflecting boundaries

def _class_entries(drawn):
    names = [c[1] for c in REFLECTION_CLASSES]
    return {n: h for h in drawn["handles"] for n in names
            if h.get_label().startswith(n + " boundary")}


@pytest.mark.parametrize("krs, classes", [
    ((1.0, 0.45, 0.1), {"fully reflecting", "partly reflecting", "absorbing"}),
    ((1.0, 0.95, 0.9), {"fully reflecting"}),
    ((0.3, 0.5, 0.89), {"partly reflecting"}),
    ((0.0, 0.29, 1.0), {"absorbing", "fully reflecting"}),
])
def test_each_reflection_class_present_gets_one_key_entry(solved, krs, classes):
    # our classes (issue 14): fully reflecting K_r >= 0.9, partly 0.3-0.9, absorbing < 0.3
    fig, drawn = _draw(full_field(solved, depth=False, krs=krs))
    entries = _class_entries(drawn)
    assert set(entries) == classes
    ranges = {"fully reflecting": "\u2265 0.9", "partly reflecting": "0.3 \u2264",
              "absorbing": "< 0.3"}
    for name, h in entries.items():
        assert ranges[name] in h.get_label()
    # the boundaries of each class are named in its entry, with their K_r
    owners = ["west arm", "east arm", "shore"]
    for owner, kr in zip(owners, krs):
        cls = next(c[1] for c in REFLECTION_CLASSES if kr >= c[0] - 1e-9)
        assert owner in entries[cls].get_label()
    # one drawn line per wall piece, in its class's colour
    colours = {c[2] for c in REFLECTION_CLASSES}
    wall_lines = [ln for ln in drawn["ax"].lines if ln.get_color() in colours]
    assert len(wall_lines) == 3
    # a grey-scale copy still tells the classes apart: their key lines, rendered, have
    # inked runs of clearly different lengths (solid, dashes, dots)
    runs = sorted(_ink_run(h) for h in entries.values())
    assert all(b > 1.5 * a for a, b in zip(runs, runs[1:])), runs


def _ink_run(handle):
    """Mean length (pixels) of the inked runs along a rendered key line."""
    from matplotlib.lines import Line2D

    fig = new_figure((2.0, 0.3))
    ax = fig.add_axes((0, 0, 1, 1))
    ax.set_axis_off()
    line = Line2D([0.05, 0.95], [0.5, 0.5])
    line.update_from(handle)
    line.set_path_effects([])
    ax.add_line(line)
    fig.canvas.draw()
    img = np.asarray(fig.canvas.buffer_rgba())[..., :3].astype(float)
    inked = (img.min(axis=2) < 200).any(axis=0)
    n = img.shape[1]
    inked = inked[int(0.1 * n):int(0.9 * n)].astype(int)
    edges = np.diff(np.concatenate([[0], inked, [0]]))
    lengths = np.flatnonzero(edges == -1) - np.flatnonzero(edges == 1)
    return float(lengths.mean())


def test_screening_sea_states_show_no_reflection_classes(solved):
    # the screening methods do not use K_r: their maps keep the plain arms and land
    r = older(solved).assign(_walls(solved, [1.0, 0.45, 0.1]))
    assert not maps.reflection_shown(r, "swell N")
    fig, drawn = _draw(r)
    assert _class_entries(drawn) == {}
    assert maps.reflection_shown(full_field(solved), "swell N")


# ------------------------------------------------------------------ method and reason

def test_sheet_and_report_say_why_the_method_was_used(solved, tmp_path):
    r = full_field(solved)
    text = _pdf_text(pdf_sheet(r, 0, tmp_path / "sheet.pdf"))
    assert FF_METHOD in text
    assert REASON in text
    report = _pdf_text(pdf_report(r, tmp_path / "report.pdf"))
    assert REASON in report


def test_no_reason_shows_nothing_extra(solved, tmp_path):
    text = _pdf_text(pdf_sheet(older(solved), 0, tmp_path / "sheet.pdf"))
    assert "Why this method" not in text
    assert str(solved["sea_method"].values[0]) in text
    assert maps.method_reason(older(solved), "swell N") == ""
    # the reason harbor.solve itself gives (here: the method was named) is printed
    own = maps.method_reason(solved, "swell N")
    assert own and own in _pdf_text(pdf_sheet(solved, 0, tmp_path / "own.pdf"))


def test_point_records_carry_the_method_and_its_reason(solved):
    r = full_field(solved)
    recs = export.point_records(r)
    assert {x["method"] for x in recs} == {FF_METHOD}
    assert {x["method_reason"] for x in recs} == {REASON}
    json.dumps(recs)  # the `harbor points --json` rows stay plain JSON
    assert {x["method_reason"] for x in export.point_records(older(solved))} == {""}


def test_terminal_table_says_why(solved):
    assert f"why this method: {REASON}" in export.point_table(full_field(solved))
    assert "why this method" not in export.point_table(older(solved))


def test_gis_files_carry_the_reason(solved, tmp_path):
    # read back by outside readers: the json module (RFC 7946 file) and GDAL's pyogrio
    from harbor.outputs.gis import write_geopackage

    r = full_field(solved)
    doc = json.loads(export.write_geojson_isolines(r, 0, tmp_path / "iso.geojson")
                     .read_text())
    assert doc["harbor"]["method"] == FF_METHOD
    assert doc["harbor"]["method_reason"] == REASON
    plain = json.loads(export.write_geojson_isolines(older(solved), 0, tmp_path / "p.geojson")
                       .read_text())
    assert "method_reason" not in plain["harbor"]
    raw = pytest.importorskip("pyogrio.raw")
    meta, _, _, values = raw.read(write_geopackage(r, tmp_path / "h.gpkg"), layer="points")
    f = dict(zip(meta["fields"], values))
    assert set(f["method"]) == {FF_METHOD} and set(f["method_reason"]) == {REASON}


def test_grid_nc_alone_redraws_contours_walls_and_reason(solved, tmp_path):
    # grid.nc keeps the new variables: read back by xarray/netCDF4, the map needs
    # nothing else to draw the depth contours and the boundary classes, and to say why
    import xarray as xr

    path = export.write_netcdf(full_field(solved), tmp_path / "grid.nc")
    with xr.open_dataset(path) as back:
        back.load()
    assert maps.method_reason(back, "swell N") == REASON
    fig, drawn = _draw(back)
    assert drawn["depth_contours"] is not None
    assert set(_class_entries(drawn)) == {"fully reflecting", "partly reflecting",
                                          "absorbing"}


# ----------------------------------------------------------------- ground print scale

def test_web_mercator_scale_factor_is_the_secant_of_latitude(solved):
    # pyproj's point scale of Web Mercator at the site against sec(phi) (Snyder 1987,
    # eq. 7-3, sphere; Web Mercator uses the spherical formulas): about 1.414 at 45 N
    f = pyproj.Proj(CRS).get_factors(LON0, LAT0)
    assert f.meridional_scale == pytest.approx(1.0 / math.cos(math.radians(LAT0)), rel=1e-6)
    assert solved.attrs["scale_factor"] == pytest.approx(f.meridional_scale, rel=0.01)


def test_printed_scale_and_scale_bar_are_in_ground_metres(solved):
    k = float(solved.attrs["scale_factor"])
    assert k == pytest.approx(1.41, abs=0.01)
    fig = sheet_pages(solved, 0)[0]
    texts = [t.get_text() for t in fig.texts]
    scale_text = next(t for t in texts if t.endswith("(A4)"))
    n = float(re.sub(r"[^\d.]", "", scale_text.split("(A4)")[0].split(":")[1]))
    ax = fig.axes[0]
    fw, _ = fig.get_size_inches()
    paper_m = ax.get_position().width * fw * 0.0254
    x = solved["x"].values
    ground_m = float(x.max() - x.min()) / k   # ground = CRS distance / scale factor
    # a ruler on the printed sheet times N gives ground metres (ISO 5455)
    assert paper_m * n == pytest.approx(ground_m, rel=0.003)
    # the same distance read in CRS units would be k times longer: not what is printed
    assert abs(paper_m * n - ground_m * k) > 0.3 * ground_m
    # the scale bar: its length on paper times N is the ground length it is labelled with
    bar_label = next(t for t in ax.texts if re.fullmatch(r"[\d.]+ m", t.get_text())
                     and t.get_position()[1] < 0.3)
    length = float(bar_label.get_text()[:-2])
    from matplotlib.patches import Rectangle

    halves = [p for p in ax.artists + ax.patches if isinstance(p, Rectangle)
              and abs(p.get_height() - 0.055) < 1e-9]
    bar_in = sum(p.get_width() for p in halves)
    assert bar_in * 0.0254 * n == pytest.approx(length, rel=0.003)
    # the provenance says the scale factor is taken out
    assert "scale factor 1.41" in re.sub(r"\s+", " ", " ".join(texts))
