"""Directional random seas against a converged integration (Goda, Takayama & Suzuki 1978).

The reference integrates K'^2 S(f) G(theta | f) over frequency and direction with plain
composite Gauss-Legendre rules (scipy.special.roots_legendre), fine enough to be converged
to about 1e-4 in K_eff (checked by doubling both rules while writing this test: K_eff
changed by < 1.3e-4, the period ratio by < 4e-4; s_max = 10 and 75, principal
directions 60 and 90 deg). Its regular-sea kernel is Sommerfeld's
solution written here from scipy's Fresnel integrals (Sommerfeld 1896; Penney & Price
1952), its spectrum Goda's Bretschneider-Mitsuyasu formula and its spreading Mitsuyasu's
cos^2s with Goda's s(f), all written out below: nothing of the code under test is used
but the dispersion relation.
"""

import numpy as np
import pytest
from scipy.special import fresnel, gammaln, roots_legendre

import harbor
from harbor.geometry.layout import Arm, Layout
from harbor.solver.random import random_sea_field
from harbor.waves import random_components

DEPTH = 10.0
T13 = 8.0
FP = 1.0 / (1.05 * T13)                   # Goda (1988): fp = 1 / (1.05 T1/3)
LP = float(harbor.wavelength(1.05 * T13, DEPTH))
SEMI = Layout(arms=(Arm("breakwater", np.array([[1e6, 0.0], [0.0, 0.0]]), rooted_start=True),))


def _sommerfeld(x, y, k, alpha):
    """Rigid half-plane {y = 0, x >= 0}, travel angle alpha in (0, pi) (Sommerfeld 1896):
    u = e^(-i pi/4)/sqrt(pi) sum_j exp(-ikr cos psi_j) F(sqrt(2kr) cos(psi_j/2)),
    F(s) = int_-inf^s exp(i t^2) dt = sqrt(pi)/2 e^(i pi/4) + sqrt(pi/2) (C + iS)(s sqrt(2/pi))."""
    r = np.hypot(x, y)
    th = np.mod(np.arctan2(-y, x), 2 * np.pi)
    out = 0.0
    for psi in (th - (np.pi - alpha), th + (np.pi - alpha)):
        s_, c_ = fresnel(np.sqrt(2 * k * r) * np.cos(psi / 2) * np.sqrt(2 / np.pi))
        f = np.sqrt(np.pi) / 2 * np.exp(1j * np.pi / 4) + np.sqrt(np.pi / 2) * (c_ + 1j * s_)
        out = out + np.exp(-1j * k * r * np.cos(psi)) * f
    return np.exp(-1j * np.pi / 4) / np.sqrt(np.pi) * out


def _k2(x, y, k, d):
    """|u|^2 for any travel direction d: waves from y > 0 by the mirror image y -> -y."""
    d = np.mod(d, 2 * np.pi)
    up = d < np.pi
    u = np.where(up, _sommerfeld(x, y, k, np.where(up, d, 1.0)),
                 _sommerfeld(x, -y, k, np.where(up, 1.0, 2 * np.pi - d)))
    return u.real**2 + u.imag**2


def _rule(edges, n):
    t, w = roots_legendre(n)
    a, b = edges[:-1, None], edges[1:, None]
    return (0.5 * (b - a) * (t + 1) + a).ravel(), (0.5 * (b - a) * w).ravel()


def _converged(x, y, alpha, s_max):
    """K_eff and period ratio T_m02 behind / incident by direct integration."""
    a = 0.257 / T13**4                  # Goda (1988): S = 0.257 H^2 T^-4 f^-5 exp(-1.03 (Tf)^-4)
    b = 1.03 / T13**4
    m0 = a / (4 * b)
    m2 = a / (4 * np.sqrt(b)) * np.sqrt(np.pi)
    f, wf = _rule(np.geomspace(0.35 * FP, 200 * FP, 25), 10)
    x, y = np.asarray(x, float)[:, None], np.asarray(y, float)[:, None]
    rmax = float(np.max(np.hypot(x, y)))
    k_cap = 2 * np.pi / float(harbor.wavelength(1 / (12 * FP), DEPTH))
    e0 = np.zeros(x.shape[0])
    e2 = np.zeros(x.shape[0])
    for fi, wi in zip(f, wf):
        ratio = fi / FP
        s = s_max * (ratio**5 if ratio <= 1 else ratio**-2.5)    # Goda & Suzuki (1975)
        k = 2 * np.pi / float(harbor.wavelength(1 / fi, DEPTH))
        half = min(np.pi, 14 / np.sqrt(s))                       # cos^2s below 1e-21 beyond
        # panels narrower than the Fresnel width 1/sqrt(kr) of the shadow boundary
        panels = int(max(8, np.ceil(half * np.sqrt(min(k, k_cap) * rmax) / 2)))
        th, wt = _rule(np.linspace(-half, half, panels + 1), 32)
        g0 = np.exp(2 * gammaln(s + 1) + (2 * s - 1) * np.log(2) - np.log(np.pi)
                    - gammaln(2 * s + 1))                        # Mitsuyasu et al. (1975)
        with np.errstate(divide="ignore"):
            g = g0 * np.exp(2 * s * np.log(np.cos(th / 2)))
        v = (_k2(x, y, k, alpha + th) * g) @ wt * wi * a * fi**-5 * np.exp(-b / fi**4) / m0
        e0 += v
        e2 += v * fi * fi
    return np.sqrt(e0), np.sqrt((e0 / e2) / (m0 / m2))


def test_reference_kernel_is_sommerfeld():
    # The reference's own kernel against harbor's (both Sommerfeld's solution).
    x, y = np.array([30.0, -50.0, 200.0]), np.array([40.0, 60.0, -80.0])
    for d in (30.0, 90.0, 150.0):
        ref = _sommerfeld(x, y, 2 * np.pi / LP, np.radians(d))
        assert np.max(np.abs(ref - harbor.semi_infinite(x, y, LP, d))) < 1e-9


@pytest.mark.parametrize("principal, s_max", [(90.0, 10.0), (90.0, 75.0), (60.0, 10.0),
                                               (60.0, 75.0)])
def test_default_components_against_converged_integration(principal, s_max):
    # Points 2 and 5 peak wavelengths from the tip: on the geometric shadow line, deep in
    # the shadow (60 % of the principal angle into it) and in the lit zone (30 deg out).
    # Target of the method (issue 10): K_eff within 0.005 and the period ratio within
    # 0.01 of the converged integration with the default 12 x 36 components. Measured
    # (cell-averaged interference): 0.0027 and 0.005; with every component taken as a
    # regular sea, 0.0063 and 0.022 (deep in the shadow, where components from the
    # landward side stand against the arm's back face). The former equal-energy bands
    # with mid-band frequencies were off by up to 0.009 and 0.32 here.
    a = np.radians(principal)
    r = LP * np.array([2.0, 5.0, 2.0, 5.0, 2.0, 5.0])
    t = a + np.radians([0.0, 0.0, -0.6 * principal, -0.6 * principal, 30.0, 30.0])
    x, y = r * np.cos(t), r * np.sin(t)
    k_ref, ratio_ref = _converged(x, y, a, s_max)
    res = random_sea_field(SEMI, x, y, random_components(1.0, T13, s_max=s_max), DEPTH, a)
    assert np.max(np.abs(res.kd - k_ref)) < 0.005
    assert np.max(np.abs(res.period_ratio - ratio_ref)) < 0.01


@pytest.mark.parametrize("principal, s_max", [(90.0, 75.0), (60.0, 10.0)])
def test_standing_waves_in_front_of_the_arm_average_out(principal, s_max):
    # In front of the reflecting face (1 and 2 peak wavelengths out, 30 and 80 deg from
    # the arm) the incident and reflected waves of each component interfere; over the
    # spectrum the pattern averages out. Measured with the default components: K_eff
    # within 0.0101, period ratio within 0.002; taken as regular seas the components
    # leave 0.038 and 0.052 (s_max = 75) of unresolved standing wave.
    a = np.radians(principal)
    r = LP * np.array([1.0, 2.0, 1.0, 2.0])
    t = np.radians([-30.0, -30.0, -80.0, -80.0])
    x, y = r * np.cos(t), r * np.sin(t)
    k_ref, ratio_ref = _converged(x, y, a, s_max)
    res = random_sea_field(SEMI, x, y, random_components(1.0, T13, s_max=s_max), DEPTH, a)
    assert np.max(np.abs(res.kd - k_ref)) < 0.015
    assert np.max(np.abs(res.period_ratio - ratio_ref)) < 0.01
