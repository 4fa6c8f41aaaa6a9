"""Refraction over straight parallel contours, and the wall tuned to an angle of attack.

Small domains only (a channel a wavelength wide, a strip of coast).
"""

from __future__ import annotations

import numpy as np
import pytest
import shapely

from harbor.geometry import bathymetry as bathy
from harbor.geometry.layout import Land, Layout
from harbor.solver.fullfield import HarbourModel, robin_reflection
from harbor.waves.dispersion import group_velocity, wavelength, wavenumber


def test_refraction_over_straight_parallel_contours():
    # Snell's law k sin(theta) = constant and K_s K_r = sqrt(cg0 / cg) sqrt(cos theta0 /
    # cos theta) (energy flux between rays; Dean & Dalrymple 1991, sect. 4.8 and 4.9,
    # eq. 4.120 and 4.125; CEM 2002 Part II-3), within 2 %.
    # Oblique waves need contours that run on to infinity; the engine keeps a constant
    # depth outside its model, so the contours run along a channel whose reflecting
    # walls (K_r = 1, exact at any angle) carry the first transverse mode
    # cos(k_y y) exp(i k_x x) = the wave at theta0 plus its mirror image: k_y = pi / W
    # is the longshore wavenumber that Snell's law keeps. The mode is the background
    # wave exactly (incident plus its reflection from the north shore). The channel
    # ends in a wall of K_r = 0 tuned to the refracted angle (Isaacson & Qu 1990), which
    # absorbs the mode exactly.
    T, h0, h1 = 8.0, 10.0, 3.0
    theta0 = np.radians(30.0)
    k0 = wavenumber(T, h0)
    ky = k0 * np.sin(theta0)
    W = np.pi / ky
    x1 = (h0 - h1) * 50.0  # a 1:50 slope
    x_end = x1 + 150.0
    k1 = wavenumber(T, h1)
    theta1 = np.arcsin(ky / k1)
    xs = np.linspace(-500.0, x_end + 300.0, 1301)
    depth = np.clip(h0 - np.clip(xs, 0, None) / 50.0, h1, h0)
    bath = bathy.from_raster(xs, np.array([-1e4, 1e4]), np.vstack([depth, depth]))
    # the south shore has a vertex where it crosses the edge of the model, so that the
    # background's straight coast is the north shore (the longest straight piece)
    south = shapely.Polygon([(-1e5, -1e5), (1e5, -1e5), (1e5, 0.0), (-300.0, 0.0),
                             (-1e5, 0.0)])
    lands = (Land("north", shapely.box(-1e5, W, 1e5, 1e5)), Land("south", south),
             Land("end", shapely.box(x_end, 0.0, 1e5, W)))
    L0 = wavelength(T, h0)
    xp = np.linspace(-0.5 * L0, x_end - 30.0, 300)
    yl = 0.1 * W
    pts = np.column_stack([xp, np.full_like(xp, yl)])
    # the wanted area spans the whole channel, so that its depth is not blended
    edges = np.array([[xp[0], 0.01], [x_end - 0.01, W - 0.01]])
    model = HarbourModel(Layout(lands=lands), bath, points=np.concatenate([pts, edges]),
                         reflection={"end": 0.0}, attack={"end": np.degrees(theta1)},
                         exterior_depth=h0)
    u = model.regular(T, np.degrees(theta0)).points[:len(xp)]
    hx = np.clip(h0 - np.clip(xp, 0, None) / 50.0, h1, h0)
    kx = wavenumber(T, hx)
    theta = np.arcsin(ky / kx)  # Snell
    ksr = np.sqrt(group_velocity(T, h0) / group_velocity(T, hx)) * np.sqrt(
        np.cos(theta0) / np.cos(theta))
    amp = np.abs(u) / (2.0 * abs(np.cos(ky * yl)))
    assert ksr.max() > 1.1 and np.degrees(theta0 - theta.min()) > 10  # it does refract
    assert np.abs(amp / ksr - 1).max() < 0.02, np.abs(amp / ksr - 1).max()
    # crest direction from the phase gradient, tan(theta) = k_y / (d phase / dx), the
    # gradient taken over one wavelength along x: that averages out the ripple of the
    # weak reflections from the breaks in slope (period half a wavelength)
    phase = np.unwrap(np.angle(u))
    kxs = np.sqrt(kx ** 2 - ky ** 2)
    lam = 2 * np.pi / kxs
    lo = np.interp(xp - lam / 2, xp, phase, left=np.nan)
    hi = np.interp(xp + lam / 2, xp, phase, right=np.nan)
    ok = np.isfinite(lo) & np.isfinite(hi)
    kx_fe = (hi - lo)[ok] / lam[ok]
    # Snell's k_x averaged over the same window
    cum = np.concatenate([[0.0], np.cumsum(0.5 * (kxs[1:] + kxs[:-1]) * np.diff(xp))])
    kx_sn = (np.interp(xp + lam / 2, xp, cum) - np.interp(xp - lam / 2, xp, cum))[ok] / lam[ok]
    err = np.abs(np.arctan2(ky, kx_fe) / np.arctan2(ky, kx_sn) - 1)
    assert ok.sum() > 150
    assert err.max() < 0.02, err.max()


@pytest.mark.parametrize("kr", [0.0, 0.5])
def test_wall_tuned_to_its_angle_of_attack_reflects_its_nominal_kr(kr):
    # Isaacson & Qu (1990): with the admittance alpha cos(theta_a) the first-order
    # condition reflects K_r exactly at theta_a. Measured from the standing-wave envelope
    # in front of the wall, max/min = (1 + |R|)/(1 - |R|) (Dean & Dalrymple 1991, sect.
    # 5.2; common practice); K_r = 0 has no envelope, so there the field must be the
    # incident wave alone.
    T, h = 6.0, 8.0
    L = wavelength(T, h)
    land = Land("coast", shapely.box(-1e5, -1e5, 1e5, 0.0))
    ys = np.linspace(0.05 * L, 2.0 * L, 400)
    pts = np.column_stack([np.zeros_like(ys), ys])
    model = HarbourModel(Layout(lands=(land,)), h, points=pts, reflection={"coast": kr},
                         attack={"coast": 45.0})
    u = np.abs(model.regular(T, 270.0 + 45.0).points)
    assert abs(float(robin_reflection(kr, np.radians(45.0), np.radians(45.0)))) == \
        pytest.approx(kr, abs=1e-12)
    if kr == 0.0:
        np.testing.assert_allclose(u, 1.0, atol=0.01)
    else:
        assert u.max() / u.min() == pytest.approx((1 + kr) / (1 - kr), rel=0.01)
