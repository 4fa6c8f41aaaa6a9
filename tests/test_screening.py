"""Screening answers on real layouts: closed water, seams, idle arms, joins, entrance width.

References: the independent finite-element solution of the Helmholtz equation
(harbor.solver.field via harbor.solver.accuracy.field_method_solve, itself checked against
Sommerfeld's exact solution in tests/test_field.py); the property of every real wave field
that it is continuous in open water (a solution of the Helmholtz equation is smooth away
from the structures: common practice, and Sommerfeld 1896); plain geometry (shapely
distances) for the entrance width.
"""

from __future__ import annotations

import copy
import tomllib
from pathlib import Path

import numpy as np
import pytest

import harbor
from harbor.cli import main
from harbor.geometry.entrance import entrance_width
from harbor.geometry.layout import JOIN_TOLERANCE
from harbor.geometry.visibility import diffracting_edges, distance_to_arms
from harbor.solver.accuracy import field_method_solve
from harbor.solver.assemble import check
from harbor.solver.layout import classic_entrance, layout_field
from harbor.study.scenario import scenario_from_dict
from harbor.study.sweep import move_head
from harbor.waves.dispersion import wavelength

DEMO = Path(__file__).resolve().parents[1] / "scenarios" / "demo.toml"
T, DEPTH = 4.0, 10.0
L = float(wavelength(T, DEPTH))
X0, Y0 = 500000.0, 5000000.0


def _scenario(arms, land=True, frm=350.0, points=((1.0, 1.0),)):
    data = {"title": "invented test harbour", "site": {"crs": "EPSG:32630", "depth": DEPTH},
            "arm": [dict(a) for a in arms],
            "sea": [{"name": "s", "kind": "regular", "height": 1.0, "period": T, "from": frm}],
            "point": [{"name": f"p{i}", "at": [X0 + x * L, Y0 + y * L]}
                      for i, (x, y) in enumerate(points)],
            "grid": {"spacing": L / 5}}
    if land:
        data["land"] = [{"name": "shore", "outline": [[X0 - 20 * L, Y0], [X0 + 20 * L, Y0],
                                                      [X0 + 20 * L, Y0 - 8 * L],
                                                      [X0 - 20 * L, Y0 - 8 * L]]}]
    return scenario_from_dict(data, path="test.toml")


def _w(x, y):
    return [X0 + x * L, Y0 + y * L]


def _points(sc):
    return (np.array([p.at[0] for p in sc.points]), np.array([p.at[1] for p in sc.points]))


def _kd(sc, px, py):
    s = sc.seas[0]
    u, info = layout_field(sc.layout, px, py, L, float(sc.site.travel_angle(s.from_deg)))
    return np.abs(u), info


# --- 1. no energy in closed water --------------------------------------------------------

def test_closed_basin_is_calm_as_the_finite_element_solution():
    # two bent arms rooted on the shore and joined end to end: no entrance is left
    sc = _scenario([{"name": "west", "line": [_w(0, 0), _w(-0.5, 4), _w(2, 4.3)]},
                    {"name": "east", "line": [_w(4, 0), _w(4.5, 4), _w(2, 4.3)]}],
                   points=((1, 1), (3, 2), (2, 3.5)))
    assert all(a.rooted_start and a.rooted_end for a in sc.layout.arms)
    px, py = _points(sc)
    kd, _ = _kd(sc, px, py)
    fe = np.abs(field_method_solve(sc, "s", px, py, points_per_wavelength=8))
    assert np.all(fe <= 0.02), fe          # the reference: calm (measured 0.001-0.003)
    assert np.all(kd <= 0.02), kd          # before: 0.16-0.33 from the bends' waves


def test_closing_entrance_falls_continuously_to_zero():
    # a gap in a straight wall whose far ends run out into the absorbing layer, closing
    # 10 m -> 1 m -> 0.3 m -> 5 cm (joined: within the 0.25 m join tolerance, a drawing
    # error) -> closed; points 0.5-2 L behind it
    def sc(B):
        arms = [{"name": "west", "line": [_w(-20, 0), [X0 - B / 2, Y0]], "rooted": "start"},
                {"name": "east", "line": [_w(20, 0), [X0 + B / 2, Y0]], "rooted": "start"}]
        if B == 0:
            arms = [{"name": "west", "line": [_w(-20, 0), [X0, Y0]], "rooted": "both"},
                    {"name": "east", "line": [_w(20, 0), [X0, Y0]], "rooted": "both"}]
        return _scenario(arms, land=False, frm=200.0, points=((-1, 1), (0.5, 2), (0.2, 0.5)))

    kd = {}
    for B in (10.0, 1.0, 0.3, 0.05, 0.0):
        s = sc(B)
        kd[B], _ = _kd(s, *_points(s))
    assert np.all(kd[10.0] > kd[1.0]) and np.all(kd[1.0] > kd[0.3])
    assert np.all(kd[0.3] > kd[0.05])
    assert np.all(kd[0.05] <= 0.02) and np.all(kd[0.0] <= 0.02)
    s = sc(1.0)
    fe = np.abs(field_method_solve(s, "s", *_points(s), points_per_wavelength=8))
    # measured 0.002-0.004 apart (at 10 m: 0.001-0.002; closed: FE 0.001)
    assert np.max(np.abs(fe - kd[1.0])) < 0.02, (fe, kd[1.0])


def test_overlapping_heads_berth_responds_to_the_entrance_head():
    # inner arm from the shore turns parallel to the outer one; the berth sits behind the
    # inner arm, reached through the channel only
    def sc(head_x):
        return _scenario([{"name": "outer", "line": [_w(-6, 0), _w(-6, 6), _w(4, 6)]},
                          {"name": "inner", "line": [_w(6, 0), _w(6, 4), [X0 + head_x * L,
                                                                        Y0 + 4 * L]]}],
                         frm=30.0, points=((2, 2),))
    values = [float(_kd(sc(x), *_points(sc(x)))[0][0]) for x in (-4.0, -3.0, -2.0, -1.0, 0.0)]
    assert np.ptp(values) > 0.005, values


# --- 2. no seams in open water --------------------------------------------------------------

def _steps(layout, alpha, rays, delta=0.01 * L):
    """Largest step of the complex field across each boundary ray: the difference of the
    two one-sided linear extrapolations to the boundary from +-delta and +-3 delta, so
    that the field's own slope (|grad u| up to 2k) is not counted as a step."""
    out = []
    for start, v, rs in rays:
        nrm = np.array([-v[1], v[0]])
        P = start[None] + np.asarray(rs)[:, None] * v[None]
        u = {}
        for k in (-3, -1, 1, 3):
            Q = P + k * delta * nrm[None]
            u[k], _ = layout_field(layout, Q[:, 0], Q[:, 1], L, alpha)
        step = np.abs((1.5 * u[1] - 0.5 * u[3]) - (1.5 * u[-1] - 0.5 * u[-3]))
        clear = np.min([distance_to_arms(P[:, 0] + k * delta * nrm[0],
                                         P[:, 1] + k * delta * nrm[1], layout)
                        for k in (-3, 3)], axis=0) > 4 * delta
        clear &= ~layout.in_land(P[:, 0], P[:, 1])
        out.append(np.where(clear, step, 0.0))
    return np.concatenate(out)


def _edge_rays(layout, alpha, rs):
    """The shadow boundary and the reflection boundaries of every head and bend."""
    d = np.array([np.cos(alpha), np.sin(alpha)])
    rays = []
    for tip, dirs in diffracting_edges(layout):
        rays.append((tip, d, rs))
        for f in dirs:
            n = np.array([-f[1], f[0]])
            rays.append((tip, d - 2 * np.dot(d, n) * n, rs))
    return rays


@pytest.mark.parametrize("frm", [315.0, 280.0])
def test_demo_has_no_seam(frm):
    sc = harbor.load_scenario(str(DEMO))
    s = sc.seas[0]
    Ld = float(wavelength(s.period, sc.site.depth))
    alpha = float(sc.site.travel_angle(frm))
    ent = classic_entrance(sc.layout, Ld)
    h0, h1 = ent.heads
    # the method boundary: the entrance line between the heads (gap solution inside,
    # the general method outside), probed 0.1-0.9 of the way across
    t = np.linspace(0.1, 0.9, 9)
    global L
    saved, L = L, Ld
    try:
        axis = (h1 - h0) / np.hypot(*(h1 - h0))
        steps = _steps(sc.layout, alpha, [(h0, axis, t * ent.width)])
        assert steps.max() < 0.05, steps.max()       # before: 0.24-0.41
        steps = _steps(sc.layout, alpha, _edge_rays(sc.layout, alpha, Ld * np.array(
            [0.5, 1.0, 2.0])))
        assert steps.max() < 0.05, steps.max()
    finally:
        L = saved


LAYOUTS = {
    # invented: a trunk along the shore-normal and a head leg turned 60 deg (dog-leg)
    "dog-leg": [{"name": "mole", "line": [_w(0, 0), _w(0, 6), _w(3 * np.cos(np.radians(30)),
                                                                 6 + 3 * np.sin(np.radians(30)))]}],
    # invented: a bend of only 4 degrees
    "bend 4 deg": [{"name": "mole", "line": [_w(0, 0), _w(0, 6), _w(6 * np.sin(np.radians(4)),
                                                                    6 + 6 * np.cos(np.radians(4)))]}],
    # invented: overlapping heads with a 2 L channel
    "overlapping heads": [{"name": "outer", "line": [_w(-6, 0), _w(-6, 6), _w(3, 6)]},
                          {"name": "inner", "line": [_w(6, 0), _w(6, 4), _w(-2, 4)]}],
}


@pytest.mark.parametrize("name, frm", [("dog-leg", 20.0), ("dog-leg", 300.0),
                                       ("bend 4 deg", 20.0), ("bend 4 deg", 340.0),
                                       ("overlapping heads", 300.0),
                                       ("overlapping heads", 340.0)])
def test_layout_has_no_seam(name, frm):
    # from 20 deg the overlapping heads keep a step of 0.06 at 0.5 L from the outer bend:
    # the inner face's image of the outer head's wave, cut at the inner head (a third-
    # order term the method leaves out; docs/methods.md)
    sc = _scenario(LAYOUTS[name], frm=frm)
    alpha = float(sc.site.travel_angle(frm))
    steps = _steps(sc.layout, alpha, _edge_rays(sc.layout, alpha, L * np.array([0.5, 1.5, 3.0])))
    assert steps.max() < 0.05, steps.max()


# --- 4. an arm that does nothing changes nothing ---------------------------------------------

def _demo_data():
    """The demo with its regular sea only (its random seas add nothing to these checks),
    without its survey and reflection coefficients: these checks are of the screening
    methods, which the demo's survey would hand over to the full-field method."""
    data = tomllib.loads(DEMO.read_text())
    data["sea"] = [s for s in data["sea"] if s["kind"] == "regular"]
    data.pop("bathymetry", None)
    for t in data["arm"] + data["land"]:
        t.pop("reflection", None)
    return data


@pytest.mark.parametrize("line", [
    [[302600.0, 4985500.0], [302900.0, 4985600.0]],               # buried in the shore
    [[302347.4, 4985695.7], [302510.6, 4985771.8]],               # along the shore's edge
])
def test_arm_on_land_changes_nothing(line):
    base = harbor.solve(scenario_from_dict(_demo_data(), path="demo.toml"), grid=False,
                        sea="swell NW")
    data = _demo_data()
    data["arm"].append({"name": "old quay", "line": line})
    sc = scenario_from_dict(data, path="demo.toml")
    ds = harbor.solve(sc, grid=False, sea="swell NW")
    assert ds.sea_method.values[0] == base.sea_method.values[0]
    np.testing.assert_allclose(ds.point_kd.values, base.point_kd.values, atol=1e-4)
    notes = [n for n in check(sc) if n.code == "arm-on-land"]
    assert notes and "'old quay'" in notes[0]


def test_seawall_outside_the_basin_keeps_the_classic_entrance():
    data = _demo_data()
    # rooted on the shore at both ends, bowing seaward 1 km east of the harbour
    data["arm"].append({"name": "seawall", "line": [[303500.0, 4986233.0], [303650.0, 4986400.0],
                                                    [303800.0, 4986373.0]]})
    sc = scenario_from_dict(data, path="demo.toml")
    assert sc.layout.arms[2].rooted_start and sc.layout.arms[2].rooted_end
    ds = harbor.solve(sc, grid=False, sea="swell NW")
    assert ds.sea_method.values[0].startswith("exact aperture solution")


# --- 7. ends that miss by centimetres ---------------------------------------------------------

def _closing_demo(miss):
    """The demo with the east head moved to ``miss`` metres from the west head, along the
    entrance line."""
    data = _demo_data()
    w = np.array(data["arm"][0]["line"][-1])
    e = np.array(data["arm"][1]["line"][-1])
    data["arm"][1]["line"][-1] = list(w + miss * (e - w) / np.hypot(*(e - w)))
    return data


def test_ends_within_the_tolerance_are_joined_and_reported():
    assert JOIN_TOLERANCE == pytest.approx(0.25)
    sc = scenario_from_dict(_closing_demo(0.04), path="demo.toml")
    assert all(a.rooted_start and a.rooted_end for a in sc.layout.arms)
    joined = [n for n in check(sc) if n.code == "ends-joined"]
    assert joined and "4 cm" in joined[0]
    # now a closed basin: the fish quay is calm
    assert float(harbor.solve(sc, grid=False, sea="swell NW").point_kd.values[0, 0]) < 0.02


@pytest.mark.parametrize("miss, joined", [(0.2, True), (0.3, False), (1.0, False)])
def test_join_tolerance_edge(miss, joined):
    sc = scenario_from_dict(_closing_demo(miss), path="demo.toml")
    codes = {n.code for n in check(sc)}
    assert ("ends-joined" in codes) == joined
    assert ("near-miss" in codes) == (not joined)
    if not joined:
        line = [n for n in check(sc) if n.code == "near-miss"][0]
        assert "did you mean to join" in line


# --- 8. one entrance width ----------------------------------------------------------------------

def _overlap(outer_to=3.0):
    sc = _scenario([{"name": "outer", "line": [_w(-6, 0), _w(-6, 6), _w(outer_to, 6)]},
                    {"name": "inner", "line": [_w(6, 0), _w(6, 4), _w(-2, 4)]}],
                   points=((0, 2),))
    return sc


def test_entrance_width_is_the_narrowest_passage(tmp_path, capsys):
    sc = _overlap()
    # the channel between the arms (2 L), not the 5.4 L between the heads
    assert entrance_width(sc.layout) == pytest.approx(2 * L, rel=1e-9)
    # lengthening the outer arm does not widen it
    assert entrance_width(_overlap(5.0).layout) == pytest.approx(2 * L, rel=1e-9)
    moved, width = move_head(sc, "outer", 1.0 * L)
    # sweep reports ground metres: the 2 L channel drawn in UTM units, divided by k
    assert width == pytest.approx(2 * L / sc.site.scale_factor, rel=1e-6)
    # check prints the same number
    def xy(x, y):
        return f"[{X0 + x * L:.3f}, {Y0 + y * L:.3f}]"

    p = tmp_path / "overlap.toml"
    p.write_text(f"""title = "invented overlapping heads"
[site]
crs = "EPSG:32630"
depth = {DEPTH}
[[arm]]
name = "outer"
line = [{xy(-6, 0)}, {xy(-6, 6)}, {xy(3, 6)}]
[[arm]]
name = "inner"
line = [{xy(6, 0)}, {xy(6, 4)}, {xy(-2, 4)}]
[[land]]
name = "shore"
outline = [{xy(-20, 0)}, {xy(20, 0)}, {xy(20, -8)}, {xy(-20, -8)}]
[[sea]]
name = "s"
kind = "regular"
height = 1.0
period = {T}
from = 350.0
[[point]]
name = "berth"
at = {xy(0, 2)}
""")
    assert main(["check", str(p)]) == 0
    out = capsys.readouterr().out
    assert f"entrance width {2 * L:.1f} m" in out


# --- 3. where the method is outside its validity, the result says so point by point -------

def test_validity_masks_mark_the_lee_of_overlapping_heads_only():
    # overlapping heads with a 2 L channel: measured off by up to 1-2 in K' in their lee
    # (docs/accuracy.md sect. 3); the open sea in front stays valid
    # (method="screening": by default this layout goes to the full-field method)
    sc = _overlap(outer_to=1.0)
    ds = harbor.solve(sc, grid=True, method="screening")
    assert any(n.code == "overlapping-heads" for n in harbor.solver.assemble.notices(ds))
    valid = ds.valid.values[0]
    X, Y = np.meshgrid(ds.x.values, ds.y.values)
    wet = np.isfinite(ds.kd.values[0])
    basin = wet & (X > X0 - 5.5 * L) & (X < X0 + 5.5 * L) & (Y > Y0 + 0.5 * L) & (Y < Y0 + 3.5 * L)
    sea = wet & (Y > Y0 + 7 * L)
    assert basin.any() and sea.any()
    assert not valid[basin].any()            # the lee behind the inner arm
    assert valid[sea].mean() > 0.9           # open water up-wave
    assert not ds.point_valid.values[0, 0]   # the berth at (0, 2 L) is in that lee
