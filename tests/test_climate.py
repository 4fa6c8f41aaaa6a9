"""Berth downtime from a wave climate (harbor.study.climate).

The harbour is the invented collinear entrance of tests/test_sweep.py (a 100 m gap on
y = 5 000 000, EPSG:32630, basin closed by land on the other sides).
"""

import argparse

import numpy as np
import pandas as pd
import pytest

from harbor.cli import add_climate_parser, cmd_climate
import harbor
from harbor.errors import InputError
from harbor.solver import assemble
from harbor.outputs.studies import climate_tables, downtime_csv_text
from harbor.study.climate import (SECTORS, climate_downtime, percent_warning, read_climate,
                                  sector_label, sector_of)

GAP_TOML = """
title = "collinear test entrance (invented)"
[site]
crs = "EPSG:32630"
depth = 10.0
[[arm]]
name = "west"
line = [[499700.0, 5000000.0], [499950.0, 5000000.0]]
[[arm]]
name = "east"
line = [[500300.0, 5000000.0], [500050.0, 5000000.0]]
[[land]]
name = "shore"
outline = [[499600.0, 4999900.0], [499700.0, 4999900.0], [499700.0, 5000600.0],
           [500300.0, 5000600.0], [500300.0, 4999900.0], [500400.0, 4999900.0],
           [500400.0, 5000700.0], [499600.0, 5000700.0]]
[[sea]]
name = "south"
kind = "regular"
height = 1.0
period = 6.0
from = 180.0
[[point]]
name = "quay"
at = [500000.0, 5000150.0]
limit = 0.3
[[point]]
name = "pontoon"
at = [499950.0, 5000200.0]
limit = 0.8
[[point]]
name = "no limit here"
at = [500100.0, 5000200.0]
"""


@pytest.fixture(scope="module")
def scenario(tmp_path_factory):
    p = tmp_path_factory.mktemp("climate") / "gap.toml"
    p.write_text(GAP_TOML)
    return harbor.load_scenario(p)


def _write(tmp_path, text, name="climate.csv"):
    p = tmp_path / name
    p.write_text(text)
    return p


class _CountingSolve:
    """Wraps harbor.solver.assemble.solve and records each call's sea states."""

    def __init__(self, real):
        self.real = real
        self.calls = []

    def __call__(self, sc, *a, **kw):
        self.calls.append((tuple(sc.seas), kw.get("grid")))
        return self.real(sc, *a, **kw)


def test_sectors():
    # 30-degree sectors centred on 0, 30, ...; half-open [c - 15, c + 15)
    got = sector_of([0, 14.9, 15, 344.99, 345, 359.9, 360, 181, 195, 224.9])
    np.testing.assert_array_equal(got, [0, 0, 30, 330, 0, 0, 0, 180, 210, 210])
    assert sector_label(0) == "345-015"
    assert sector_label(210) == "195-225"
    assert SECTORS == tuple(range(0, 360, 30))


def test_downtime_by_hand(scenario, tmp_path, monkeypatch):
    # Heights chosen so that each row is clearly on one side of every limit: 0.01 m
    # seas stay far below 0.3 m whatever K' (K' stays below 2 behind a gap: common practice),
    # 100 m seas exceed any limit wherever K' > 0.008; both points lie in full view of
    # the opening, so K' there is of order 0.1-1.
    p = _write(tmp_path, "height,period,from,percent\n"
                         "0.01,6,180,40\n"
                         "100,6,180,25\n"
                         "100,8,200,15\n"
                         "0.01,8,200,20\n")
    counter = _CountingSolve(assemble.solve)
    monkeypatch.setattr(assemble, "solve", counter)
    res = climate_downtime(scenario, p, workers=1)
    # a labelled result: the downtime per point and sector adds up to the total
    assert res["downtime"].dims == ("point", "sector")
    np.testing.assert_allclose(res["downtime"].sum("sector"), res["total"])
    d, rows, occurrence = climate_tables(res)
    # hand computation: rows 2 and 3 exceed, at both points
    assert list(d.index) == ["quay", "pontoon"]            # points without a limit left out
    np.testing.assert_allclose(d["total"], [40.0, 40.0])
    np.testing.assert_allclose(d[180], [25.0, 25.0])
    np.testing.assert_allclose(d[210], [15.0, 15.0])       # 200 deg lies in 195-225
    others = [c for c in SECTORS if c not in (180, 210)]
    assert (d[others].to_numpy() == 0).all()
    np.testing.assert_allclose(d["limit"], [0.3, 0.8])
    np.testing.assert_allclose(occurrence[180], 65.0)
    np.testing.assert_allclose(occurrence[210], 35.0)
    assert occurrence.sum() == pytest.approx(100.0)
    assert float(res["occurrence"].sel(sector=180)) == pytest.approx(65.0)
    assert percent_warning(read_climate(p)) is None
    # two distinct (period, direction, spreading): two solves at unit height, points only
    assert len(counter.calls) == 2
    for seas, grid in counter.calls:
        assert grid is False
        assert len(seas) == 1 and seas[0].height == 1.0 and seas[0].kind == "random"
    r = rows
    assert set(r.columns) >= {"row", "height", "period", "from", "percent", "sector",
                              "point", "kd", "point_height", "limit", "exceeds"}
    assert r["exceeds"].sum() == 4
    assert (r.loc[r["exceeds"], "row"].unique() == [2, 3]).all()


def test_cases_are_reused(scenario, tmp_path, monkeypatch):
    # 8 rows, 4 distinct cases: (6 s, 330, 10) four times (once written as spreading
    # left empty, 10 by default), (6 s, 0/360, 10) twice -- 0 and 360 are one
    # direction -- and (6 s, 330, 75) and (8 s, 330, 10) once each. Four cases are
    # enough for the threads to be used (workers=2).
    p = _write(tmp_path, "height,period,from,percent,spreading\n"
                         "0.5,6,330,10,10\n"
                         "1.0,6,330,20,\n"
                         "2.0,6,330,20,10\n"
                         "4.0,6,330,10,10\n"
                         "1.0,6,0,15,10\n"
                         "1.0,6,360,15,10\n"
                         "1.0,6,330,10,75\n"
                         "1.0,8,330,0,10\n")
    counter = _CountingSolve(assemble.solve)
    monkeypatch.setattr(assemble, "solve", counter)
    res = climate_downtime(scenario, p, workers=2)
    assert len(counter.calls) == 4
    assert sorted((s[0].period, s[0].from_deg, s[0].spreading) for s, _ in counter.calls) \
        == [(6.0, 0.0, 10.0), (6.0, 330.0, 10.0), (6.0, 330.0, 75.0), (8.0, 330.0, 10.0)]
    _, rows, _ = climate_tables(res)
    r = rows[rows["point"] == "quay"].set_index("row")
    # linear theory: the same K' for every height of a case, heights in proportion
    assert r.loc[[1, 2, 3, 4], "kd"].nunique() == 1
    np.testing.assert_allclose(r.loc[4, "point_height"] / r.loc[1, "point_height"], 8.0)
    assert r.loc[5, "kd"] == r.loc[6, "kd"]


def _error(tmp_path, text):
    p = _write(tmp_path, text, "bad.csv")
    with pytest.raises(InputError) as e:
        read_climate(p)
    return e.value.line(), str(p)


def test_bad_cells_name_row_and_column(tmp_path):
    line, f = _error(tmp_path, "height,period,from,percent\n1.0,6,330,50\n-0.5,6,330,50\n")
    assert f in line and "row 2 (line 3)" in line and "'height'" in line and "negative" in line
    # a comment line shifts the file line but not the row number
    line, f = _error(tmp_path, "# comment\nheight,period,from,percent\n1.0,6,330,50\n"
                               "1.0,6,330,abc\n")
    assert "row 2 (line 4)" in line and "'percent'" in line and "'abc'" in line
    line, _ = _error(tmp_path, "height,period,from,percent\n1.0,,330,50\n")
    assert "row 1" in line and "'period'" in line and "empty" in line
    line, _ = _error(tmp_path, "height,period,from,percent\n1.0,6,400,50\n")
    assert "row 1" in line and "'from'" in line and "360" in line
    line, _ = _error(tmp_path, "height,period,from,percent\n1.0,0,30,50\n")
    assert "'period'" in line and "positive" in line
    line, _ = _error(tmp_path, "height,period,from,percent,spreading\n1.0,6,30,50,-3\n")
    assert "'spreading'" in line and "negative" in line
    line, _ = _error(tmp_path, "height,period,from,percent\n1.0,6,30,nan\n")
    assert "'percent'" in line and "finite" in line


def test_bad_tables(tmp_path):
    line, f = _error(tmp_path, "height,period,direction,percent\n1.0,6,330,100\n")
    assert f in line and "missing column" in line and "from" in line
    line, _ = _error(tmp_path, "height,period,from,percent\n")
    assert "no data rows" in line
    line, _ = _error(tmp_path, "")
    assert "empty" in line
    with pytest.raises(InputError, match="file not found"):
        read_climate(tmp_path / "nowhere.csv")


def test_percent_warning(scenario, tmp_path):
    t = read_climate(_write(tmp_path, "HEIGHT, Period ,from,percent,notes\n"
                                      "0.01,6,180,45,calm\n0.01,6,180,45,calm\n"))
    w = percent_warning(t)
    assert w is not None and "90.00" in w and "climate.csv" in w
    res = climate_downtime(scenario, t, workers=1)
    assert w in res.attrs["warnings"]
    near = read_climate(_write(tmp_path, "height,period,from,percent\n"
                                         "0.01,6,180,50.4\n0.01,6,180,50.4\n"))
    assert percent_warning(near) is None


def test_no_limits(scenario, tmp_path):
    import dataclasses

    bare = dataclasses.replace(scenario, points=scenario.points[2:])
    with pytest.raises(InputError, match="limit"):
        climate_downtime(bare, pd.DataFrame({"height": [1.0], "period": [6.0],
                                             "from": [180.0], "percent": [100.0]}))


def test_dataframe_input_errors_name_row():
    df = pd.DataFrame({"height": [1.0, "x"], "period": [6, 6], "from": [0, 0],
                       "percent": [50, 50]})
    import harbor.study.climate as C

    with pytest.raises(InputError, match="row 2.*'height'"):
        C.climate_table(df)


def test_cli_climate(scenario, tmp_path, capsys):
    table = _write(tmp_path, "height,period,from,percent\n0.01,6,180,60\n100,6,180,30\n")
    p = argparse.ArgumentParser()
    add_climate_parser(p.add_subparsers())
    out = tmp_path / "out"
    args = p.parse_args(["climate", scenario.path, "--table", str(table), "--out", str(out),
                         "--quiet", "--arm", "west", "--move", "20"])
    assert cmd_climate(args) == 0
    text = capsys.readouterr().out
    assert "warning:" in text and "90.00" in text            # 60 + 30 is not 100
    assert "entrance width 80.0 m" in text
    assert "quay" in text and "30.00" in text
    assert sorted(f.name for f in out.iterdir()) == ["climate-rows.csv", "downtime.csv",
                                                      "downtime.png"]
    head = (out / "downtime.csv").read_text().splitlines()[0]
    assert head == "point,limit,total," + ",".join(f"{c:03d}" for c in SECTORS)
    args = p.parse_args(["climate", scenario.path, "--table", str(table), "--arm", "west"])
    with pytest.raises(InputError, match="go together"):
        cmd_climate(args)
    args = p.parse_args(["climate", scenario.path, "--table", str(table), "--arm", "west",
                         "--move", "-300", "--out", str(tmp_path / "none")])
    with pytest.raises(InputError, match="cannot move"):
        cmd_climate(args)
    assert not (tmp_path / "none").exists()


def test_downtime_csv_text_matches_table(scenario, tmp_path):
    p = _write(tmp_path, "height,period,from,percent\n100,6,180,100\n")
    res = climate_downtime(scenario, p, workers=1)
    back = pd.read_csv(pd.io.common.StringIO(downtime_csv_text(res)), dtype={"point": str})
    assert list(back["total"]) == [100.0, 100.0]
    assert list(back["180"]) == [100.0, 100.0]
