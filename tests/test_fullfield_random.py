"""Cost estimates and random seas of the full-field engine (harbor.solver.fullfield).

Small domains only: every check here meshes a few wavelengths at most.
"""

from __future__ import annotations

import numpy as np
import pytest

from harbor.geometry.layout import Arm, Layout
from harbor.solver.fullfield import HarbourModel
from harbor.waves.dispersion import wavelength
from harbor.waves.spectra import random_components


def test_estimate_predicts_the_mesh_without_building_it():
    # The estimate integrates the element density (L/ppw)^-2 over the model's domain;
    # measured against the meshes the engine then builds (a property of the mesher:
    # Triangle meets the area bound with triangles of a stable mean size). Recorded:
    # within 10 % on the demo harbour and open squares (docs/full-field.md).
    T, h = 8.0, 10.0
    L = wavelength(T, h)
    arm = Arm("detached", np.array([[-L, 0.0], [L, 0.0]]))
    pts = np.array([[-1.5 * L, -1.5 * L], [1.5 * L, 1.5 * L]])
    m = HarbourModel(Layout(arms=(arm,)), h, points=pts, points_per_wavelength=8)
    est = m.estimate([T, 0.8 * T], n_directions=4)
    assert not m._periods  # nothing meshed or factorised
    built = m.frequency(T)["unknowns"]
    assert est.unknowns[0] == pytest.approx(built, rel=0.15)
    # shorter waves, finer mesh: unknowns grow, memory and seconds with them
    assert est.unknowns[1] > est.unknowns[0]
    assert est.max_factor_bytes == est.factor_bytes[1] > est.factor_bytes[0] > 0
    assert est.total_seconds == pytest.approx(est.seconds.sum())
    # a cap: the short period is solved at the longest period that fits
    cap = int(0.5 * (est.unknowns[0] + est.unknowns[1]))
    ec = m.estimate([T, 0.8 * T], max_unknowns=cap)
    assert list(ec.capped) == [False, True]
    assert 0.8 * T < ec.solve_periods[1] < T
    assert ec.unknowns[1] <= cap * 1.01


def test_random_sea_for_many_principal_directions_at_once():
    # Goda, Takayama & Suzuki (1978): with nothing to scatter K_eff = 1 and the T_m02
    # ratio is 1 for any principal direction (a property of the definitions). One
    # factorisation per frequency band serves every principal direction.
    comp = random_components(1.0, 8.0, 25.0, n_freq=3, n_dir=4)
    pts = np.array([[0.0, 0.0], [60.0, 40.0]])
    m = HarbourModel(Layout(), 10.0, points=pts, points_per_wavelength=6)
    res = m.random(comp, [0.0, 90.0, 200.0])
    assert isinstance(res, list) and len(res) == 3
    for r in res:
        np.testing.assert_allclose(r.kd_points, 1.0, atol=0.01)
        np.testing.assert_allclose(r.ratio_points, 1.0, atol=0.01)
        assert len(r.info["bands"]) == 3
    one = HarbourModel(Layout(), 10.0, points=pts, points_per_wavelength=6).random(comp, 90.0)
    np.testing.assert_allclose(one.kd_points, res[1].kd_points, rtol=1e-9)
