"""Layouts from GIS and CAD files: `harbor import` and file references in scenarios.

Fixtures are written inside the tests with pyogrio (GeoPackage, GeoJSON) and ezdxf
(DXF) from the demo scenario as parsed by tomllib (not by harbor), and the imported
scenarios are read back with tomllib; curves are checked against their geometry (circle
radius, sagitta) and splines against scipy's own B-spline evaluation; CRS conversion
against pyproj. The demo harbour (Port Tellivar) is invented.
"""

from __future__ import annotations

import json
try:  # Python >= 3.11
    import tomllib
except ModuleNotFoundError:  # pragma: no cover - Python 3.10
    import tomli as tomllib
from pathlib import Path

import ezdxf
import numpy as np
import pyproj
import pytest
import shapely
from pyogrio import raw
from scipy.interpolate import BSpline

from harbor.cli import main
from harbor.errors import InputError
from harbor.study.layout_files import read_layout
from harbor.study.scenario import load_scenario

ROOT = Path(__file__).resolve().parents[1]
DEMO = tomllib.loads((ROOT / "scenarios" / "demo.toml").read_text())


def demo_gpkg(path, move_head=0.0):
    """The demo's arms, land and points in one GeoPackage layer 'layout' (a 'kind'
    attribute says which is which), in EPSG:32630 like the demo."""
    geoms, kind, name, limit = [], [], [], []
    for i, a in enumerate(DEMO["arm"]):
        line = np.array(a["line"], float)
        if i == 0:
            line[-1, 0] += move_head
        geoms.append(shapely.LineString(line))
        kind.append("arm")
        name.append(a["name"])
        limit.append(np.nan)
    for ld in DEMO["land"]:
        geoms.append(shapely.Polygon(ld["outline"]))
        kind.append("land")
        name.append(ld["name"])
        limit.append(np.nan)
    for p in DEMO["point"]:
        geoms.append(shapely.Point(p["at"]))
        kind.append("berth")
        name.append(p["name"])
        limit.append(p["limit"])
    path.unlink(missing_ok=True)
    raw.write(str(path), shapely.to_wkb(np.array(geoms, dtype=object)),
              [np.array(kind, dtype=object), np.array(name, dtype=object),
               np.array(limit)], ["kind", "label", "allowable"], layer="layout",
              driver="GPKG", geometry_type="Unknown", crs="EPSG:32630")
    return path


def demo_dxf(path):
    """The demo as a CAD drawing: arms as polylines named in extended data, the shore
    as a closed polyline, berths as block references with NAME and LIMIT attributes."""
    doc = ezdxf.new("R2010")
    doc.header["$INSUNITS"] = 6  # metres
    doc.appids.add("HARBOR")
    msp = doc.modelspace()
    for a in DEMO["arm"]:
        e = msp.add_lwpolyline(a["line"], dxfattribs={"layer": "BREAKWATER"})
        e.set_xdata("HARBOR", [(1000, f"name={a['name']}")])
    for ld in DEMO["land"]:
        msp.add_lwpolyline(ld["outline"], close=True, dxfattribs={"layer": "COAST"})
    msp.add_text("Port Tellivar", dxfattribs={"layer": "COAST"})  # annotation: ignored
    blk = doc.blocks.new("BERTH")
    blk.add_circle((0, 0), 2.0)
    for p in DEMO["point"]:
        ref = msp.add_blockref("BERTH", p["at"], dxfattribs={"layer": "BERTHS"})
        ref.add_attrib("NAME", p["name"], p["at"])
        ref.add_attrib("LIMIT", f"{p['limit']}", p["at"])
    doc.saveas(path)
    return path


def assert_same_layout(back, names_land=True):
    assert [a["name"] for a in back["arm"]] == [a["name"] for a in DEMO["arm"]]
    for a, b in zip(DEMO["arm"], back["arm"]):
        np.testing.assert_allclose(b["line"], a["line"], atol=1e-3)  # 1 mm
    assert len(back["land"]) == 1
    np.testing.assert_allclose(back["land"][0]["outline"], DEMO["land"][0]["outline"],
                               atol=1e-3)
    assert [p["name"] for p in back["point"]] == [p["name"] for p in DEMO["point"]]
    for a, b in zip(DEMO["point"], back["point"]):
        np.testing.assert_allclose(b["at"], a["at"], atol=1e-3)
        assert b["limit"] == a["limit"]


def test_geopackage_round_trip(tmp_path, capsys):
    src = demo_gpkg(tmp_path / "layout.gpkg")
    out = tmp_path / "imported.toml"
    code = main(["import", str(src), "--arms", "layout:kind=arm", "--land",
                 "layout:kind=land", "--points", "kind=berth", "--name-field", "label",
                 "--limit-field", "allowable", "--depth", "9", "--out", str(out)])
    assert code == 0, capsys.readouterr().err
    back = tomllib.loads(out.read_text())
    assert back["site"]["crs"] == "EPSG:32630" and back["site"]["depth"] == 9
    assert_same_layout(back)
    # the placeholders are marked, and the file passes `harbor check`
    text = out.read_text()
    assert "PLACEHOLDER" in back["sea"][0]["name"] and "PLACEHOLDER grid" in text
    capsys.readouterr()
    assert main(["check", str(out)]) == 0


def test_dxf_round_trip(tmp_path, capsys):
    src = demo_dxf(tmp_path / "layout.dxf")
    out = tmp_path / "imported.toml"
    code = main(["import", str(src), "--crs", "EPSG:32630", "--arms", "BREAKWATER",
                 "--land", "COAST", "--points", "BERTH*", "--limit-field", "LIMIT",
                 "--out", str(out)])
    assert code == 0, capsys.readouterr().err
    back = tomllib.loads(out.read_text())
    assert_same_layout(back)
    assert main(["check", str(out)]) == 0


def test_dxf_curves_become_polylines_within_the_chord_tolerance(tmp_path):
    tol = 0.05
    doc = ezdxf.new("R2010")
    msp = doc.modelspace()
    cx, cy, R = 302000.0, 4986000.0, 120.0
    msp.add_arc((cx, cy), R, 10.0, 170.0, dxfattribs={"layer": "ARMS"})
    # bulge = tan(theta/4): 1 is a half circle from (x0, y0) to (x0 + 200, y0)
    x0, y0 = 302500.0, 4986000.0
    msp.add_lwpolyline([(x0, y0, 0, 0, 1.0), (x0 + 200.0, y0)], format="xyseb",
                       dxfattribs={"layer": "ARMS"})
    ctrl = np.array([[303000.0, 4986000.0], [303050.0, 4986150.0],
                     [303150.0, 4986180.0], [303200.0, 4986050.0],
                     [303300.0, 4986020.0]])
    sp = msp.add_spline(dxfattribs={"layer": "ARMS"})
    sp.set_open_uniform([tuple(p) for p in ctrl], degree=3)
    doc.saveas(tmp_path / "curves.dxf")
    lay = read_layout(tmp_path / "curves.dxf", arms="ARMS", crs="EPSG:32630", chord=tol)
    arc, half, spline = (f.coords for f in lay.of("arm"))

    def worst_sagitta(xy, centre, radius):
        # largest distance between a chord's midpoint and the circle
        mid = 0.5 * (xy[1:] + xy[:-1])
        return float(np.max(radius - np.hypot(*(mid - centre).T)))

    # every vertex on the circle; every chord within the tolerance of it
    assert np.allclose(np.hypot(arc[:, 0] - cx, arc[:, 1] - cy), R, atol=1e-6)
    assert worst_sagitta(arc, np.array([cx, cy]), R) <= tol
    assert len(arc) > 10  # 160 deg at 0.05 m: about 25 segments (s = R (1 - cos(t/2)))
    c2 = np.array([x0 + 100.0, y0])
    assert np.allclose(np.hypot(*(half - c2).T), 100.0, atol=1e-6)
    assert worst_sagitta(half, c2, 100.0) <= tol
    # the spline: scipy's B-spline with the drawing's knots and control points is
    # within the tolerance of the polyline everywhere (sampled densely)
    ref = BSpline(np.array(sp.knots, float), ctrl, 3)
    t = np.linspace(sp.knots[3], sp.knots[-4], 4000)
    dense = ref(t)
    poly = shapely.LineString(spline)
    d = shapely.distance(poly, shapely.points(dense))
    assert float(d.max()) <= tol * 1.05
    assert np.allclose(spline[0], ctrl[0]) and np.allclose(spline[-1], ctrl[-1])


# ------------------------------------------------------------------ scenario references

SITE = """title = "Port Tellivar by reference"
[site]
crs = "EPSG:32630"
depth = 9.0
"""
SEA = """
[[sea]]
name = "swell NW"
kind = "regular"
height = 1.5
period = 10.0
from = 315.0
"""


def test_scenario_reference_follows_the_revised_drawing(tmp_path, monkeypatch):
    (tmp_path / "gis").mkdir()
    demo_gpkg(tmp_path / "gis" / "layout.gpkg")
    sc = tmp_path / "harbour.toml"
    sc.write_text(SITE + """
[[arm]]
file = "gis/layout.gpkg"
layer = "layout"
select = "kind=arm"
name_field = "label"
[[land]]
file = "gis/layout.gpkg"
layer = "layout"
select = "kind=land"
[[point]]
file = "gis/layout.gpkg"
select = "kind=berth"
name_field = "label"
limit_field = "allowable"
""" + SEA)
    monkeypatch.chdir(tmp_path / "gis")  # relative paths resolve from the scenario
    s = load_scenario(sc)
    assert [a.name for a in s.layout.arms] == ["west arm", "east arm"]
    for a, want in zip(s.layout.arms, DEMO["arm"]):
        np.testing.assert_allclose(a.line, want["line"], atol=1e-3)
    assert [(p.name, p.limit) for p in s.points] == \
        [(p["name"], p["limit"]) for p in DEMO["point"]]
    # both arms start on the shore: rooted by the scenario reader as for typed vertices
    assert all(a.rooted_start and not a.rooted_end for a in s.layout.arms)
    # the drawing is revised: the west head moves 12 m east; no re-import needed
    demo_gpkg(tmp_path / "gis" / "layout.gpkg", move_head=12.0)
    s2 = load_scenario(sc)
    head = np.array(DEMO["arm"][0]["line"][-1]) + [12.0, 0.0]
    np.testing.assert_allclose(s2.layout.arms[0].line[-1], head, atol=1e-3)


def test_reference_in_another_crs_is_converted_with_pyproj(tmp_path):
    # GeoJSON is lon/lat (RFC 7946); the scenario is in UTM 30N
    to_ll = pyproj.Transformer.from_crs("EPSG:32630", "EPSG:4326", always_xy=True)
    feats = []
    for a in DEMO["arm"]:
        xy = np.array(a["line"])
        lon, lat = to_ll.transform(xy[:, 0], xy[:, 1])
        feats.append({"type": "Feature", "properties": {"name": a["name"]},
                      "geometry": {"type": "LineString",
                                   "coordinates": np.column_stack([lon, lat]).tolist()}})
    (tmp_path / "arms.geojson").write_text(json.dumps(
        {"type": "FeatureCollection", "features": feats}))
    sc = tmp_path / "h.toml"
    sc.write_text(SITE + '[[arm]]\nfile = "arms.geojson"\n' + SEA)
    s = load_scenario(sc)
    for a, want in zip(s.layout.arms, DEMO["arm"]):
        np.testing.assert_allclose(a.line, want["line"], atol=1e-3)


def test_dxf_reference_takes_the_site_crs(tmp_path):
    demo_dxf(tmp_path / "d.dxf")
    sc = tmp_path / "h.toml"
    sc.write_text(SITE + '[[arm]]\nfile = "d.dxf"\nlayer = "BREAKWATER"\n'
                  '[[land]]\nfile = "d.dxf"\nlayer = "COAST"\n' + SEA)
    s = load_scenario(sc)
    assert len(s.layout.arms) == 2 and len(s.layout.lands) == 1
    np.testing.assert_allclose(s.layout.arms[1].line, DEMO["arm"][1]["line"], atol=1e-3)


def test_reference_with_vertices_too_is_refused(tmp_path):
    sc = tmp_path / "h.toml"
    sc.write_text(SITE + '[[arm]]\nfile = "d.dxf"\nline = [[0, 0], [1, 1]]\n' + SEA)
    with pytest.raises(InputError, match=r"\[\[arm\]\] #1: key 'line'"):
        load_scenario(sc)


# ------------------------------------------------------------------ bad files

def _dxf(path, build, units=6):
    doc = ezdxf.new("R2010")
    doc.header["$INSUNITS"] = units
    doc.layers.add("ARMS")
    doc.layers.add("COAST")
    build(doc.modelspace())
    doc.saveas(path)


ARM = [(302800.0, 4985900.0), (302700.0, 4986100.0)]
RING = [(302200.0, 4985600.0), (303800.0, 4986400.0), (304000.0, 4985800.0),
        (302400.0, 4985100.0)]


def _gpkg(path, geoms, layer, gtype):
    raw.write(str(path), shapely.to_wkb(np.array(geoms, dtype=object)),
              [np.array([f"f{i}" for i in range(len(geoms))], dtype=object)], ["name"],
              layer=layer, driver="GPKG", geometry_type=gtype, crs="EPSG:32630")


def bad_open_land_dxf(d):
    _dxf(d / "bad.dxf", lambda m: (m.add_lwpolyline(ARM, dxfattribs={"layer": "ARMS"}),
                                   m.add_lwpolyline(RING, dxfattribs={"layer": "COAST"})))
    return "bad.dxf", ["--crs", "EPSG:32630", "--arms", "ARMS", "--land", "COAST"], \
        ["layer 'COAST'", "open land outline"]


def bad_open_land_gpkg(d):
    _gpkg(d / "bad.gpkg", [shapely.LineString(RING)], "shore", "LineString")
    return "bad.gpkg", ["--land", "shore"], ["layer 'shore'", "open land outline"]


def bad_unclosed_polygon(d):
    ring = [list(p) for p in RING]  # first vertex not repeated at the end
    (d / "bad.geojson").write_text(json.dumps({"type": "FeatureCollection", "features": [
        {"type": "Feature", "properties": {"name": "shore"},
         "geometry": {"type": "Polygon", "coordinates": [ring]}}]}))
    return "bad.geojson", ["--land", ""], ["layer 'bad'", "unclosed polygon"]


def bad_3d_dxf(d):
    _dxf(d / "bad.dxf", lambda m: m.add_polyline3d(
        [(302800.0, 4985900.0, 0.0), (302700.0, 4986100.0, 4.5)],
        dxfattribs={"layer": "ARMS"}))
    return "bad.dxf", ["--crs", "EPSG:32630", "--arms", "ARMS"], \
        ["layer 'ARMS'", "3-D coordinates (z = 4.5 at vertex 2)"]


def bad_3d_gpkg(d):
    _gpkg(d / "bad.gpkg", [shapely.LineString([(*ARM[0], 3.0), (*ARM[1], 3.0)])], "arms",
          "LineString Z")
    return "bad.gpkg", ["--arms", "arms"], ["layer 'arms'", "3-D coordinates"]


def bad_empty_gpkg(d):
    raw.write(str(d / "bad.gpkg"), np.array([], dtype=object),
              [np.array([], dtype=object)], ["name"], layer="arms", driver="GPKG",
              geometry_type="LineString", crs="EPSG:32630")
    return "bad.gpkg", ["--arms", "arms"], ["layer 'arms'", "empty"]


def bad_empty_dxf(d):
    _dxf(d / "bad.dxf", lambda m: m.add_lwpolyline(ARM, dxfattribs={"layer": "COAST"}))
    return "bad.dxf", ["--crs", "EPSG:32630", "--arms", "ARMS"], ["layer 'ARMS'", "empty"]


def bad_no_crs_dxf(d):
    _dxf(d / "bad.dxf", lambda m: m.add_lwpolyline(ARM, dxfattribs={"layer": "ARMS"}))
    return "bad.dxf", ["--arms", "ARMS"], ["bad.dxf", "no CRS"]


def bad_units_dxf(d):
    _dxf(d / "bad.dxf", lambda m: m.add_lwpolyline(ARM, dxfattribs={"layer": "ARMS"}),
         units=4)
    return "bad.dxf", ["--crs", "EPSG:32630", "--arms", "ARMS"], ["millimetres"]


BAD = [bad_open_land_dxf, bad_open_land_gpkg, bad_unclosed_polygon, bad_3d_dxf,
       bad_3d_gpkg, bad_empty_gpkg, bad_empty_dxf, bad_no_crs_dxf, bad_units_dxf]


@pytest.mark.parametrize("make", BAD, ids=[f.__name__[4:] for f in BAD])
def test_bad_file_is_refused_in_one_line(make, tmp_path, capsys):
    name, opts, words = make(tmp_path)
    out = tmp_path / "out.toml"
    code = main(["import", str(tmp_path / name), *opts, "--out", str(out)])
    err = capsys.readouterr().err
    assert code == 2
    assert err.count("\n") == 1 and "Traceback" not in err
    assert name in err
    for w in words:
        assert w in err, err
    assert not out.exists()
    assert sorted(p.name for p in tmp_path.iterdir()) == [name]  # nothing else written


@pytest.mark.parametrize("make", [bad_3d_dxf, bad_open_land_gpkg],
                         ids=["3d_dxf", "open_land_gpkg"])
def test_bad_referenced_file_is_refused_by_check(make, tmp_path, capsys):
    name, opts, words = make(tmp_path)
    kind, layer = ("arm", "ARMS") if name.endswith(".dxf") else ("land", "shore")
    sc = tmp_path / "h.toml"
    sc.write_text(SITE + f'[[{kind}]]\nfile = "{name}"\nlayer = "{layer}"\n'
                  + ('[[arm]]\nline = [[0, 0], [100, 100]]\n' if kind == "land" else "")
                  + SEA)
    code = main(["check", str(sc)])
    err = capsys.readouterr().err
    assert code == 2 and err.count("\n") == 1
    assert f"h.toml: [[{kind}]] #1: key 'file': {name}" in err
    for w in words:
        assert w in err


@pytest.mark.filterwarnings("ignore:'crs' was not provided")  # on purpose: no .prj
def test_shapefile_without_prj_needs_a_crs(tmp_path, capsys):
    geoms = [shapely.LineString(a["line"]) for a in DEMO["arm"]]
    raw.write(str(tmp_path / "arms.shp"), shapely.to_wkb(np.array(geoms, dtype=object)),
              [np.array([a["name"] for a in DEMO["arm"]], dtype=object),
               np.array([0.4, 1.0])], ["name", "kr"], driver="ESRI Shapefile",
              geometry_type="LineString")  # no crs: no .prj file
    out = tmp_path / "a.toml"
    code = main(["import", str(tmp_path / "arms.shp"), "--arms", "", "--out", str(out)])
    assert code == 2 and "no CRS" in capsys.readouterr().err and not out.exists()
    code = main(["import", str(tmp_path / "arms.shp"), "--arms", "", "--crs",
                 "EPSG:32630", "--reflection-field", "kr", "--out", str(out)])
    assert code == 0
    text = out.read_text()
    back = tomllib.loads(text)
    for a, b in zip(DEMO["arm"], back["arm"]):
        np.testing.assert_allclose(b["line"], a["line"], atol=1e-3)
    # the reflection coefficients travel with the arms (as a key, or as a comment
    # while the scenario reader has no such key)
    assert "reflection = 0.4" in text and "reflection = 1" in text


def test_reflection_coefficient_outside_0_1_is_refused(tmp_path, capsys):
    raw.write(str(tmp_path / "b.gpkg"), shapely.to_wkb(np.array(
        [shapely.LineString(ARM)], dtype=object)), [np.array([1.5])], ["kr"],
        layer="arms", driver="GPKG", geometry_type="LineString", crs="EPSG:32630")
    code = main(["import", str(tmp_path / "b.gpkg"), "--arms", "arms",
                 "--reflection-field", "kr", "--out", str(tmp_path / "o.toml")])
    err = capsys.readouterr().err
    assert code == 2 and "between 0 and 1, got 1.5" in err and "layer 'arms'" in err


def test_multipart_parts_are_numbered_and_duplicate_names_refused(tmp_path, capsys):
    a = shapely.LineString(ARM)
    b = shapely.LineString([(302900.0, 4985900.0), (303000.0, 4986100.0)])
    raw.write(str(tmp_path / "m.gpkg"), shapely.to_wkb(np.array(
        [shapely.MultiLineString([a, b])], dtype=object)),
        [np.array(["twin"], dtype=object)], ["name"], layer="arms", driver="GPKG",
        geometry_type="MultiLineString", crs="EPSG:32630")
    lay = read_layout(tmp_path / "m.gpkg", arms="arms")
    assert [f.name for f in lay.of("arm")] == ["twin (1)", "twin (2)"]
    # two separate features with one name: which is which cannot be told, so refused
    _gpkg(tmp_path / "d.gpkg", [a, b], "arms", "LineString")
    raw.write(str(tmp_path / "d.gpkg"), shapely.to_wkb(np.array([a, b], dtype=object)),
              [np.array(["twin", "twin"], dtype=object)], ["name"], layer="arms2",
              driver="GPKG", geometry_type="LineString", crs="EPSG:32630")
    code = main(["import", str(tmp_path / "d.gpkg"), "--arms", "arms2", "--out",
                 str(tmp_path / "o.toml")])
    err = capsys.readouterr().err
    assert code == 2 and "both named 'twin'" in err and "layer 'arms2'" in err


def test_reference_table_with_an_unknown_key_is_refused(tmp_path):
    sc = tmp_path / "h.toml"
    sc.write_text(SITE + '[[arm]]\nfile = "d.gpkg"\nlayr = "arms"\n' + SEA)
    with pytest.raises(InputError, match=r"key 'layr': unknown key; did you mean 'layer'"):
        load_scenario(sc)
