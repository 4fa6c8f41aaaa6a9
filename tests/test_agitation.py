"""Harbour agitation through every command: survey and reflection keys, the auto method.

The references here are things the project did not make: pyproj (the survey written in
another CRS), the exact aperture solution of a gap (Morse & Rubenstein 1938, the
screening method's kernel, within its measured validity), energy conservation (walls
that absorb leave less energy in a basin than walls that reflect), and the calm of a basin
closed on every side (common practice: K' of a few hundredths at most).
"""

from __future__ import annotations

import json
import textwrap
from pathlib import Path

import numpy as np
import pyproj
import pytest

import harbor
from harbor.cli import main
from harbor.solver.agitation import METHOD_FULL_FIELD
from harbor.study.scenario import load_scenario

# An invented cove (no real harbour): UTM zone 30N, a shore along y = Y0, two arms.
X0, Y0 = 412000.0, 5120000.0
T = 12.0          # s: long waves keep the meshes small
DEPTH = 5.0


def _write(tmp_path, body, name="cove.toml"):
    p = tmp_path / name
    p.write_text(textwrap.dedent(body))
    return p


def _cove(extra_arm="", extra_land="", bath="", head_gap=60.0, top="", points=None):
    pts = points or [("berth", X0 + 0.0, Y0 + 60.0)]
    ptxt = "".join(f'[[point]]\nname = "{n}"\nat = [{x}, {y}]\nlimit = 0.5\n'
                   for n, x, y in pts)
    g = head_gap / 2
    return f"""
    title = "Cove of Brannock (invented test harbour)"
    {top}
    [site]
    crs = "EPSG:32630"
    depth = {DEPTH}
    {bath}
    [[arm]]
    name = "west"
    line = [[{X0 - 120}, {Y0 - 10}], [{X0 - 120}, {Y0 + 120}], [{X0 - g}, {Y0 + 120}]]
    {extra_arm}
    [[arm]]
    name = "east"
    line = [[{X0 + 120}, {Y0 - 10}], [{X0 + 120}, {Y0 + 120}], [{X0 + g}, {Y0 + 120}]]
    [[land]]
    name = "shore"
    outline = [[{X0 - 600}, {Y0}], [{X0 + 600}, {Y0}], [{X0 + 600}, {Y0 - 300}],
               [{X0 - 600}, {Y0 - 300}]]
    {extra_land}
    [[sea]]
    name = "swell"
    kind = "regular"
    height = 1.0
    period = {T}
    from = 0.0
""" + ptxt + f"""
[grid]
spacing = 10.0
bounds = [{X0 - 160}, {Y0 + 10}, {X0 + 160}, {Y0 + 200}]
"""


def _soundings(path, crs="EPSG:32630", slope=0.004):
    """A plane bed, deeper seawards: depth = 4 + slope (y - Y0) m (chart datum)."""
    xs = np.arange(X0 - 700, X0 + 701, 50.0)
    ys = np.arange(Y0 - 50, Y0 + 700, 50.0)
    X, Y = np.meshgrid(xs, ys)
    D = 4.0 + slope * (Y - Y0)
    if crs != "EPSG:32630":
        X, Y = pyproj.Transformer.from_crs("EPSG:32630", crs, always_xy=True).transform(X, Y)
    fmt = "{:.9f},{:.9f},{:.3f}\n" if crs == "EPSG:4326" else "{:.3f},{:.3f},{:.3f}\n"
    with open(path, "w") as f:
        f.write("x,y,depth\n")
        for x, y, d in zip(X.ravel(), Y.ravel(), D.ravel()):
            f.write(fmt.format(x, y, d))
    return path


# --------------------------------------------------------------------- survey and CRS

def test_survey_in_another_crs_gives_the_same_answer(tmp_path):
    # the same plane bed written in UTM (the layout's CRS) and in lon/lat (pyproj)
    _soundings(tmp_path / "utm.csv")
    _soundings(tmp_path / "ll.csv", crs="EPSG:4326")
    a = load_scenario(_write(tmp_path, _cove(bath='[bathymetry]\nfile = "utm.csv"'), "a.toml"))
    b = load_scenario(_write(tmp_path, _cove(
        bath='[bathymetry]\nfile = "ll.csv"\ncrs = "EPSG:4326"'), "b.toml"))
    # the depth itself at the berth: 4 + 0.004 * 60 m
    bx, by = a.points[0].at
    assert a.bathymetry.depth(bx, by) == pytest.approx(4.24, abs=0.01)
    assert b.bathymetry.depth(bx, by) == pytest.approx(4.24, abs=0.01)
    ra = harbor.solve(a, grid=False)
    rb = harbor.solve(b, grid=False)
    assert str(ra.sea_method.values[0]) == METHOD_FULL_FIELD
    assert "depth varies" in str(ra.sea_method_reason.values[0])
    np.testing.assert_allclose(rb.point_kd.values, ra.point_kd.values, atol=0.01)


def test_still_water_level_is_added_to_the_charted_depth(tmp_path):
    _soundings(tmp_path / "utm.csv")
    sc = load_scenario(_write(tmp_path, _cove(
        bath='[bathymetry]\nfile = "utm.csv"\nstill_water_level = 1.5')))
    bx, by = sc.points[0].at
    assert sc.bathymetry.depth(bx, by) == pytest.approx(4.24 + 1.5, abs=0.01)


# --------------------------------------------------------------------- closed basin

def _closed(tmp_path, top=""):
    # the east arm's head meets the west arm's: no entrance is left
    return _write(tmp_path, _cove(head_gap=0.0, top=top))


def test_closed_basin_is_calm_through_every_command(tmp_path, capsys):
    # common practice: a basin closed on every side has K' of a few hundredths at most
    p = _closed(tmp_path)
    sc = load_scenario(p)
    for method in ("auto", "full-field"):
        ds = harbor.solve(sc, grid=True, method=method)
        X, Y = np.meshgrid(ds.x.values, ds.y.values)
        basin = (np.abs(X - X0) < 115) & (Y > Y0 + 5) & (Y < Y0 + 115)
        kd = ds.kd.values[0][basin]
        assert basin.sum() > 50 and np.all(kd[np.isfinite(kd)] <= 0.02), method
        assert np.all(ds.point_kd.values <= 0.02), method
    assert main(["points", str(p), "--at", str(X0 + 50), str(Y0 + 100)]) == 0
    out = capsys.readouterr().out.splitlines()
    assert float(out[1].split(",")[4]) <= 0.02
    clim = tmp_path / "clim.csv"
    clim.write_text("height,period,from,percent\n2.0,10.0,0.0,50\n1.0,8.0,330.0,50\n")
    from harbor.study.climate import climate_downtime

    res = climate_downtime(sc, clim)
    assert np.all(res.kd.values <= 0.02)
    assert main(["map", str(p), "--out", str(tmp_path / "maps"), "--quiet"]) == 0
    assert main(["check", str(p)]) == 0


# --------------------------------------------------------------------- reflection

def test_absorbing_walls_leave_the_basin_calmer_than_vertical_walls(tmp_path):
    # energy: walls that absorb (K_r = 0) take energy out of the basin that vertical walls
    # (K_r = 1) send back into it, so the mean agitation over the basin is lower
    pts = [(f"b{i}", X0 + x, Y0 + y) for i, (x, y) in
           enumerate([(-80, 40), (-40, 70), (0, 30), (40, 90), (80, 50), (60, 20)])]
    walls = {}
    for kr in (0.0, 1.0):
        body = _cove(extra_arm=f"reflection = {kr}", extra_land=f"reflection = {kr}",
                     points=pts).replace('name = "east"', f'name = "east"\nreflection = {kr}')
        sc = load_scenario(_write(tmp_path, body, f"k{kr}.toml"))
        assert sc.reflection["shore"] == kr
        ds = harbor.solve(sc, grid=False)
        assert str(ds.sea_method.values[0]) == METHOD_FULL_FIELD
        walls[kr] = ds.point_kd.values[0]
    assert np.sqrt(np.mean(walls[0.0] ** 2)) < np.sqrt(np.mean(walls[1.0] ** 2))


def test_full_field_with_absorbing_shore_agrees_with_the_gap_solution(tmp_path):
    # a classic collinear entrance 1.5 L wide in a long straight breakwater, whose arms run
    # out of the model onto absorbing land (K_r = 0): the screening methods' exact
    # aperture solution (Morse & Rubenstein 1938) holds there, and the full-field method
    # must see the same lee (within 0.05 in K': the engine's P2 error at 10 elements per
    # wavelength plus the gap solution's own accuracy, docs/full-field.md)
    L = float(harbor.wavelength(T, DEPTH))
    B = 1.5 * L
    far = 25 * L
    body = f"""
    title = "Gap of Quillan (invented test harbour)"
    [site]
    crs = "EPSG:32630"
    depth = {DEPTH}
    [[arm]]
    name = "west"
    line = [[{X0 - far}, {Y0}], [{X0 - B / 2}, {Y0}]]
    [[arm]]
    name = "east"
    line = [[{X0 + far}, {Y0}], [{X0 + B / 2}, {Y0}]]
    [[land]]
    name = "west cape"
    outline = [[{X0 - far - 5 * L}, {Y0 - 5 * L}], [{X0 - far + 1}, {Y0 - 5 * L}],
               [{X0 - far + 1}, {Y0 + 5 * L}], [{X0 - far - 5 * L}, {Y0 + 5 * L}]]
    reflection = 0.0
    [[land]]
    name = "east cape"
    outline = [[{X0 + far - 1}, {Y0 - 5 * L}], [{X0 + far + 5 * L}, {Y0 - 5 * L}],
               [{X0 + far + 5 * L}, {Y0 + 5 * L}], [{X0 + far - 1}, {Y0 + 5 * L}]]
    reflection = 0.0
    [[sea]]
    name = "swell"
    kind = "regular"
    height = 1.0
    period = {T}
    from = 20.0
    """
    pts = [(0.0, -1.0), (0.5, -1.5), (-0.8, -1.0), (0.0, -2.0), (1.2, -0.6)]
    body += "".join(f'[[point]]\nname = "p{i}"\nat = [{X0 + a * L}, {Y0 + b * L}]\n'
                    for i, (a, b) in enumerate(pts))
    sc = load_scenario(_write(tmp_path, body))
    ff = harbor.solve(sc, grid=False)
    assert str(ff.sea_method.values[0]) == METHOD_FULL_FIELD   # reflection given: auto
    scr = harbor.solve(sc, grid=False, method="screening")
    assert "exact aperture" in str(scr.sea_method.values[0])
    np.testing.assert_allclose(ff.point_kd.values, scr.point_kd.values, atol=0.05)


# --------------------------------------------------------------------- the auto method

def _overlap_body(reflect=""):
    L = float(harbor.wavelength(T, DEPTH))
    return f"""
    title = "Overlap of Dunmere (invented test harbour)"
    [site]
    crs = "EPSG:32630"
    depth = {DEPTH}
    [[arm]]
    name = "outer"
    line = [[{X0 - 2 * L}, {Y0 - 1}], [{X0 - 2 * L}, {Y0 + 3 * L}], [{X0 + L}, {Y0 + 3 * L}]]
    [[arm]]
    name = "inner"
    line = [[{X0 + 2 * L}, {Y0 - 1}], [{X0 + 2 * L}, {Y0 + 2 * L}], [{X0 - 0.5 * L}, {Y0 + 2 * L}]]
    [[land]]
    name = "shore"
    outline = [[{X0 - 6 * L}, {Y0}], [{X0 + 6 * L}, {Y0}], [{X0 + 6 * L}, {Y0 - 3 * L}],
               [{X0 - 6 * L}, {Y0 - 3 * L}]]
    [[sea]]
    name = "swell"
    kind = "regular"
    height = 1.0
    period = {T}
    from = 350.0
    [[point]]
    name = "berth"
    at = [{X0}, {Y0 + L}]
    limit = 0.5
    [grid]
    spacing = {L / 6:.2f}
    bounds = [{X0 - 2.5 * L}, {Y0 + 0.2 * L}, {X0 + 2.5 * L}, {Y0 + 4 * L}]
    """


def test_auto_picks_full_field_for_overlapping_heads_and_says_so(tmp_path, capsys):
    p = _write(tmp_path, _overlap_body())
    sc = load_scenario(p)
    ds = harbor.solve(sc)
    assert str(ds.sea_method.values[0]) == METHOD_FULL_FIELD
    reason = str(ds.sea_method_reason.values[0])
    assert "overlapping-heads" in reason and reason.startswith("auto:")
    assert bool(ds.point_valid.values.all())
    assert int(ds.attrs["full_field"]) == 1
    # check says it before solving, with the size
    assert main(["check", str(p)]) == 0
    out = capsys.readouterr().out
    assert "swell: full-field" in out and "unknowns" in out and "nothing solved yet" in out
    # the map run names the method in its table and files
    out_dir = tmp_path / "maps"
    assert main(["map", str(p), "--out", str(out_dir), "--quiet"]) == 0
    out = capsys.readouterr().out
    assert "full-field" in out
    gj = json.loads((out_dir / "isolines-swell.geojson").read_text())
    assert "full-field" in gj["harbor"]["method"]
    # asked for the screening methods, the berth is flagged instead
    scr = harbor.solve(sc, grid=False, method="screening")
    assert not bool(scr.point_valid.values[0, 0])


def test_scenario_method_key_and_command_line_override(tmp_path):
    sc = load_scenario(_write(tmp_path, _overlap_body().replace(
        'title = "Overlap', 'method = "screening"\n    title = "Overlap')))
    assert sc.method == "screening"
    ds = harbor.solve(sc, grid=False)
    assert str(ds.sea_method.values[0]) != METHOD_FULL_FIELD
    assert "named in the scenario" in str(ds.sea_method_reason.values[0])
    ds = harbor.solve(sc, grid=False, method="full-field")
    assert str(ds.sea_method.values[0]) == METHOD_FULL_FIELD
    assert "--method full-field" in str(ds.sea_method_reason.values[0])


def test_result_carries_depth_and_walls(tmp_path):
    _soundings(tmp_path / "utm.csv")
    body = _cove(bath='[bathymetry]\nfile = "utm.csv"', extra_arm="reflection = 0.4",
                 extra_land="reflection = [0.1, 0.9, 0.1, 0.1]")
    ds = harbor.solve(load_scenario(_write(tmp_path, body)))
    assert ds["depth"].attrs["constant"] == 0
    d = ds["depth"].values
    y = ds["y"].values
    col = d[:, d.shape[1] // 2]
    ok = np.isfinite(col)
    np.testing.assert_allclose(col[ok], 4.0 + 0.004 * (y[ok] - Y0), atol=0.05)
    kr = dict(zip(ds.wall_owner.values.tolist(), ds.wall_reflection.values.tolist()))
    assert kr["west"] == 0.4 and kr["east"] == 1.0
    shore = ds.wall_reflection.values[ds.wall_owner.values == "shore"]
    assert sorted(shore.tolist()) == [0.1, 0.9]   # runs: the quay edge, the rest (0.1)


# --------------------------------------------------------------------- bad input

BAD = [
    ('[bathymetry]\nfile = "missing.csv"', "missing.csv"),
    ('[bathymetry]\nfile = "far.csv"', "does not overlap the harbour"),
    ('[bathymetry]\nfile = "part.csv"', "does not cover"),
    ('[bathymetry]\nfile = "nan.csv"', "line 3"),
    ('[bathymetry]\nfile = "neg.csv"', "positive down"),
    ('[bathymetry]\nfile = "utm.csv"\npositive = "sideways"', "positive"),
    ('[bathymetry]\nfile = "utm.csv"\nstill_water_level = 80', "still_water_level"),
    ('[bathymetry]\nfile = "utm.csv"\ncrs = "EPSG:99999"', "crs"),
    ('[bathymetry]\nfile = "utm.csv"\ncolour = 1', "colour"),
    ('[bathymetry]\nfile = "holes.tif"', "no depth"),
    ('[bathymetry]\nfile = "holes.tif"\ncrs = "EPSG:32631"', "the file's own CRS"),
]


def _bad_files(d):
    _soundings(d / "utm.csv")
    (d / "far.csv").write_text("x,y,depth\n0,0,5\n10,0,5\n0,10,5\n10,10,5\n")
    (d / "part.csv").write_text("x,y,depth\n" + "".join(
        f"{X0 + a},{Y0 + b},5\n" for a in (-700, 700) for b in (-50, 100)))
    (d / "nan.csv").write_text(f"x,y,depth\n{X0},{Y0},5\n{X0 + 1},{Y0},nan\n{X0},{Y0 + 1},5\n")
    lines = (d / "utm.csv").read_text().splitlines()
    (d / "neg.csv").write_text("\n".join([lines[0]] + [
        ",".join(ln.split(",")[:2] + [str(-float(ln.split(",")[2]))]) for ln in lines[1:]]))
    import rasterio
    from rasterio.transform import from_origin

    arr = np.full((80, 80), 6.0, np.float32)
    arr[30:60, 30:50] = -9999.0          # a hole over the basin
    with rasterio.open(d / "holes.tif", "w", driver="GTiff", width=80, height=80, count=1,
                       dtype="float32", crs="EPSG:32630", nodata=-9999.0,
                       transform=from_origin(X0 - 400, Y0 + 500, 10.0, 10.0)) as dst:
        dst.write(arr, 1)


@pytest.mark.parametrize("bath, words", BAD)
def test_bad_survey_is_one_line_exit_2_nothing_written(tmp_path, capsys, bath, words):
    _bad_files(tmp_path)
    p = _write(tmp_path, _cove(bath=bath))
    out = tmp_path / "out"
    assert main(["map", str(p), "--out", str(out), "--quiet"]) == 2
    err = capsys.readouterr().err.strip().splitlines()
    assert len(err) == 1 and "cove.toml" in err[0] and words in err[0], err
    assert not out.exists()


BAD_WALLS = [
    ("reflection = 1.5", "", "reflection"),
    ("reflection = \"wall\"", "", "reflection"),
    ("footprint = -4.0", "", "footprint"),
    ("footprint = 900.0", "", "footprint"),
    ("", "reflection = [0.1, 0.2]", "one reflection coefficient per edge"),
    ("", "reflection = [0.1, 0.2, 0.3, 1.2]", "reflection"),
]


@pytest.mark.parametrize("arm, land, words", BAD_WALLS)
def test_bad_reflection_or_footprint_is_one_line_exit_2(tmp_path, capsys, arm, land, words):
    p = _write(tmp_path, _cove(extra_arm=arm, extra_land=land))
    out = tmp_path / "out"
    assert main(["map", str(p), "--out", str(out), "--quiet"]) == 2
    err = capsys.readouterr().err.strip().splitlines()
    assert len(err) == 1 and "cove.toml" in err[0] and words in err[0], err
    assert not out.exists()


def test_footprint_over_a_point_is_refused(tmp_path, capsys):
    body = _cove(extra_arm="footprint = 30.0", points=[("toe", X0 - 110, Y0 + 60)])
    p = _write(tmp_path, body)
    assert main(["check", str(p)]) == 2
    err = capsys.readouterr().err
    assert "footprint" in err and "'toe'" in err


def test_unknown_method_is_refused_with_the_choices(tmp_path, capsys):
    p = _write(tmp_path, _cove(top='method = "fullfield"'))
    assert main(["check", str(p)]) == 2
    err = capsys.readouterr().err
    assert "full-field" in err and "key 'method'" in err


def test_climate_with_reflecting_walls_goes_full_field_once_per_period(tmp_path, monkeypatch):
    # short bands at a small mesh: the test is of the route, not of the band cap
    monkeypatch.setattr("harbor.solver.agitation.BAND_CAP", 20_000)
    # two directions of one (period, spreading): one task, one set of factorisations; the
    # downtime is that of the random seas solved one by one (Goda 2010: K_eff does not
    # depend on the height, so one solve per case at unit height)
    body = _cove(extra_land="reflection = 0.2")
    sc = load_scenario(_write(tmp_path, body))
    clim = tmp_path / "clim.csv"
    clim.write_text("height,period,from,percent\n1.0,12.0,0.0,40\n2.0,12.0,20.0,30\n"
                    "1.5,12.0,0.0,30\n")
    from harbor.study.climate import climate_downtime
    from harbor.study.scenario import Sea

    res = climate_downtime(sc, clim, workers=1)
    assert any(m.startswith("full-field") for m in res.attrs["methods"])
    one = harbor.solve(sc.__class__(**{**sc.__dict__, "seas": (
        Sea("a", "random", 1.0, 12.0, 20.0, spreading=10.0),)}), grid=False)
    assert str(one.sea_method.values[0]) == METHOD_FULL_FIELD
    # (several directions share the capped bands' solves: interpolated in direction)
    np.testing.assert_allclose(res.kd.values[1], one.point_kd.values[0], atol=2e-3)
    np.testing.assert_allclose(res.point_height.values[:, 0],
                               res.kd.values[:, 0] * np.array([1.0, 2.0, 1.5]), rtol=1e-12)


def test_bundled_demo_is_a_full_field_harbour(full_demo_scenario):
    # the demo ships with a survey (sloping shore, dredged basin and channel) and
    # reflection coefficients (rubble mounds, a quay wall, a beach): every sea state is
    # planned for the full-field method, within this machine's memory
    sc = full_demo_scenario
    assert sc.bathymetry is not None and sc.bathymetry.kind == "soundings"
    x, y = sc.points[0].at
    assert 4.5 < sc.bathymetry.depth(x, y) < 8.0          # the dredged basin + 1 m level
    assert sc.reflection["west arm"] == 0.4 and len(sc.reflection["shore"]) == 6
    planned = harbor.solver.assemble.plan(sc)
    assert [c.full_field for _, c in planned] == [True, True, True]
    assert all(c.estimate["memory"] < 8 * 2**30 for _, c in planned)


def test_sweep_runs_the_full_field_method_and_says_so(tmp_path):
    # a narrowing entrance with reflecting walls: each head position is one full-field
    # solve; a narrower gap lets less energy in (energy flux through the aperture)
    pts = [(f"b{i}", X0 + x, Y0 + y) for i, (x, y) in
           enumerate([(-60, 40), (-20, 70), (20, 30), (60, 90), (0, 100)])]
    sc = load_scenario(_write(tmp_path, _cove(extra_land="reflection = 0.1", points=pts,
                                              head_gap=80.0)))
    from harbor.study.sweep import sweep

    res = sweep(sc, "east", [0.0, 30.0])
    assert all(str(m) == METHOD_FULL_FIELD for m in res.method.values.ravel())
    assert float(res.entrance_width.values[1]) == pytest.approx(50.0, abs=0.5)
    e = (res.kd.values[:, 0, :] ** 2).mean(axis=1)
    assert e[1] < e[0]
