"""Validity warnings travel as structured records (sea state, point, code, text)."""

import pickle

import numpy as np
import pytest
import xarray as xr

import harbor
from harbor.cautions import Notice
from harbor.solver.assemble import notices


def test_notice_is_its_sentence_and_keeps_its_fields_through_pickle():
    n = Notice("breaking", "sea 'a': heights above 0.78 h", sea="a")
    assert n == "sea 'a': heights above 0.78 h"
    assert "0.78 h" in n
    back = pickle.loads(pickle.dumps(n))
    assert (back.code, back.sea, back.point, back.level) == ("breaking", "a", None, "warning")
    with pytest.raises(ValueError):
        Notice("x", "y", level="loud")


def test_solve_attributes_warnings_to_their_sea(demo_scenario):
    ds = harbor.solve(demo_scenario, grid=False)
    assert ds.sizes["notice"] == len(notices(ds))
    for sea in ds.sea.values.tolist():
        mine = notices(ds, sea=sea)
        assert all(n.sea in (None, sea) for n in mine)
    # the note on neglected basin reflection concerns every sea state of a screening run
    notes = notices(ds, level="note")
    assert any(n.code == "reflection-neglected" and n.sea is None for n in notes)
    assert ds.point_valid.dtype == bool and ds.valid.dims == ("sea", "y", "x")


def test_notices_survive_a_netcdf_round_trip(demo_scenario, tmp_path):
    ds = harbor.solve(demo_scenario, grid=False)
    enc = ds.copy()
    enc["valid"] = enc["valid"].astype("i1")
    enc["point_valid"] = enc["point_valid"].astype("i1")
    path = tmp_path / "r.nc"
    enc.to_netcdf(path)
    with xr.open_dataset(path) as back:
        got = [(n.code, n.sea, n.point, n.level, n.text) for n in notices(back)]
    want = [(n.code, n.sea, n.point, n.level, n.text) for n in notices(ds)]
    assert got == want and len(want) >= 1
