"""Triangle meshes of a rectangle cut by thin barriers (slits), for the field solver.

The mesh is a Delaunay triangulation (scipy.spatial) of a near-equilateral lattice of
spacing ``h`` plus nodes placed along every barrier. The barrier sub-edges are made Gabriel
edges (no other node inside the circle on the sub-edge as diameter), which guarantees that
they are edges of the Delaunay triangulation, so the mesh conforms to the barrier lines
without a constrained mesher. The nodes along each barrier are then duplicated, one copy
per side, so that the two faces of the barrier carry independent values; a free tip keeps a
single node because the field is continuous around it.

Geometry only: no waves here.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import shapely
from scipy.sparse import coo_matrix
from scipy.sparse.csgraph import connected_components
from scipy.spatial import Delaunay, cKDTree


@dataclass
class SlitMesh:
    """A triangulation with slits.

    Attributes
    ----------
    points : numpy.ndarray, shape (2, n_nodes)
        Node coordinates (m), with the barrier nodes duplicated (one per side).
    triangles : numpy.ndarray, shape (3, n_triangles)
        Node indices of each triangle (into ``points``).
    delaunay : scipy.spatial.Delaunay
        The triangulation before the duplication; its simplices are ``triangles`` in the
        same order, so ``delaunay.find_simplex`` locates points in the slit mesh.
    box : tuple of float
        (xmin, ymin, xmax, ymax) of the meshed rectangle (m).
    segments : numpy.ndarray, shape (m, 2, 2)
        The barrier sub-edges as coordinate pairs (m).
    """

    points: np.ndarray
    triangles: np.ndarray
    delaunay: Delaunay
    box: tuple
    segments: np.ndarray


def _point_segment_distance(p, a, b):
    """Distance (m) from points ``p`` (n, 2) to the segment ``a``-``b``."""
    d = b - a
    L2 = float(d @ d)
    t = np.clip(((p - a) @ d) / L2, 0.0, 1.0) if L2 > 0 else np.zeros(len(p))
    q = a + t[:, None] * d
    return np.hypot(p[:, 0] - q[:, 0], p[:, 1] - q[:, 1])


def _lattice(box, h):
    """Near-equilateral lattice strictly inside ``box`` plus nodes on its boundary."""
    x0, y0, x1, y1 = box
    dy = h * np.sqrt(3.0) / 2.0
    ny = max(int(np.ceil((y1 - y0) / dy)), 1)
    ys = np.linspace(y0, y1, ny + 1)
    nx = max(int(np.ceil((x1 - x0) / h)), 1)
    hx = (x1 - x0) / nx
    xs = x0 + hx * np.arange(nx + 1)
    X, Y = np.meshgrid(xs, ys)
    X = X + 0.5 * hx * (np.arange(ny + 1)[:, None] % 2)
    P = np.column_stack([X.ravel(), Y.ravel()])
    # Interior lattice nodes too close to the boundary would make slivers there.
    keep = ((P[:, 0] > x0 + 0.45 * hx) & (P[:, 0] < x1 - 0.45 * hx)
            & (P[:, 1] > y0 + 0.45 * dy) & (P[:, 1] < y1 - 0.45 * dy))
    P = P[keep]
    bx = np.linspace(x0, x1, nx + 1)
    by = np.linspace(y0, y1, max(int(np.ceil((y1 - y0) / h)), 1) + 1)[1:-1]
    B = np.concatenate([
        np.column_stack([bx, np.full_like(bx, y0)]),
        np.column_stack([bx, np.full_like(bx, y1)]),
        np.column_stack([np.full_like(by, x0), by]),
        np.column_stack([np.full_like(by, x1), by]),
    ])
    return np.concatenate([B, P])


def _barrier_pieces(barriers, box):
    """Clip the barriers to ``box`` and node them where they cross; return straight pieces."""
    x0, y0, x1, y1 = box
    lines = [shapely.LineString(np.asarray(b, float)) for b in barriers]
    clipped = shapely.intersection(shapely.MultiLineString([list(l.coords) for l in lines]),
                                   shapely.box(x0, y0, x1, y1))
    noded = shapely.node(clipped)  # splits at every crossing, so junctions become nodes
    pieces = []
    for g in shapely.get_parts(noded):
        c = np.asarray(g.coords)
        for a, b in zip(c[:-1], c[1:]):
            if np.hypot(*(b - a)) > 0:
                pieces.append((a, b))
    return pieces


def _subdivide(pieces, size, scale):
    """Barrier nodes (unique) and constrained edges (index pairs).

    ``size(p)`` is the wanted edge length (m) at points ``p`` (n, 2); each straight piece
    is cut so that its edges follow it.
    """
    pts, edges = [], []
    for a, b in pieces:
        length = np.hypot(*(b - a))
        # Place nodes at equal steps of the integral of 1/size along the piece.
        s_f = np.linspace(0.0, 1.0, 401)
        inv = 1.0 / size(a + s_f[:, None] * (b - a))
        cum = np.concatenate([[0.0], np.cumsum(0.5 * (inv[1:] + inv[:-1]) * np.diff(s_f))])
        cum *= length
        n = max(int(np.ceil(cum[-1] - 1e-9)), 1)
        t = np.interp(np.linspace(0.0, cum[-1], n + 1), cum, s_f)
        q = a + t[:, None] * (b - a)
        base = sum(len(p) for p in pts)
        pts.append(q)
        edges.append(np.column_stack([base + np.arange(n), base + np.arange(1, n + 1)]))
    P = np.concatenate(pts)
    E = np.concatenate(edges)
    # Pieces share end nodes (polyline vertices, crossings): merge coincident nodes.
    tree = cKDTree(P)
    pairs = tree.query_pairs(1e-9 * scale, output_type="ndarray")
    n = len(P)
    g = coo_matrix((np.ones(len(pairs)), (pairs[:, 0], pairs[:, 1])), shape=(n, n))
    _, lab = connected_components(g, directed=False)
    first = np.full(lab.max() + 1, -1)
    first[lab[::-1]] = np.arange(n)[::-1]
    U = P[first]
    E = lab[E]
    E = np.sort(E, axis=1)
    E = np.unique(E[E[:, 0] != E[:, 1]], axis=0)
    return U, E


def _free_tips(pieces, inner, h, scale):
    """End points of the barrier network that belong to one piece only (free heads)."""
    ends = np.array([p for ab in pieces for p in ab])
    tree = cKDTree(ends)
    cnt = np.array([len(v) for v in tree.query_ball_point(ends, 1e-9 * scale)])
    tips = ends[cnt == 1]
    x0, y0, x1, y1 = inner
    # Ends cut off at the edge of the mesh lie in the absorbing layer: no grading there.
    away = ((tips[:, 0] > x0 + 0.5 * h) & (tips[:, 0] < x1 - 0.5 * h)
            & (tips[:, 1] > y0 + 0.5 * h) & (tips[:, 1] < y1 - 0.5 * h))
    return tips[away]


def _tip_rings(tips, h, radius, finest):
    """Rings of nodes around each tip, spacing growing from ``finest`` to ``h``."""
    out = []
    r = 0.5 * finest
    radii = []
    while r < radius:
        radii.append(r)
        r += max(finest, h * r / radius)
    for tip in tips:
        for r in radii:
            hl = max(finest, h * r / radius)
            n = max(int(np.ceil(2 * np.pi * r / hl)), 6)
            ang = 2 * np.pi * (np.arange(n) + 0.5 * (len(out) % 2)) / n
            out.append(np.column_stack([tip[0] + r * np.cos(ang), tip[1] + r * np.sin(ang)]))
    return np.concatenate(out) if out else np.zeros((0, 2))


def _edge_keys(a, b, n):
    lo, hi = np.minimum(a, b), np.maximum(a, b)
    return lo.astype(np.int64) * n + hi


def build(barriers, box, h, grade=True, grade_radius=4.0, grade_finest=0.1,
          max_splits=30):
    """Mesh ``box`` with node spacing about ``h``, conforming to and slit along ``barriers``.

    Parameters
    ----------
    barriers : list of array_like, each (n_i, 2)
        Barrier polylines (m). Parts outside ``box`` shrunk by ``h`` are dropped, so a
        barrier that runs out of the box ends just inside it.
    box : tuple of float
        (xmin, ymin, xmax, ymax) of the rectangle to mesh (m).
    h : float
        Target edge length (m).
    grade : bool
        Refine towards the free tips of the barriers, where the field has its
        square-root singularity: the edge length falls linearly from ``h`` at
        ``grade_radius * h`` from a tip to ``grade_finest * h`` at the tip.

    Returns
    -------
    SlitMesh
    """
    x0, y0, x1, y1 = box
    scale = max(x1 - x0, y1 - y0)
    inner = (x0 + h, y0 + h, x1 - h, y1 - h)
    pieces = _barrier_pieces(barriers, inner)
    lattice = _lattice(box, h)
    if pieces:
        tips = _free_tips(pieces, inner, h, scale) if grade else np.zeros((0, 2))
        radius = grade_radius * h
        finest = grade_finest * h
        if len(tips):
            tip_tree = cKDTree(tips)

            def size(p):
                dist = tip_tree.query(p)[0]
                return h * np.clip(dist / radius, grade_finest, 1.0)

            rings = _tip_rings(tips, h, radius, finest)
            own = np.repeat(np.arange(len(tips)), len(rings) // len(tips))
            which = tip_tree.query(rings)[1]
            # Where the rings of two tips overlap keep each node only near its own tip.
            rings = rings[which == own]
            lattice = lattice[tip_tree.query(lattice)[0] > radius + 0.3 * h]
            lattice = np.concatenate([lattice, rings])
        else:
            def size(p):
                return np.full(len(p), h)
        near = np.zeros(len(lattice), bool)
        loc = size(lattice)
        for a, b in pieces:
            # Slightly more than half the local edge length keeps every node out of the
            # diametral circles of the barrier sub-edges, so those sub-edges are Gabriel
            # edges and hence Delaunay edges.
            near |= _point_segment_distance(lattice, a, b) < 0.55 * loc
        lattice = lattice[~near]
        bnodes, bedges = _subdivide(pieces, size, scale)
    else:
        bnodes, bedges = np.zeros((0, 2)), np.zeros((0, 2), int)

    for _ in range(max_splits):
        P = np.concatenate([bnodes, lattice])
        tri = Delaunay(P)
        T = tri.simplices
        n = len(P)
        have = np.unique(np.concatenate([_edge_keys(T[:, i], T[:, (i + 1) % 3], n)
                                         for i in range(3)]))
        ek = _edge_keys(bedges[:, 0], bedges[:, 1], n)
        missing = ~np.isin(ek, have)
        if not missing.any():
            break
        # A sub-edge is missing when another barrier node lies in its diametral circle
        # (sharp polyline corners, barriers close together): split it and mesh again.
        bad = bedges[missing]
        mid = 0.5 * (bnodes[bad[:, 0]] + bnodes[bad[:, 1]])
        m0 = len(bnodes)
        bnodes = np.concatenate([bnodes, mid])
        new = np.arange(m0, m0 + len(bad))
        bedges = np.concatenate([bedges[~missing],
                                 np.column_stack([bad[:, 0], new]),
                                 np.column_stack([new, bad[:, 1]])])
    else:
        raise RuntimeError("could not make the mesh conform to the barriers "
                           "(barriers too close together for the mesh spacing)")

    T = tri.simplices
    n = len(P)
    # Orient triangles counter-clockwise.
    a, b, c = P[T[:, 0]], P[T[:, 1]], P[T[:, 2]]
    cw = ((b[:, 0] - a[:, 0]) * (c[:, 1] - a[:, 1])
          - (b[:, 1] - a[:, 1]) * (c[:, 0] - a[:, 0])) < 0
    T = T.copy()
    T[cw, 1], T[cw, 2] = T[cw, 2], T[cw, 1].copy()

    points, triangles = split_slits(P, T, bedges)
    segments = np.stack([bnodes[bedges[:, 0]], bnodes[bedges[:, 1]]], axis=1)
    return SlitMesh(points=points, triangles=triangles, delaunay=tri, box=tuple(box),
                    segments=segments)


def split_slits(P, T, bedges):
    """Duplicate the nodes along constrained edges so that each side has its own copy.

    Parameters
    ----------
    P : numpy.ndarray, shape (n, 2)
        Node coordinates (m).
    T : numpy.ndarray, shape (nt, 3)
        Counter-clockwise triangles (node indices), a conforming triangulation in which
        every row of ``bedges`` is an edge.
    bedges : numpy.ndarray, shape (m, 2)
        The slit edges (node index pairs).

    Returns
    -------
    points : numpy.ndarray, shape (2, n_new)
    triangles : numpy.ndarray, shape (3, nt)
        Same triangles in the same order, indexing ``points``.

    Notes
    -----
    Each triangle corner is a graph vertex; two corners at the same node are joined when
    their triangles share an edge through that node that is not a slit edge. The
    connected components are the new nodes: a node off the slits keeps one component, a
    node inside a slit gets one per side, a free tip (one slit edge) keeps one.
    """
    n = len(P)
    nt = len(T)
    corner = np.arange(3 * nt).reshape(nt, 3)
    # For each triangle edge (i, i+1) record both corners it touches.
    ea = np.concatenate([T[:, i] for i in range(3)])
    eb = np.concatenate([T[:, (i + 1) % 3] for i in range(3)])
    ca = np.concatenate([corner[:, i] for i in range(3)])
    cb = np.concatenate([corner[:, (i + 1) % 3] for i in range(3)])
    key = _edge_keys(ea, eb, n)
    constrained = np.isin(key, _edge_keys(bedges[:, 0], bedges[:, 1], n))
    order = np.argsort(key, kind="stable")
    ks = key[order]
    same = np.flatnonzero(ks[1:] == ks[:-1])  # interior edges appear twice
    i1, i2 = order[same], order[same + 1]
    free = ~constrained[i1]
    i1, i2 = i1[free], i2[free]
    # Match corners at the same node: edge (p, q) in one triangle is (q, p) in the other.
    same_dir = ea[i1] == ea[i2]
    r1 = np.concatenate([ca[i1], cb[i1]])
    r2 = np.concatenate([np.where(same_dir, ca[i2], cb[i2]),
                         np.where(same_dir, cb[i2], ca[i2])])
    g = coo_matrix((np.ones(len(r1)), (r1, r2)), shape=(3 * nt, 3 * nt))
    ncomp, lab = connected_components(g, directed=False)
    old = np.empty(ncomp, int)
    old[lab] = T.ravel()
    points = P[old].T.copy()
    triangles = lab.reshape(nt, 3).T.copy()
    return points, triangles
