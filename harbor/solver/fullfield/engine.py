r"""The mild-slope equation by quadratic finite elements: assembly, layer and factorisation.

Pure arrays in, arrays out: the mesh (:mod:`harbor.solver.fullfield.mesh`), the depth at
given points (a function), a reflection coefficient per boundary facet and the absorbing
layer's rectangle. The harbour-level set-up (domain, background wave, notices) is in
:mod:`harbor.solver.fullfield.harbour`.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
import scipy.sparse as sp
from scipy.sparse.linalg import splu

from harbor.solver.field import _one_blas_thread
from harbor.waves.dispersion import group_velocity, wavenumber

__all__ = ["Space", "Layer", "FrequencySolver", "robin_alpha", "robin_reflection"]


def robin_alpha(kr):
    r"""Admittance of the partially reflecting boundary condition (-).

    Parameters
    ----------
    kr : float or array_like
        Reflection coefficient K_r in [0, 1] at normal incidence (-).

    Returns
    -------
    numpy.ndarray
        :math:`\alpha = (1 - K_r) / (1 + K_r)`.

    Notes
    -----
    The boundary condition is :math:`\partial\eta/\partial n = i k \alpha \eta` (n
    out of the water), which reflects a plane wave at normal incidence with the
    coefficient K_r exactly; at other angles see :func:`robin_reflection`.

    References
    ----------
    Tsay, T.-K., Zhu, W. and Liu, P. L.-F. (1989). A finite element model for wave
    refraction, diffraction, reflection and dissipation. Applied Ocean Research 11(1),
    33-38.

    Isaacson, M. and Qu, S. (1990). Waves in a harbour with partially reflecting
    boundaries. Coastal Engineering 14(3), 193-214.
    """
    kr = np.asarray(kr, float)
    return (1.0 - kr) / (1.0 + kr)


def robin_reflection(kr, angle, attack=0.0):
    r"""Reflection coefficient of the condition of :func:`robin_alpha` at an angle (-).

    Parameters
    ----------
    kr : float or array_like
        Nominal K_r (normal incidence) (-).
    angle : float or array_like
        Angle of incidence from the boundary normal (rad), in [0, pi/2].
    attack : float or array_like, optional
        Main angle of attack the wall is tuned to (rad from the normal): the
        admittance is :math:`\alpha\cos\theta_a`, which reflects K_r exactly at
        :math:`\theta = \theta_a` (Isaacson & Qu 1990). Default 0 (normal incidence).

    Returns
    -------
    numpy.ndarray
        Complex amplitude ratio R of the reflected to the incident plane wave at the
        boundary; |R| is the effective reflection coefficient.

    Notes
    -----
    With :math:`\eta = e^{i k \mathbf{d}\cdot\mathbf{x}} + R e^{i k \mathbf{d}'\cdot
    \mathbf{x}}` and :math:`\partial_n \eta = i k \beta \eta` on the boundary,
    :math:`R = (\cos\theta - \beta) / (\cos\theta + \beta)` with
    :math:`\beta = \alpha\cos\theta_a`; R = 1 for
    :math:`\alpha = 0` at any angle. The condition absorbs best at normal incidence and
    reflects more, with reversed sign, towards grazing incidence.

    References
    ----------
    Isaacson, M. and Qu, S. (1990). Waves in a harbour with partially reflecting
    boundaries. Coastal Engineering 14(3), 193-214.
    """
    a = robin_alpha(kr) * np.cos(np.asarray(attack, float))
    c = np.cos(np.asarray(angle, float))
    with np.errstate(invalid="ignore", divide="ignore"):
        r = (c - a) / (c + a)
    return np.where(a == 0, 1.0, np.where(c + a == 0, -1.0, r))


@dataclass(frozen=True)
class Layer:
    """The absorbing layer: a rectangle of free water surrounded by a stretched band.

    Attributes
    ----------
    inner : tuple of float
        (xmin, ymin, xmax, ymax) of the unstretched water (m).
    thickness : float
        Thickness of the band (m); the outer rectangle is ``inner`` grown by it.
    strength : float
        One-way attenuation exponent at normal incidence (default 20, exp(-20)).
    """

    inner: tuple
    thickness: float
    strength: float = 20.0

    @property
    def outer(self):
        x0, y0, x1, y1 = self.inner
        t = self.thickness
        return (x0 - t, y0 - t, x1 + t, y1 + t)

    def stretch(self, x, lo, hi, k0):
        """s(x) = 1 + i sigma(x) / k0 with sigma growing as the square of the depth."""
        sigma0 = 3.0 * self.strength / self.thickness
        d = np.maximum(lo - x, 0.0) + np.maximum(x - hi, 0.0)
        return 1.0 + 1j * sigma0 * (d / self.thickness) ** 2 / k0


class Space:
    """Quadratic Lagrange elements on a water mesh, with what every frequency shares.

    Parameters
    ----------
    mesh : harbor.solver.fullfield.mesh.WaterMesh
    layer : Layer
        Its outer rectangle is the edge of the mesh, where the field is set to zero.
    facet_kr : callable
        ``facet_kr(mid, normal)`` -> K_r (n_facets,) for the boundary facets that are
        not on the outer rectangle, given their midpoints (2, n) and outward normals.
    facet_factor : callable, optional
        The same for the admittance factor cos(angle of attack) of each facet (1:
        tuned to normal incidence); default 1 everywhere.

    Notes
    -----
    Holds the scikit-fem mesh and basis, the dof coordinates, the Dirichlet dofs of the
    outer edge, the boundary facets with their K_r, and the nested-dissection ordering
    (METIS, through pymetis) of the matrix pattern, which is the same at every
    frequency.
    """

    def __init__(self, mesh, layer, facet_kr, facet_factor=None):
        from skfem import Basis, ElementTriP2, MeshTri

        self.mesh = mesh
        self.layer = layer
        self.skmesh = MeshTri(mesh.points, mesh.triangles)
        self.elem = ElementTriP2()
        self.basis = Basis(self.skmesh, self.elem)
        self.N = self.basis.N
        self.doflocs = np.asarray(self.basis.doflocs)
        m = self.skmesh
        bfac = m.boundary_facets()
        mid = m.p[:, m.facets[:, bfac]].mean(axis=1)
        box = layer.outer
        tol = 1e-7 * max(box[2] - box[0], box[3] - box[1])
        outer = ((np.abs(mid[0] - box[0]) < tol) | (np.abs(mid[0] - box[2]) < tol)
                 | (np.abs(mid[1] - box[1]) < tol) | (np.abs(mid[1] - box[3]) < tol))
        D = self.basis.get_dofs(bfac[outer]).all()
        free = np.ones(self.N, bool)
        free[D] = False
        self.free = np.flatnonzero(free)
        self.wall_facets = bfac[~outer]
        t = m.facets[:, self.wall_facets]
        tan = m.p[:, t[1]] - m.p[:, t[0]]
        tan /= np.hypot(*tan)
        nrm = np.vstack([tan[1], -tan[0]])
        # orient the normal out of the water: away from the facet's triangle
        tri = m.f2t[0, self.wall_facets]
        cen = m.p[:, m.t[:, tri]].mean(axis=1)
        fm = mid[:, ~outer]
        flip = np.sum(nrm * (cen - fm), axis=0) > 0
        nrm[:, flip] *= -1
        self.wall_mid = fm
        self.wall_normal = nrm
        kr = np.asarray(facet_kr(fm, nrm), float) if self.wall_facets.size else np.zeros(0)
        self.wall_kr = np.clip(kr, 0.0, 1.0)
        fac = (np.asarray(facet_factor(fm, nrm), float)
               if facet_factor is not None and self.wall_facets.size
               else np.ones(self.wall_facets.size))
        self.wall_factor = np.clip(fac, 0.0, 1.0)
        self.xq = np.asarray(self.basis.global_coordinates())
        self._perm = None

    @property
    def n_unknowns(self) -> int:
        return int(self.free.size)

    @property
    def n_triangles(self) -> int:
        return int(self.skmesh.t.shape[1])

    def ordering(self, A):
        """Nested-dissection permutation of the free dofs (computed once per mesh)."""
        if self._perm is None:
            try:
                import pymetis
            except ImportError:  # pragma: no cover - pymetis is a dependency
                self._perm = False
                return None
            G = A.tocsr()
            G = (G + G.T).tocsr()
            G.setdiag(0)
            G.eliminate_zeros()
            # METIS: row i of the permuted matrix is row perm[i] of the original
            if hasattr(pymetis, "CSRAdjacency"):
                graph = {"adjacency": pymetis.CSRAdjacency(G.indptr, G.indices)}
            else:  # pragma: no cover - older pymetis
                graph = {"xadj": G.indptr, "adjncy": G.indices}
            perm, _ = pymetis.nested_dissection(**graph)
            self._perm = np.asarray(perm)
        return None if self._perm is False else self._perm

    def probe(self, x, y):
        """Sparse matrix that evaluates a dof vector at points (x, y) (m).

        Returns
        -------
        P : scipy.sparse.csr_matrix, shape (n_points, N)
        found : numpy.ndarray of bool
            False for points outside the water (land, outside the mesh).
        """
        x = np.asarray(x, float).ravel()
        y = np.asarray(y, float).ravel()
        cells = self.mesh.locate(x, y)
        found = cells >= 0
        idx = np.flatnonzero(found)
        c = cells[found]
        rows, cols, vals = [], [], []
        if idx.size:
            pts = np.vstack([x[idx], y[idx]])
            ref = self.basis.mapping.invF(pts[:, :, None], tind=c)
            dofs = self.basis.element_dofs[:, c]
            for i in range(self.basis.Nbfun):  # the 6 local shape functions
                phi = np.asarray(self.elem.gbasis(self.basis.mapping, ref, i, tind=c)[0])
                rows.append(idx)
                cols.append(dofs[i])
                vals.append(phi[:, 0])
        if rows:
            P = sp.csr_matrix((np.concatenate(vals), (np.concatenate(rows),
                                                       np.concatenate(cols))),
                              shape=(x.size, self.N))
        else:
            P = sp.csr_matrix((x.size, self.N))
        return P, found


def _coefficients(period, h, h0, g):
    """k (rad/m) and p = c c_g / (c c_g)_0 (-) at depths h (m)."""
    k = wavenumber(period, h, g)
    omega = 2.0 * np.pi / period
    ccg = (omega / k) * group_velocity(period, h, g)
    k0 = wavenumber(period, h0, g)
    ccg0 = (omega / k0) * group_velocity(period, h0, g)
    return np.asarray(k), np.asarray(ccg / ccg0), float(k0)


@dataclass
class FrequencySolver:
    """The factorised mild-slope system of one wave period over one mesh.

    Build with :meth:`build`; :meth:`solve` then costs one back-substitution per
    right-hand side (one per direction).

    Attributes
    ----------
    period : float
        Wave period T (s).
    k0 : float
        Wavenumber of the constant-depth exterior (rad/m).
    space : Space
    A : scipy.sparse.csr_matrix
        The full matrix (all dofs), used for the total-field/scattered-field sources.
    seconds : dict
        Wall-clock seconds of ``assemble`` and ``factor``.
    """

    period: float
    k0: float
    space: Space
    A: object = field(repr=False)
    lu: object = field(repr=False)
    perm: object = field(repr=False)
    seconds: dict = field(default_factory=dict)
    fill: int = 0

    @classmethod
    def build(cls, space, period, depth, h0, g=9.81, ordering="metis"):
        r"""Assemble and factorise the mild-slope system at one period.

        Parameters
        ----------
        space : Space
        period : float
            Wave period T (s).
        depth : callable
            ``depth(x, y)`` -> still-water depth (m) at arrays of points; it must equal
            ``h0`` outside the total-field region and in the layer.
        h0 : float
            Depth of the exterior (m).
        g : float
            Gravity (m/s^2).
        ordering : {"metis", "mmd"}
            Fill-reducing ordering: nested dissection (METIS) applied symmetrically,
            then SuperLU with its natural order; or SuperLU's own minimum degree on
            A^T + A.

        Returns
        -------
        FrequencySolver

        Notes
        -----
        Weak form, with p = c c_g / (c c_g)_0 and the layer's stretching s_x, s_y:

        .. math::

            \int \left(p\frac{s_y}{s_x}\partial_x\eta\,\partial_x v
            + p\frac{s_x}{s_y}\partial_y\eta\,\partial_y v - k^2 p s_x s_y \eta v\right)
            - \oint i k \alpha\, p\, s_t \eta v \,ds = 0,

        the mild-slope equation of Berkhoff (1972) divided by the exterior's
        (c c_g)_0 (so that it is the Helmholtz equation of today's solver at constant
        depth) with the partially reflecting condition of :func:`robin_alpha` on the
        walls (s_t: stretching along the wall, 1 outside the layer), and eta = 0 on
        the outer edge.

        References
        ----------
        Berkhoff, J. C. W. (1972). Computation of combined refraction-diffraction.
        Proc. 13th International Conference on Coastal Engineering, ASCE, 471-490.

        Karypis, G. and Kumar, V. (1998). A fast and high quality multilevel scheme for
        partitioning irregular graphs. SIAM Journal on Scientific Computing 20(1),
        359-392.
        """
        import time

        from skfem import BilinearForm, FacetBasis, asm

        t0 = time.perf_counter()
        lay = space.layer
        x0, y0, x1, y1 = lay.inner
        xq = space.xq
        hq = depth(xq[0], xq[1])
        kq, pq, k0 = _coefficients(period, hq, h0, g)
        sx = lay.stretch(xq[0], x0, x1, k0)
        sy = lay.stretch(xq[1], y0, y1, k0)

        @BilinearForm(dtype=np.complex128)
        def mildslope(u, v, w):
            return (w.cxx * u.grad[0] * v.grad[0] + w.cyy * u.grad[1] * v.grad[1]
                    - w.cm * u * v)

        A = asm(mildslope, space.basis, cxx=pq * sy / sx, cyy=pq * sx / sy,
                cm=kq ** 2 * pq * sx * sy)
        absorbing = space.wall_kr < 1.0
        if np.any(absorbing):
            fb = FacetBasis(space.skmesh, space.elem, facets=space.wall_facets[absorbing])
            xf = np.asarray(fb.global_coordinates())
            kf, pf, _ = _coefficients(period, depth(xf[0], xf[1]), h0, g)
            nx, ny = space.wall_normal[:, absorbing]
            fsx = lay.stretch(xf[0], x0, x1, k0)
            fsy = lay.stretch(xf[1], y0, y1, k0)
            st = fsx * ny[:, None] ** 2 + fsy * nx[:, None] ** 2
            al = (robin_alpha(space.wall_kr[absorbing])
                  * space.wall_factor[absorbing])[:, None]

            @BilinearForm(dtype=np.complex128)
            def robin(u, v, w):
                return w.c * u * v

            A = A + asm(robin, fb, c=-1j * kf * al * pf * st)
        A = A.tocsr()
        t1 = time.perf_counter()
        f = space.free
        Aff = A[f][:, f].tocsc()
        perm = space.ordering(Aff) if ordering == "metis" else None
        with _one_blas_thread():
            if perm is not None:
                Ap = Aff[perm][:, perm].tocsc()
                lu = splu(Ap, permc_spec="NATURAL", diag_pivot_thresh=0.0,
                          options={"SymmetricMode": True})
            else:
                lu = splu(Aff, permc_spec="MMD_AT_PLUS_A", diag_pivot_thresh=0.01,
                          options={"SymmetricMode": True})
        t2 = time.perf_counter()
        out = cls(period=float(period), k0=k0, space=space, A=A, lu=lu, perm=perm,
                  seconds={"assemble": t1 - t0, "factor": t2 - t1},
                  fill=int(lu.L.nnz + lu.U.nnz))
        out._Aff = Aff
        return out

    def solve(self, rhs):
        """Solve for right-hand sides over all dofs (N,) or (N, m); zero on the edge."""
        rhs = np.asarray(rhs, complex)
        one = rhs.ndim == 1
        R = rhs.reshape(self.space.N, -1)
        f = self.space.free
        b = R[f]
        with _one_blas_thread():
            if self.perm is not None:
                x = np.empty_like(b)
                x[self.perm] = self.lu.solve(np.ascontiguousarray(b[self.perm]))
            else:
                x = self.lu.solve(np.ascontiguousarray(b))
            res = np.linalg.norm(self._Aff @ x - b)
            if res > 1e-8 * max(np.linalg.norm(b), 1e-300):
                # diagonal pivots were poor: refactor with partial pivoting
                x = splu(self._Aff, permc_spec="COLAMD").solve(np.ascontiguousarray(b))
        out = np.zeros_like(R)
        out[f] = x
        return out[:, 0] if one else out

    def total_field_sources(self, background, inside):
        r"""Right-hand sides of the total-field / scattered-field split.

        Parameters
        ----------
        background : numpy.ndarray, shape (N,) or (N, m)
            The background wave at the dofs (only its values next to the interface are
            used).
        inside : numpy.ndarray of bool, shape (N,)
            True for dofs whose unknown is the total field; elsewhere the unknown is the
            scattered field (total minus background).

        Returns
        -------
        numpy.ndarray
            The right-hand sides, shape of ``background``.

        Notes
        -----
        Rows inside: :math:`A_{II}\eta_I + A_{IE}w_E = -A_{IE} b_E`; rows outside:
        :math:`A_{EI}\eta_I + A_{EE} w_E = A_{EI} b_I`, so that the total field satisfies
        the equations inside and the scattered field outside, where the background
        solves them (constant depth, straight coast).
        """
        B = np.asarray(background, complex)
        one = B.ndim == 1
        B = B.reshape(self.space.N, -1)
        ins = inside[:, None]
        r_in = -(self.A @ np.where(ins, 0.0, B))
        r_out = self.A @ np.where(ins, B, 0.0)
        r = np.where(ins, r_in, r_out)
        return r[:, 0] if one else r
