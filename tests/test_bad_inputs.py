"""Bad and extreme inputs: every one refused with one line and exit 2 (or the documented
exit code of a machine fault), nothing written, no traceback, no RuntimeWarning text.

Table-driven: each case is the input, the expected exit code, a word the message must
contain. The CLI runs in-process (``harbor.cli.main``) to stay fast. The plausible ranges
are facts of the trade (common practice) or physical limits, cited in
``harbor/study/_limits.py``.
"""

import math
import os
from pathlib import Path

import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

import harbor
from harbor.cli import main
from harbor.errors import InputError
from harbor.study.scenario import load_scenario, scenario_from_dict

BASE = """
title = "Skerrow Cove (invented test harbour)"
[site]
crs = "EPSG:32630"
depth = 8.0
[[arm]]
name = "west arm"
line = [[500000.0, 6300000.0], [500000.0, 6300200.0], [500070.0, 6300200.0]]
[[arm]]
name = "east arm"
line = [[500300.0, 6300000.0], [500300.0, 6300200.0], [500130.0, 6300200.0]]
[[land]]
name = "beach"
outline = [[499800.0, 6300010.0], [500500.0, 6300010.0], [500500.0, 6299800.0], [499800.0, 6299800.0]]
[[sea]]
name = "swell"
kind = "regular"
height = 1.2
period = 7.0
from = 10.0
[[point]]
name = "quay"
at = [500150.0, 6300100.0]
limit = 0.4
[grid]
spacing = 10.0
bounds = [499950.0, 6300020.0, 500350.0, 6300400.0]
"""

RANDOM_SEA = """
[[sea]]
name = "wind sea"
kind = "random"
height = 1.0
period = 7.0
from = 0.0
spectrum = "jonswap"
"""

BIG = "1" + "0" * 400          # a 400-digit integer


def edit(text, old, new):
    assert old in text, old
    return text.replace(old, new, 1)


# (id, scenario text, exit code, word in the message)
SCENARIO_CASES = [
    ("depth-400-digits", edit(BASE, "depth = 8.0", f"depth = {BIG}"), 2, "depth"),
    ("coordinate-400-digits", edit(BASE, "[[500000.0, 6300000.0]", f"[[{BIG}, 6300000.0]"),
     2, "line"),
    ("coordinate-1e308", edit(BASE, "[[500000.0, 6300000.0]", "[[1e308, 6300000.0]"),
     2, "line"),
    ("spacing-5e-324", edit(BASE, "spacing = 10.0", "spacing = 5e-324"), 2, "spacing"),
    ("depth-1e308", edit(BASE, "depth = 8.0", "depth = 1e308"), 2, "depth"),
    ("depth-1e-6", edit(BASE, "depth = 8.0", "depth = 1e-6"), 2, "depth"),
    ("period-1e-6", edit(BASE, "period = 7.0", "period = 1e-6"), 2, "period"),
    ("height-1e308", edit(BASE, "height = 1.2", "height = 1e308"), 2, "height"),
    ("height-inf", edit(BASE, "height = 1.2", "height = inf"), 2, "finite"),
    ("g-981", edit(BASE, "depth = 8.0", "depth = 8.0\ng = 981.0"), 2, "g"),
    ("g-1e-300", edit(BASE, "depth = 8.0", "depth = 8.0\ng = 1e-300"), 2, "g"),
    ("limit-1e308", edit(BASE, "limit = 0.4", "limit = 1e308"), 2, "limit"),
    ("jonswap-peak-1e-6", BASE + RANDOM_SEA + "peak_period = 1e-6\n", 2, "peak_period"),
    ("jonswap-peak-70s", BASE + RANDOM_SEA + "peak_period = 70.0\n", 2, "T1/3"),
    ("grid-too-coarse", edit(BASE, "period = 7.0", "period = 3.0"), 2, "per wavelength"),
    ("bounds-400-digits", edit(BASE, "bounds = [499950.0", f"bounds = [-{BIG}"), 2,
     "bounds"),
    ("collinear-outline",
     edit(BASE, "[[499800.0, 6300010.0], [500500.0, 6300010.0], [500500.0, 6299800.0], "
          "[499800.0, 6299800.0]]",
          "[[499800.0, 6300010.0], [500000.0, 6300010.0], [500500.0, 6300010.0]]"),
     2, "no area"),
    ("arms-cross-at-shared-vertex",
     edit(BASE, "[[500300.0, 6300000.0], [500300.0, 6300200.0], [500130.0, 6300200.0]]",
          "[[500000.0, 6300300.0], [500000.0, 6300200.0], [500100.0, 6300100.0]]"),
     2, "crosses"),
    ("point-on-arm-head", edit(BASE, "at = [500150.0, 6300100.0]",
                               "at = [500070.0, 6300200.0]"), 2, "arm"),
]


def _files(root):
    return sorted(str(p.relative_to(root)) for p in Path(root).rglob("*"))


def run(argv, capsys):
    code = main([str(a) for a in argv])
    out, err = capsys.readouterr()
    return code, out, err


def assert_refused(code, err, expected, word):
    assert code == expected, err
    lines = err.strip().splitlines()
    assert len(lines) == 1, err                      # one line
    assert "Traceback" not in err and "internal error" not in err
    assert "RuntimeWarning" not in err
    assert word.lower() in lines[0].lower(), lines[0]


@pytest.mark.parametrize("name,text,code,word", SCENARIO_CASES,
                         ids=[c[0] for c in SCENARIO_CASES])
def test_scenario_refused(name, text, code, word, tmp_path, capsys):
    f = tmp_path / "s.toml"
    f.write_text(text)
    before = _files(tmp_path)
    got, out, err = run(["check", f], capsys)
    assert_refused(got, err, code, word)
    assert _files(tmp_path) == before              # nothing written


def test_crs_not_blamed_for_huge_vertex(tmp_path, capsys):
    f = tmp_path / "s.toml"
    f.write_text(edit(BASE, "[[500000.0, 6300000.0]", "[[1e308, 6300000.0]"))
    _, _, err = run(["check", f], capsys)
    assert "key 'crs'" not in err and "key 'line'" in err


# ---------------------------------------------------------------- special files


def _special(kind, tmp_path):
    if kind == "fifo":
        p = tmp_path / "pipe.toml"
        os.mkfifo(p)
        return p
    if kind == "devzero":
        return Path("/dev/zero")
    if kind == "loop":
        p = tmp_path / "loop.toml"
        os.symlink(p, p)
        return p
    if kind == "dir":
        p = tmp_path / "folder.toml"
        p.mkdir()
        return p
    if kind == "huge":
        p = tmp_path / "huge.toml"
        with open(p, "wb") as fh:                   # sparse: no disk used
            fh.truncate(17 * 2**20)
        return p
    if kind == "missing":
        return tmp_path / "none.toml"
    raise AssertionError(kind)


SPECIAL = [("fifo", "pipe"), ("devzero", "device"), ("loop", "loop"), ("dir", "directory"),
           ("huge", "MiB"), ("missing", "not found")]


@pytest.mark.parametrize("kind,word", SPECIAL, ids=[k for k, _ in SPECIAL])
def test_special_scenario_files(kind, word, tmp_path, capsys):
    p = _special(kind, tmp_path)
    got, _, err = run(["check", p], capsys)
    assert_refused(got, err, 2, word)


@pytest.mark.parametrize("kind,word", SPECIAL[:3], ids=[k for k, _ in SPECIAL[:3]])
def test_special_climate_tables(kind, word, tmp_path, capsys):
    s = tmp_path / "s.toml"
    s.write_text(BASE)
    p = _special(kind, tmp_path)
    got, _, err = run(["climate", s, "--table", p, "--out", tmp_path / "out"], capsys)
    assert_refused(got, err, 2, word)
    assert not (tmp_path / "out").exists()


@pytest.mark.parametrize("kind,word", SPECIAL[:4], ids=[k for k, _ in SPECIAL[:4]])
def test_special_layout_files(kind, word, tmp_path, capsys):
    p = _special(kind, tmp_path)
    if kind == "devzero":
        p = tmp_path / "zero.gpkg"
        os.symlink("/dev/zero", p)
    got, _, err = run(["import", p, "--arms", "arms", "--out", tmp_path / "new.toml"],
                      capsys)
    assert_refused(got, err, 2, word)
    assert not (tmp_path / "new.toml").exists()


def test_import_out_folder_refused(tmp_path, capsys):
    (tmp_path / "new.toml").mkdir()
    got, _, err = run(["import", tmp_path / "x.gpkg", "--arms", "arms", "--out",
                       tmp_path / "new.toml"], capsys)
    assert_refused(got, err, 2, "folder")


def test_bom_accepted(tmp_path, capsys):
    f = tmp_path / "bom.toml"
    f.write_bytes(b"\xef\xbb\xbf" + BASE.encode())
    got, out, err = run(["check", f], capsys)
    assert got == 0, err and "valid" in out


# ---------------------------------------------------------------- climate tables

CLIMATE_CASES = [
    ("percent-1e308", "height,period,from,percent\n1.0,7,10,1e308\n", [], "percent"),
    ("percent-over-100", "height,period,from,percent\n1.0,7,10,120\n", [], "percent"),
    ("duplicates-115", "height,period,from,percent\n1.0,7,10,57.5\n1.0,7,10,57.5\n", [],
     "repeats"),
    ("height-400-digits", f"height,period,from,percent\n{BIG},7,10,50\n", [], "height"),
    ("period-1e-6", "height,period,from,percent\n1.0,1e-6,10,50\n", [], "period"),
    ("too-many-cases", "height,period,from,percent\n1.0,7,10,50\n1.0,8,10,50\n",
     ["--max-cases", "1"], "--max-cases"),
]


@pytest.mark.parametrize("name,table,extra,word", CLIMATE_CASES,
                         ids=[c[0] for c in CLIMATE_CASES])
def test_climate_refused(name, table, extra, word, tmp_path, capsys):
    s = tmp_path / "s.toml"
    s.write_text(BASE)
    t = tmp_path / "c.csv"
    t.write_text(table)
    before = _files(tmp_path)
    got, _, err = run(["climate", s, "--table", t, "--out", tmp_path / "out", "--quiet"]
                      + extra, capsys)
    assert_refused(got, err, 2, word)
    assert _files(tmp_path) == before


def test_climate_duplicates_warned_and_count_printed(tmp_path, capsys):
    s = tmp_path / "s.toml"
    s.write_text(BASE)
    t = tmp_path / "c.csv"
    t.write_text("height,period,from,percent\n1.0,7,10,40\n1.0,7,10,40\n")
    got, out, err = run(["climate", s, "--table", t, "--out", tmp_path / "out", "--quiet"],
                        capsys)
    assert got == 0, err
    assert "row 2 repeats row 1" in out
    assert "1 distinct (period, direction, spreading) cases: about" in out


# ---------------------------------------------------------------- command-line values

def _cli_cases():
    d = ["diagram", "gap", "--direction", "90"]
    return [
        ("width-1e4", d + ["--width", "1e4"], "--width"),
        ("width-inf", d + ["--width", "inf"], "--width"),
        ("width-nan", d + ["--width", "nan"], "--width"),
        ("resolution-negative", d + ["--width", "2", "--resolution", "-0.1"], "--resolution"),
        ("resolution-nan", d + ["--width", "2", "--resolution", "nan"], "--resolution"),
        ("resolution-1e-4", d + ["--width", "2", "--resolution", "1e-4"], "--resolution"),
        ("resolution-0", d + ["--width", "2", "--resolution", "0"], "--resolution"),
        ("spreading-nan", d + ["--width", "2", "--random", "--spreading", "nan"],
         "--spreading"),
    ]


@pytest.mark.parametrize("name,argv,word", _cli_cases(), ids=[c[0] for c in _cli_cases()])
def test_diagram_refused(name, argv, word, tmp_path, capsys):
    out = tmp_path / "d.png"
    got, _, err = run(argv + ["--out", out], capsys)
    assert_refused(got, err, 2, word)
    assert _files(tmp_path) == []


AT_CASES = [
    ("at-1e308", ["1e308", "1e308"], "km"),
    ("at-inf", ["inf", "0"], "finite"),
    ("at-arm-head", ["500070.0", "6300200.0"], "head"),
    ("at-arm-vertex", ["500000.0", "6300200.0"], "vertex"),
    ("at-on-arm", ["500000.0", "6300100.0"], "arm"),
    ("at-on-land", ["500100.0", "6300000.0"], "land"),
]


@pytest.mark.parametrize("name,xy,word", AT_CASES, ids=[c[0] for c in AT_CASES])
def test_points_at_refused(name, xy, word, tmp_path, capsys):
    s = tmp_path / "s.toml"
    s.write_text(BASE)
    got, out, err = run(["points", s, "--at", *xy], capsys)
    assert_refused(got, err, 2, word)
    assert out == ""


def _out_cases(tmp_path):
    f = tmp_path / "afile"
    f.write_text("keep me")
    return [("existing-file", f, "file"), ("dev-null", Path("/dev/null"), "/dev"),
            ("proc", Path("/proc/harbor-out"), "/proc")]


@pytest.mark.parametrize("which", range(3), ids=["existing-file", "dev-null", "proc"])
def test_map_out_refused_before_solving(which, tmp_path, capsys, monkeypatch):
    import harbor.solver.assemble as A

    name, out, word = _out_cases(tmp_path)[which]
    s = tmp_path / "s.toml"
    s.write_text(BASE)
    before = _files(tmp_path)

    def no_solve(*a, **k):  # the location is checked before any solving
        raise AssertionError("solved before checking --out")

    monkeypatch.setattr(A, "solve", no_solve)
    got, _, err = run(["map", s, "--out", out, "--quiet"], capsys)
    assert_refused(got, err, 2, word)
    assert _files(tmp_path) == before
    if name == "existing-file":
        assert out.read_text() == "keep me"


# ---------------------------------------------------------------- geometry rules


def _dict(**arms):
    d = {"site": {"crs": "EPSG:32630", "depth": 8.0},
         "sea": [{"name": "s", "kind": "regular", "height": 1.0, "period": 7.0,
                  "from": 180.0}]}
    d["arm"] = [{"name": k, "line": v} for k, v in arms.items()]
    return d


def test_arms_touching_vertex_to_vertex_are_a_joint():
    # two V-shaped arms whose corners meet and turn back: a joint, not a crossing
    # (common practice: breakwaters built against each other)
    sc = scenario_from_dict(_dict(a=[[500000.0, 6300000.0], [500100.0, 6300100.0],
                                     [500000.0, 6300200.0]],
                                  b=[[500200.0, 6300000.0], [500100.0, 6300100.0],
                                     [500200.0, 6300200.0]]))
    assert len(sc.layout.arms) == 2


def test_arms_crossing_through_shared_vertex_refused():
    with pytest.raises(InputError, match="crosses"):
        scenario_from_dict(_dict(a=[[500000.0, 6300000.0], [500100.0, 6300100.0],
                                    [500200.0, 6300200.0]],
                                 b=[[500200.0, 6300000.0], [500100.0, 6300100.0],
                                    [500000.0, 6300200.0]]))


def test_vertex_count_refused_fast():
    import time

    d = _dict(a=[[500000.0, 6300000.0], [500100.0, 6300100.0]])
    n = 1_600_000                                   # the audit's outline
    d["land"] = [{"name": "shore", "outline": [[499000.0, 6299000.0]] * n}]
    t0 = time.perf_counter()
    with pytest.raises(InputError, match="vertices") as e:
        scenario_from_dict(d)
    assert "outline" in str(e.value) and time.perf_counter() - t0 < 5.0


def test_coarse_grid_warned_not_refused(tmp_path, capsys):
    # T = 3 s at 8 m: L = 14.0 m; 3 m spacing = 4.7 points per wavelength, under 8
    f = tmp_path / "s.toml"
    f.write_text(edit(edit(BASE, "period = 7.0", "period = 3.0"), "spacing = 10.0",
                      "spacing = 3.0"))
    got, out, err = run(["check", f], capsys)
    assert got == 0, err
    assert "points per wavelength" in out
    ds = harbor.solve(load_scenario(f), grid=False)
    assert "coarse-grid" in set(ds.notice_code.values)


# ---------------------------------------------------------------- kernels and API


@pytest.mark.parametrize("x,y", [(np.inf, 1.0), (np.nan, 1.0), (1.0, -np.inf)])
def test_semi_infinite_refuses_non_finite(x, y):
    with pytest.raises(ValueError, match="finite"):
        harbor.semi_infinite(np.array([0.0, x]), y, 10.0, 60.0)


@pytest.mark.parametrize("period", [1e-300, 1e300])
def test_wavelength_out_of_range(period):
    with pytest.raises(ValueError, match="range of water waves"):
        harbor.wavelength(period, 9.0)


def test_exact_gap_refuses_by_memory_estimate():
    import time

    t0 = time.perf_counter()
    with pytest.raises(ValueError, match="GiB"):
        harbor.gap(0.0, 10.0, 10.0, 90.0, 1e6 * 10.0, method="exact")
    assert time.perf_counter() - t0 < 1.0          # refused before allocating


def test_diagram_api_keeps_the_gap_edges():
    from harbor.solver.diagram import diagram_field

    ds = diagram_field("gap", width=10, resolution=0.25)
    # both heads (x/L = +-5) and three wavelengths beyond them are in the picture
    assert ds.x_over_l.values.min() <= -8.0 + 1e-9 and ds.x_over_l.values.max() >= 8.0 - 1e-9
    assert np.isfinite(ds.kd.values).all()


# ---------------------------------------------------------------- property-based

SOLVED = []


def _num(v):
    return str(v) if isinstance(v, int) else repr(float(v))


_extreme = st.one_of(st.floats(allow_nan=True, allow_infinity=True, width=64),
                    st.integers(min_value=-10**400, max_value=10**400))


def key(lo, hi):
    """Mostly a plausible value in [lo, hi], sometimes anything a file may hold."""
    return st.tuples(st.integers(0, 4), st.floats(lo, hi), _extreme).map(
        lambda t: t[1] if t[0] else t[2])


@settings(max_examples=20, deadline=None, derandomize=True,
          suppress_health_check=[HealthCheck.function_scoped_fixture,
                                 HealthCheck.too_slow])
@given(depth=key(0.5, 30.0), period=key(2.0, 20.0), height=key(0.1, 5.0),
       frm=key(0.0, 360.0), g=st.one_of(st.just(None), key(9.78, 9.83)),
       px=st.floats(-300.0, 600.0), py=st.floats(20.0, 500.0))
def test_random_scenarios_solve_finite_or_refuse(tmp_path, capsys, depth, period, height,
                                                 frm, g, px, py):
    text = BASE
    text = edit(text, "depth = 8.0", f"depth = {_num(depth)}" +
                (f"\ng = {_num(g)}" if g is not None else ""))
    text = edit(text, "period = 7.0", f"period = {_num(period)}")
    text = edit(text, "height = 1.2", f"height = {_num(height)}")
    text = edit(text, "from = 10.0", f"from = {_num(frm)}")
    text = edit(text, "[grid]\nspacing = 10.0\nbounds = [499950.0, 6300020.0, 500350.0, "
                "6300400.0]\n", "")
    f = tmp_path / "p.toml"
    f.write_text(text)
    code, out, err = run(["points", f, "--at", repr(500000.0 + px), repr(6300000.0 + py)],
                         capsys)
    assert code in (0, 2), err
    assert "Traceback" not in err and "RuntimeWarning" not in err
    if code == 2:
        assert len(err.strip().splitlines()) == 1 and out == ""
        return
    SOLVED.append(1)
    rows = [r.split(",") for r in out.strip().splitlines()[1:]]
    assert rows
    for r in rows:
        vals = [float(v) for v in r[2:6]]
        assert all(math.isfinite(v) for v in vals), r


def test_property_test_did_solve_some():
    # the property above must not pass by refusing everything (runs after it)
    assert SOLVED


def test_absurd_point_is_named_in_a_short_line(capsys):
    # the audit's `points --at 1e308 1e308`: refused, and the message stays one short line
    from pathlib import Path

    from harbor.cli import main

    demo = str(Path(__file__).resolve().parents[1] / "scenarios" / "demo.toml")
    assert main(["points", demo, "--at", "1e308", "1e308"]) == 2
    err = capsys.readouterr().err.strip()
    assert "1e+308" in err and "100 km" in err
    assert len(err.splitlines()) == 1 and len(err) < 300
