"""Checks of the basin response curve (harbor.study.response, harbor seiche) against the
natural periods of basins known from the literature.

Small basins (60-100 m, a few thousand unknowns per period) keep the file well under a
minute.
"""

from __future__ import annotations

import csv
import io
from pathlib import Path

import numpy as np
import pytest
import shapely

from harbor.cli import main
from harbor.errors import InputError
from harbor.geometry.layout import Land, Layout, Point
from harbor.geometry.site import Site
from harbor.study.response import MAX_PERIODS, response_curve
from harbor.study.scenario import Scenario, Sea

G = 9.81
X0, Y0 = 500000.0, 5000000.0    # UTM 30N, on the central meridian


def _basin_scenario(l, w, t, e, h, points, xm=None):
    """A rectangular basin l x w (m) behind a coast y = 0, joined to the sea y > 0 by a
    mouth of width e through a wall of thickness t centred at x = xm (default l / 2)."""
    xm = 0.5 * l if xm is None else xm
    coast = shapely.box(-1e5, -1e5, 1e5, 0.0)   # a coast far longer than any wavelength
    basin = shapely.box(0.0, -t - w, l, -t)
    mouth = shapely.box(xm - e / 2, -t - 1.0, xm + e / 2, 1.0)
    land = shapely.transform(coast.difference(basin.union(mouth)), lambda c: c + [X0, Y0])
    site = Site("EPSG:32630", (X0, Y0), h, G)
    return Scenario(path="", title="test basin", site=site,
                    layout=Layout(lands=(Land("coast", land),)),
                    seas=(Sea("long wave", "regular", 0.1, 60.0, 0.0),),
                    points=tuple(Point(n, (x + X0, y + Y0)) for n, (x, y) in points.items()))


def _merian(l, h, n=1):
    """Merian's period with linear dispersion, k = n pi / l, w^2 = g k tanh(k h)."""
    k = n * np.pi / l
    return 2 * np.pi / np.sqrt(G * k * np.tanh(k * h))


def test_closed_basin_fundamental_at_merian_period_with_node_in_the_middle():
    # Merian's formula for the fundamental seiche of a closed rectangular basin,
    # T1 = 2 l / sqrt(g h) in shallow water, with linear dispersion
    # w^2 = g k tanh(k h), k = pi / l (Rabinovich 2009, Seiches and harbor oscillations,
    # Handbook of Coastal and Ocean Engineering, eqs. 2-3; Dean & Dalrymple 1991, sect.
    # 4.9). Its surface is cos(pi x / l): antinodes at the closed ends with opposite
    # phase, a node in the middle. The narrow mouth sits near the node (not on it: a
    # mouth on the node of an odd mode cannot excite it), where it couples weakly, so
    # the peak stays at the closed-basin period.
    h, l, w, t, e = 15.0, 100.0, 30.0, 4.0, 4.0
    pts = {"west end": (2.0, -t - w + 2.0), "middle": (50.0, -t - w + 2.0),
           "east end": (98.0, -t - w + 2.0)}
    sc = _basin_scenario(l, w, t, e, h, pts, xm=0.45 * l)
    ds = response_curve(sc, t_min=12.0, t_max=24.0, n=7)
    scale = sc.site.scale_factor            # work-frame metres per ground metre
    T1 = _merian(l / scale, h)
    shallow = 2 * (l / scale) / np.sqrt(G * h)
    assert abs(T1 - shallow) / T1 > 0.03    # the check sees the dispersion correction
    assert ds.sizes["mode"] == 1
    Tn = float(ds.natural_period[0])
    assert Tn == pytest.approx(T1, rel=0.01)
    assert Tn == pytest.approx(float(ds.attrs["natural_period_1"]))
    pos = dict(zip(ds.point.values, ds.mode_position.values[0]))
    assert pos == {"west end": "antinode", "middle": "node", "east end": "antinode"}
    share = dict(zip(ds.point.values, ds.mode_share.values[0]))
    assert share["middle"] < 0.1            # cos(pi/2) = 0 against cos(0) = 1
    # the two ends swing in opposite phase: cos(0) = 1, cos(pi) = -1
    at = ds.sel(period=Tn, method="nearest")
    dphi = float(at.phase.sel(point="west end") - at.phase.sel(point="east end"))
    assert abs(((dphi + 180.0) % 360.0) - 180.0) == pytest.approx(180.0, abs=20.0)
    # a resonance, not a flat response: the peak stands well above the range's ends
    assert float(ds.natural_response[0]) > 3 * float(ds.basin_response[0])
    assert ds.refined.values.sum() > 0


def test_helmholtz_mode_of_a_basin_behind_a_narrow_channel():
    # The Helmholtz (grave) mode of a basin of area A behind a channel of width b,
    # length l_c, depth h: T_H = 2 pi sqrt(A (l_c + l') / (g b h)) (Rabinovich 2009,
    # eq. for the Helmholtz mode; USACE Coastal Engineering Manual 2002, II-7), l' the
    # added length of the water moving with the channel's ends. With l' = 0 it is a
    # strict lower bound (the ends' added mass can only lengthen the period). From
    # memory (as recalled from the Coastal Engineering Manual, II-7): the added length
    # of a channel end opening into wide water is -(b / pi) ln(pi b / (sqrt(g h) T));
    # we take it at both ends, the basin being much wider than the channel; loose
    # tolerance 5 % on T.
    # The whole basin then rises and falls together: every point is an antinode.
    h, l, w, t, e = 10.0, 60.0, 40.0, 20.0, 4.0
    pts = {"west corner": (2.0, -t - w + 2.0), "east corner": (l - 2.0, -t - w + 2.0),
           "near mouth": (l / 2, -t - 6.0)}
    sc = _basin_scenario(l, w, t, e, h, pts)
    ds = response_curve(sc, t_min=40.0, t_max=160.0, n=8)
    scale = sc.site.scale_factor
    A = (l / scale) * (w / scale)
    b, lc = e / scale, t / scale
    assert ds.sizes["mode"] >= 1
    TH = float(ds.natural_period[0])       # the longest natural period
    lower = 2 * np.pi * np.sqrt(A * lc / (G * b * h))
    assert TH > 1.1 * lower
    end = -(b / np.pi) * np.log(np.pi * b / (np.sqrt(G * h) * TH))
    memory = 2 * np.pi * np.sqrt(A * (lc + 2 * end) / (G * b * h))
    assert TH == pytest.approx(memory, rel=0.05)
    assert set(ds.mode_position.values[0]) == {"antinode"}
    # the basin is far shorter than the wavelength: it moves almost as one
    assert np.nanmin(ds.mode_share.values[0]) > 0.9


@pytest.mark.parametrize("kwargs, key", [
    (dict(t_min=300.0, t_max=30.0), "t_min"),
    (dict(t_min=30.0, t_max=30.0), "t_min"),
    (dict(t_min=-5.0, t_max=30.0), "t_min"),
    (dict(t_min=30.0, t_max=float("inf")), "t_max"),
    (dict(n=MAX_PERIODS + 1), "n"),
    (dict(n=2), "n"),
    (dict(n=10.5), "n"),
    (dict(periods=[10.0, -1.0]), "periods"),
    (dict(periods=np.arange(1.0, MAX_PERIODS + 2.0)), "periods"),
    (dict(direction=400.0), "direction"),
    (dict(reflection="none"), "reflection"),
])
def test_bad_range_or_direction_is_an_input_error(kwargs, key):
    sc = _basin_scenario(100.0, 30.0, 4.0, 4.0, 10.0, {"a": (2.0, -30.0)})
    with pytest.raises(InputError) as e:
        response_curve(sc, **kwargs)
    assert e.value.key == key


SCENARIO = """
title = "Invented test basin (Loch Varrin marina, fictional)"

[site]
crs = "EPSG:32630"
depth = 15.0

[[arm]]
name = "west wall"
line = [[500000.0, 5000000.0], [500043.0, 5000000.0]]

[[arm]]
name = "east wall"
line = [[500100.0, 5000000.0], [500047.0, 5000000.0]]

[[land]]
name = "coast"
outline = [[400000.0, 4900000.0], [600000.0, 4900000.0], [600000.0, 5000000.0],
           [500100.0, 5000000.0], [500100.0, 4999970.0], [500000.0, 4999970.0],
           [500000.0, 5000000.0], [400000.0, 5000000.0]]

[[sea]]
name = "long wave"
kind = "regular"
height = 0.1
period = 60.0
from = 0.0

[[point]]
name = "west berth"
at = [500002.0, 4999972.0]

[[point]]
name = "middle berth"
at = [500050.0, 4999972.0]
"""


def test_cli_writes_curve_table_and_chart(tmp_path, capsys):
    # the basin between two thin walls with a 4 m gap near its middle: Merian's
    # fundamental with dispersion (as above), l = 100 m, h = 15 m
    path = tmp_path / "basin.toml"
    path.write_text(SCENARIO)
    out = tmp_path / "out"
    rc = main(["seiche", str(path), "--periods", "12", "24", "--count", "5",
               "--out", str(out), "--quiet"])
    assert rc == 0
    text = capsys.readouterr().out
    assert "T1 = " in text and "west berth antinode" in text
    rows = list(csv.DictReader(io.StringIO((out / "response.csv").read_text())))
    assert list(rows[0]) == ["period_s", "point", "amplification", "phase_deg",
                             "basin_response", "refined"]
    assert {r["point"] for r in rows} == {"west berth", "middle berth"}
    periods = sorted({float(r["period_s"]) for r in rows})
    assert periods[0] == pytest.approx(12.0) and periods[-1] == pytest.approx(24.0)
    assert len(periods) > 5                     # the refinement's periods are there
    nat = list(csv.DictReader(io.StringIO((out / "natural-periods.csv").read_text())))
    assert list(nat[0]) == ["mode", "period_s", "basin_response", "point",
                            "amplification", "share_of_basin_max", "position"]
    T1 = float(nat[0]["period_s"])
    assert T1 == pytest.approx(_merian(100.0 / 0.9996, 15.0), rel=0.015)
    assert {r["point"]: r["position"] for r in nat if r["mode"] == "1"} == \
        {"west berth": "antinode", "middle berth": "node"}
    png = (out / "response.png").read_bytes()
    assert png[:8] == b"\x89PNG\r\n\x1a\n" and len(png) > 20_000
    assert sorted(p.name for p in out.iterdir()) == ["natural-periods.csv",
                                                     "response.csv", "response.png"]


@pytest.mark.parametrize("args", [
    ["--periods", "300", "30"],
    ["--periods", "0", "30"],
    ["--periods", "30", "nan"],
    ["--count", "0"],
    ["--count", str(MAX_PERIODS + 1)],
    ["--count", "ten"],
    ["--from", "400"],
    ["--at", "497500", "4998000"],          # on land
])
def test_cli_bad_input_exits_2_and_writes_nothing(tmp_path, capsys, args):
    path = tmp_path / "basin.toml"
    path.write_text(SCENARIO)
    out = tmp_path / "out"
    try:
        rc = main(["seiche", str(path), *args, "--out", str(out), "--quiet"])
    except SystemExit as e:                  # argparse's own errors exit 2 too
        rc = e.code
    assert rc == 2
    err = capsys.readouterr().err.strip().splitlines()
    assert len(err) == 1 and err[0].startswith("harbor:")
    assert not out.exists()
    assert sorted(p.name for p in Path(tmp_path).iterdir()) == ["basin.toml"]


def test_cli_help_gives_a_worked_example(capsys):
    with pytest.raises(SystemExit) as e:
        main(["seiche", "--help"])
    assert e.value.code == 0
    text = capsys.readouterr().out
    assert "harbor seiche scenarios/demo.toml --out seiche" in text
    assert "--periods" in text and "--count" in text and "--from" in text
    with pytest.raises(SystemExit):
        main(["--help"])
    assert "seiche" in capsys.readouterr().out
