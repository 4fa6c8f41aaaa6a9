"""The wedge diffraction kernel (harbor.solver.kernels.wedge) against exact solutions.

References: Macdonald's (1902) exact solution of a plane wave on a rigid wedge as a series
of Bessel functions (evaluated here with scipy.special.jv, converged), and Sommerfeld's
exact half-plane solution (n = 2; tests/conftest.py evaluates it with mpmath, and
harbor.solver.kernels.sommerfeld is checked against that in test_semi_infinite.py).
"""

import numpy as np
import pytest
from scipy import special

from harbor.solver.kernels.sommerfeld import sommerfeld_terms
from harbor.solver.kernels.wedge import wedge_diffracted

K = 2 * np.pi  # L = 1


def macdonald(r, phi, phi0, n, terms):
    """Exact total field of a rigid wedge of water angle n pi under a unit plane wave from
    phi0 (Macdonald 1902; e.g. Bowman, Senior & Uslenghi 1969, eq. 6.3):
    u = (2/n) sum_m e_m exp(-i pi nu/2) J_nu(kr) cos(nu phi) cos(nu phi0), nu = m/n,
    e_0 = 1, e_m = 2, time factor exp(-i w t)."""
    u = np.zeros(np.shape(r), complex)
    for m in range(terms):
        nu = m / n
        u += (1 if m == 0 else 2) * np.exp(-0.5j * np.pi * nu) * special.jv(nu, K * r) \
            * np.cos(nu * phi) * np.cos(nu * phi0)
    return 2 * u / n


def optics(r, phi, phi0, n):
    """Incident and first-order reflected plane waves inside the wedge."""
    u = np.where(np.abs(phi - phi0) < np.pi, np.exp(-1j * K * r * np.cos(phi - phi0)), 0)
    u = u + np.where(phi + phi0 < np.pi, np.exp(-1j * K * r * np.cos(phi + phi0)), 0)
    far = 2 * n * np.pi - phi - phi0
    return u + np.where(far < np.pi, np.exp(-1j * K * r * np.cos(far)), 0)


def test_half_plane_is_sommerfeld_exactly():
    # n = 2: the uniform coefficient reduces algebraically to Sommerfeld's diffracted wave
    rng = np.random.default_rng(3)
    r = rng.uniform(0.02, 6.0, 500)
    th = rng.uniform(0, 2 * np.pi, 500)
    alpha = 1.1
    _, _, d = sommerfeld_terms(r * np.cos(th), -r * np.sin(th), K, alpha)
    assert np.max(np.abs(wedge_diffracted(r, th, np.pi - alpha, 2.0, K) - d)) < 1e-10


@pytest.mark.parametrize("n", [1.5, 1.2, 1 + 4 / 180, 1 - 4 / 180, 0.8])
@pytest.mark.parametrize("r", [0.5, 3.0])
def test_bend_against_the_exact_wedge_solution(n, r):
    # waves from 54 % of the water angle: no multiple reflection inside the wedge; the
    # uniform theory is asymptotic in kr, measured within 0.012 in K' from r = L/2 on
    phi0 = 0.54 * n * np.pi
    phi = np.linspace(0.01, n * np.pi - 0.01, 240)
    rr = np.full_like(phi, r)
    exact = macdonald(rr, phi, phi0, n, terms=int(60 * r + 80))
    total = optics(rr, phi, phi0, n) + wedge_diffracted(rr, phi, phi0, n, K)
    assert np.max(np.abs(np.abs(total) - np.abs(exact))) < 0.012


def test_total_field_is_continuous_across_every_boundary():
    # the diffracted wave jumps by exactly the geometric-optics jump (-/+ 1/2 each side)
    n, phi0, r = 1 + 4 / 180, 0.3, 2.7
    for b in (phi0 + np.pi, np.pi - phi0, 2 * n * np.pi - np.pi - phi0):
        if not 0 < b < n * np.pi:
            continue
        phi = np.array([b - 1e-7, b + 1e-7])
        total = optics(np.full(2, r), phi, phi0, n) + wedge_diffracted(np.full(2, r), phi, phi0, n, K)
        assert abs(total[0] - total[1]) < 1e-5
