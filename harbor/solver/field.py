"""Full-field finite-element solution of the Helmholtz equation around thin rigid barriers.

An independent check of the classical diffraction methods: the constant-depth wave field
around any layout of thin, rigid, fully reflecting barriers under an incident plane wave,
computed on a triangle mesh with quadratic (P2) elements from scikit-fem, a perfectly
matched layer around the domain and a sparse direct solve (scipy SuperLU).
"""

from __future__ import annotations

import contextlib
import ctypes
import glob
import os
from dataclasses import dataclass, field

import numpy as np
from scipy.sparse.linalg import splu

from harbor.errors import InputError
from harbor.solver import _mesh

__all__ = ["solve_field", "FieldSolution"]


@contextlib.contextmanager
def _one_blas_thread():
    """Run SuperLU with one OpenBLAS thread (best effort; a no-op if not found).

    The factorisation gains nothing from BLAS threads on these 2-D meshes, and on a busy
    2-core machine spinning BLAS threads make it tens of times slower.
    """
    lib = None
    try:
        import scipy

        pattern = os.path.join(os.path.dirname(os.path.dirname(scipy.__file__)),
                               "scipy.libs", "libscipy_openblas*.so*")
        found = glob.glob(pattern)
        if found:
            lib = ctypes.CDLL(found[0])
            before = lib.scipy_openblas_get_num_threads()
            lib.scipy_openblas_set_num_threads(1)
    except (OSError, AttributeError):
        lib = None
    try:
        yield
    finally:
        if lib is not None:
            lib.scipy_openblas_set_num_threads(before)


def _incident(x, y, k, d):
    """Incident plane wave exp(i k d.x) and its gradient; x, y may be complex (PML)."""
    u = np.exp(1j * k * (x * d[0] + y * d[1]))
    return u, 1j * k * d[0] * u, 1j * k * d[1] * u


@dataclass
class FieldSolution:
    """The solved wave field around a layout; evaluate it anywhere in the region.

    Attributes
    ----------
    wavelength : float
        Wavelength L (m).
    direction : float
        Direction of wave travel (degrees counter-clockwise from +x).
    region : tuple of float
        (xmin, ymin, xmax, ymax) where the answer is wanted (m).
    box : tuple of float
        The whole meshed rectangle, absorbing layer included (m).
    n_unknowns : int
        Number of complex unknowns of the linear system solved.
    n_triangles : int
        Number of triangles in the mesh.
    """

    wavelength: float
    direction: float
    region: tuple
    box: tuple
    n_unknowns: int
    n_triangles: int
    _basis: object = field(repr=False)
    _mesh: object = field(repr=False)
    _us: np.ndarray = field(repr=False)
    _physical: tuple = field(repr=False)

    @property
    def wavenumber(self) -> float:
        """k = 2 pi / L (rad/m)."""
        return 2.0 * np.pi / self.wavelength

    def incident(self, x, y):
        """Incident wave exp(i k (x cos a + y sin a)) at points (x, y) in m (complex)."""
        a = np.radians(self.direction)
        return _incident(np.asarray(x, float), np.asarray(y, float), self.wavenumber,
                         (np.cos(a), np.sin(a)))[0]

    def scattered(self, x, y):
        """Scattered field u_s at points (x, y) (m); arrays broadcast together.

        Parameters
        ----------
        x, y : array_like
            Coordinates (m), inside the physical domain (the region plus its margin; the
            absorbing layer is excluded).

        Returns
        -------
        numpy.ndarray of complex
            u_s, normalised by the incident amplitude, shape of the broadcast inputs.

        Notes
        -----
        The P2 interpolant is evaluated in the triangle that contains each point. A point
        exactly on a barrier takes the value from the triangle on one side of it.
        """
        x, y = np.broadcast_arrays(np.asarray(x, float), np.asarray(y, float))
        shape = x.shape
        xf, yf = x.ravel(), y.ravel()
        x0, y0, x1, y1 = self._physical
        tol = 1e-9 * max(x1 - x0, y1 - y0)
        if not (np.all(np.isfinite(xf)) and np.all(np.isfinite(yf))):
            raise InputError("points must be finite numbers", key="x, y")
        if xf.size and ((xf.min() < x0 - tol) or (xf.max() > x1 + tol)
                        or (yf.min() < y0 - tol) or (yf.max() > y1 + tol)):
            raise InputError(
                f"point outside the solved domain x {x0:g}..{x1:g}, y {y0:g}..{y1:g} m",
                key="x, y")
        if xf.size == 0:
            return np.zeros(shape, complex)
        pts = np.vstack([xf, yf])
        cells = self._mesh.delaunay.find_simplex(pts.T)
        if np.any(cells < 0):  # round-off on the box edge: take the nearest triangle
            bad = cells < 0
            cells[bad] = self._mesh.delaunay.find_simplex(pts.T[bad], tol=1e-8)
        basis = self._basis
        ref = basis.mapping.invF(pts[:, :, None], tind=cells)
        dofs = basis.element_dofs[:, cells]
        out = np.zeros(xf.size, complex)
        for i in range(basis.Nbfun):  # loop over the 6 local shape functions only
            phi = np.asarray(basis.elem.gbasis(basis.mapping, ref, i, tind=cells)[0])
            out += phi[:, 0] * self._us[dofs[i]]
        return out.reshape(shape)

    def at(self, x, y):
        """Total field u = u_i + u_s at points (x, y).

        Parameters
        ----------
        x, y : array_like
            Coordinates (m), broadcast together; inside the region plus its margin.

        Returns
        -------
        numpy.ndarray of complex
            Surface elevation normalised by the incident amplitude (time factor
            exp(-i w t)); K' is its modulus and the phase gives the crest lines.

        Notes
        -----
        u_i = exp(i k (x cos a + y sin a)) exactly; u_s is the P2 finite-element
        interpolant (see :meth:`scattered`).
        """
        return self.incident(x, y) + self.scattered(x, y)

    def grid(self, x, y):
        """Total field on the grid of 1-D coordinates ``x`` (nx,) and ``y`` (ny,).

        Parameters
        ----------
        x, y : array_like, 1-D
            Grid coordinates (m).

        Returns
        -------
        numpy.ndarray of complex, shape (ny, nx)
        """
        X, Y = np.meshgrid(np.asarray(x, float), np.asarray(y, float))
        return self.at(X, Y)


def _check_inputs(barriers, wavelength, direction, region, ppw, pml_wavelengths, margin):
    try:
        wavelength = float(wavelength)
        direction = float(direction)
    except (TypeError, ValueError):
        raise InputError("wavelength and direction must be numbers",
                         key="wavelength") from None
    if not (np.isfinite(wavelength) and wavelength > 0):
        raise InputError(f"wavelength must be a positive length in m, got {wavelength!r}",
                         key="wavelength")
    if not np.isfinite(direction):
        raise InputError(f"direction must be a finite angle in degrees, got {direction!r}",
                         key="direction")
    try:
        region = tuple(float(v) for v in region)
    except (TypeError, ValueError):
        raise InputError("region must be (xmin, ymin, xmax, ymax) in m", key="region") from None
    if len(region) != 4 or not all(np.isfinite(region)) \
            or region[2] <= region[0] or region[3] <= region[1]:
        raise InputError(f"region must be (xmin, ymin, xmax, ymax) with xmin < xmax and "
                         f"ymin < ymax, got {region!r}", key="region")
    for name, v, lo in (("points_per_wavelength", ppw, 3.0),
                        ("pml_wavelengths", pml_wavelengths, 0.25),
                        ("margin_wavelengths", margin, 0.0)):
        if not (np.isfinite(v) and v >= lo):
            raise InputError(f"{name} must be at least {lo:g}, got {v!r}", key=name)
    lines = []
    for i, b in enumerate(barriers):
        try:
            a = np.asarray(b, float)
        except (TypeError, ValueError):
            raise InputError(f"barrier {i} must be an (n, 2) array of coordinates in m",
                             key="barriers") from None
        if a.ndim != 2 or a.shape[1] != 2 or a.shape[0] < 2 or not np.all(np.isfinite(a)):
            raise InputError(f"barrier {i} must be an (n >= 2, 2) array of finite "
                             f"coordinates in m, got shape {a.shape}", key="barriers")
        if np.any(np.hypot(*np.diff(a, axis=0).T) == 0):
            raise InputError(f"barrier {i} has repeated consecutive vertices",
                             key="barriers")
        lines.append(a)
    return lines, wavelength, direction, region


def solve_field(barriers, wavelength, direction, region, points_per_wavelength=10.0,
                pml_wavelengths=2.0, margin_wavelengths=1.0, pml_strength=None):
    """Solve the Helmholtz equation around thin rigid barriers for an incident plane wave.

    Parameters
    ----------
    barriers : list of array_like, each of shape (n_i, 2)
        Barrier polylines (m), any orientation. Each is thin, rigid and fully reflecting
        (no flux through either face); crossing barriers are joined where they cross.
        A barrier that runs out of the domain continues into the absorbing layer and so
        behaves as if it were very long, provided the incident wave and the wave it
        reflects both travel out through the side of the domain that it crosses (see
        Notes).
    wavelength : float
        Wavelength L (m); k = 2 pi / L.
    direction : float
        Direction of wave travel, degrees counter-clockwise from +x (any angle).
    region : tuple of float
        (xmin, ymin, xmax, ymax) where the answer is wanted (m).
    points_per_wavelength : float, optional
        Mesh edges per wavelength (P2 elements, so about twice as many nodes). The default
        10 gives K' to about 0.01 over a domain of a dozen wavelengths.
    pml_wavelengths : float, optional
        Thickness of the perfectly matched layer, in wavelengths. Two wavelengths keep
        the stretching gentle enough for barriers that cross the layer at an angle.
    margin_wavelengths : float, optional
        Free water between ``region`` and the layer, in wavelengths.
    pml_strength : float, optional
        Attenuation exponent of the layer: a wave entering it at normal incidence is
        damped by exp(-pml_strength) on the way in (default 20).

    Returns
    -------
    FieldSolution
        Evaluate the total field with ``.at(x, y)`` or ``.grid(x, y)``.

    Notes
    -----
    Total field u = u_i + u_s with u_i = exp(i k (x cos a + y sin a)) and time factor
    exp(-i w t). The scattered field solves

        -div(Lambda grad u_s) - k^2 s_x s_y u_s = 0,   Lambda = diag(s_y/s_x, s_x/s_y),

    with s_x = 1 + i sigma(x)/k, sigma = sigma_0 (distance into the layer / thickness)^2
    in the layer and 0 elsewhere (complex coordinate stretching; an outgoing wave
    exp(i k x) becomes exp(i k x - int sigma dx) in the layer), u_s = 0 on the outer
    edge, and on both faces of every barrier the rigid-wall condition
    d(u_i + u_s)/dn = 0, i.e. the natural boundary data
    (Lambda grad u_s) . n = -(s_y n_x d_x~ u_i + s_x n_y d_y~ u_i), where the incident
    wave is continued analytically to the stretched coordinates x~ = x + (i/k) int sigma.
    Inside the layer this makes the computed field the continuation of the field of the
    barrier extended to infinity. That continuation exists only for waves that leave
    the domain through the layer: an arm that runs out of the domain towards where the
    waves come from has a shadow wave (or a reflected wave) that would have to enter
    through the layer, which absorbs it, so near the layer that arm behaves as if cut
    off there. Measured against the exact solutions (tests/test_field.py,
    docs/accuracy.md): |u - u_exact| below 0.01 near a head at 10 points per
    wavelength when the arms run out down-wave, and a few hundredths within a few
    wavelengths of an arm that runs out up-wave.
    The mesh conforms to the barriers, whose nodes are duplicated (one copy per face,
    except at free tips) so that the faces are independent (see ``harbor.solver._mesh``).
    Quadratic Lagrange triangles (scikit-fem ``ElementTriP2``), sparse LU (SuperLU).

    References
    ----------
    Berenger, J.-P. (1994). A perfectly matched layer for the absorption of
    electromagnetic waves. Journal of Computational Physics 114(2), 185-200.

    Chew, W. C. and Weedon, W. H. (1994). A 3D perfectly matched medium from modified
    Maxwell's equations with stretched coordinates. Microwave and Optical Technology
    Letters 7(13), 599-604.

    Ihlenburg, F. (1998). Finite Element Analysis of Acoustic Scattering. Applied
    Mathematical Sciences 132, Springer, New York.

    Gustafsson, T. and McBain, G. D. (2020). scikit-fem: A Python package for finite
    element assembly. Journal of Open Source Software 5(52), 2369.
    """
    from skfem import (Basis, BilinearForm, ElementTriP2, FacetBasis, LinearForm,
                       MeshTri, asm, condense)

    lines, L, direction, region = _check_inputs(
        barriers, wavelength, direction, region, float(points_per_wavelength),
        float(pml_wavelengths), float(margin_wavelengths))
    k = 2.0 * np.pi / L
    a = np.radians(direction)
    d = (np.cos(a), np.sin(a))
    h = L / float(points_per_wavelength)
    m = margin_wavelengths * L
    t = pml_wavelengths * L
    px0, py0, px1, py1 = region[0] - m, region[1] - m, region[2] + m, region[3] + m
    box = (px0 - t, py0 - t, px1 + t, py1 + t)
    # sigma_0 t / 3 = int sigma dx; attenuation exp(-20) one way at normal incidence
    # keeps the round-trip reflection below 1e-15 while being resolved by the mesh.
    strength = 20.0 if pml_strength is None else float(pml_strength)
    sigma0 = 3.0 * strength / t

    def depth(xv, lo, hi):
        return np.maximum(lo - xv, 0.0) + np.maximum(xv - hi, 0.0)

    def stretch(xv, lo, hi):
        """s(x) and the stretched coordinate x~ (m) along one axis."""
        dd = depth(xv, lo, hi)
        s = 1.0 + 1j * sigma0 * (dd / t) ** 2 / k
        sign = np.where(xv > hi, 1.0, -1.0)
        xt = xv + 1j * sign * sigma0 * dd ** 3 / (3.0 * t ** 2 * k)
        return s, xt

    sm = _mesh.build(lines, box, h)
    mesh = MeshTri(sm.points, sm.triangles)
    basis = Basis(mesh, ElementTriP2())

    @BilinearForm(dtype=np.complex128)
    def helmholtz(u, v, w):
        return (w.cxx * u.grad[0] * v.grad[0] + w.cyy * u.grad[1] * v.grad[1]
                - w.cm * u * v)

    # The stretching coefficients at the quadrature points, computed once rather than
    # once per pair of shape functions.
    xq = np.asarray(basis.global_coordinates())
    sx, _ = stretch(xq[0], px0, px1)
    sy, _ = stretch(xq[1], py0, py1)
    A = asm(helmholtz, basis, cxx=sy / sx, cyy=sx / sy, cm=k ** 2 * sx * sy)
    ndof = basis.N
    b = np.zeros(ndof, complex)

    bfac = mesh.boundary_facets()
    mid = mesh.p[:, mesh.facets[:, bfac]].mean(axis=1)
    tol = 1e-9 * max(box[2] - box[0], box[3] - box[1])
    outer = ((np.abs(mid[0] - box[0]) < tol) | (np.abs(mid[0] - box[2]) < tol)
             | (np.abs(mid[1] - box[1]) < tol) | (np.abs(mid[1] - box[3]) < tol))
    slit = bfac[~outer]
    if slit.size:
        fb = FacetBasis(mesh, ElementTriP2(), facets=slit)

        @LinearForm(dtype=np.complex128)
        def wall(v, w):
            sx, xt = stretch(w.x[0], px0, px1)
            sy, yt = stretch(w.x[1], py0, py1)
            _, ux, uy = _incident(xt, yt, k, d)
            # n is the outward normal of the water, i.e. into the barrier face.
            return -(sy * w.n[0] * ux + sx * w.n[1] * uy) * v

        b = asm(wall, fb)

    D = basis.get_dofs(bfac[outer]).all()
    Ac, bc, _, I = condense(A, b, D=D)
    Ac = Ac.tocsc()
    # The matrix is complex symmetric with a structurally symmetric pattern: a symmetric
    # minimum-degree ordering with diagonal pivots preferred fills in about half as much
    # as the default column ordering and is an order of magnitude faster; keep partial
    # pivoting as the fallback if the residual says the diagonal pivots were poor.
    with _one_blas_thread():
        lu = splu(Ac, permc_spec="MMD_AT_PLUS_A", diag_pivot_thresh=0.01,
                  options={"SymmetricMode": True})
        x = lu.solve(bc)
        if np.linalg.norm(Ac @ x - bc) > 1e-8 * max(np.linalg.norm(bc), 1e-300):
            x = splu(Ac, permc_spec="COLAMD").solve(bc)
    us = np.zeros(ndof, complex)
    us[I] = x

    return FieldSolution(wavelength=L, direction=direction, region=region, box=box,
                         n_unknowns=int(len(I)), n_triangles=int(mesh.t.shape[1]),
                         _basis=basis, _mesh=sm, _us=us, _physical=(px0, py0, px1, py1))
