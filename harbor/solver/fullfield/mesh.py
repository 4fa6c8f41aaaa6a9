"""Quality triangle meshes of the water, with holes for land and slits for thin arms.

Geometry only: the element size comes in as a function of position; no waves here.
The mesher is Shewchuk's Triangle (the ``triangle`` package: constrained conforming
Delaunay triangulation with a minimum-angle bound), refined until every triangle is no
larger than the wanted size at its centroid. Thin arms are constrained segments whose
nodes are then duplicated, one copy per face (:func:`harbor.solver._mesh.split_slits`).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import shapely
from scipy.sparse import coo_matrix
from scipy.sparse.csgraph import connected_components
from scipy.spatial import cKDTree

from harbor.solver._mesh import split_slits

#: Minimum angle of the triangles (degrees): Triangle's quality bound.
MIN_ANGLE = 28.0


@dataclass
class WaterMesh:
    """A triangle mesh of the water.

    Attributes
    ----------
    points : numpy.ndarray, shape (2, n_nodes)
        Node coordinates (m); nodes on slits are duplicated, one per face.
    triangles : numpy.ndarray, shape (3, n_triangles)
        Counter-clockwise triangles (indices into ``points``).
    vertices : numpy.ndarray, shape (n_vertices, 2)
        Nodes before the duplication (m).
    vtriangles : numpy.ndarray, shape (n_triangles, 3)
        The same triangles over ``vertices`` (used to locate points).
    slit_edges : numpy.ndarray, shape (m, 2, 2)
        The slit edges as coordinate pairs (m).
    """

    points: np.ndarray
    triangles: np.ndarray
    vertices: np.ndarray
    vtriangles: np.ndarray
    slit_edges: np.ndarray

    _finder: object = None

    def locate(self, x, y):
        """Index of the triangle containing each point (-1 outside the water)."""
        x = np.asarray(x, float).ravel()
        y = np.asarray(y, float).ravel()
        out = np.full(x.size, -1, np.int64)
        if x.size == 0:
            return out
        V, T = self.vertices, self.vtriangles
        if self._finder is None:
            self._finder = cKDTree(V[T].mean(axis=1))
        k = min(12, len(T))
        _, cand = self._finder.query(np.column_stack([x, y]), k)
        cand = cand.reshape(x.size, -1)
        a, b, c = V[T[cand, 0]], V[T[cand, 1]], V[T[cand, 2]]
        det = ((b[..., 0] - a[..., 0]) * (c[..., 1] - a[..., 1])
               - (b[..., 1] - a[..., 1]) * (c[..., 0] - a[..., 0]))
        px, py = x[:, None] - a[..., 0], y[:, None] - a[..., 1]
        l1 = (px * (c[..., 1] - a[..., 1]) - py * (c[..., 0] - a[..., 0])) / det
        l2 = (py * (b[..., 0] - a[..., 0]) - px * (b[..., 1] - a[..., 1])) / det
        tol = 1e-10
        ok = (l1 >= -tol) & (l2 >= -tol) & (1 - l1 - l2 >= -tol)
        hit = ok.any(axis=1)
        out[hit] = cand[hit, np.argmax(ok[hit], axis=1)]
        miss = np.flatnonzero(~hit)
        if miss.size:  # rare (large graded triangles): exact search for those points
            from matplotlib.tri import Triangulation

            f = Triangulation(V[:, 0], V[:, 1], T).get_trifinder()
            out[miss] = np.asarray(f(x[miss], y[miss]))
        return out


def _densify(coords, size):
    """Split a closed or open coordinate run so no piece is longer than ``size`` there."""
    a, b = coords[:-1], coords[1:]
    mid = 0.5 * (a + b)
    n = np.maximum(np.ceil(np.hypot(*(b - a).T) / size(mid) - 1e-9), 1).astype(int)
    out = [a[i] + (b[i] - a[i]) * (np.arange(n[i])[:, None] / n[i]) for i in range(len(a))]
    out.append(coords[-1:])
    return np.concatenate(out)


def _rings(poly):
    g = shapely.get_parts(poly)
    for p in g:
        if p.is_empty:
            continue
        yield np.asarray(p.exterior.coords)
        for r in p.interiors:
            yield np.asarray(r.coords)


def _merge(P, E, tol):
    """Merge coincident vertices; return unique vertices and the re-indexed edges."""
    tree = cKDTree(P)
    pairs = tree.query_pairs(tol, output_type="ndarray")
    n = len(P)
    g = coo_matrix((np.ones(len(pairs)), (pairs[:, 0], pairs[:, 1])), shape=(n, n))
    _, lab = connected_components(g, directed=False)
    first = np.full(lab.max() + 1, -1)
    first[lab[::-1]] = np.arange(n)[::-1]
    E = lab[E]
    keep = E[:, 0] != E[:, 1]
    return P[first], E[keep], keep


def build(water, slits, size, max_rounds=6):
    """Mesh the water polygon with elements of the wanted size, slit along thin walls.

    Parameters
    ----------
    water : shapely.Polygon or MultiPolygon
        The water (m); its holes are land or structure footprints.
    slits : list of numpy.ndarray, each (n_i, 2)
        Thin walls inside the water (m): polylines whose two faces are independent.
    size : callable
        ``size(p)`` -> wanted edge length (m) at points ``p`` (n, 2).
    max_rounds : int
        Refinement rounds after the first mesh.

    Returns
    -------
    WaterMesh

    Notes
    -----
    Boundaries and slits are first cut into pieces no longer than the local size, then
    triangulated with a minimum angle of :data:`MIN_ANGLE` degrees and refined (Triangle
    switches ``r``, ``q``, ``a`` with a per-triangle area bound) until no triangle
    exceeds the area of an equilateral triangle of the wanted edge at its centroid.

    References
    ----------
    Shewchuk, J. R. (1996). Triangle: engineering a 2D quality mesh generator and
    Delaunay triangulator. In *Applied Computational Geometry* (LNCS 1148), Springer,
    203-222.
    """
    import triangle

    bounds = water.bounds
    scale = max(bounds[2] - bounds[0], bounds[3] - bounds[1])
    P, E, M = [], [], []
    base = 0
    rings = [shapely.LineString(r) for r in _rings(water)]
    slit_lines = [shapely.LineString(np.asarray(q, float)) for q in slits]
    if slit_lines and rings:
        # a slit clipped at a shore ends on the shore only to rounding: put that end on
        # the ring as a vertex of both, or the mesher meets a gap of 1e-12 m and runs
        # out of precision
        ends = shapely.MultiPoint(np.concatenate([np.asarray(g.coords)[[0, -1]]
                                                  for g in slit_lines]))
        snap_tol = 1e-6 * scale
        rings = [shapely.snap(g, ends, snap_tol) for g in rings]
        allring = shapely.MultiLineString([np.asarray(g.coords) for g in rings])
        slit_lines = [shapely.snap(g, allring, snap_tol) for g in slit_lines]
    # node everything where it crosses or touches (an arm rooted on a shore ends on the
    # shore's edge), so that the mesher sees no T-junctions
    noded = shapely.get_parts(shapely.node(shapely.MultiLineString(
        [np.asarray(g.coords) for g in rings + slit_lines])))
    ring_ml = shapely.MultiLineString([np.asarray(g.coords) for g in rings])
    slit_ml = shapely.MultiLineString([np.asarray(g.coords) for g in slit_lines]) \
        if slit_lines else None
    tol = 1e-9 * scale
    for g in noded:
        c = np.asarray(g.coords)
        if len(c) < 2:
            continue
        mid = shapely.Point(0.5 * (c[0] + c[1]))
        is_slit = (slit_ml is not None and shapely.distance(mid, slit_ml) < tol
                   and shapely.distance(mid, ring_ml) > tol)
        q = _densify(c, size)
        n = len(q)
        P.append(q)
        E.append(np.column_stack([base + np.arange(n - 1), base + np.arange(1, n)]))
        M.append(np.full(n - 1, 2 if is_slit else 1))
        base += n
    P = np.concatenate(P)
    E = np.concatenate(E)
    M = np.concatenate(M)
    P, E, keep = _merge(P, E, 1e-9 * scale)
    M = M[keep]
    holes = []
    box = shapely.box(*bounds).buffer(1e-6 * scale)
    for part in shapely.get_parts(shapely.difference(box, water)):
        if part.area > 0:
            holes.append(np.asarray(part.representative_point().coords)[0])
    tri_in = dict(vertices=P, segments=E, segment_markers=M)
    if holes:
        tri_in["holes"] = np.array(holes)
    area0 = np.sqrt(3.0) / 4.0 * float(np.min(size(P))) ** 2
    hmax = float(np.max(size(P)))
    out = triangle.triangulate(tri_in, f"pq{MIN_ANGLE}a{np.sqrt(3) / 4 * hmax ** 2:.12g}")
    for _ in range(max_rounds):
        V, T = out["vertices"], out["triangles"]
        cen = V[T].mean(axis=1)
        want = np.sqrt(3.0) / 4.0 * size(cen) ** 2
        a = V[T]
        area = 0.5 * np.abs((a[:, 1, 0] - a[:, 0, 0]) * (a[:, 2, 1] - a[:, 0, 1])
                            - (a[:, 1, 1] - a[:, 0, 1]) * (a[:, 2, 0] - a[:, 0, 0]))
        if np.all(area <= 1.25 * want):
            break
        out = triangle.triangulate(dict(vertices=V, triangles=T, segments=out["segments"],
                                        segment_markers=out["segment_markers"],
                                        triangle_max_area=np.maximum(want, 0.25 * area0)),
                                   f"rpq{MIN_ANGLE}")
    V = np.asarray(out["vertices"], float)
    T = np.asarray(out["triangles"], np.int64)
    S = np.asarray(out["segments"], np.int64)
    SM = np.asarray(out["segment_markers"]).ravel()
    a, b, c = V[T[:, 0]], V[T[:, 1]], V[T[:, 2]]
    cw = ((b[:, 0] - a[:, 0]) * (c[:, 1] - a[:, 1])
          - (b[:, 1] - a[:, 1]) * (c[:, 0] - a[:, 0])) < 0
    T = T.copy()
    T[cw, 1], T[cw, 2] = T[cw, 2], T[cw, 1].copy()
    slit = S[SM == 2]
    if len(slit):
        points, triangles = split_slits(V, T, slit)
    else:
        points, triangles = V.T.copy(), T.T.copy()
    return WaterMesh(points=points, triangles=triangles, vertices=V, vtriangles=T,
                     slit_edges=np.stack([V[slit[:, 0]], V[slit[:, 1]]], axis=1)
                     if len(slit) else np.zeros((0, 2, 2)))
