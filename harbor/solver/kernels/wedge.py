r"""Diffraction by the vertex of a rigid wedge: the uniform theory of diffraction.

Pure array functions. Local frame: the wedge's vertex at the origin, water in the sector
:math:`0 \le \varphi \le n\pi` between face 0 (along :math:`\varphi = 0`) and face n
(along :math:`\varphi = n\pi`); a plane wave arrives from the direction
:math:`\varphi'` (the direction the waves come *from*, :math:`0 < \varphi' < n\pi`).
Time factor exp(-i w t); amplitudes normalised by the incident wave at the vertex.

A bent breakwater is, near its bend, such a wedge: on the side the waves strike the
water angle is :math:`\pi \pm \tau` for a bend turning by :math:`\tau`, so
:math:`n = 1 \pm \tau/\pi`; a free head is the half-plane :math:`n = 2`, for which the
formula below reduces exactly to the diffracted part of Sommerfeld's solution.
"""

from __future__ import annotations

import numpy as np

from harbor.solver.kernels._compiled import amplitude as _amplitude

__all__ = ["wedge_diffracted"]


def _ratio(eps, n):
    """cot(eps / 2n) |sin(eps / 2)| with its limit n sgn(eps) at eps = 0 (eps >= 0: +n)."""
    a = 0.5 * eps / n
    small = np.abs(a) < 1e-9
    safe = np.where(small, 1.0, a)
    val = np.cos(safe) * np.abs(np.sin(0.5 * eps)) / np.where(small, 1.0, np.sin(safe))
    return np.where(small, np.where(eps >= 0, n, -n), val)


def wedge_diffracted(r, phi, phi0, n, k, parts="all", source=None):
    r"""Diffracted wave of a rigid (Neumann) wedge's vertex under a plane wave.

    Parameters
    ----------
    r : array_like
        Distance from the vertex (m).
    phi : array_like
        Angle of the point from face 0, measured into the water (rad, 0 to n pi).
    phi0 : float
        Angle of the direction the waves come from, from face 0 (rad, 0 to n pi).
    n : float
        Water angle of the wedge over pi (2: half-plane; 1: straight wall; 1 + tau/pi
        and 1 - tau/pi: the two sides of a bend turning by tau).
    k : float
        Wavenumber (rad/m).
    parts : {"all", "shadow"}, optional
        ``"shadow"``: only the terms of :math:`\beta = \varphi - \varphi'` (those that
        smooth the incident wave's shadow boundary), for a wave whose reflection by the
        wedge's faces is not part of the geometric field.
    source : float, optional
        For a cylindrical wave from a line source at this distance (m) from the vertex
        (a wave diffracted by another edge), instead of a plane wave: the transition
        functions take the distance parameter :math:`L = r s'/(r + s')` and the wave
        spreads as :math:`\sqrt{s'/(r + s')}` (Kouyoumjian & Pathak 1974, eq. 27-28),
        so the jump across each boundary is still the incident wave's.

    Returns
    -------
    numpy.ndarray of complex
        The diffracted wave, normalised by the incident wave at the vertex.

    Notes
    -----
    The uniform diffraction coefficient of Kouyoumjian & Pathak (1974, eq. 25-30), written
    for exp(-i w t) with the transition function expressed through the diffraction
    amplitude :math:`A(t) = \pi^{-1/2} e^{-i\pi/4} e^{-it^2}\int_t^\infty e^{i\tau^2}d\tau`
    (:mod:`harbor.solver.kernels.fresnel`), :math:`F(X) = 2e^{-i\pi/4}\sqrt{\pi X}\,A(\sqrt X)`:

    .. math::

        u_d = -\frac{e^{ikr}}{n} \sum_{\beta = \varphi \mp \varphi'}\;
              \sum_{\epsilon = \epsilon^\pm(\beta)}
              \cot\frac{\epsilon}{2n}\,\Bigl|\sin\frac{\epsilon}{2}\Bigr|\,
              A\!\left(\sqrt{2kr}\,\Bigl|\sin\frac{\epsilon}{2}\Bigr|\right),

    :math:`\epsilon^\pm = \pi \pm \beta - 2\pi n N^\pm` with the integers
    :math:`N^\pm = \mathrm{round}((\beta \pm \pi)/(2\pi n))` (K&P's
    :math:`2\pi n N^\pm - \beta \approx \pm\pi`), the reflection terms
    (:math:`\beta = \varphi + \varphi'`) with the + sign of a rigid face.
    :math:`\epsilon = 0` is a shadow boundary (:math:`\varphi = \varphi' + \pi`) or a
    reflection boundary (:math:`\varphi = \pi - \varphi'`, :math:`2n\pi - \pi - \varphi'`);
    there the term tends to :math:`\mp 1/2`, so that the total field (geometric optics
    plus this wave) is continuous across every boundary at any distance. For n = 2 the
    two terms of each :math:`\beta` combine to :math:`-\mathrm{sgn}(\cos\tfrac{\beta}{2})
    A(\sqrt{2kr}|\cos\tfrac{\beta}{2}|)`, Sommerfeld's exact diffracted wave. For other
    n it is the leading term of the asymptotic expansion of the exact wedge solution
    (Macdonald 1902) for large kr, uniform across the boundaries; multiple reflections
    inside a wedge narrower than pi (n < 1) are not included.

    References
    ----------
    .. [1] Kouyoumjian, R. G., & Pathak, P. H. (1974). A uniform geometrical theory of
       diffraction for an edge in a perfectly conducting surface. *Proceedings of the
       IEEE*, 62(11), 1448-1461.
    .. [2] Macdonald, H. M. (1902). *Electric Waves*. Cambridge University Press,
       appendix D.
    """
    r = np.asarray(r, float)
    phi = np.asarray(phi, float)
    r, phi = np.broadcast_arrays(r, phi)
    n = float(n)
    if source is None:
        root = np.sqrt(2.0 * k * r)
        factor = 1.0
    else:
        sp = float(source)
        root = np.sqrt(2.0 * k * r * sp / (r + sp))
        factor = np.sqrt(sp / (r + sp))
    total = np.zeros(r.shape, complex)
    betas = (phi - phi0,) if parts == "shadow" else (phi - phi0, phi + phi0)
    for beta in betas:
        for sign in (1.0, -1.0):
            big_n = np.round((beta + sign * np.pi) / (2.0 * np.pi * n))
            eps = np.pi + sign * beta - sign * 2.0 * np.pi * n * big_n
            # sign = -1: eps' = pi + 2 pi n N- - beta, the same form
            total += _ratio(eps, n) * _amplitude(root * np.abs(np.sin(0.5 * eps)))
    return -factor * np.exp(1j * k * r) * total / n
