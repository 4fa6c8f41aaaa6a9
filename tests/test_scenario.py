"""Scenario files: reading, coordinates, rooting, defaults and every bad input.

References for the checks: pyproj (PROJ transformations, ``pyproj.Geod`` geodesic
distances on WGS 84), the US survey foot definition, and facts marked "common practice"
or "from memory" beside them.
"""

import copy
import filecmp
import itertools
import math
import re
from pathlib import Path

import numpy as np
import pyproj
import pytest

from harbor.errors import InputError
from harbor.study.scenario import (MAX_GRID_POINTS, GridSpec, Scenario, Sea, grid_size,
                                   load_scenario, scenario_from_dict)

ROOT = Path(__file__).resolve().parents[1]
DATA = Path(__file__).resolve().parent / "data"
GEOD = pyproj.Geod(ellps="WGS84")
FILE = "harbour.toml"

# An invented layout in UTM 30N coordinates (open water, test data only).
E0, N0 = 400000.0, 6300000.0


def xy(x, y):
    return [E0 + x, N0 + y]


def base():
    return {
        "title": "test harbour",
        "site": {"crs": "EPSG:32630", "depth": 8.0},
        "arm": [
            {"name": "west arm", "line": [xy(-200, -10), xy(-200, 300), xy(-45, 300)]},
            {"name": "east arm", "line": [xy(200, -10), xy(200, 300), xy(45, 300)]},
        ],
        "land": [{"name": "shore", "outline": [xy(-600, 0), xy(600, 0), xy(600, -400),
                                                xy(-600, -400)]}],
        "sea": [
            {"name": "storm", "kind": "regular", "height": 2.0, "period": 8.0,
             "from": 0.0},
            {"name": "swell", "kind": "random", "height": 1.5, "period": 10.0,
             "from": 20.0, "spreading": 75},
        ],
        "point": [{"name": "quay", "at": xy(0, 100), "limit": 0.3}],
        "grid": {"spacing": 5.0},
    }


# --- good inputs ----------------------------------------------------------------------

def test_demo_scenario_loads_and_matches_package_copy():
    demo = ROOT / "scenarios" / "demo.toml"
    assert filecmp.cmp(demo, ROOT / "harbor" / "data" / "demo.toml", shallow=False)
    sc = load_scenario(demo)
    assert isinstance(sc, Scenario)
    assert sc.site.crs_code == "EPSG:32630"
    assert 8.0 <= sc.site.depth <= 10.0
    assert len(sc.layout.arms) == 2 and len(sc.seas) in (2, 3, 4)
    assert {s.kind for s in sc.seas} == {"regular", "random"}
    assert 3 <= len(sc.points) <= 4
    assert all(0.3 <= p.limit <= 0.6 for p in sc.points)
    # Both arms rooted on the shore, one free head each; entrance 60-120 m wide.
    heads = sc.layout.heads()
    assert len(heads) == 2
    gap = math.dist(heads[0][2], heads[1][2])
    assert 60.0 <= gap <= 120.0
    # The berths lie inside the basin: the polygon closed by arms and entrance.
    import shapely
    basin = shapely.Polygon(np.concatenate([sc.layout.arms[0].line,
                                            sc.layout.arms[1].line[::-1]]))
    assert all(basin.contains(shapely.Point(p.at)) for p in sc.points)
    # The grid covers the basin and the approaches (100 m around each head).
    x0, y0, x1, y1 = sc.grid.bounds
    box = shapely.box(x0, y0, x1, y1)
    assert box.contains(basin)
    assert all(box.contains(shapely.Point(h[2]).buffer(100.0)) for h in heads)
    assert grid_size(sc.grid.bounds, sc.grid.spacing) <= MAX_GRID_POINTS


def test_base_scenario_reads():
    sc = scenario_from_dict(base(), path=FILE)
    assert sc.title == "test harbour"
    assert sc.path == FILE
    assert sc.sea("swell") == Sea("swell", "random", 1.5, 10.0, 20.0, spreading=75.0)
    assert sc.sea("storm").kind == "regular"
    arms = {a.name: a for a in sc.layout.arms}
    # Roots 10 m inside the land polygon: rooted; heads in open water: free.
    assert arms["west arm"].rooted_start and not arms["west arm"].rooted_end
    assert isinstance(sc.grid, GridSpec) and sc.grid.spacing == 5.0
    # UTM is projected in metres: the work frame is the scenario CRS itself.
    assert np.allclose(arms["west arm"].line[0], xy(-200, -10))
    assert sc.points[0].at == tuple(xy(0, 100)) and sc.points[0].limit == 0.3


def _pairwise(points):
    return [math.dist(p, q) for p, q in itertools.combinations(points, 2)]


def test_lonlat_scenario_has_the_geodesic_shape():
    sc = load_scenario(DATA / "lonlat_harbour.toml")
    import tomllib
    raw = tomllib.loads((DATA / "lonlat_harbour.toml").read_text())
    ll = [v for a in raw["arm"] for v in a["line"]] + [p["at"] for p in raw["point"]]
    work = [tuple(v) for a in sc.layout.arms for v in a.line] + [p.at for p in sc.points]
    assert len(ll) == len(work)
    for (p, q), d in zip(itertools.combinations(ll, 2), _pairwise(work)):
        _, _, g = GEOD.inv(p[0], p[1], q[0], q[1])
        assert d == pytest.approx(g, rel=1e-3)
    assert all(a.rooted_start and not a.rooted_end for a in sc.layout.arms)


def test_same_harbour_in_utm_and_lonlat_has_same_shape():
    d = base()
    inv = pyproj.Transformer.from_crs("EPSG:32630", "EPSG:4326", always_xy=True)
    ll = copy.deepcopy(d)
    ll["site"]["crs"] = "EPSG:4326"
    for a in ll["arm"]:
        a["line"] = [list(inv.transform(*v)) for v in a["line"]]
    for land in ll["land"]:
        land["outline"] = [list(inv.transform(*v)) for v in land["outline"]]
    for p in ll["point"]:
        p["at"] = list(inv.transform(*p["at"]))
    utm = scenario_from_dict(d)
    geo = scenario_from_dict(ll)
    pu = [tuple(v) for a in utm.layout.arms for v in a.line]
    pg = [tuple(v) for a in geo.layout.arms for v in a.line]
    # UTM distances carry the grid scale factor (0.9996 at the CM, ~1.0004 here;
    # common practice): within 0.1 %.
    assert np.allclose(_pairwise(pu), _pairwise(pg), rtol=1e-3)
    # The sea directions map to travel directions that differ by the convergence only.
    for s in d["sea"]:
        du = utm.site.travel_angle(s["from"])
        dg = geo.site.travel_angle(s["from"])
        rot_u = math.atan2(pu[1][1] - pu[0][1], pu[1][0] - pu[0][0])
        rot_g = math.atan2(pg[1][1] - pg[0][1], pg[1][0] - pg[0][0])
        rel = ((du - rot_u) - (dg - rot_g) + math.pi) % (2 * math.pi) - math.pi
        assert abs(rel) < math.radians(0.01)


def test_feet_scenario_is_converted_to_metres():
    # California zone 5 in US survey feet (EPSG:2229); 1 US ft = 1200/3937 m.
    fwd = pyproj.Transformer.from_crs("EPSG:4326", "EPSG:2229", always_xy=True)
    x, y = fwd.transform(-118.9, 34.0)
    d = {"site": {"crs": "EPSG:2229", "depth": 6.0},
         "arm": [{"name": "mole", "line": [[x, y], [x + 1000.0, y]]}],
         "sea": [{"name": "s", "kind": "regular", "height": 1.0, "period": 6.0,
                  "from": 180.0}]}
    sc = scenario_from_dict(d)
    line = sc.layout.arms[0].line
    assert math.dist(line[0], line[1]) == pytest.approx(1000.0 * 1200.0 / 3937.0,
                                                        rel=1e-9)


def test_rooting_rules_and_override(tmp_path):
    d = base()
    # On the land boundary exactly: rooted. One metre off the shore: a free head.
    d["arm"][0]["line"][0] = xy(-200, 0)
    d["arm"][1]["line"][0] = xy(200, 1.0)
    sc = scenario_from_dict(d)
    a = {x.name: x for x in sc.layout.arms}
    assert a["west arm"].rooted_start
    assert not a["east arm"].rooted_start
    assert len(sc.layout.heads()) == 3
    d["arm"][1]["rooted"] = "both"
    d["arm"][0]["rooted"] = "none"
    a = {x.name: x for x in scenario_from_dict(d).layout.arms}
    assert a["east arm"].rooted_start and a["east arm"].rooted_end
    assert not a["west arm"].rooted_start and not a["west arm"].rooted_end


def test_arm_ending_on_another_arm_is_a_junction_not_a_head():
    d = base()
    # A spur from the middle of the west arm's trunk, pointing east: its start
    # touches the west arm (allowed), its end is a free head.
    d["arm"].append({"name": "spur", "line": [xy(-200, 150), xy(-120, 150)]})
    sc = scenario_from_dict(d)
    spur = [a for a in sc.layout.arms if a.name == "spur"][0]
    assert spur.rooted_start and not spur.rooted_end


def test_default_bounds_ignore_a_large_land_polygon():
    d = base()
    d["land"][0]["outline"] = [xy(-50000, 0), xy(50000, 0), xy(50000, -40000),
                               xy(-50000, -40000)]
    sc = scenario_from_dict(d)
    x0, y0, x1, y1 = sc.grid.bounds
    # Arms span 400 m x 310 m: a 20 % margin (80 m) on each side.
    assert x1 - x0 == pytest.approx(400 + 2 * 80)
    assert y1 - y0 == pytest.approx(310 + 2 * 80)
    assert x0 < E0 - 200 and y1 > N0 + 300


def test_default_spacing_resolves_the_shortest_wave():
    d = base()
    del d["grid"]
    sc = scenario_from_dict(d)
    # From memory: T = 8 s in 8 m of water gives L of about 65 m, so about ten points
    # per wavelength (common practice) means a spacing of a few metres.
    assert 3.0 <= sc.grid.spacing <= 6.6


def test_bounds_given_are_used_and_lonlat_bounds_are_converted():
    d = base()
    d["grid"]["bounds"] = [E0 - 500, N0 - 100, E0 + 500, N0 + 700]
    sc = scenario_from_dict(d)
    assert sc.grid.bounds == pytest.approx((E0 - 500, N0 - 100, E0 + 500, N0 + 700))
    sc = load_scenario(DATA / "lonlat_harbour.toml")
    x0, y0, x1, y1 = sc.grid.bounds
    assert x0 < 0 < x1 and y0 < 0 < y1      # work frame centred on the harbour


# --- bad inputs -----------------------------------------------------------------------

def _set(path, value):
    def f(d):
        node = d
        for k in path[:-1]:
            node = node[k]
        node[path[-1]] = value
    return f


def _del(path):
    def f(d):
        node = d
        for k in path[:-1]:
            node = node[k]
        del node[path[-1]]
    return f


def _lonlat(d):
    d["site"]["crs"] = "EPSG:4326"
    d["arm"] = [{"name": "west arm", "line": [[-12.0, 57.0], [-11.99, 57.0]]}]
    d["land"] = []
    d["point"] = []
    d["grid"] = {"spacing": 5.0}


def _then(*fs):
    def f(d):
        for g in fs:
            g(d)
    return f


# (id, mutation, where, key, words in the message)
BAD = [
    ("unknown top key", _set(["titel"], "x"), None, "titel", "did you mean 'title'"),
    ("unknown arm key", _set(["arm", 0, "rooter"], "start"), "[[arm]] 'west arm'",
     "rooter", "did you mean 'rooted'"),
    ("unknown sea key", _set(["sea", 0, "hieght"], 2.0), "[[sea]] 'storm'", "hieght",
     "did you mean 'height'"),
    ("unknown site key", _set(["site", "depht"], 8.0), "[site]", "depht",
     "did you mean 'depth'"),
    ("missing period", _del(["sea", 1, "period"]), "[[sea]] 'swell'", "period",
     "missing"),
    ("missing depth", _del(["site", "depth"]), "[site]", "depth", "missing"),
    ("missing crs", _del(["site", "crs"]), "[site]", "crs", "missing"),
    ("missing site", _del(["site"]), None, "site", "missing"),
    ("missing line", _del(["arm", 1, "line"]), "[[arm]] 'east arm'", "line", "missing"),
    ("missing point at", _del(["point", 0, "at"]), "[[point]] 'quay'", "at", "missing"),
    ("missing spacing", _set(["grid"], {}), "[grid]", "spacing", "missing"),
    ("unnamed sea", _del(["sea", 1, "name"]), "[[sea]] #2", "name", "missing"),
    ("height is text", _set(["sea", 0, "height"], "2 m"), "[[sea]] 'storm'", "height",
     "must be a number"),
    ("height is bool", _set(["sea", 0, "height"], True), "[[sea]] 'storm'", "height",
     "must be a number"),
    ("crs is number", _set(["site", "crs"], 32630), "[site]", "crs",
     "must be a string"),
    ("line not pairs", _set(["arm", 0, "line"], [[1, 2, 3], [4, 5, 6]]),
     "[[arm]] 'west arm'", "line", "pair of numbers"),
    ("zero height", _set(["sea", 0, "height"], 0.0), "[[sea]] 'storm'", "height",
     "positive"),
    ("negative period", _set(["sea", 1, "period"], -8.0), "[[sea]] 'swell'", "period",
     "positive"),
    ("zero depth", _set(["site", "depth"], 0), "[site]", "depth", "positive"),
    ("negative g", _set(["site", "g"], -9.81), "[site]", "g", "positive"),
    ("zero spacing", _set(["grid", "spacing"], 0.0), "[grid]", "spacing", "positive"),
    ("negative limit", _set(["point", 0, "limit"], -0.3), "[[point]] 'quay'", "limit",
     "positive"),
    ("direction 361", _set(["sea", 0, "from"], 361.0), "[[sea]] 'storm'", "from",
     "between 0 and 360"),
    ("direction -5", _set(["sea", 1, "from"], -5), "[[sea]] 'swell'", "from",
     "between 0 and 360"),
    ("one distinct vertex", _set(["arm", 0, "line"], [xy(0, 50), xy(0, 50)]),
     "[[arm]] 'west arm'", "line", "two distinct vertices"),
    ("one vertex", _set(["arm", 0, "line"], [xy(0, 50)]), "[[arm]] 'west arm'", "line",
     "at least 2"),
    ("arm crosses itself",
     _set(["arm", 0, "line"], [xy(-300, 100), xy(-200, 200), xy(-200, 100),
                               xy(-300, 200)]),
     "[[arm]] 'west arm'", "line", "crosses itself"),
    ("arm closes on itself",
     _set(["arm", 0, "line"], [xy(-300, 100), xy(-200, 200), xy(-200, 100),
                               xy(-300, 100)]),
     "[[arm]] 'west arm'", "line", "closes on itself"),
    ("arms cross", _set(["arm", 1, "line"], [xy(-300, 250), xy(0, 250)]),
     "[[arm]] 'east arm'", "line", "crosses [[arm]] 'west arm'"),
    ("arms overlap", _set(["arm", 1, "line"], [xy(-200, 50), xy(-200, 150)]),
     "[[arm]] 'east arm'", "line", "overlaps"),
    ("unknown crs", _set(["site", "crs"], "EPSG:999999"), "[site]", "crs",
     "unknown CRS"),
    ("other geographic crs", _set(["site", "crs"], "EPSG:4258"), "[site]", "crs",
     "EPSG:4326"),
    ("lat 147 swapped", _then(_lonlat, _set(["arm", 0, "line"],
                                            [[57.0, 147.0], [57.0, 147.01]])),
     "[[arm]] 'west arm'", "line", "swapped"),
    ("lon out of range", _then(_lonlat, _set(["arm", 0, "line"],
                                             [[-12.0, 57.0], [190.0, 57.0]])),
     "[[arm]] 'west arm'", "line", "vertex 2: longitude 190"),
    ("lonlat under utm", _set(["arm", 0, "line"], [[-5.0, 57.0], [-5.001, 57.0]]),
     "[[arm]] 'west arm'", "line", "look like longitude/latitude"),
    ("unknown sea kind", _set(["sea", 1, "kind"], "randon"), "[[sea]] 'swell'", "kind",
     "did you mean 'random'"),
    ("unknown spectrum", _set(["sea", 1, "spectrum"], "jonswop"), "[[sea]] 'swell'",
     "spectrum", "did you mean 'jonswap'"),
    ("spreading on regular", _set(["sea", 0, "spreading"], 10), "[[sea]] 'storm'",
     "spreading", "random seas only"),
    ("gamma without jonswap", _set(["sea", 1, "gamma"], 3.3), "[[sea]] 'swell'",
     "gamma", "jonswap"),
    ("unknown rooted", _set(["arm", 0, "rooted"], "bth"), "[[arm]] 'west arm'",
     "rooted", "did you mean 'both'"),
    ("duplicate sea", _set(["sea", 1, "name"], "storm"), "[[sea]] 'storm'", "name",
     "duplicate sea name"),
    ("duplicate point",
     lambda d: d["point"].append({"name": "quay", "at": xy(10, 100)}),
     "[[point]] 'quay'", "name", "duplicate point name"),
    ("point on land", _set(["point", 0, "at"], xy(0, -50)), "[[point]] 'quay'", "at",
     "on land"),
    ("point on arm", _set(["point", 0, "at"], xy(-200, 100)), "[[point]] 'quay'", "at",
     "on an arm"),
    ("land bow-tie", _set(["land", 0, "outline"],
                          [xy(-600, 0), xy(600, -400), xy(600, 0), xy(-600, -400)]),
     "[[land]] 'shore'", "outline", "not a valid polygon"),
    ("grid too large", _then(_set(["grid", "spacing"], 0.1),
                             _set(["grid", "bounds"], [E0 - 1000, N0 - 1000,
                                                       E0 + 1000, N0 + 1000])),
     "[grid]", "spacing", "would fit"),
    ("bounds reversed", _set(["grid", "bounds"], [E0 + 500, N0, E0 - 500, N0 + 500]),
     "[grid]", "bounds", "xmin < xmax"),
    ("bounds too short", _set(["grid", "bounds"], [E0, N0, E0 + 500]), "[grid]",
     "bounds", "four numbers"),
    ("no seas", _set(["sea"], []), None, "sea", "no [[sea]]"),
    ("no arms", _del(["arm"]), None, "arm", "no [[arm]]"),
    ("single arm table", _set(["arm"], {"name": "x", "line": [xy(0, 0), xy(1, 1)]}),
     None, "arm", "double brackets"),
]


@pytest.mark.parametrize("mutate,where,key,words", [b[1:] for b in BAD],
                         ids=[b[0] for b in BAD])
def test_bad_input_names_file_table_and_key(mutate, where, key, words):
    d = base()
    mutate(d)
    with pytest.raises(InputError) as info:
        scenario_from_dict(d, path=FILE)
    e = info.value
    msg = str(e)
    assert "\n" not in msg
    assert e.file == FILE and msg.startswith(FILE + ": ")
    assert e.where == where
    assert e.key == key and f"key '{key}'" in msg
    assert words in msg


def test_too_large_grid_suggests_a_spacing_that_fits():
    d = base()
    d["grid"] = {"spacing": 0.1, "bounds": [E0 - 1000, N0 - 1000, E0 + 1000, N0 + 1000]}
    with pytest.raises(InputError) as info:
        scenario_from_dict(d, path=FILE)
    m = re.search(r"a spacing of ([0-9.]+) m", str(info.value))
    assert m
    fit = float(m.group(1))
    bounds = (E0 - 1000, N0 - 1000, E0 + 1000, N0 + 1000)
    assert grid_size(bounds, fit) <= MAX_GRID_POINTS
    # ... and not needlessly coarse: (2000 / s)^2 = 4e6 gives s = 1 m.
    assert fit <= 1.1
    d["grid"]["spacing"] = fit
    scenario_from_dict(d, path=FILE)


def test_toml_syntax_error_gives_the_line():
    path = DATA / "bad_syntax.toml"
    with pytest.raises(InputError) as info:
        load_scenario(path)
    msg = str(info.value)
    assert msg.startswith(str(path)) and "TOML syntax error" in msg and "line 4" in msg


def test_unclosed_bracket_at_end_of_file(tmp_path):
    p = tmp_path / "open.toml"
    p.write_text('[site]\ncrs = "EPSG:32630"\ndepth = 8.0\n[[arm]]\nline = [[0, 0],\n')
    with pytest.raises(InputError, match="never closed"):
        load_scenario(p)


def test_missing_file_and_directory(tmp_path):
    with pytest.raises(InputError, match="file not found") as info:
        load_scenario(tmp_path / "nowhere.toml")
    assert "nowhere.toml" in str(info.value)
    with pytest.raises(InputError, match="directory"):
        load_scenario(tmp_path)


def test_not_utf8(tmp_path):
    p = tmp_path / "latin1.toml"
    p.write_bytes('title = "Quai d\'\xe9t\xe9"\n'.encode("latin-1"))
    with pytest.raises(InputError, match="UTF-8"):
        load_scenario(p)


def test_bad_value_in_a_file_names_the_file(tmp_path):
    text = (DATA / "lonlat_harbour.toml").read_text().replace("height = 1.5",
                                                              "height = -1.5")
    p = tmp_path / "neg.toml"
    p.write_text(text)
    with pytest.raises(InputError) as info:
        load_scenario(p)
    e = info.value
    assert e.file == str(p) and e.where == "[[sea]] 'north swell'" and e.key == "height"


def test_unknown_sea_name_suggests_the_nearest():
    sc = scenario_from_dict(base(), path=FILE)
    assert sc.sea("swell").period == 10.0
    with pytest.raises(InputError) as e:
        sc.sea("swel")
    msg = str(e.value)
    assert msg == "harbour.toml: key 'sea': no sea state named 'swel' (did you mean 'swell'?)"
    with pytest.raises(KeyError):  # still a KeyError for code written against the old API
        sc.sea("nothing like it")
    with pytest.raises(InputError, match=r"known: storm, swell"):
        sc.sea("zzz", key="--sea")


def test_geometry_rules_module_is_the_readers():
    # the reader's tolerance and point rule are harbor.geometry.checks': a point 5 mm
    # off an arm (inside max(1 cm, 1e-6 x size)) is on it, 5 cm off is not
    from harbor.geometry import checks

    sc = scenario_from_dict(base(), path=FILE)
    (ax, ay), (bx, by) = xy(-200.005, 100), xy(-200.05, 100)
    assert checks.point_problems(sc.layout, [ax, bx], [ay, by]
                                 ).tolist() == ["is on an arm ('west arm')", None]
    d = base()
    d["point"][0]["at"] = xy(-200.005, 100)
    with pytest.raises(InputError, match=r"is on an arm \('west arm'\)"):
        scenario_from_dict(d, path=FILE)
    d["point"][0]["at"] = xy(-200.05, 100)
    scenario_from_dict(d, path=FILE)
