"""The harbor command: exit codes, one-line errors, CSV/JSON contracts, outputs agreeing
with `harbor points`."""

import csv
import io
import json
import subprocess
import sys
from pathlib import Path

import numpy as np
import pyproj
import pytest
import xarray as xr

from harbor.cli import main

ROOT = Path(__file__).resolve().parents[1]
DEMO = str(ROOT / "scenarios" / "demo.toml")

SMALL = """
title = "Cove of Nerrin (invented test harbour)"
[site]
crs = "EPSG:32630"
depth = 8.0
[[arm]]
name = "north arm"
line = [[500000.0, 6300000.0], [500000.0, 6300200.0], [500070.0, 6300200.0]]
[[arm]]
name = "south arm"
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


def run(args, capsys):
    code = main(args)
    out, err = capsys.readouterr()
    return code, out, err


@pytest.fixture()
def small(tmp_path):
    p = tmp_path / "cove.toml"
    p.write_text(SMALL)
    return p


def test_version_and_help(capsys):
    with pytest.raises(SystemExit) as e:
        main(["--version"])
    assert e.value.code == 0
    assert "harbor" in capsys.readouterr().out
    for cmd in ("map", "points", "check", "diagram", "demo"):
        with pytest.raises(SystemExit) as e:
            main([cmd, "--help"])
        assert e.value.code == 0
        text = capsys.readouterr().out
        assert "example" in text and "preliminary" in text.lower()


def test_points_csv_header_and_rows(small, capsys):
    code, out, err = run(["points", str(small)], capsys)
    assert code == 0, err
    rows = list(csv.reader(io.StringIO(out)))
    # DESIGN.md sect. 6: the contract columns first, the verdict columns after them
    assert rows[0] == ["sea", "point", "x", "y", "kd", "height", "limit", "ok", "valid"]
    assert rows[1][0] == "swell" and rows[1][1] == "quay"
    assert float(rows[1][6]) == pytest.approx(0.4)
    assert rows[1][7] == ("true" if float(rows[1][5]) <= 0.4 else "false")
    # the warnings and the caution go to stderr, never into the CSV
    assert "reflection" in err and "preliminary" in err.lower()
    assert float(rows[1][2]) == pytest.approx(500150.0)
    assert float(rows[1][5]) == pytest.approx(1.2 * float(rows[1][4]), abs=2e-3)


def test_points_at_and_json(small, capsys):
    code, out, _ = run(["points", str(small), "--at", "500150", "6300120", "--at", "500100", "6300150",
                        "--json"], capsys)
    assert code == 0
    data = json.loads(out)
    assert [r["point"] for r in data["rows"]] == ["at1", "at2"]
    assert data["rows"][0]["x"] == pytest.approx(500150.0)
    assert "preliminary" in data["cautions"].lower()
    assert set(data["method"]) == {"swell"} and data["method"]["swell"]
    assert any(w["code"] == "reflection-neglected" for w in data["warnings"])
    # The entrance is a classic one (collinear heads on y = 6300200, gap 60 m, centre
    # x = 500100); the sea from 10 deg true travels at 100 deg in the gap's frame
    # (basin side = local y > 0); convergence ~0 on the zone's central meridian. Both
    # points are in the basin, where the gap solution applies (seaward, the arms' bends
    # 70 m from the heads make the field differ from an infinite straight wall's).
    import harbor
    from harbor.study.scenario import load_scenario
    conv = load_scenario(str(small)).site.convergence_deg
    L = harbor.wavelength(7.0, 8.0)
    local_dir = 100.0 - conv
    # UTM lengths are 0.9996 x ground lengths near the central meridian (Snyder 1987,
    # p. 57); the waves see ground lengths (pyproj's scale factor at the site).
    site = load_scenario(str(small)).site
    k = pyproj.Proj("EPSG:32630").get_factors(*site.anchor_lonlat).meridional_scale
    for row, (x, y) in zip(data["rows"], [(500150.0, 6300120.0), (500100.0, 6300150.0)]):
        ref = abs(harbor.gap((x - 500100.0) / k, (6300200.0 - y) / k, L, local_dir, 60.0 / k))
        assert row["kd"] == pytest.approx(ref, abs=2e-3)


def test_random_seas_add_period_ratio_column(capsys):
    # (screening: the full-field random sea of the demo takes minutes; its columns are
    # the same)
    code, out, _ = run(["points", DEMO, "--sea", "storm N", "--method", "screening"], capsys)
    assert code == 0
    rows = list(csv.reader(io.StringIO(out)))
    assert rows[0] == ["sea", "point", "x", "y", "kd", "height", "period_ratio", "limit", "ok",
                       "valid"]
    assert all(float(r[6]) > 0 for r in rows[1:])


@pytest.mark.parametrize("args, key", [
    (["points", "{f}", "--sea", "swel"], "--sea"),
    (["points", "{f}", "--at", "500150", "6299900"], "--at"),
    (["diagram", "gap", "--direction", "60"], "--width"),
    (["diagram", "semi-infinite", "--direction", "190"], "--direction"),
])
def test_bad_options_exit_2_with_one_line(small, capsys, args, key):
    args = [a.replace("{f}", str(small)) for a in args]
    code, out, err = run(args, capsys)
    assert code == 2
    assert err.count("\n") == 1 and key in err and "Traceback" not in err


def test_bad_scenario_file_exit_2_names_file_table_and_key(tmp_path, capsys):
    bad = tmp_path / "bad.toml"
    bad.write_text(SMALL.replace('kind = "regular"', 'kind = "regullar"'))
    code, _, err = run(["check", str(bad)], capsys)
    assert code == 2
    assert "bad.toml" in err and "kind" in err and "swell" in err
    assert err.count("\n") == 1
    code, _, err = run(["check", str(tmp_path / "missing.toml")], capsys)
    assert code == 2 and "missing.toml" in err


def test_command_line_process_exit_code_and_no_traceback(tmp_path):
    bad = tmp_path / "bad.toml"
    bad.write_text(SMALL.replace("depth = 8.0", "depth = -8.0"))
    p = subprocess.run([sys.executable, "-m", "harbor", "points", str(bad)], capture_output=True,
                       text=True)
    assert p.returncode == 2
    assert "Traceback" not in p.stderr and "depth" in p.stderr


def test_check_prints_warnings_and_convergence(small, capsys):
    code, out, _ = run(["check", str(small)], capsys)
    assert code == 0
    assert "convergence" in out and "reflection" in out


def test_map_outputs_agree_with_points(small, tmp_path, capsys):
    out_dir = tmp_path / "maps"
    code, out, err = run(["map", str(small), "--out", str(out_dir), "--quiet"], capsys)
    assert code == 0, err
    names = sorted(p.name for p in out_dir.iterdir())
    assert names == ["grid.nc", "harbor.gpkg", "height-swell.tif", "isolines-swell.geojson",
                     "kd-swell.tif", "map-swell.png", "points.csv", "report.pdf",
                     "sheet-swell.pdf"]
    # the warning block is printed once (it ends the berth table)
    assert out.count("reflection from quays, shores") == 1
    ds = xr.open_dataset(out_dir / "grid.nc")
    kd = ds["kd"].isel(sea=0) if "sea" in ds["kd"].dims else ds["kd"]
    # pick a few wet grid nodes and ask `harbor points` for them
    xs, ys = ds["x"].values, ds["y"].values
    picks = [(xs[5], ys[20]), (xs[20], ys[10]), (xs[30], ys[35])]
    args = ["points", str(small)]
    for x, y in picks:
        args += ["--at", repr(float(x)), repr(float(y))]
    code, pout, _ = run(args, capsys)
    rows = list(csv.reader(io.StringIO(pout)))[1:]
    for (x, y), row in zip(picks, rows):
        grid_value = float(kd.sel(x=x, y=y).values)
        assert float(row[4]) == pytest.approx(grid_value, abs=1e-3)
    gj = json.loads((out_dir / "isolines-swell.geojson").read_text())
    lon, lat = np.array([c for f in gj["features"] for line in
                         (f["geometry"]["coordinates"] if f["geometry"]["type"] == "MultiLineString"
                          else [f["geometry"]["coordinates"]]) for c in line]).T
    # the invented site is near 56.8 N, 3.0 W (UTM 30N, 500 km E, 6300 km N)
    assert np.all((lon > -3.1) & (lon < -2.9) & (lat > 56.8) & (lat < 56.9))


def test_diagram_writes_png(tmp_path, capsys):
    out = tmp_path / "d.png"
    code, _, err = run(["diagram", "gap", "--width", "1.5", "--direction", "60", "--out", str(out),
                        "--resolution", "0.1"], capsys)
    assert code == 0, err
    assert out.read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"


def test_top_level_help_lists_every_command(capsys):
    with pytest.raises(SystemExit) as e:
        main(["--help"])
    assert e.value.code == 0
    text = capsys.readouterr().out
    for cmd in ("map", "points", "check", "diagram", "demo", "sweep", "climate"):
        assert cmd in text


def test_lonlat_scenario_points_csv_in_lonlat(tmp_path, capsys):
    # The points CSV of a map run gives x, y in the scenario's CRS, as `harbor points`
    # does: for an EPSG:4326 scenario, lon/lat (GeoJSON order, RFC 7946).
    src = ROOT / "tests" / "data" / "lonlat_harbour.toml"
    # (screening: a test of coordinates, not of the full-field method this layout gets)
    code, _, err = run(["map", str(src), "--out", str(tmp_path / "m"), "--quiet",
                        "--method", "screening"], capsys)
    assert code == 0, err
    rows = list(csv.DictReader((tmp_path / "m" / "points.csv").open()))
    code, out, _ = run(["points", str(src), "--method", "screening"], capsys)
    ref = list(csv.DictReader(io.StringIO(out)))
    for r, q in zip(rows, ref):
        assert -12.01 < float(r["x"]) < -11.99 and 56.99 < float(r["y"]) < 57.01
        assert float(r["x"]) == pytest.approx(float(q["x"]), abs=1e-6)
        assert float(r["kd"]) == pytest.approx(float(q["kd"]), abs=1e-3)


# --------------------------------------------------------------------------- one rule, every entry

# Points of the SMALL cove: on the beach polygon, on the north arm's straight part, on its
# corner vertex and on its free head (the layout file above fixes every coordinate).
BAD_POINTS = [
    ((500150.0, 6300000.0), "is on land"),
    ((500000.0, 6300100.0), "is on an arm ('north arm')"),
    ((500000.0, 6300200.0), "is on a vertex of an arm ('north arm')"),
    ((500070.0, 6300200.0), "is on the head of an arm ('north arm')"),
]


@pytest.mark.parametrize("xy, words", BAD_POINTS)
def test_bad_point_refused_alike_by_every_entry(small, tmp_path, capsys, xy, words):
    import harbor
    from harbor.errors import InputError

    x, y = xy
    # 1. the scenario reader ([[point]] table)
    bad = tmp_path / "bad.toml"
    bad.write_text(SMALL.replace("at = [500150.0, 6300100.0]", f"at = [{x}, {y}]"))
    code, _, err = run(["check", str(bad)], capsys)
    assert code == 2 and words in err and "[[point]] 'quay'" in err and "key 'at'" in err
    # 2. the API: solve(points=...)
    sc = harbor.load_scenario(str(small))
    with pytest.raises(InputError) as e:
        harbor.solve(sc, points=[("p", x, y)], grid=False)
    assert words in str(e.value) and e.value.key == "points"
    # 3. the command line: harbor points --at
    code, out, err = run(["points", str(small), "--at", str(x), str(y)], capsys)
    assert code == 2 and out == "" and words in err and "--at" in err
    assert err.count("\n") == 1


def test_sweep_refuses_a_head_moved_over_a_point(tmp_path):
    # the quay sits on the line of the south arm's end segment, 30 m beyond its head
    import harbor
    from harbor.study.sweep import MoveRejected, move_head

    p = tmp_path / "cove.toml"
    p.write_text(SMALL.replace("at = [500150.0, 6300100.0]", "at = [500100.0, 6300200.0]"))
    sc = harbor.load_scenario(str(p))
    with pytest.raises(MoveRejected, match="point 'quay'"):
        move_head(sc, "south arm", 40.0)
    move_head(sc, "south arm", 20.0)  # stops 10 m short: accepted


# --------------------------------------------------------------------------- lon/lat

GEOGRAPHIC_SPELLINGS = ["EPSG:4326", "epsg:4326", "WGS84", "WGS 84", "OGC:CRS84",
                        "urn:ogc:def:crs:OGC::CRS84", "+proj=longlat +datum=WGS84 +no_defs"]


@pytest.mark.parametrize("spelling", GEOGRAPHIC_SPELLINGS)
def test_lonlat_precision_whatever_the_spelling(tmp_path, capsys, spelling):
    # The points as written in the file (lon, lat to 6 decimals) must come back from both
    # the points CSV of a run and `harbor points` to 1e-7 degree (about 1 cm), never
    # rounded to metres' 2 decimals (0.01 degree is about 1 km).
    from harbor.outputs.export import points_csv_text
    from harbor.solver.assemble import solve
    from harbor.study.scenario import load_scenario

    src = (ROOT / "tests" / "data" / "lonlat_harbour.toml").read_text()
    p = tmp_path / "ll.toml"
    # a regular sea: the coordinates, not the spectrum, are under test (and it is fast)
    src = src.replace('kind = "random"', 'kind = "regular"').replace("spreading = 25\n", "")
    p.write_text(src.replace('crs = "EPSG:4326"', f'crs = "{spelling}"'))
    written = {"inner berth": (-12.000000, 57.000898), "west berth": (-12.001316, 57.001347)}
    sc = load_scenario(str(p))
    ds = solve(sc, grid=False)
    assert ds.attrs["scenario_crs_is_lonlat"] == 1
    rows = list(csv.DictReader(io.StringIO(points_csv_text(ds))))
    code, out, err = run(["points", str(p)], capsys)
    assert code == 0, err
    for table in (rows, list(csv.DictReader(io.StringIO(out)))):
        for r in table:
            lon, lat = written[r["point"]]
            assert len(r["x"].split(".")[1]) >= 7 and len(r["y"].split(".")[1]) >= 7
            assert float(r["x"]) == pytest.approx(lon, abs=1e-7)
            assert float(r["y"]) == pytest.approx(lat, abs=1e-7)


# --------------------------------------------------------------------------- one contract

def _contract(ds):
    """The values every point output must carry, read straight from the result's
    variables: {(sea, point): (kd, height, limit)}."""
    out = {}
    for i, s in enumerate(ds.sea.values):
        for j, p in enumerate(ds.point.values):
            lim = float(ds.point_limit.values[j])
            out[(str(s), str(p))] = (float(ds.point_kd.values[i, j]),
                                     float(ds.point_height.values[i, j]),
                                     None if np.isnan(lim) else lim)
    return out


def test_csv_json_netcdf_and_table_carry_one_contract(small, tmp_path, capsys):
    from harbor.outputs.export import point_table, points_csv_text, write_netcdf
    from harbor.solver.assemble import solve
    from harbor.study.scenario import load_scenario

    ds = solve(load_scenario(str(small)), grid=False)
    want = _contract(ds)
    assert want  # one sea state, one point
    # CSV (points.csv of a map run)
    for r in csv.DictReader(io.StringIO(points_csv_text(ds))):
        kd, h, lim = want[(r["sea"], r["point"])]
        assert float(r["kd"]) == pytest.approx(kd, abs=5e-5)
        assert float(r["height"]) == pytest.approx(h, abs=5e-4)
        assert float(r["limit"]) == pytest.approx(lim)
        assert r["ok"] == ("true" if h <= lim else "false")
    # JSON of harbor points
    code, out, _ = run(["points", str(small), "--json"], capsys)
    assert code == 0
    for r in json.loads(out)["rows"]:
        kd, h, lim = want[(r["sea"], r["point"])]
        assert r["kd"] == pytest.approx(kd, abs=1e-12) and r["height"] == pytest.approx(h)
        assert r["limit"] == pytest.approx(lim) and r["ok"] == (h <= lim)
    # NetCDF, read back by an independent reader (netCDF4 through xarray)
    write_netcdf(ds, tmp_path / "g.nc")
    with xr.open_dataset(tmp_path / "g.nc") as nc:
        got = _contract(nc)
        assert got.keys() == want.keys()
        for k in want:
            assert got[k][:2] == pytest.approx(want[k][:2]) and got[k][2] == want[k][2]
        # the same grid mapping and coordinates as in memory
        assert nc["crs"].attrs["crs_wkt"] == ds["crs"].attrs["crs_wkt"]
        assert nc["x"].attrs["long_name"] == ds["x"].attrs["long_name"]
    # the terminal table: heights to 2 decimals and the verdict
    text = point_table(ds)
    for (s, p), (kd, h, lim) in want.items():
        line = next(ln for ln in text.splitlines() if ln.startswith(p))
        assert f"{h:.2f}" in line and ("ok" if h <= lim else "OVER") in line
