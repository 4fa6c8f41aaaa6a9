r"""Wave field behind (and in front of) a gap between two collinear breakwaters.

Local frame: origin at the gap centre, barrier on {y = 0, |x| >= B/2}, waves arrive from
y < 0 travelling in direction alpha (counter-clockwise from +x, 0 < alpha < pi), time
factor exp(-i w t), incident phase zero at the origin.
"""

from __future__ import annotations

import threading
from functools import lru_cache

import numpy as np
from scipy import linalg, special

from harbor.solver.kernels._compiled import gap_energy, hankel_matrix
from harbor.solver.kernels.sommerfeld import check_direction, semi_infinite

__all__ = ["gap", "gap_superposition", "gap_exact", "gap_exact_many", "gap_exact_energy", "AUTO_EXACT_BELOW", "aperture_solution",
           "auto_method"]

#: ``method="auto"`` uses the exact aperture solution when the gap's width projected
#: across the wave direction, B sin(alpha), is below this many wavelengths, and the
#: Penney & Price superposition otherwise. Chosen from the comparison of the two
#: (benchmarks/gap_comparison.py, table in docs/methods.md): one to six wavelengths
#: behind the gap the largest K' difference is 0.001-0.009 for B sin(alpha) >= 3 L at
#: 45-90 degrees and reaches 0.03-0.13 for narrow or grazing cases; the projected width
#: also covers grazing waves (at 15 degrees the difference is still 0.038 at B = 4 L).
AUTO_EXACT_BELOW = 3.0

_EULER_GAMMA = 0.5772156649015329
_LAPACK_LOCK = threading.Lock()


def _check(wavelength, width):
    L = float(wavelength)
    B = float(width)
    if not np.isfinite(L) or L <= 0:
        raise ValueError(f"wavelength must be positive and finite, got {wavelength!r}")
    if not np.isfinite(B) or B <= 0:
        raise ValueError(f"width must be positive and finite, got {width!r}")
    return L, B


#: Largest working memory (bytes) the exact aperture solution may ask for; a wider gap is
#: refused before anything is allocated (the superposition serves wide gaps to 0.005 in K').
MAX_EXACT_BYTES = 2 * 1024**3


def exact_memory(wavelength, width, nodes=None) -> int:
    """Estimated peak working memory (bytes) of the exact aperture solution.

    Parameters
    ----------
    wavelength, width : float
        L and B (m).
    nodes : int, optional
        Chebyshev nodes (default :func:`default_nodes`).

    Returns
    -------
    int
        About ten complex m × m matrices for the aperture system and the complex blocks
        of the field integral (32768 far and 4096 near points at a time, a few arrays
        each), 16 bytes per complex number.
    """
    kb = np.pi * float(width) / float(wavelength)
    m = float(default_nodes(kb) if nodes is None else int(nodes)) if np.isfinite(kb) else np.inf
    return int(min(16.0 * (10.0 * m * m + 32768.0 * m + 6.0 * 4096.0 * m), 2.0**62))


def check_exact_size(wavelength, width, nodes=None):
    """Refuse an exact gap solution whose estimated memory exceeds :data:`MAX_EXACT_BYTES`.

    Parameters
    ----------
    wavelength, width : float
        L and B (m).
    nodes : int, optional
        Chebyshev nodes.

    Raises
    ------
    ValueError
        Naming B/L and the estimate (see :func:`exact_memory`).
    """
    need = exact_memory(wavelength, width, nodes)
    if need > MAX_EXACT_BYTES:
        raise ValueError(f"the exact aperture solution for B/L = {width / wavelength:.4g} "
                         f"would need about {need / 2**30:.3g} GiB (limit "
                         f"{MAX_EXACT_BYTES / 2**30:g} GiB); use method='superposition', "
                         f"which is accurate to 0.005 in K' for B/L >= 3")


def gap_superposition(x, y, wavelength, direction, width):
    r"""Gap field by superposing two semi-infinite solutions (Penney & Price 1952).

    Parameters
    ----------
    x, y : array_like
        Coordinates (m), origin at the gap centre, barrier on {y = 0, |x| >= width/2}.
    wavelength : float
        Wavelength L (m).
    direction : float
        Direction of wave travel (degrees CCW from +x), strictly in (0, 180).
    width : float
        Gap width B (m).

    Returns
    -------
    numpy.ndarray of complex
        Surface elevation normalised by the incident amplitude, both sides of the barrier.

    Notes
    -----
    :math:`u = u_R + u_L - u_i`, where :math:`u_R` is Sommerfeld's solution for the
    barrier {x >= B/2} alone, :math:`u_L` for {x <= -B/2} alone (obtained by mirroring
    x and the direction) and :math:`u_i` the incident wave. Each solution satisfies the
    no-flux condition on its own barrier only; the error (the diffracted wave of one
    head scattered by the other barrier) is small when B is a few wavelengths or more.

    References
    ----------
    .. [1] Penney, W. G., & Price, A. T. (1952). The diffraction theory of sea waves and
       the shelter afforded by breakwaters. *Phil. Trans. R. Soc. Lond. A*, 244(882),
       236-253.
    .. [2] Johnson, J. W. (1952). Generalized wave diffraction diagrams. *Proc. 2nd
       Conference on Coastal Engineering*, ASCE, 6-23.
    """
    L, B = _check(wavelength, width)
    alpha = check_direction(direction)
    k = 2 * np.pi / L
    b = 0.5 * B
    x = np.asarray(x, float)
    y = np.asarray(y, float)
    ca, sa = np.cos(alpha), np.sin(alpha)
    right = np.exp(1j * k * b * ca) * semi_infinite(x - b, y, L, np.rad2deg(alpha))
    left = np.exp(-1j * k * b * ca) * semi_infinite(-x - b, y, L, 180.0 - np.rad2deg(alpha))
    incident = np.exp(1j * k * (x * ca + y * sa))
    return right + left - incident


def default_nodes(kb: float) -> int:
    """Number of Chebyshev nodes for the aperture solution at half-width kb (rad).

    ``ceil(2 kb) + 16``: doubling it changes K' by less than 1e-9 for B <= 3 L and
    1e-6 up to B = 20 L at any angle (tests/test_gap.py checks the 1e-4 bar of the spec).
    """
    return int(np.ceil(2.0 * kb)) + 16


@lru_cache(maxsize=32)
def _aperture_matrix(kb: float, m: int):
    """Nodes and LU factors of the aperture system (depends on kb and m only)."""
    j = np.arange(1, m + 1)
    t = np.cos((2 * j - 1) * np.pi / (2 * m))
    n = np.arange(1, m)
    Tn = np.cos(np.outer(n, np.arccos(t)))              # (m-1, m): T_n(t_j)
    # Product-integration weights of ln|t_i - t'| against 1/sqrt(1-t'^2) (Chebyshev
    # interpolation of the smooth factor): int ln|t-t'| T_n(t')/sqrt(1-t'^2) dt'
    # = -pi ln 2 (n = 0), -(pi/n) T_n(t) (n >= 1).
    W = -(np.pi / m) * (np.log(2.0) + 2.0 * (Tn.T / n) @ Tn)
    tau = np.abs(t[:, None] - t[None, :])
    z = kb * tau
    J0 = special.j0(z)
    with np.errstate(divide="ignore", invalid="ignore"):
        smooth = special.hankel1(0, z) - (2j / np.pi) * J0 * np.log(tau)
    diag = 1.0 + (2j / np.pi) * (np.log(kb / 2.0) + _EULER_GAMMA)
    smooth[np.arange(m), np.arange(m)] = diag
    A = (2j / np.pi) * W * J0 + (np.pi / m) * smooth
    return t, linalg.lu_factor(A)


def _aperture_cached(kb: float, cos_alpha, m: int):
    """Nodes t and w (see :func:`aperture_solution`); ``cos_alpha`` scalar or 1-D."""
    # One LAPACK call at a time: concurrent calls from a thread pool have aborted the
    # bundled BLAS under load; the solve itself takes microseconds.
    with _LAPACK_LOCK:
        t, lu = _aperture_matrix(float(kb), int(m))
        ca = np.atleast_1d(np.asarray(cos_alpha, float))
        rhs = 2j * np.exp(1j * kb * t[:, None] * ca[None, :])
        w = linalg.lu_solve(lu, rhs, check_finite=False)   # v(b t) b sqrt(1 - t^2)
    return t, (w[:, 0] if np.ndim(cos_alpha) == 0 else w)


def aperture_solution(kb, alpha, m=None):
    r"""Solve the aperture integral equation of a gap in a rigid thin wall.

    Parameters
    ----------
    kb : float
        Wavenumber times the half-width of the gap, k B / 2 (rad).
    alpha : float
        Direction of wave travel (rad), 0 < alpha < pi.
    m : int, optional
        Number of Chebyshev nodes (default :func:`default_nodes`).

    Returns
    -------
    t : numpy.ndarray
        Chebyshev nodes on (-1, 1) (aperture coordinate x / b).
    w : numpy.ndarray of complex
        :math:`w(t_j) = b\,v(b t_j)\sqrt{1 - t_j^2}`, v the normal derivative of the field
        (1/m) across the aperture, normalised by the incident amplitude.

    Notes
    -----
    The normal derivative v on the opening :math:`|x| < b` satisfies

    .. math:: \int_{-b}^{b} H_0^{(1)}(k|x-x'|)\, v(x')\, dx' = 2i\, e^{ikx\cos\alpha}.

    With :math:`x = bt`, :math:`v = w/(b\sqrt{1-t^2})` (inverse-square-root edge
    singularity) and :math:`H_0^{(1)}(kb|\tau|) = \tfrac{2i}{\pi} J_0(kb\tau)\ln|\tau|
    + S(\tau)`, S analytic, the logarithmic part is integrated exactly against the
    Chebyshev interpolant of :math:`J_0 w` and the smooth part by Gauss-Chebyshev
    quadrature (Nystrom collocation at the same nodes); the error decreases spectrally.

    References
    ----------
    .. [1] Morse, P. M., & Rubenstein, P. J. (1938). The diffraction of waves by ribbons
       and by slits. *Physical Review*, 54(11), 895-898.
    .. [2] Atkinson, K. E. (1997). *The Numerical Solution of Integral Equations of the
       Second Kind*. Cambridge University Press (product integration, sect. 4.2).
    .. [3] Mason, J. C., & Handscomb, D. C. (2003). *Chebyshev Polynomials*. Chapman &
       Hall/CRC, sect. 9.5 (the logarithmic-kernel integrals).
    """
    check_exact_size(2.0 * np.pi, 2.0 * float(kb), m)   # kb = k B / 2 = pi B / L
    if m is None:
        m = default_nodes(kb)
    t, w = _aperture_cached(float(kb), float(np.cos(alpha)), int(m))
    return t.copy(), w.copy()


def evaluation_nodes(kb: float, m: int) -> int:
    """Gauss-Chebyshev nodes for the field integral: ``ceil(1.2 kb) + 10`` (at most m).

    The solution needs more nodes than the field integral away from the opening:
    resampled onto this many nodes the field changes by less than 1e-10 (within 8b/m of
    the opening the logarithmic part is integrated exactly anyway).
    """
    return min(int(m), int(np.ceil(1.2 * kb)) + 10)


def _chebyshev_resample(t, w, m_out):
    """Interpolate w (values at Gauss-Chebyshev nodes t, shape (m,) or (m, nd)) onto
    m_out such nodes, through the Chebyshev series truncated to m_out terms."""
    m = t.size
    if m_out == m:
        return t, w
    theta = np.arccos(t)
    n = np.arange(min(m, m_out))
    c = (2.0 / m) * (np.cos(np.outer(n, theta)) @ w)
    c[0] *= 0.5
    j = np.arange(1, m_out + 1)
    t_out = np.cos((2 * j - 1) * np.pi / (2 * m_out))
    return t_out, np.cos(np.outer(np.arccos(t_out), n)) @ c


def _radiated(x, y, k, b, t, w, chunk=32768, far_nodes=None):
    r"""-(i/2) \int H0(k rho) v dx' at (x, y); y of either sign (mirror symmetric).

    ``w`` has shape (m,) or (m, nd) (several right-hand sides: one per direction); the
    result has shape ``x.shape`` or ``x.shape + (nd,)``. The Hankel matrix of the points is
    built once and shared by every direction. Away from the opening the integral uses
    ``far_nodes`` Gauss-Chebyshev nodes (default m, see :func:`evaluation_nodes`).
    """
    m = t.size
    w2 = w.reshape(m, -1)
    mf = m if far_nodes is None else int(far_nodes)
    tf, wf = _chebyshev_resample(t, w2, mf)
    xsf = b * tf
    nd = w2.shape[1]
    xf = np.ravel(x)
    yf = np.abs(np.ravel(y))
    of = np.empty((xf.size, nd), complex)
    xs = b * t
    theta = np.arccos(t)
    nn = np.arange(m)
    cheb = (2.0 / m) * np.cos(np.outer(nn, theta))    # maps samples -> Chebyshev coeffs
    cheb[0] *= 0.5
    gap_to_aperture = np.hypot(np.maximum(np.abs(xf) - b, 0.0), yf)
    # Near the opening the quadrature of the nearly singular kernel is not enough: there
    # the log part is integrated exactly (product integration with complex z).
    near = gap_to_aperture < 8.0 * b / mf
    far_idx = np.nonzero(~near)[0]
    for s in range(0, far_idx.size, chunk):
        idx = far_idx[s:s + chunk]
        of[idx] = (-0.5j * np.pi / mf) * (hankel_matrix(xf[idx], yf[idx], xsf, k) @ wf)
    near_idx = np.nonzero(near)[0]
    n = np.arange(1, m)
    for s in range(0, near_idx.size, 4096):
        idx = near_idx[s:s + 4096]
        z = (xf[idx] + 1j * yf[idx]) / b
        zeta = z - np.sqrt(z - 1) * np.sqrt(z + 1)          # |zeta| <= 1 branch
        flip = np.abs(zeta) > 1
        zeta[flip] = 1.0 / zeta[flip]
        Ln = np.empty((idx.size, m))
        Ln[:, 0] = -np.pi * (np.log(2.0) + np.log(np.abs(zeta)))
        Ln[:, 1:] = -(np.pi / n) * np.real(zeta[:, None] ** n[None, :])
        rho = np.hypot(xf[idx, None] - xs[None, :], yf[idx, None])
        with np.errstate(divide="ignore", invalid="ignore"):
            H = hankel_matrix(xf[idx], yf[idx], xs, k)
            J0 = H.real                      # J0 = Re H0 for real arguments
            smooth = H - (2j / np.pi) * J0 * np.log(rho / b)
        zero = rho == 0
        if np.any(zero):
            smooth[zero] = 1.0 + (2j / np.pi) * (np.log(k * b / 2.0) + _EULER_GAMMA)
        # sum_n Ln[p, n] sum_j cheb[n, j] J0[p, j] w[j] = ((Ln @ cheb) * J0) @ w
        kernel = (2j / np.pi) * ((Ln @ cheb) * J0) + (np.pi / m) * smooth
        of[idx] = -0.5j * (kernel @ w2)
    if w.ndim == 1:
        return of[:, 0].reshape(np.shape(x))
    return of.reshape(np.shape(x) + (nd,))


def gap_exact(x, y, wavelength, direction, width, nodes=None):
    r"""Gap field from the exact aperture solution (both sides of the barrier).

    Parameters
    ----------
    x, y : array_like
        Coordinates (m), origin at the gap centre, barrier on {y = 0, |x| >= width/2}.
    wavelength : float
        Wavelength L (m).
    direction : float
        Direction of wave travel (degrees CCW from +x), strictly in (0, 180).
    width : float
        Gap width B (m).
    nodes : int, optional
        Chebyshev nodes of the aperture solution (default from :func:`default_nodes`).

    Returns
    -------
    numpy.ndarray of complex
        Surface elevation normalised by the incident amplitude.

    Notes
    -----
    Lee side (y > 0): :math:`u = -\tfrac{i}{2}\int_{-b}^{b} H_0^{(1)}(k\rho)\,v(x')\,dx'`;
    seaward side (y < 0): :math:`u = u_i + u_r + \tfrac{i}{2}\int H_0^{(1)}(k\rho)\,v\,dx'`
    with :math:`u_i + u_r = e^{ikx\cos\alpha}\,2\cos(ky\sin\alpha)` the field of the closed
    wall; v from :func:`aperture_solution`. The field integral uses the solution's own
    Gauss-Chebyshev nodes (increasing them changes K' by less than 1e-10) and, within
    8b/m of the opening, where that quadrature would lose accuracy on the nearly singular
    kernel, the logarithmic part is integrated exactly against the Chebyshev interpolant.

    References
    ----------
    .. [1] Morse, P. M., & Rubenstein, P. J. (1938). The diffraction of waves by ribbons
       and by slits. *Physical Review*, 54(11), 895-898.
    .. [2] Stamnes, J. J. (1986). *Waves in Focal Regions*. Adam Hilger, ch. 17
       (slit diffraction, the integral equation of the aperture field).
    """
    return gap_exact_many(x, y, wavelength, [direction], width, nodes=nodes)[..., 0]


def auto_method(wavelength, direction, width) -> str:
    """The method ``gap(method="auto")`` chooses: ``"exact"`` or ``"superposition"``.

    Exact when the projected width B sin(alpha) / L is below :data:`AUTO_EXACT_BELOW` and
    the exact solution fits in :data:`MAX_EXACT_BYTES` (:func:`exact_memory`).

    Parameters
    ----------
    wavelength : float
        L (m).
    direction : float
        Direction of travel (degrees, 0-180 exclusive).
    width : float
        Gap width B (m).
    """
    alpha = check_direction(direction)
    projected = float(width) * np.sin(alpha) / float(wavelength)
    if exact_memory(wavelength, width) > MAX_EXACT_BYTES:
        # near-grazing waves on a gap of hundreds of wavelengths (the short bands of a
        # random sea): the exact solution does not fit, the superposition is accurate
        return "superposition"
    return "exact" if projected < AUTO_EXACT_BELOW else "superposition"


def gap_exact_many(x, y, wavelength, directions, width, nodes=None):
    r"""Exact gap field for several travel directions at once (same points, same L).

    Parameters
    ----------
    x, y : array_like
        Coordinates (m), origin at the gap centre.
    wavelength : float
        Wavelength L (m).
    directions : array_like
        Directions of travel (degrees), each strictly in (0, 180).
    width : float
        Gap width B (m).
    nodes : int, optional
        Chebyshev nodes (default :func:`default_nodes`).

    Returns
    -------
    numpy.ndarray of complex, shape ``x.shape + (len(directions),)``

    Notes
    -----
    The aperture matrix depends on kB only and the field integral on the points only,
    so one factorisation and one Hankel matrix serve every direction: this is what makes
    directional random seas through a narrow entrance cheap (see :func:`gap_exact`).

    References
    ----------
    .. [1] Morse, P. M., & Rubenstein, P. J. (1938). The diffraction of waves by ribbons
       and by slits. *Physical Review*, 54(11), 895-898.
    """
    L, B = _check(wavelength, width)
    check_exact_size(L, B, nodes)
    alphas = np.array([check_direction(d) for d in np.atleast_1d(directions)])
    k = 2 * np.pi / L
    b = 0.5 * B
    x = np.asarray(x, float)
    y = np.asarray(y, float)
    x, y = np.broadcast_arrays(x, y)
    m = default_nodes(k * b) if nodes is None else int(nodes)
    t, W = _aperture_cached(float(k * b), np.cos(alphas), m)
    return _aperture_fields(x, y, k, b, t, W, alphas)


def _aperture_fields(x, y, k, b, t, W, alphas):
    """Fields of solved apertures (``W``: one column per direction) on both sides."""
    u = _radiated(x, y, k, b, t, W, far_nodes=evaluation_nodes(k * b, t.size))
    sea = y < 0
    if np.any(sea):
        xs_, ys_ = x[sea][:, None], y[sea][:, None]
        # closed wall (incident + reflected) minus the aperture's radiation
        u[sea] = (np.exp(1j * k * xs_ * np.cos(alphas)) * (2.0 * np.cos(k * ys_ * np.sin(alphas)))
                  - u[sea])
    return u


def gap_exact_energy(x, y, wavelength, directions, width, weights, nodes=None):
    r"""Weighted sum of K'^2 over several directions: :math:`\sum_d w_d |u_d|^2`.

    Parameters
    ----------
    x, y : array_like
        Coordinates (m), origin at the gap centre.
    wavelength : float
        Wavelength L (m).
    directions : array_like
        Directions of travel (degrees), each strictly in (0, 180).
    width : float
        Gap width B (m).
    weights : array_like
        One weight per direction (e.g. energy fractions).
    nodes : int, optional
        Chebyshev nodes of the aperture solution.

    Returns
    -------
    numpy.ndarray
        Shape of ``x``.

    Notes
    -----
    The same field as :func:`gap_exact_many`, reduced to energy inside a compiled loop so
    that no per-direction field is stored: the hot path of directional random seas.
    """
    L, B = _check(wavelength, width)
    check_exact_size(L, B, nodes)
    dirs = np.atleast_1d(np.asarray(directions, float))
    alphas = np.array([check_direction(d) for d in dirs])
    wts = np.asarray(weights, float)
    k = 2 * np.pi / L
    b = 0.5 * B
    x, y = np.broadcast_arrays(np.asarray(x, float), np.asarray(y, float))
    xf, yf = x.ravel(), y.ravel()
    m = default_nodes(k * b) if nodes is None else int(nodes)
    t, W = _aperture_cached(float(k * b), np.cos(alphas), m)
    mf = evaluation_nodes(k * b, m)
    tf, Wf = _chebyshev_resample(t, W, mf)
    out = np.empty(xf.size)
    dist = np.hypot(np.maximum(np.abs(xf) - b, 0.0), yf)
    ca, sa = np.cos(alphas), np.sin(alphas)
    far = dist >= 8.0 * b / mf
    lee = far & (yf >= 0)
    if np.any(lee):
        # In the lee sum_d w_d |h.W_d|^2 = h^H conj(M) h with M = W diag(w) W^H: its few
        # significant eigenvectors replace the directions (rank ~12-20 instead of ~36).
        M = (Wf * wts) @ Wf.conj().T
        with _LAPACK_LOCK:
            lam, V = np.linalg.eigh(M)
        keep = lam > 1e-13 * max(lam[-1], 1e-300)
        Wl = V[:, keep] * np.sqrt(lam[keep])
        r = Wl.shape[1]
        out[lee] = gap_energy(xf[lee], yf[lee], b * tf, k, Wl, np.zeros(r), np.zeros(r),
                              np.ones(r), -0.5j * np.pi / mf)
    sea = far & ~lee
    if np.any(sea):
        out[sea] = gap_energy(xf[sea], yf[sea], b * tf, k, Wf, ca, sa, wts, -0.5j * np.pi / mf)
    # closer in, the solution's own (denser) nodes keep the plain quadrature accurate
    mid = ~far & (dist >= 8.0 * b / m)
    if np.any(mid):
        out[mid] = gap_energy(xf[mid], yf[mid], b * t, k, W, ca, sa, wts, -0.5j * np.pi / m)
    near = ~far & ~mid
    if np.any(near):
        U = _aperture_fields(xf[near], yf[near], k, b, t, W, alphas)
        out[near] = (U.real**2 + U.imag**2) @ wts
    return out.reshape(x.shape)


def gap(x, y, wavelength, direction, width, method="auto"):
    r"""Wave field at a gap between two collinear breakwaters.

    Parameters
    ----------
    x, y : array_like
        Coordinates (m): origin at the gap centre, breakwaters on {y = 0, |x| >= width/2}.
    wavelength : float
        Wavelength L (m).
    direction : float
        Direction of wave travel (degrees CCW from +x), strictly in (0, 180): the waves
        arrive from y < 0.
    width : float
        Gap width B (m).
    method : {"auto", "superposition", "exact"}
        ``"superposition"``: Penney & Price (1952), two semi-infinite solutions minus the
        incident wave. ``"exact"``: the aperture integral equation
        (:func:`gap_exact`). ``"auto"``: exact when B sin(alpha) / L <
        :data:`AUTO_EXACT_BELOW` (= 3), superposition otherwise.

    Returns
    -------
    numpy.ndarray of complex
        Surface elevation normalised by the incident amplitude, time factor exp(-i w t),
        incident phase zero at the gap centre; K' is the modulus.

    Notes
    -----
    Both methods solve :math:`\nabla^2 u + k^2 u = 0` with no flux through the barrier.
    The superposition neglects the interaction of the two heads; the aperture solution
    is exact for any width (up to the discretisation, converged to 1e-5 in K').

    References
    ----------
    .. [1] Penney, W. G., & Price, A. T. (1952). The diffraction theory of sea waves and
       the shelter afforded by breakwaters. *Phil. Trans. R. Soc. Lond. A*, 244(882),
       236-253.
    .. [2] Morse, P. M., & Rubenstein, P. J. (1938). The diffraction of waves by ribbons
       and by slits. *Physical Review*, 54(11), 895-898.
    """
    L, B = _check(wavelength, width)
    if method == "exact":
        check_exact_size(L, B)
    if method == "auto":
        method = auto_method(L, direction, B)
    if method == "superposition":
        return gap_superposition(x, y, L, direction, B)
    if method == "exact":
        return gap_exact(x, y, L, direction, B)
    raise ValueError(f"method must be 'auto', 'superposition' or 'exact', got {method!r}")
