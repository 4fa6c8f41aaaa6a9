"""Entrance-width sweeps (harbor.study.sweep).

The layout used throughout is an invented collinear entrance: two straight arms on the
line y = 5 000 000 (EPSG:32630, on the zone's central meridian so that grid north is
true north), rooted on a U-shaped land polygon that closes the basin on the other three
sides. The west head is at x = 499 950, the east head at x = 500 050: a 100 m gap.
"""

import argparse
import math

import numpy as np
import pandas as pd
import pytest

from harbor.cli import add_sweep_parser, cmd_sweep
import harbor
from harbor.errors import InputError
from harbor.study.sweep import (MIN_GAP, SWEEP_COLUMNS, sweep_table, MoveRejected, move_head, move_range, sweep, sweep_csv_text,
                                verdict, widest_ok)

Y0 = 5_000_000.0
WEST_HEAD = 499_950.0
EAST_HEAD = 500_050.0

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
[[sea]]
name = "south-south-west"
kind = "regular"
height = 2.0
period = 6.0
from = 200.0
[[point]]
name = "centre"
at = [500000.0, 5000150.0]
limit = 0.5
[[point]]
name = "west corner"
at = [499880.0, 5000250.0]
"""

# One arm off the shore pointing north at an island 50 m beyond its head.
ISLAND_TOML = """
[site]
crs = "EPSG:32630"
depth = 10.0
[[arm]]
name = "mole"
line = [[500000.0, 5000000.0], [500000.0, 5000200.0]]
[[land]]
name = "shore"
outline = [[499800.0, 4999900.0], [500200.0, 4999900.0], [500200.0, 5000000.0],
           [499800.0, 5000000.0]]
[[land]]
name = "island"
outline = [[499950.0, 5000250.0], [500050.0, 5000250.0], [500050.0, 5000300.0],
           [499950.0, 5000300.0]]
[[sea]]
name = "west"
kind = "regular"
height = 1.0
period = 6.0
from = 270.0
[[point]]
name = "lee"
at = [500060.0, 5000100.0]
limit = 1.0
"""


@pytest.fixture(scope="module")
def gap_scenario(tmp_path_factory):
    p = tmp_path_factory.mktemp("sweep") / "gap.toml"
    p.write_text(GAP_TOML)
    return harbor.load_scenario(p)


@pytest.fixture(scope="module")
def island_scenario(tmp_path_factory):
    p = tmp_path_factory.mktemp("sweep") / "island.toml"
    p.write_text(ISLAND_TOML)
    return harbor.load_scenario(p)


@pytest.fixture(scope="module")
def gap_sweep(gap_scenario):
    # -50 widens to 150 m, +60 narrows to 40 m; -260 and +100 cannot be built.
    # The tests below read the tidy table of the labelled result.
    return sweep_table(sweep(gap_scenario, "west", [-260.0, -50.0, 0.0, 30.0, 60.0, 100.0]))


def test_sweep_of_collinear_entrance_reproduces_gap(gap_scenario, gap_sweep):
    # Moving the west head by m (positive: east, lengthening) gives a gap of width
    # B = 100 - m centred at x = 500 000 + m/2. K' at every basin point must be that of
    # harbor.gap in the gap's own frame (barrier on y = 0, waves from y < 0), with the
    # direction of travel 90 deg for waves from 180 deg true and 70 deg for waves from
    # 200 deg true (grid north = true north on the central meridian).
    assert abs(gap_scenario.site.convergence_deg) < 1e-6
    k = gap_scenario.site.scale_factor
    assert k == pytest.approx(0.9996, abs=1e-6)
    L = float(harbor.wavelength(6.0, 10.0))
    pts = {p.name: p.at for p in gap_scenario.points}
    local_dir = {"south": 90.0, "south-south-west": 70.0}
    height = {"south": 1.0, "south-south-west": 2.0}
    moves = sorted(gap_sweep["move"].unique())
    assert moves == [-50.0, 0.0, 30.0, 60.0]
    for m in moves:
        # moves and reported widths are ground metres: the head moves m k in UTM units
        B = 100.0 - m * k
        xc = 0.5 * (WEST_HEAD + m * k + EAST_HEAD)
        sub = gap_sweep[gap_sweep["move"] == m]
        np.testing.assert_allclose(sub["entrance_width"], B / k, atol=1e-6)
        for _, r in sub.iterrows():
            x, y = pts[r["point"]]
            # the waves see ground lengths: UTM lengths / k (k = 0.9996 on the central
            # meridian, Snyder 1987 p. 57)
            ref = abs(complex(harbor.gap((x - xc) / k, (y - Y0) / k, L, local_dir[r["sea"]],
                                         B / k)))
            assert r["kd"] == pytest.approx(ref, abs=1e-7), (m, r["sea"], r["point"])
            assert r["height"] == pytest.approx(ref * height[r["sea"]], abs=1e-7)


def test_gap_centre_matters(gap_scenario, gap_sweep):
    # Guard on the test above: had the gap stayed centred at x = 500 000, the oblique
    # sea at the off-centre point would differ noticeably at the 40 m width.
    L = float(harbor.wavelength(6.0, 10.0))
    x, y = 499880.0, 5000250.0
    r = gap_sweep[(gap_sweep["move"] == 60.0) & (gap_sweep["point"] == "west corner")
                  & (gap_sweep["sea"] == "south-south-west")].iloc[0]
    wrong = abs(complex(harbor.gap(x - 500000.0, y - Y0, L, 70.0, 40.0)))
    assert abs(r["kd"] - wrong) > 0.01


def test_impossible_moves_are_reported_and_skipped(gap_sweep):
    skipped = dict(gap_sweep.attrs["skipped"])
    assert set(skipped) == {-260.0, 100.0}
    assert "past the other vertex" in skipped[-260.0]        # end segment is 250 m
    assert "east" in skipped[100.0]                          # runs into the east arm
    assert not gap_sweep["move"].isin([-260.0, 100.0]).any()


def test_table_columns_and_ok(gap_sweep):
    # the contract columns, then the validity flag
    assert list(gap_sweep.columns) == SWEEP_COLUMNS + ["valid"]
    with_limit = gap_sweep[gap_sweep["point"] == "centre"]
    np.testing.assert_array_equal(with_limit["ok"].astype(bool),
                                  with_limit["height"] <= 0.5)
    assert gap_sweep.loc[gap_sweep["point"] == "west corner", "ok"].isna().all()
    assert gap_sweep.loc[gap_sweep["point"] == "west corner", "limit"].isna().all()
    text = sweep_csv_text(gap_sweep)
    lines = text.splitlines()
    assert lines[0] == "move,entrance_width,sea,point,kd,height,limit,ok,valid"
    assert len(lines) == 1 + len(gap_sweep)
    back = pd.read_csv(pd.io.common.StringIO(text))
    assert set(back.loc[back["point"] == "centre", "ok"]) <= {True, False}
    assert back.loc[back["point"] == "west corner", "ok"].isna().all()


def test_move_head_geometry_island(island_scenario):
    # The mole's head is 50 m short of the island (by construction).
    # Moves and widths are ground metres (CRS lengths / k, k = 0.9996 on the UTM
    # central meridian, Snyder 1987 p. 57).
    k = island_scenario.site.scale_factor
    _, w0 = move_head(island_scenario, "mole", 0.0)
    assert w0 == pytest.approx(50.0 / k)
    moved, w20 = move_head(island_scenario, "mole", 20.0)
    assert w20 == pytest.approx(50.0 / k - 20.0)
    np.testing.assert_allclose(moved.layout.arms[0].line[-1], [500000.0, 5000200.0 + 20.0 * k])
    # the rest of the scenario is untouched
    assert moved.points == island_scenario.points
    assert moved.layout.lands == island_scenario.layout.lands
    np.testing.assert_allclose(island_scenario.layout.arms[0].line[-1],
                               [500000.0, 5000200.0])
    with pytest.raises(MoveRejected, match="in land"):
        move_head(island_scenario, "mole", 60.0)
    with pytest.raises(MoveRejected, match="entrance closed"):
        move_head(island_scenario, "mole", 50.0 - MIN_GAP / 2)
    with pytest.raises(MoveRejected, match="past the other vertex"):
        move_head(island_scenario, "mole", -201.0)      # the segment is 200 / k = 200.08 m
    # shortened by 120 m the head is 80 m from the shore, nearer than the island (170 m)
    _, w = move_head(island_scenario, "mole", -120.0)
    assert w == pytest.approx(200.0 / k - 120.0)


def test_move_head_across_land(tmp_path):
    # a mole whose extension would cut through a thin spit and come out beyond it
    text = ISLAND_TOML.replace(
        "[[499950.0, 5000250.0], [500050.0, 5000250.0], [500050.0, 5000300.0],\n"
        "           [499950.0, 5000300.0]]",
        "[[499950.0, 5000250.0], [500050.0, 5000250.0], [500050.0, 5000252.0],\n"
        "           [499950.0, 5000252.0]]")
    p = tmp_path / "spit.toml"
    p.write_text(text)
    sc = harbor.load_scenario(p)
    with pytest.raises(MoveRejected, match="across land"):
        move_head(sc, "mole", 60.0)


def test_arm_errors(gap_scenario, tmp_path):
    with pytest.raises(InputError, match="did you mean 'west'"):
        sweep(gap_scenario, "wset", [0.0])
    # a detached breakwater has two free heads: which to move would be a guess
    text = GAP_TOML + """
[[arm]]
name = "detached"
line = [[499900.0, 4999800.0], [500100.0, 4999800.0]]
"""
    p = tmp_path / "detached.toml"
    p.write_text(text)
    sc = harbor.load_scenario(p)
    with pytest.raises(InputError, match="exactly one free head"):
        move_head(sc, "detached", 10.0)
    with pytest.raises(InputError, match="no sea state"):
        sweep(gap_scenario, "west", [0.0], sea="north")


def test_move_range():
    np.testing.assert_allclose(move_range(-10, 10, 5), [-10, -5, 0, 5, 10])
    np.testing.assert_allclose(move_range(0, 1, 0.1), np.arange(11) / 10)
    np.testing.assert_allclose(move_range(3, 3, 1), [3])
    for bad in [(0, 10, 0), (0, 10, -1), (10, 0, 1), (0, math.nan, 1), (0, 1e6, 1)]:
        with pytest.raises(InputError):
            move_range(*bad)


def _table(rows):
    df = pd.DataFrame(rows, columns=SWEEP_COLUMNS)
    df["ok"] = df["ok"].astype("boolean")
    return df


def test_widest_ok_hand_table():
    # by hand: at 80 m point b fails; at 60 m and 40 m both pass; point c has no limit
    # and does not count; the widest passing width is 60 m (move 20)
    na = pd.NA
    rows = []
    for move, width, hb in ((0.0, 80.0, 0.6), (20.0, 60.0, 0.4), (40.0, 40.0, 0.3)):
        rows += [(move, width, "s", "a", 0.1, 0.1, 0.5, True),
                 (move, width, "s", "b", hb, hb, 0.5, hb <= 0.5),
                 (move, width, "s", "c", 9.0, 9.0, math.nan, na)]
    t = _table(rows)
    assert widest_ok(t) == (60.0, 20.0)
    assert "60.0 m" in verdict(t)
    t.loc[t["point"] == "a", "ok"] = False
    assert widest_ok(t) is None
    assert "none" in verdict(t) or "no swept" in verdict(t)
    t2 = t[t["point"] == "c"]
    assert widest_ok(t2) is None
    assert "no point has a limit" in verdict(t2)


def test_cli_sweep_writes_csv_and_png(gap_scenario, tmp_path, capsys):
    p = argparse.ArgumentParser()
    add_sweep_parser(p.add_subparsers())
    out = tmp_path / "out"
    args = p.parse_args(["sweep", gap_scenario.path, "--arm", "west", "--move", "0", "120",
                         "60", "--sea", "south", "--out", str(out), "--quiet"])
    assert cmd_sweep(args) == 0
    text = capsys.readouterr().out
    assert "skipped move +120 m" in text
    assert "widest entrance at which every point meets its limit" in text or \
        "lets every point meet its limit" in text
    csv_text = (out / "sweep-west.csv").read_text()
    assert csv_text.startswith("move,entrance_width,sea,point,kd,height,limit,ok,valid\n")
    png = (out / "sweep-west.png").read_bytes()
    assert png[:8] == b"\x89PNG\r\n\x1a\n"
    # nothing but the two outputs is left behind (atomic staging)
    assert sorted(f.name for f in out.iterdir()) == ["sweep-west.csv", "sweep-west.png"]
    assert not [f for f in tmp_path.iterdir() if f.name.startswith(".")]


def test_sweep_is_a_labelled_result(gap_scenario):
    # the same shape as the climate study: an xarray Dataset with named dimensions; the
    # widths follow from the invented layout (a 100 m gap, the west head moving east)
    res = sweep(gap_scenario, "west", [0.0, 30.0, 100.0], sea="south")
    assert res["height"].dims == ("move", "sea", "point")
    assert list(res["move"].values) == [0.0, 30.0]          # +100 closes the entrance
    k = gap_scenario.site.scale_factor                      # widths in ground metres
    np.testing.assert_allclose(res["entrance_width"], [100.0 / k, 100.0 / k - 30.0])
    assert [m for m, _ in res.attrs["skipped"]] == [100.0]
    t = sweep_table(res)
    assert list(t.columns) == SWEEP_COLUMNS + ["valid"]
    assert len(t) == 2 * len(gap_scenario.points)
