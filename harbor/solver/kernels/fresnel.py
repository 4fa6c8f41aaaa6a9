r"""The diffraction amplitude of Sommerfeld's half-plane solution, fast.

Sommerfeld's solution is written with the complex Fresnel integral
:math:`F(s) = \int_{-\infty}^{s} e^{i\tau^2}\,d\tau`. Everything a breakwater head
radiates is carried by the smooth, slowly varying amplitude

.. math::

    A(t) = \frac{e^{-i\pi/4}}{\sqrt{\pi}}\, e^{-i t^2} \int_t^{\infty} e^{i\tau^2}\,d\tau,
    \qquad t \ge 0,

with :math:`A(0) = 1/2` and :math:`A(t) \sim e^{i\pi/4} / (2\sqrt{\pi}\,t)` for large t.
Because :math:`A` has no fast oscillation, it is tabulated once (at import) on the
compactified variable :math:`u = 1/(1+t) \in (0, 1]` and evaluated by cubic Hermite
interpolation using the exact derivative :math:`A'(t) = -2 i t A(t) - e^{-i\pi/4}/\sqrt{\pi}`.
The table is built from :func:`scipy.special.fresnel`; interpolation error is below
1e-12 everywhere (checked against mpmath in the tests).
"""

from __future__ import annotations

import numpy as np
from scipy import special

_C = np.exp(-0.25j * np.pi) / np.sqrt(np.pi)
_N_TABLE = 4096


def amplitude_reference(t):
    r"""Diffraction amplitude :math:`A(t)` from scipy's Fresnel integrals (slow, exact).

    Parameters
    ----------
    t : array_like
        Non-negative argument (dimensionless), :math:`t = \sqrt{2kr}\,|\cos(\psi/2)|`.

    Returns
    -------
    numpy.ndarray of complex
        :math:`A(t)`.

    Notes
    -----
    :math:`\int_t^\infty e^{i\tau^2} d\tau = \sqrt{\pi/2}\,[(1/2 - C(z)) + i(1/2 - S(z))]`,
    :math:`z = t\sqrt{2/\pi}`, with C, S the Fresnel integrals of Abramowitz & Stegun
    (1964), eq. 7.3.1-7.3.2.

    References
    ----------
    .. [1] Abramowitz, M., & Stegun, I. A. (1964). *Handbook of Mathematical Functions*.
       National Bureau of Standards, ch. 7.
    """
    t = np.asarray(t, dtype=float)
    S, C = special.fresnel(t * np.sqrt(2.0 / np.pi))
    tail = np.sqrt(np.pi / 2.0) * ((0.5 - C) + 1j * (0.5 - S))
    return _C * np.exp(-1j * t * t) * tail


def _asymptotic(t):
    # Asymptotic series of the Fresnel tail (A&S 7.3.27-28 rearranged), accurate to
    # ~1e-15 for t >= 12 with these terms; used for the table's last nodes.
    t = np.asarray(t, float)
    x = 1.0 / (2j * t * t)
    s = np.ones_like(x)
    term = np.ones_like(x)
    for n in range(1, 12):
        term = term * (2 * n - 1) * x
        s = s + term
    return _C * (1j / (2.0 * t)) * s


def _build_table(n=_N_TABLE):
    u = np.linspace(0.0, 1.0, n + 1)
    val = np.empty(n + 1, complex)
    der = np.empty(n + 1, complex)
    with np.errstate(divide="ignore"):
        t = np.where(u > 0, 1.0 / np.where(u > 0, u, 1.0) - 1.0, np.inf)
    big = t >= 12.0
    small = ~big
    val[small] = amplitude_reference(t[small])
    fin = big & np.isfinite(t)
    val[fin] = _asymptotic(t[fin])
    val[~np.isfinite(t)] = 0.0
    # dA/du = dA/dt * dt/du with dt/du = -1/u^2; at u = 0, A ~ (e^{i pi/4}/(2 sqrt(pi))) u.
    dAdt = -2j * np.where(np.isfinite(t), t, 0.0) * val - _C
    der[1:] = dAdt[1:] * (-1.0 / u[1:] ** 2)
    der[0] = np.exp(0.25j * np.pi) / (2.0 * np.sqrt(np.pi))
    # For u -> 0 the product t*val is finite: recompute from the asymptotic derivative.
    fin_big = big & np.isfinite(t)

    # d/du of A(1/u - 1): exact derivative expression is ill-conditioned for huge t; use the
    # asymptotic series differentiated numerically in u instead.
    uu = u[fin_big]
    hstep = 1e-7
    der[fin_big] = (_asymptotic(1.0 / (uu + hstep) - 1.0) - _asymptotic(1.0 / (uu - hstep) - 1.0)) / (2 * hstep)
    return val, der


_VAL, _DER = _build_table()


def diffraction_amplitude(t):
    r"""Diffraction amplitude :math:`A(t)` of Sommerfeld's solution (fast, vectorised).

    Parameters
    ----------
    t : array_like
        Non-negative argument (dimensionless).

    Returns
    -------
    numpy.ndarray of complex
        :math:`A(t) = \dfrac{e^{-i\pi/4}}{\sqrt\pi} e^{-it^2}\int_t^\infty e^{i\tau^2}d\tau`.

    Notes
    -----
    Cubic Hermite interpolation on :math:`u = 1/(1+t)` over 4096 uniform intervals of a
    table computed from the Fresnel integrals; error below 1e-12.

    References
    ----------
    .. [1] Sommerfeld, A. (1896). Mathematische Theorie der Diffraction.
       *Mathematische Annalen*, 47, 317-374.
    .. [2] Abramowitz, M., & Stegun, I. A. (1964). *Handbook of Mathematical Functions*,
       ch. 7.
    """
    t = np.asarray(t, dtype=float)
    u = 1.0 / (1.0 + t)
    n = _N_TABLE
    pos = u * n
    i = np.minimum(pos.astype(np.intp), n - 1)
    s = pos - i
    h = 1.0 / n
    s2 = s * s
    s3 = s2 * s
    h00 = 2 * s3 - 3 * s2 + 1
    h10 = s3 - 2 * s2 + s
    h01 = -2 * s3 + 3 * s2
    h11 = s3 - s2
    return (h00 * _VAL[i] + h01 * _VAL[i + 1]) + h * (h10 * _DER[i] + h11 * _DER[i + 1])
