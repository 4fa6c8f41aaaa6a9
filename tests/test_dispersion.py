"""Linear dispersion relation checks against independent references."""

import numpy as np
import pytest
from scipy import optimize

import harbor

G = 9.81


@pytest.mark.parametrize("T", [1.0, 4.0, 8.0, 15.0, 25.0])
@pytest.mark.parametrize("h", [0.05, 1.0, 8.0, 50.0, 4000.0])
def test_wavenumber_matches_independent_root_finder(T, h):
    # Independent check: scipy's bracketing root finder (brentq) on w^2 = g k tanh(kh).
    w = 2 * np.pi / T
    k_ref = optimize.brentq(lambda k: G * k * np.tanh(k * h) - w**2, 1e-12, 10 * w**2 / G + 10 / h,
                            xtol=1e-15, rtol=4 * np.finfo(float).eps)
    assert harbor.wavenumber(T, h) == pytest.approx(k_ref, rel=1e-13)


def test_deep_and_shallow_limits():
    # Deep water L0 = g T^2 / (2 pi) ~ 1.56 T^2 (common practice); shallow L = T sqrt(g h).
    assert harbor.wavelength(8.0, 5000.0) == pytest.approx(G * 64 / (2 * np.pi), rel=1e-12)
    assert harbor.wavelength(20.0, 0.01) == pytest.approx(20 * np.sqrt(G * 0.01), rel=1e-4)


@pytest.mark.parametrize("h_over_L0, h_over_L", [(0.05, 0.0942), (0.1, 0.1410), (0.2, 0.2251),
                                                 (0.5, 0.5018)])
def test_published_table_values(h_over_L0, h_over_L):
    # From memory: the h/L0 -> h/L table of linear wave theory (e.g. Shore Protection
    # Manual 1984, Appendix C, Table C-1; Dean & Dalrymple 1991). Loose tolerance 0.3 %.
    T = 10.0
    L0 = G * T**2 / (2 * np.pi)
    h = h_over_L0 * L0
    assert h / harbor.wavelength(T, h) == pytest.approx(h_over_L, rel=3e-3)


def test_vectorised_broadcast_and_scalar():
    k = harbor.wavenumber(np.array([[5.0], [10.0]]), np.array([2.0, 10.0, 100.0]))
    assert k.shape == (2, 3)
    assert isinstance(harbor.wavelength(8.0, 10.0), float)
    # residual of the dispersion relation to machine precision
    T = np.array([[5.0], [10.0]])
    h = np.array([2.0, 10.0, 100.0])
    w = 2 * np.pi / T
    assert np.allclose(G * k * np.tanh(k * h), w**2, rtol=1e-14, atol=0)


@pytest.mark.parametrize("T, h", [(0, 5), (-1, 5), (np.nan, 5), (5, 0), (5, -3), (5, np.inf),
                                  (np.array([5.0, -1.0]), 5)])
def test_bad_values_raise(T, h):
    with pytest.raises(ValueError):
        harbor.wavenumber(T, h)


from hypothesis import given, settings  # noqa: E402
from hypothesis import strategies as st  # noqa: E402


@settings(max_examples=200, deadline=None)
@given(T=st.floats(0.5, 40.0), h=st.floats(0.01, 5000.0))
def test_phase_speed_bounded_by_shallow_and_deep_limits(T, h):
    # Linear theory (common practice): c = L/T never exceeds the shallow-water speed
    # sqrt(g h) nor the deep-water speed g T / (2 pi), and the relation holds to
    # machine precision everywhere in between.
    k = harbor.wavenumber(T, h)
    c = 2 * np.pi / k / T
    assert c <= np.sqrt(G * h) * (1 + 1e-12)
    assert c <= G * T / (2 * np.pi) * (1 + 1e-12)
    w = 2 * np.pi / T
    assert G * k * np.tanh(k * h) == pytest.approx(w**2, rel=1e-13)
