"""Compiled (numba) inner loops of the kernels.

They release the GIL (``nogil``), so callers spread work over cores with threads (the
climate screening does); they hold no thread pool of their own, so they are safe to call
from several threads at once.

These are the hot paths of directional random seas: the Hankel matrix of the aperture
solution and the diffraction amplitude of Sommerfeld's solution. Each function has a
numpy twin in its kernel module; the tests compare the two with scipy and mpmath.
If numba is not installed the kernels fall back to numpy (slower, same results).
"""

from __future__ import annotations

import numpy as np
from scipy import special

try:  # numba is a declared dependency; the fallback keeps the package importable without it
    import numba

    HAVE_NUMBA = True
except Exception:  # pragma: no cover
    HAVE_NUMBA = False

from harbor.solver.kernels.fresnel import _DER as _A_DER
from harbor.solver.kernels.fresnel import _N_TABLE as _A_N
from harbor.solver.kernels.fresnel import _VAL as _A_VAL

_EULER_GAMMA = 0.5772156649015329
_Z_SERIES = 8.0
_Z_ASYM = 25.0
_H_STEP = 1.0 / 128.0


def _h0_table():
    # g(z) = H0(z) e^{-iz} sqrt(z) is smooth on [8, 25]: tabulated with its derivative
    # for cubic Hermite interpolation (H0' = -H1).
    z = np.arange(_Z_SERIES, _Z_ASYM + 2 * _H_STEP, _H_STEP)
    h0 = special.hankel1(0, z)
    h1 = special.hankel1(1, z)
    mod = np.exp(-1j * z) * np.sqrt(z)
    g = h0 * mod
    dg = (-h1 - 1j * h0 + h0 / (2 * z)) * mod
    return g, dg


_G_VAL, _G_DER = _h0_table()
def _series_coeffs(n=28):
    # J0 = sum (-q)^k/(k!)^2; Y0 = (2/pi)[(ln(z/2)+gamma) J0 + sum_{k>=1} (-1)^(k+1) H_k q^k/(k!)^2]
    cj = np.empty(n)
    cy = np.empty(n)
    fact2 = 1.0
    harm = 0.0
    for k in range(n):
        if k:
            fact2 *= k * k
            harm += 1.0 / k
        cj[k] = (-1) ** k / fact2
        cy[k] = (-1) ** (k + 1) * harm / fact2
    return cj, cy


_CJ, _CY = _series_coeffs()
_ASYM = np.array([1.0, -1 / 8, 9 / 128, -75 / 1024, 3675 / 32768, -59535 / 262144,
                  2401245 / 4194304, -57972915 / 33554432])

#: cos and sin on a uniform table over one period, for cubic Hermite interpolation
#: (derivatives exact); error below 1e-12.
_CIS_N = 2048
_CIS_TAB = np.exp(1j * 2 * np.pi * np.arange(_CIS_N + 1) / _CIS_N)

if HAVE_NUMBA:

    @numba.njit(cache=True, inline="always")
    def _cis(x, tab):
        """(cos x, sin x) by table interpolation: trigonometric calls dominate H0 otherwise."""
        t = x * (_CIS_N / (2.0 * np.pi))
        fl = np.floor(t)
        f = t - fl
        i = int(fl) & (_CIS_N - 1)
        a = tab[i]
        b = tab[i + 1]
        f2 = f * f
        f3 = f2 * f
        h00 = 2 * f3 - 3 * f2 + 1
        h01 = -2 * f3 + 3 * f2
        hs = (2.0 * np.pi / _CIS_N)
        h10 = (f3 - 2 * f2 + f) * hs
        h11 = (f3 - f2) * hs
        # d/dx (cos, sin) = (-sin, cos)
        c = h00 * a.real + h01 * b.real - h10 * a.imag - h11 * b.imag
        s = h00 * a.imag + h01 * b.imag + h10 * a.real + h11 * b.real
        return c, s

    @numba.njit(cache=True, inline="always")
    def _h0_far(z, asym):
        """(Re, Im) of H0(z) for z >= 25: Hankel's expansion, 8 terms."""
        # sum a_m (i/z)^m split into real and imaginary parts (i^m cycles 1, i, -1, -i)
        w = 1.0 / z
        w2 = w * w
        pr = asym[0] + w2 * (-asym[2] + w2 * (asym[4] - w2 * asym[6]))
        pim = w * (asym[1] + w2 * (-asym[3] + w2 * (asym[5] - w2 * asym[7])))
        amp = np.sqrt(2.0 / np.pi * w)
        c, sn = _cis(z - 0.25 * np.pi, _CIS_TAB)
        c *= amp
        sn *= amp
        return c * pr - sn * pim, c * pim + sn * pr

    @numba.njit(cache=True, fastmath=False, inline="always")
    def _h0(z, gval, gder, asym, cj, cy):
        if z >= _Z_ASYM:
            hr, hi = _h0_far(z, asym)
            return complex(hr, hi)
        if z >= _Z_SERIES:
            pos = (z - _Z_SERIES) / _H_STEP
            i = int(pos)
            s = pos - i
            s2 = s * s
            s3 = s2 * s
            g = ((2 * s3 - 3 * s2 + 1) * gval[i] + (-2 * s3 + 3 * s2) * gval[i + 1]
                 + _H_STEP * ((s3 - 2 * s2 + s) * gder[i] + (s3 - s2) * gder[i + 1]))
            r = 1.0 / np.sqrt(z)
            c, sn = _cis(z, _CIS_TAB)
            return g * complex(c * r, sn * r)
        # Power series in q = z^2/4 (A&S 9.1.12-13) in Horner form, 28 terms: the
        # truncation error is below 1e-20 for z < 8.
        q = 0.25 * z * z
        j0 = cj[27]
        ys = cy[27]
        for i in range(26, -1, -1):
            j0 = j0 * q + cj[i]
            ys = ys * q + cy[i]
        y0 = (2.0 / np.pi) * ((np.log(0.5 * z) + _EULER_GAMMA) * j0 + ys)
        return j0 + 1j * y0

    def _hankel_matrix_py(xp, yp, xs, k, gval, gder, asym, cj, cy):
        n = xp.size
        m = xs.size
        out = np.empty((n, m), np.complex128)
        for p in range(n):
            for j in range(m):
                dx = xp[p] - xs[j]
                z = k * np.sqrt(dx * dx + yp[p] * yp[p])
                out[p, j] = _h0(z, gval, gder, asym, cj, cy)
        return out

    _hankel_matrix = numba.njit(cache=True, nogil=True)(_hankel_matrix_py)

    def _amplitude_py(t, val, der, ntab):
        out = np.empty(t.size, np.complex128)
        h = 1.0 / ntab
        for p in range(t.size):
            u = 1.0 / (1.0 + t[p])
            pos = u * ntab
            i = min(int(pos), ntab - 1)
            s = pos - i
            s2 = s * s
            s3 = s2 * s
            out[p] = ((2 * s3 - 3 * s2 + 1) * val[i] + (-2 * s3 + 3 * s2) * val[i + 1]
                      + h * ((s3 - 2 * s2 + s) * der[i] + (s3 - s2) * der[i + 1]))
        return out

    _amplitude = numba.njit(cache=True, nogil=True)(_amplitude_py)


def hankel_matrix(xp, yp, xs, k):
    """Matrix ``H[p, j] = H0^(1)(k * hypot(xp[p] - xs[j], yp[p]))`` (complex).

    Parameters
    ----------
    xp, yp : numpy.ndarray, shape (n,)
        Points (m).
    xs : numpy.ndarray, shape (m,)
        Source abscissae on y = 0 (m).
    k : float
        Wavenumber (rad/m).

    Notes
    -----
    Power series of J0 and Y0 (Abramowitz & Stegun 1964, 9.1.12-13) below z = 8, cubic
    Hermite interpolation of :math:`H_0^{(1)}(z) e^{-iz}\\sqrt z` between 8 and 25, the
    Hankel asymptotic expansion (A&S 9.2.7) above; relative error below 1e-10 (tests).
    """
    xp = np.ascontiguousarray(xp, float).ravel()
    yp = np.ascontiguousarray(yp, float).ravel()
    xs = np.ascontiguousarray(xs, float)
    if HAVE_NUMBA:
        return _hankel_matrix(xp, yp, xs, float(k), _G_VAL, _G_DER, _ASYM, _CJ, _CY)
    from harbor.solver.kernels.hankel import hankel0  # pragma: no cover

    return hankel0(k * np.hypot(xp[:, None] - xs[None, :], yp[:, None]))  # pragma: no cover


def amplitude(t):
    """Diffraction amplitude A(t) of :mod:`harbor.solver.kernels.fresnel`, compiled."""
    t = np.asarray(t, float)
    if HAVE_NUMBA:
        return _amplitude(np.ascontiguousarray(t).ravel(), _A_VAL, _A_DER, _A_N).reshape(t.shape)
    from harbor.solver.kernels.fresnel import diffraction_amplitude  # pragma: no cover

    return diffraction_amplitude(t)  # pragma: no cover


if HAVE_NUMBA:

    _BLOCK = 512

    def _gap_energy_py(xp, yp, xs, k, Wr, Wi, cos_a, sin_a, wts, sr, si, gval, gder, asym, cj, cy):
        n = xp.size
        m = xs.size
        nd = cos_a.size
        out = np.zeros(n)
        nblocks = (n + _BLOCK - 1) // _BLOCK
        for blk in range(nblocks):
            hr = np.empty(m)
            hi = np.empty(m)
            ar = np.empty(nd)
            ai = np.empty(nd)
            for p in range(blk * _BLOCK, min(n, (blk + 1) * _BLOCK)):
                y = yp[p]
                ay = abs(y)
                for j in range(m):
                    dx = xp[p] - xs[j]
                    z = k * np.sqrt(dx * dx + ay * ay)
                    if z >= _Z_ASYM:
                        # the common far case, without the complex round trip of _h0
                        hr[j], hi[j] = _h0_far(z, asym)
                    else:
                        h = _h0(z, gval, gder, asym, cj, cy)
                        hr[j] = h.real
                        hi[j] = h.imag
                for d in range(nd):
                    ar[d] = 0.0
                    ai[d] = 0.0
                # real arithmetic with the direction loop innermost: it vectorises
                for j in range(m):
                    a = hr[j]
                    b = hi[j]
                    for d in range(nd):
                        ar[d] += a * Wr[j, d] - b * Wi[j, d]
                        ai[d] += a * Wi[j, d] + b * Wr[j, d]
                e = 0.0
                for d in range(nd):
                    r = ar[d] * sr - ai[d] * si
                    i = ar[d] * si + ai[d] * sr
                    if y < 0:
                        ph = k * xp[p] * cos_a[d]
                        c2 = 2.0 * np.cos(k * y * sin_a[d])
                        r = np.cos(ph) * c2 - r
                        i = np.sin(ph) * c2 - i
                    e += wts[d] * (r * r + i * i)
                out[p] = e
        return out

    _gap_energy = numba.njit(cache=True, nogil=True, fastmath=True)(_gap_energy_py)


def gap_energy(xp, yp, xs, k, W, cos_a, sin_a, weights, scale):
    """Weighted energy of the aperture field over several directions, fused.

    ``sum_d weights[d] |u_d(p)|^2`` with ``u_d = scale * sum_j H0(k rho_pj) W[j, d]`` in
    the lee (y >= 0) and the closed-wall field minus it on the seaward side (y < 0),
    as :func:`harbor.solver.kernels.gap.gap_exact_many` -- without storing any field.
    Only for points away from the opening (the quadrature is plain Gauss-Chebyshev).
    """
    xp = np.ascontiguousarray(xp, float).ravel()
    yp = np.ascontiguousarray(yp, float).ravel()
    W = np.asarray(W, complex)
    args = (xp, yp, np.ascontiguousarray(xs, float), float(k), np.ascontiguousarray(W.real),
            np.ascontiguousarray(W.imag), np.ascontiguousarray(cos_a, float),
            np.ascontiguousarray(sin_a, float), np.ascontiguousarray(weights, float),
            float(np.real(scale)), float(np.imag(scale)))
    if HAVE_NUMBA:
        return _gap_energy(*args, _G_VAL, _G_DER, _ASYM, _CJ, _CY)
    H = hankel_matrix(xp, yp, xs, k)  # pragma: no cover
    U = scale * (H @ W)  # pragma: no cover
    sea = yp < 0  # pragma: no cover
    U[sea] = (np.exp(1j * k * xp[sea, None] * cos_a) * 2 * np.cos(k * yp[sea, None] * sin_a)
              - U[sea])  # pragma: no cover
    return (np.abs(U) ** 2) @ weights  # pragma: no cover


#: BLAS threads for the solver's small dense algebra (aperture LU, eigen-decompositions,
#: Hankel-matrix products of a few hundred columns): on a busy machine more threads only
#: spin (benchmarks/solve_map.py measures both). None leaves BLAS as it is.
SOLVER_BLAS_THREADS = 1


def blas_limited(threads=None):
    """Context manager holding BLAS to ``threads`` (default :data:`SOLVER_BLAS_THREADS`).

    Parameters
    ----------
    threads : int, optional
        Number of BLAS threads; None for :data:`SOLVER_BLAS_THREADS`.

    Returns
    -------
    contextlib.AbstractContextManager
        ``threadpoolctl.threadpool_limits`` for the BLAS libraries, or a no-op when
        threadpoolctl is missing or the limit is None.
    """
    import contextlib

    n = SOLVER_BLAS_THREADS if threads is None else threads
    if n is None:
        return contextlib.nullcontext()
    try:
        from threadpoolctl import threadpool_limits
    except Exception:  # pragma: no cover - threadpoolctl is a declared dependency
        return contextlib.nullcontext()
    return threadpool_limits(limits=int(n), user_api="blas")
