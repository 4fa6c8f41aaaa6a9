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
    assert rows[0] == ["sea", "point", "x", "y", "kd", "height"]
    assert rows[1][0] == "swell" and rows[1][1] == "quay"
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
    # The entrance is a classic one (collinear heads on y = 6300200, gap 60 m, centre
    # x = 500100); the sea from 10 deg true travels at 100 deg in the gap's frame
    # (basin side = local y > 0); convergence ~0 on the zone's central meridian.
    import harbor
    from harbor.study.scenario import load_scenario
    site = load_scenario(str(small)).site
    conv = site.convergence_deg
    L = harbor.wavelength(7.0, 8.0)
    local_dir = 100.0 - conv
    # UTM lengths are 0.9996 x ground lengths near the central meridian (Snyder 1987,
    # p. 57); the waves see ground lengths (pyproj's scale factor at the site). Both
    # points lie in the basin: on the seaward side K' sits near a node of the standing
    # wave, where 0.04 % of scale moves it by 0.006.
    k = pyproj.Proj("EPSG:32630").get_factors(*site.anchor_lonlat).meridional_scale
    for row, (x, y) in zip(data["rows"], [(500150.0, 6300120.0), (500100.0, 6300150.0)]):
        ref = abs(harbor.gap((x - 500100.0) / k, (6300200.0 - y) / k, L, local_dir, 60.0 / k))
        assert row["kd"] == pytest.approx(ref, abs=2e-3)


def test_random_seas_add_period_ratio_column(capsys):
    code, out, _ = run(["points", DEMO, "--sea", "storm N"], capsys)
    assert code == 0
    rows = list(csv.reader(io.StringIO(out)))
    assert rows[0] == ["sea", "point", "x", "y", "kd", "height", "period_ratio"]
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
    assert names == ["grid.nc", "isolines-swell.geojson", "map-swell.png", "points.csv",
                     "sheet-swell.pdf"]
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
    code, _, err = run(["map", str(src), "--out", str(tmp_path / "m"), "--quiet"], capsys)
    assert code == 0, err
    rows = list(csv.DictReader((tmp_path / "m" / "points.csv").open()))
    code, out, _ = run(["points", str(src)], capsys)
    ref = list(csv.DictReader(io.StringIO(out)))
    for r, q in zip(rows, ref):
        assert -12.01 < float(r["x"]) < -11.99 and 56.99 < float(r["y"]) < 57.01
        assert float(r["x"]) == pytest.approx(float(q["x"]), abs=1e-6)
        assert float(r["kd"]) == pytest.approx(float(q["kd"]), abs=1e-3)
