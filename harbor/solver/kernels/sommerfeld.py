r"""Sommerfeld's exact solution for a semi-infinite, thin, rigid, fully reflecting barrier.

Pure array functions. Local frame: the tip at the origin, the barrier on
{y = 0, x >= 0}; waves arrive from y < 0 travelling in direction ``alpha``
(counter-clockwise from +x, 0 < alpha < pi). Time factor exp(-i w t).
"""

from __future__ import annotations

import numpy as np

from harbor.solver.kernels._compiled import HAVE_NUMBA
from harbor.solver.kernels._compiled import amplitude as _fast_amplitude
from harbor.solver.kernels.general import semi_infinite_fused

#: Evaluate :func:`semi_infinite` in one compiled pass per point (no complex temporaries);
#: False: the numpy path (:func:`_semi_infinite_reference`), kept for the benchmarks.
FUSED = HAVE_NUMBA

__all__ = ["semi_infinite", "sommerfeld_terms", "check_direction"]


def check_direction(direction) -> float:
    """Validate a kernel-frame travel direction (degrees, strictly in (0, 180)); return radians."""
    d = float(direction)
    if not np.isfinite(d) or not (0.0 < d < 180.0):
        raise ValueError(
            f"direction must be strictly between 0 and 180 degrees (waves travelling from "
            f"y < 0 towards the barrier), got {direction!r}"
        )
    return np.deg2rad(d)


#: Farthest distance from the origin, in wavelengths, at which a kernel evaluates the
#: field: beyond it k r loses every digit of its phase in double precision (the phase of
#: exp(i k r) is meaningless when k r exceeds about 1e15).
MAX_DISTANCE_WAVELENGTHS = 1e12


def check_coordinates(x, y, wavelength):
    """Refuse non-finite coordinates and points too far for a meaningful phase.

    Parameters
    ----------
    x, y : numpy.ndarray
        Coordinates (m).
    wavelength : float
        L (m).

    Raises
    ------
    ValueError
        If any coordinate is NaN or infinite, or farther than
        :data:`MAX_DISTANCE_WAVELENGTHS` wavelengths from the origin.
    """
    if x.size and not (np.all(np.isfinite(x)) and np.all(np.isfinite(y))):
        raise ValueError("coordinates must be finite (got NaN or infinity)")
    far = MAX_DISTANCE_WAVELENGTHS * float(wavelength)
    if x.size and max(float(np.max(np.abs(x))), float(np.max(np.abs(y)))) > far:
        raise ValueError(f"coordinates farther than {MAX_DISTANCE_WAVELENGTHS:g} "
                         "wavelengths from the origin: the phase of the wave is lost in "
                         "rounding")


def sommerfeld_terms(x, y, k, alpha, amplitude=_fast_amplitude, split=False):
    r"""The pieces of Sommerfeld's solution at points (x, y): geometric optics and diffraction.

    Parameters
    ----------
    x, y : array_like
        Coordinates in the local frame (m), broadcast together.
    k : float
        Wavenumber (rad/m).
    alpha : float
        Direction of wave travel (rad), 0 < alpha < pi.
    amplitude : callable, optional
        Implementation of the diffraction amplitude A(t)
        (:mod:`harbor.solver.kernels.fresnel`); default the compiled table (error < 1e-12).
    split : bool, optional
        Return the diffracted wave as its two parts (the one that smooths the shadow
        boundary and the one that smooths the reflection boundary) instead of their sum.

    Returns
    -------
    incident_lit : numpy.ndarray of bool
        True where the incident wave is present geometrically (outside the shadow).
    reflected_lit : numpy.ndarray of bool
        True where the wave reflected by the seaward face is present geometrically.
    diffracted : numpy.ndarray of complex, or a pair of them when ``split``
        The diffracted wave (normalised by the incident amplitude).

    Notes
    -----
    With :math:`\theta = \arg(x - i y) \in [0, 2\pi)`, :math:`\theta_0 = \pi - \alpha` and
    :math:`\psi_{1,2} = \theta \mp \theta_0`, Sommerfeld's solution for the Neumann
    (rigid) half-plane is

    .. math::

        u = \sum_{j=1,2} \frac{e^{-i\pi/4}}{\sqrt\pi}\, e^{-ikr\cos\psi_j}
            F\!\left(\sqrt{2kr}\cos\tfrac{\psi_j}{2}\right),
        \qquad F(s) = \int_{-\infty}^{s} e^{i\tau^2} d\tau .

    Writing :math:`s_j = \sqrt{2kr}\cos(\psi_j/2)`, each term splits exactly into a
    geometric-optics wave :math:`e^{-ikr\cos\psi_j}` present where :math:`s_j > 0` (j = 1:
    the incident wave, j = 2: the wave reflected by the seaward face) and a diffracted
    wave :math:`-\operatorname{sgn}(s_j)\, e^{ikr} A(|s_j|)`, with A the diffraction
    amplitude of :mod:`harbor.solver.kernels.fresnel`.

    References
    ----------
    .. [1] Sommerfeld, A. (1896). Mathematische Theorie der Diffraction.
       *Mathematische Annalen*, 47, 317-374.
    .. [2] Penney, W. G., & Price, A. T. (1952). The diffraction theory of sea waves and
       the shelter afforded by breakwaters. *Philosophical Transactions of the Royal
       Society of London A*, 244(882), 236-253.
    """
    x = np.asarray(x, dtype=float)
    y = np.asarray(y, dtype=float)
    x, y = np.broadcast_arrays(x, y)
    r = np.hypot(x, y)
    theta = np.mod(np.arctan2(-y, x), 2.0 * np.pi)
    theta0 = np.pi - alpha
    root = np.sqrt(2.0 * k * r)
    s1 = root * np.cos(0.5 * (theta - theta0))
    s2 = root * np.cos(0.5 * (theta + theta0))
    # Points on a shadow or reflection boundary (s = 0 up to rounding) count as lit, the
    # same rule the layout's ray tests use, so the two halves of the field always match.
    lit1 = s1 >= -1e-9
    lit2 = s2 >= -1e-9
    spread = np.exp(1j * k * r)
    d1 = spread * np.where(lit1, -1.0, 1.0) * amplitude(np.abs(s1))
    d2 = spread * np.where(lit2, -1.0, 1.0) * amplitude(np.abs(s2))
    if split:
        return lit1, lit2, (d1, d2)
    return lit1, lit2, d1 + d2


def semi_infinite(x, y, wavelength, direction):
    r"""Wave field around a semi-infinite breakwater (Sommerfeld; Penney & Price 1952).

    Parameters
    ----------
    x, y : array_like
        Coordinates (m) in the local frame: the breakwater tip at the origin, the
        breakwater on {y = 0, x >= 0}. Broadcast together.
    wavelength : float
        Wavelength L (m), > 0.
    direction : float
        Direction of wave travel (degrees, counter-clockwise from +x), strictly between
        0 and 180: the waves arrive from y < 0.

    Returns
    -------
    numpy.ndarray of complex
        Surface elevation normalised by the incident amplitude (time factor
        exp(-i w t)); the diffraction coefficient K' is its modulus. The incident wave is
        :math:`u_i = e^{ik(x\cos\alpha + y\sin\alpha)}` (phase zero at the tip). Valid
        everywhere: shadow, illuminated and reflection zones, on both faces (points on
        y = 0, x > 0 are taken on the seaward face).

    Raises
    ------
    ValueError
        If the wavelength is not positive and finite, the direction is outside
        (0, 180), or a coordinate is not finite (see :func:`check_coordinates`).

    Notes
    -----
    The exact solution of the Helmholtz equation :math:`\nabla^2 u + k^2 u = 0` with
    :math:`\partial u/\partial n = 0` on both faces of the barrier and the Sommerfeld
    radiation condition on the scattered wave:

    .. math::

        u = \frac{e^{-i\pi/4}}{\sqrt\pi}\left[ e^{-ikr\cos(\theta-\theta_0)}
            F(\sigma_1) + e^{-ikr\cos(\theta+\theta_0)} F(\sigma_2)\right],\quad
        \sigma_{1,2} = \sqrt{2kr}\cos\frac{\theta\mp\theta_0}{2},

    :math:`F(\sigma) = \int_{-\infty}^{\sigma} e^{i\tau^2}d\tau`,
    :math:`\theta = \arg(x - iy)`, :math:`\theta_0 = \pi - \alpha`. On the geometric
    shadow boundary far from the tip, K' tends to 0.5.

    Evaluated in one compiled pass per point (:mod:`harbor.solver.kernels.general`):
    :math:`\cos(\theta/2)` and :math:`\sin(\theta/2)` from the half-angle formulas
    (no arctangent), the diffraction amplitude and :math:`e^{ix}` from tables (error
    below 1e-12 each), no complex temporaries.

    References
    ----------
    .. [1] Sommerfeld, A. (1896). Mathematische Theorie der Diffraction.
       *Mathematische Annalen*, 47, 317-374.
    .. [2] Penney, W. G., & Price, A. T. (1952). The diffraction theory of sea waves and
       the shelter afforded by breakwaters. *Philosophical Transactions of the Royal
       Society of London A*, 244(882), 236-253.
    .. [3] Wiegel, R. L. (1962). Diffraction of waves by semi-infinite breakwater.
       *Journal of the Hydraulics Division, ASCE*, 88(HY1), 27-44.
    """
    L = float(wavelength)
    if not np.isfinite(L) or L <= 0:
        raise ValueError(f"wavelength must be positive and finite, got {wavelength!r}")
    alpha = check_direction(direction)
    k = 2.0 * np.pi / L
    x = np.asarray(x, dtype=float)
    y = np.asarray(y, dtype=float)
    check_coordinates(x, y, L)
    if FUSED:
        x, y = np.broadcast_arrays(x, y)
        return semi_infinite_fused(x.ravel(), y.ravel(), k, alpha).reshape(x.shape)
    return _semi_infinite_reference(x, y, k, alpha)


def _semi_infinite_reference(x, y, k, alpha):
    """The numpy evaluation of :func:`semi_infinite` (local frame, k in rad/m, alpha in
    rad), with complex temporaries; kept for the benchmarks and as the platform
    fallback."""
    lit1, lit2, d = sommerfeld_terms(x, y, k, alpha)
    x, y = np.broadcast_arrays(x, y)
    ca, sa = np.cos(alpha), np.sin(alpha)
    incident = np.exp(1j * k * (x * ca + y * sa))
    reflected = np.exp(1j * k * (x * ca - y * sa))
    return np.where(lit1, incident, 0.0) + np.where(lit2, reflected, 0.0) + d
