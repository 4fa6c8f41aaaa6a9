"""Sommerfeld's semi-infinite breakwater against independent references."""

import numpy as np
import pytest

import harbor
from harbor.solver.kernels.fresnel import diffraction_amplitude
from tests.conftest import spread_points

L = 40.0


@pytest.mark.parametrize("direction", [15, 40, 65, 90, 115, 140, 165])
def test_against_mpmath_closed_form(direction, mp_semi_infinite):
    # Reference: the closed form at 30 digits with mpmath's Fresnel integrals.
    pts = spread_points(L)
    u = harbor.semi_infinite(pts[:, 0], pts[:, 1], L, direction)
    ref = np.array([mp_semi_infinite(x, y, L, direction) for x, y in pts])
    assert np.max(np.abs(u - ref)) < 1e-7


def test_fast_amplitude_table_against_mpmath(mp_semi_infinite):
    # The tabulated diffraction amplitude A(t) (used by the fast kernels) against mpmath.
    import mpmath as mp
    ts = np.concatenate([np.linspace(0, 15, 301), np.logspace(1.2, 5, 40)])
    with mp.workdps(30):
        ref = []
        for t in ts:
            z = mp.mpf(t) * mp.sqrt(2 / mp.pi)
            tail = mp.sqrt(mp.pi / 2) * ((mp.mpf(1) / 2 - mp.fresnelc(z)) + 1j * (mp.mpf(1) / 2 - mp.fresnels(z)))
            ref.append(complex(mp.expj(-mp.pi / 4) / mp.sqrt(mp.pi) * mp.expj(-mp.mpf(t) ** 2) * tail))
    assert np.max(np.abs(diffraction_amplitude(ts) - np.array(ref))) < 1e-11


@pytest.mark.parametrize("direction", np.arange(15, 166, 15))
def test_half_on_shadow_boundary_far_from_tip(direction):
    # K' -> 0.5 on the geometric shadow boundary far from the tip for any approach angle
    # (US Army Corps of Engineers, Coastal Engineering Manual EM 1110-2-1100, Part II-7;
    # Wiegel 1962). The approach is slow (~1/sqrt(kr)): check it at 1e5 L and that it
    # improves with distance.
    a = np.deg2rad(direction)
    dev = []
    for r in (1e2 * L, 1e5 * L):
        u = harbor.semi_infinite(r * np.cos(a), r * np.sin(a), L, direction)
        dev.append(abs(abs(u) - 0.5))
    assert dev[1] < 0.005
    assert dev[1] < dev[0] + 1e-12


def _fd_points():
    pts = spread_points(L, n_r=(0.7, 2.3, 6.1), n_theta=13)
    return pts[np.abs(pts[:, 1]) > 0.05 * L]


@pytest.mark.parametrize("direction", [25, 90, 150])
def test_helmholtz_equation_by_finite_differences(direction):
    # Any solution must satisfy lap(u) + k^2 u = 0 away from the barrier (Helmholtz).
    k = 2 * np.pi / L
    h = L / 400
    pts = _fd_points()
    x, y = pts[:, 0], pts[:, 1]
    f = lambda dx, dy: harbor.semi_infinite(x + dx, y + dy, L, direction)  # noqa: E731
    lap = (f(h, 0) + f(-h, 0) + f(0, h) + f(0, -h) - 4 * f(0, 0)) / h**2
    assert np.max(np.abs(lap + k**2 * f(0, 0))) / k**2 < 1e-3


@pytest.mark.parametrize("direction", [25, 90, 150])
@pytest.mark.parametrize("face", [+1, -1])
def test_no_flux_on_both_faces(direction, face):
    # Rigid barrier: du/dy = 0 on both faces of {y = 0, x > 0} (Sommerfeld 1896).
    k = 2 * np.pi / L
    x = np.array([0.3, 1.0, 2.7, 8.0]) * L
    h = L / 2000
    y0 = face * 1e-12
    f = lambda yy: harbor.semi_infinite(x, yy, L, direction)  # noqa: E731
    dudy = (-3 * f(y0) + 4 * f(y0 + face * h) - f(y0 + 2 * face * h)) / (2 * face * h)
    assert np.max(np.abs(dudy)) / k < 2e-3


def test_far_field_outside_shadow_is_incident_plus_reflection():
    # Far in front of the barrier the field is the standing wave of a wall: K' = 2|cos(k y sin a)|
    # (common practice: total reflection doubles the height at antinodes).
    a = 90
    x = 5000 * L
    y = -np.linspace(0.1, 1.0, 7) * L
    u = harbor.semi_infinite(x, y, L, a)
    k = 2 * np.pi / L
    assert np.allclose(np.abs(u), 2 * np.abs(np.cos(k * y)), atol=0.01)


@pytest.mark.parametrize("bad", [0, 180, -10, 200, np.nan])
def test_direction_outside_range_raises(bad):
    with pytest.raises(ValueError):
        harbor.semi_infinite(1.0, 1.0, L, bad)


def test_shapes_broadcast():
    u = harbor.semi_infinite(np.zeros((3, 1)), np.ones((1, 4)), L, 60)
    assert u.shape == (3, 4) and np.iscomplexobj(u)
