"""Layout alternatives x a wave climate (harbor.study.alternatives, harbor climate A B).

The alternatives are the invented collinear entrance of tests/test_climate.py (a 100 m
gap) and the same harbour with the east head moved 20 m west (an 80 m gap). The
expected downtimes are worked out by hand from K' of single `harbor.solve` runs at the
berths, not from the study code.
"""

import dataclasses

import numpy as np
import pytest

import harbor
from harbor.cli import main
from harbor.study.alternatives import compare_alternatives, group_tasks
from harbor.study.scenario import Sea
from tests.test_climate import GAP_TOML

NARROW_TOML = GAP_TOML.replace("[500300.0, 5000000.0], [500050.0, 5000000.0]",
                               "[500300.0, 5000000.0], [500030.0, 5000000.0]").replace(
    'title = "collinear test entrance (invented)"',
    'title = "collinear test entrance, 80 m (invented)"')

#: the Penney & Price superposition, the fastest screening method here (time budget)
M = "superposition"
#: two climate cases: (T1/3 s, from deg, s_max, percent)
CASES = [(6.0, 180.0, 10.0, 30.0), (8.0, 200.0, 25.0, 70.0)]


@pytest.fixture(scope="module")
def files(tmp_path_factory):
    d = tmp_path_factory.mktemp("alternatives")
    (d / "wide.toml").write_text(GAP_TOML)
    (d / "narrow.toml").write_text(NARROW_TOML)
    return d


def _kd_by_hand(scenario, period, from_deg, spreading):
    """K' at the limited points from one plain solve of one random sea at unit height."""
    sea = Sea(name="hand", kind="random", height=1.0, period=period, from_deg=from_deg,
              spreading=spreading)
    ds = harbor.solve(dataclasses.replace(scenario, seas=(sea,)), grid=False, method=M)
    names = [p.name for p in scenario.points if p.limit is not None]
    return ds.point_kd.sel(point=names).values[0], names


@pytest.fixture(scope="module")
def hand(files):
    """A two-row table whose rows straddle the quay's limit under the wide layout, and
    the downtimes computed by hand from K' at the berths."""
    wide = harbor.load_scenario(files / "wide.toml")
    narrow = harbor.load_scenario(files / "narrow.toml")
    kd_w = [_kd_by_hand(wide, t, f, s)[0] for t, f, s, _ in CASES]
    # row 1: 1.25 x the height that brings the quay to its 0.3 m limit (exceeds there),
    # row 2: 0.75 x that height (stays below): the rows sit clearly on either side
    heights = [float(1.25 * 0.3 / kd_w[0][0]), float(0.75 * 0.3 / kd_w[1][0])]
    lines = ["height,period,from,percent,spreading"]
    lines += [f"{h!r},{t:g},{f:g},{p:g},{s:g}" for h, (t, f, s, p) in zip(heights, CASES)]
    table = files / "two-rows.csv"
    table.write_text("\n".join(lines) + "\n")
    expect = {}
    for name, sc, kds in (("wide", wide, kd_w), ("narrow", narrow, None)):
        if kds is None:
            kds = [_kd_by_hand(sc, t, f, s)[0] for t, f, s, _ in CASES]
        names = [p.name for p in sc.points if p.limit is not None]
        lim = np.array([p.limit for p in sc.points if p.limit is not None])
        tot = np.zeros(len(lim))
        sector = {180: np.zeros(len(lim)), 210: np.zeros(len(lim))}
        for kd, h, (t, f, s, p), sec in zip(kds, heights, CASES, (180, 210)):
            over = kd * h > lim
            tot += p * over
            sector[sec] += p * over
        expect[name] = (names, tot, sector, kds)
    return table, expect


def test_compare_alternatives_by_hand(files, hand):
    table, expect = hand
    ds = compare_alternatives([files / "wide.toml", files / "narrow.toml"], table,
                              kind="serial", method=M)
    assert list(ds.alternative.values) == ["wide", "narrow"]
    assert list(ds.point.values) == ["quay", "pontoon"]      # the point without a limit left out
    assert ds.downtime.dims == ("alternative", "point", "sector")
    assert list(ds.sector.values) == list(range(0, 360, 30))
    assert ds.downtime.attrs["units"] == "%"
    for alt, (names, tot, sector, kds) in expect.items():
        np.testing.assert_allclose(ds.downtime_total.sel(alternative=alt, point=names), tot,
                                   rtol=0, atol=1e-12)
        for c, v in sector.items():
            np.testing.assert_allclose(ds.downtime.sel(alternative=alt, point=names,
                                                       sector=c), v, rtol=0, atol=1e-12)
        others = [c for c in range(0, 360, 30) if c not in sector]
        assert (ds.downtime.sel(alternative=alt, sector=others).values == 0).all()
        np.testing.assert_allclose(ds.kd.sel(alternative=alt, point=names).values,
                                   np.array(kds), rtol=1e-12, atol=0)
    # by construction the quay is down in row 1 only under the wide layout: 30 % of time
    assert float(ds.downtime_total.sel(alternative="wide", point="quay")) == 30.0
    np.testing.assert_allclose(ds.occurrence.sel(sector=[180, 210]), [30.0, 70.0])
    assert ds.attrs["cases"] == 4 and ds.attrs["tasks"] == 4


def test_task_grain():
    # one task per (alternative, period, spreading); its directions are the distinct
    # ones of the rows that share them (0 and 360 are one direction)
    tasks, rows_of, cases, _ = group_tasks("a", [6, 6, 6, 8, 6], [330, 0, 360, 330, 330],
                                           [10, 10, 10, 10, 75], heights=[1, 2, 3, 4, 5])
    assert [(t["period"], t["spreading"], t["directions"]) for t in tasks] == \
        [(6.0, 10.0, (330.0, 0.0)), (8.0, 10.0, (330.0,)), (6.0, 75.0, (330.0,))]
    assert [r.tolist() for r in rows_of] == [[0, 1, 2], [3], [4]]
    assert tasks[0]["direction_of"].tolist() == [0, 1, 1]
    assert tasks[0]["heights"].tolist() == [1.0, 2.0, 3.0]
    assert len(cases) == 4


def test_berth_missing_in_one_alternative(files, hand, tmp_path):
    table, expect = hand
    # the narrow layout without its pontoon: NaN there, a warning, the rest unchanged
    text = NARROW_TOML.replace('name = "pontoon"', 'name = "pontoon b"')
    (tmp_path / "renamed.toml").write_text(text)
    ds = compare_alternatives([files / "wide.toml", tmp_path / "renamed.toml"], table,
                              kind="serial", method=M)
    assert list(ds.point.values) == ["quay", "pontoon", "pontoon b"]
    assert np.isnan(float(ds.downtime_total.sel(alternative="renamed", point="pontoon")))
    assert np.isnan(float(ds.downtime_total.sel(alternative="wide", point="pontoon b")))
    assert any("'pontoon' in 'renamed'" in w for w in ds.attrs["warnings"])
    np.testing.assert_allclose(ds.downtime_total.sel(alternative="wide",
                                                     point=["quay", "pontoon"]),
                               expect["wide"][1], atol=1e-12)


def test_cli_several_scenarios(files, hand, tmp_path, capsys):
    table, expect = hand
    out = tmp_path / "cmp"
    rc = main(["climate", str(files / "wide.toml"), str(files / "narrow.toml"),
               "--table", str(table), "--out", str(out), "--executor", "serial", "--method", M])
    assert rc == 0
    assert sorted(p.name for p in out.iterdir()) == \
        ["alternatives-rows.csv", "alternatives.csv", "alternatives.png"]
    import pandas as pd

    d = pd.read_csv(out / "alternatives.csv")
    assert list(d.columns[:4]) == ["alternative", "point", "limit", "total"]
    assert list(d.columns[4:]) == [f"{c:03d}" for c in range(0, 360, 30)]
    for alt, (names, tot, _, _) in expect.items():
        got = d[d["alternative"] == alt].set_index("point").loc[names, "total"]
        np.testing.assert_allclose(got, tot, atol=1e-9)
    r = pd.read_csv(out / "alternatives-rows.csv")
    assert len(r) == 2 * 2 * 2                      # alternatives x rows x berths
    np.testing.assert_allclose(
        r[(r.alternative == "wide") & (r.point == "quay")]["kd"],
        [expect["wide"][3][0][0], expect["wide"][3][1][0]], rtol=1e-5)  # %.6g in the CSV
    assert (out / "alternatives.png").read_bytes()[:8] == b"\x89PNG\r\n\x1a\n"
    text = capsys.readouterr().out
    assert "wide" in text and "narrow" in text and "30.00 (0.30)" in text


def test_cli_several_scenarios_bad_input(files, hand, tmp_path, capsys):
    table, _ = hand
    out = tmp_path / "never"
    rc = main(["climate", str(files / "wide.toml"), str(files / "narrow.toml"),
               "--table", str(table), "--out", str(out), "--arm", "west", "--move", "5"])
    assert rc == 2
    err = capsys.readouterr().err.strip().splitlines()
    assert len(err) == 1 and "--arm" in err[0]
    assert not out.exists()


VARIANTS = GAP_TOML + """
[[alternative]]
name = "narrow"
[[alternative.arm]]
name = "east"
line = [[500300.0, 5000000.0], [500030.0, 5000000.0]]

[[alternative]]
name = "no pontoon"
leave_out = ["pontoon"]
"""


def test_alternatives_in_one_file(files, hand, tmp_path):
    table, expect = hand
    p = tmp_path / "harbour.toml"
    p.write_text(VARIANTS)
    ds = compare_alternatives([p], table, kind="serial", method=M)
    assert list(ds.alternative.values) == ["harbour", "narrow", "no pontoon"]
    for alt, ref in (("harbour", "wide"), ("narrow", "narrow"), ("no pontoon", "wide")):
        names, tot = expect[ref][0], expect[ref][1]
        if alt == "no pontoon":
            names, tot = names[:1], tot[:1]
        np.testing.assert_allclose(ds.downtime_total.sel(alternative=alt, point=names), tot,
                                   atol=1e-12)
    assert np.isnan(float(ds.downtime_total.sel(alternative="no pontoon", point="pontoon")))
    # the file is still a plain scenario for every other command
    assert harbor.load_scenario(p).layout.arms[1].name == "east"


@pytest.mark.parametrize("extra, message", [
    ('[[alternative]]\nname = "x"\nleve_out = ["pontoon"]\n', "did you mean 'leave_out'"),
    ('[[alternative]]\nname = "x"\nleave_out = ["pontonn"]\n', "did you mean 'pontoon'"),
    ('[[alternative]]\nname = "x"\n[[alternative]]\nname = "x"\n', "used twice"),
    ('[[alternative]]\nleave_out = []\n', "needs a name"),
    ('[[alternative]]\nname = "x"\n[[alternative.arm]]\nname = "east"\n'
     'line = [[500300.0, 5000000.0]]\n', "[[alternative]] 'x'"),
])
def test_alternative_mistakes(tmp_path, capsys, extra, message):
    p = tmp_path / "bad.toml"
    p.write_text(GAP_TOML + "\n" + extra)
    t = tmp_path / "t.csv"
    t.write_text("height,period,from,percent\n1,6,180,100\n")
    out = tmp_path / "out"
    assert main(["climate", str(p), "--table", str(t), "--out", str(out)]) == 2
    err = capsys.readouterr().err.strip().splitlines()
    assert len(err) == 1 and message in err[0] and str(p) in err[0], err
    assert not out.exists()
