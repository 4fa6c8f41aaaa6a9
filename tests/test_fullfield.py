"""Checks of the full-field engine (harbor.solver.fullfield) against published solutions.

Each check names its source beside it. The domains are small (a few wavelengths) so that
the whole file runs in well under two minutes.
"""

from __future__ import annotations

import numpy as np
import pytest
import shapely
from scipy.special import hankel1, h1vp, jv, jvp

import harbor
from harbor.geometry import bathymetry as bathy
from harbor.geometry.layout import Arm, Land, Layout
from harbor.solver.fullfield import HarbourModel, robin_reflection
from harbor.waves.dispersion import group_velocity, wavelength, wavenumber

G = 9.81


def _homma(x, y, k0, a, b, mmax=40):
    """Long waves around a circular island on a paraboloidal shoal (Homma 1950).

    Homma, S. (1950). On the behaviour of seismic sea waves around circular island.
    Geophysical Magazine 21, 199-208. Derived here from the long-wave equation
    div(h grad eta) + (w^2/g) eta = 0 with h = h0 (r/b)^2 on a <= r <= b, h0 beyond,
    d eta / dr = 0 at r = a and an incident wave exp(i k0 x):
    on the shoal R_m = r^s, s = -1 +- sqrt(1 + m^2 - (k0 b)^2) (an Euler equation),
    outside R_m = eps_m i^m (J_m(k0 r) + C_m H_m(k0 r)); C_m from continuity of eta and
    d eta / dr at r = b.
    """
    r = np.hypot(x, y)
    th = np.arctan2(y, x)
    nu = (k0 * b) ** 2
    out = np.zeros(np.shape(x), complex)
    A = a / b
    for m in range(mmax + 1):
        eps = 1.0 if m == 0 else 2.0
        q = np.sqrt(complex(1 + m * m - nu))
        s1, s2 = -1 + q, -1 - q

        def f(rho):
            return rho ** s1 - (s1 / s2) * A ** (s1 - s2) * rho ** s2

        def fp(rho):
            return s1 * rho ** (s1 - 1) - (s1 / s2) * A ** (s1 - s2) * s2 * rho ** (s2 - 1)

        gam = fp(1.0) / (b * f(1.0))
        J, Jp = jv(m, k0 * b), jvp(m, k0 * b)
        H, Hp = hankel1(m, k0 * b), h1vp(m, k0 * b)
        C = (gam * J - k0 * Jp) / (k0 * Hp - gam * H)
        outer = eps * 1j ** m * (jv(m, k0 * r) + C * hankel1(m, k0 * r))
        inner = eps * 1j ** m * (J + C * H) * f(np.maximum(r, a) / b) / f(1.0)
        out += np.where(r >= b, outer, inner) * np.cos(m * th)
    return out


def test_homma_island_on_paraboloidal_shoal():
    # Homma (1950), series derived in _homma. At k0 h0 = 0.1 the mild-slope equation is
    # the long-wave equation to within about 1 % in c c_g and k (Berkhoff 1972).
    h0, a, b = 4.0, 30.0, 90.0
    k0 = 0.1 / h0
    T = 2 * np.pi / np.sqrt(G * k0 * np.tanh(k0 * h0))
    xs = np.linspace(-b - 60, b + 60, 241)
    X, Y = np.meshgrid(xs, xs)
    R2 = np.maximum(np.hypot(X, Y), a) ** 2
    depth = np.where(R2 < b * b, h0 * R2 / (b * b), h0)
    bath = bathy.from_raster(xs, xs, depth)
    island = Land("island", shapely.Point(0.0, 0.0).buffer(a, quad_segs=64))
    th = np.linspace(0, 2 * np.pi, 73)[:-1]
    ring = np.column_stack([1.02 * a * np.cos(th), 1.02 * a * np.sin(th)])
    rr = np.linspace(1.05 * a, 1.5 * b, 40)
    line = np.concatenate([np.column_stack([rr, 0 * rr]), np.column_stack([-rr, 0 * rr]),
                           np.column_stack([0 * rr, rr])])
    pts = np.concatenate([ring, line])
    model = HarbourModel(Layout(lands=(island,)), bath, points=pts, exterior_depth=h0)
    u = model.regular(T, 0.0).points
    ref = _homma(pts[:, 0], pts[:, 1], k0, a, b)
    err = np.abs(np.abs(u) - np.abs(ref))
    # recorded: max 0.02 around the island and across the shoal (ppw 10)
    assert np.all(np.isfinite(u))
    assert err.max() < 0.05, err.max()
    assert np.abs(ref).max() > 1.5  # the shoal focuses the waves: a real test


def test_gap_oblique_matches_exact_aperture_solution():
    # Exact solution of the aperture integral equation (Morse & Rubenstein 1938, Phys.
    # Rev. 54, 895-898), harbor.gap(method="exact"): rigid wall on {y = 0, |x| >= B/2},
    # constant depth, K_r = 1. The wall is the straight coast that leaves the model; the
    # background is the incident wave plus its reflection, so the oblique case that
    # today's slit solver cannot represent (0.12 in K' at 30 deg) is exact here.
    # Recorded (ppw 10): max |dK'| 0.007, mean 0.002.
    T, h = 8.0, 10.0
    L = wavelength(T, h)
    B = 2 * L
    arms = (Arm("w", np.array([[-100 * L, 0], [-B / 2, 0]]), rooted_start=True),
            Arm("e", np.array([[B / 2, 0], [100 * L, 0]]), rooted_end=True))
    xs = np.linspace(-2.5 * L, 2.5 * L, 21)
    ys = np.linspace(0.25 * L, 2.5 * L, 19)
    X, Y = np.meshgrid(xs, ys)
    pts = np.column_stack([X.ravel(), Y.ravel()])
    model = HarbourModel(Layout(arms=arms), h, points=pts)
    K = np.abs(model.regular(T, 30.0).points)
    Ke = np.abs(harbor.gap(pts[:, 0], pts[:, 1], L, 30.0, B, method="exact"))
    assert np.abs(K - Ke).max() < 0.02, np.abs(K - Ke).max()
    assert np.abs(K - Ke).mean() < 0.004, np.abs(K - Ke).mean()


def test_plane_wave_without_structures_is_exact():
    # With nothing to scatter the total field is the incident plane wave exp(i k x.d)
    # (the background solves the exterior and the interior alike at constant depth).
    T, h = 6.0, 8.0
    k = wavenumber(T, h)
    pts = np.array([[0.0, 0.0], [40.0, 25.0], [-30.0, 60.0]])
    u = HarbourModel(Layout(), h, points=pts).regular(T, 200.0).points
    a = np.radians(200.0)
    exact = np.exp(1j * k * (pts[:, 0] * np.cos(a) + pts[:, 1] * np.sin(a)))
    # P2 elements at 10 per wavelength: phase error of a few thousandths over the model
    np.testing.assert_allclose(u, exact, atol=5e-3)


def _coast(kr):
    land = Land("coast", shapely.box(-1e5, -1e5, 1e5, 0.0))
    return Layout(lands=(land,)), {"coast": kr}


@pytest.mark.parametrize("angle", [0.0, 45.0])
def test_partial_reflection_standing_wave_envelope(angle):
    # Standing-wave envelope in front of a wall of reflection coefficient K_r: the
    # amplitude ranges between 1 + |R| and 1 - |R| (Dean & Dalrymple 1991, sect. 5.2;
    # common practice for measuring reflection), and at normal incidence |R| = K_r, so
    # max/min = (1 + K_r)/(1 - K_r). At 45 deg the condition's own plane-wave reflection
    # (Isaacson & Qu 1990, eq. for the first-order condition) applies.
    T, h = 6.0, 8.0
    L = wavelength(T, h)
    layout, refl = _coast(0.5)
    th = np.radians(angle)
    ys = np.linspace(0.05 * L, 2.0 * L, 400)
    # sample along the wall normal through the middle of the model
    pts = np.column_stack([np.zeros_like(ys), ys])
    model = HarbourModel(layout, h, points=pts, reflection=refl)
    u = np.abs(model.regular(T, 270.0 + angle).points)
    R = abs(float(robin_reflection(0.5, th)))
    ratio = u.max() / u.min()
    assert ratio == pytest.approx((1 + R) / (1 - R), rel=0.01)
    if angle == 0.0:
        assert ratio == pytest.approx(3.0, rel=0.01)


def _channel(h_of_x, x_end, W):
    """A channel y in [0, W] closed by an absorbing end at x_end (land on both sides)."""
    lands = (Land("north", shapely.box(-1e5, W, 1e5, 1e5)),
             Land("south", shapely.box(-1e5, -1e5, 1e5, 0.0)),
             Land("end", shapely.box(x_end, 0.0, 1e5, W)))
    return Layout(lands=lands), {"end": 0.0}


def test_linear_shoaling_on_one_in_fifty_slope():
    # Energy-flux conservation at normal incidence: K_s = sqrt(c_g0 / c_g) (Dean &
    # Dalrymple 1991, sect. 4.8; CEM 2002, Part II-3). A plane wave runs up a 1:50 slope
    # from 10 m to 3 m in a channel with reflecting side walls (K_r = 1 is exact for
    # waves along them) ending in an absorbing wall (K_r = 0, exact at normal
    # incidence).
    T, h0, h1 = 8.0, 10.0, 3.0
    x1 = (h0 - h1) * 50.0
    L0 = wavelength(T, h0)
    W = 0.3 * L0
    xs = np.linspace(-400, x1 + 300, 1201)
    depth = np.clip(h0 - np.clip(xs, 0, None) / 50.0, h1, h0)
    bath = bathy.from_raster(xs, np.array([-1e4, 1e4]), np.vstack([depth, depth]))
    x_end = x1 + 150.0
    layout, refl = _channel(None, x_end, W)
    xp = np.linspace(-0.5 * L0, x_end - 40.0, 300)
    pts = np.column_stack([xp, np.full_like(xp, 0.5 * W)])
    # the wanted area spans the whole channel, so that its depth is not blended
    edges = np.array([[xp[0], 0.01], [x_end - 0.01, W - 0.01]])
    model = HarbourModel(layout, bath, points=np.concatenate([pts, edges]),
                         reflection=refl, exterior_depth=h0)
    u = np.abs(model.regular(T, 0.0).points[:len(xp)])
    hx = np.clip(h0 - np.clip(xp, 0, None) / 50.0, h1, h0)
    ks = np.sqrt(group_velocity(T, h0) / group_velocity(T, hx))
    err = np.abs(u / ks - 1.0)
    assert ks.max() > 1.1  # the waves do shoal over this range
    assert err.max() < 0.01, err.max()


def _basin(l, w, t, xm, e):
    """Sea y > 0; coast y < 0 with a rectangular basin behind a mouth of width e."""
    coast = shapely.box(-1e5, -1e5, 1e5, 0.0)
    basin = shapely.box(0.0, -t - w, l, -t)
    mouth = shapely.box(xm - e / 2, -t - 1e-9, xm + e / 2, 1e-9)
    return Land("coast", coast.difference(basin.union(mouth)))


def test_closed_basin_resonates_at_merian_periods():
    # Merian's formula for the seiche of a closed rectangular basin, T = 2 l / (n c), with
    # linear dispersion: k = n pi / l, w^2 = g k tanh(k h) (common practice; Wilson 1972,
    # Seiches, Adv. Hydrosci. 8). A narrow mouth near the mode's node couples weakly, so
    # the peak of the response lies at the closed-basin period.
    from scipy.optimize import minimize_scalar

    h, l, w = 5.0, 100.0, 45.0
    t, e = 4.0, 4.0
    xm = 0.45 * l
    land = _basin(l, w, t, xm, e)
    k = np.pi / l
    T_merian = 2 * np.pi / np.sqrt(G * k * np.tanh(k * h))
    probe = np.array([[1.0, -t - w + 1.0], [l - 1.0, -t - 1.0]])

    def response(T):
        m = HarbourModel(Layout(lands=(land,)), h, points=probe, points_per_wavelength=10)
        return -float(np.abs(m.regular(T, 270.0).points).max())

    res = minimize_scalar(response, bounds=(0.97 * T_merian, 1.03 * T_merian),
                          method="bounded", options={"xatol": 0.0005 * T_merian})
    assert -res.fun > 5.0  # a resonance, not a flat response
    assert res.x == pytest.approx(T_merian, rel=0.01)


def test_energy_balance_through_an_entrance():
    # Conservation of energy flux for the linear (mild-slope) equation at constant depth:
    # div Im(conj(eta) grad eta) = 0 (e.g. Mei, Stiassnie & Yue 2005, Theory and
    # Applications of Ocean Surface Waves, sect. 3.1), so the flux through the entrance
    # into a basin equals the flux the basin's partially reflecting walls absorb,
    # k alpha |eta|^2 per unit length with alpha = (1 - K_r)/(1 + K_r).
    h, l, w, t, e = 5.0, 100.0, 45.0, 4.0, 20.0
    xm = 0.3 * l
    land = _basin(l, w, t, xm, e)
    T = 20.0
    kr = 0.5
    k = wavenumber(T, h)
    alpha = (1 - kr) / (1 + kr)
    d = 1e-3
    # a line across the basin half-way down (away from the singular corners of the
    # mouth); the derivative towards -y by a central difference of the P2 field
    yc = -t - w / 2
    xe = np.linspace(d, l - d, 401)
    ent = np.concatenate([np.column_stack([xe, np.full_like(xe, yc + s)]) for s in (d, -d)])
    # the walls of the lower half of the basin, sampled just inside the water
    s = np.linspace(0.0, 1.0, 801)
    walls = [np.column_stack([d + 0 * s, -t - w + s * w / 2]),                 # west
             np.column_stack([l - d + 0 * s, -t - w + s * w / 2]),             # east
             np.column_stack([s * l, np.full_like(s, -t - w + d)])]            # south
    lens = [w / 2, w / 2, l]
    pts = np.concatenate([ent] + walls)
    m = HarbourModel(Layout(lands=(land,)), h, points=pts, reflection={"coast": kr})
    u = m.regular(T, 270.0).points
    n = xe.size
    up, dn = u[:n], u[n:2 * n]
    eta = 0.5 * (up + dn)
    deta = (dn - up) / (2 * d)  # derivative towards -y, into the lower half
    flux_in = np.trapezoid(np.imag(np.conj(eta) * deta), xe)
    absorbed = 0.0
    off = 2 * n
    for wl, ln in zip(walls, lens):
        v = u[off:off + len(wl)]
        off += len(wl)
        absorbed += k * alpha * np.trapezoid(np.abs(v) ** 2, s * ln)
    assert flux_in > 0
    assert absorbed == pytest.approx(flux_in, rel=0.02)


def test_dry_ground_and_steep_slope_are_noted():
    # A mound that dries in the middle and has a 1:2 flank: the engine must say both
    # (the mild-slope equation is valid to slopes of about 1:3, Booij 1983).
    xs = np.linspace(-200, 200, 161)
    X, Y = np.meshgrid(xs, xs)
    r = np.hypot(X, Y)
    depth = np.clip(8.0 - np.clip(40.0 - r, 0, None) * 0.5, -2.0, 8.0)
    bath = bathy.from_raster(xs, xs, depth)
    pts = np.array([[0.0, 0.0], [100.0, 0.0]])
    m = HarbourModel(Layout(), bath, points=pts, exterior_depth=8.0,
                     points_per_wavelength=6)
    u = m.regular(8.0, 0.0).points
    codes = {n.code for n in m.notices}
    assert "field-dry" in codes and "field-slope" in codes
    assert np.isnan(u[0]) and np.isfinite(u[1])


def test_reflection_out_of_range_is_an_input_error():
    layout, _ = _coast(0.5)
    with pytest.raises(harbor.errors.InputError):
        HarbourModel(layout, 8.0, points=[[0.0, 10.0]], reflection={"coast": 1.5})
    with pytest.raises(harbor.errors.InputError):
        HarbourModel(layout, 8.0, points=[[0.0, 10.0]], reflection={"quay": 0.5})
