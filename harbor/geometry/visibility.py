"""Line-of-sight tests against the layout's obstacles (pure geometry, vectorised).

Obstacles are straight segments: every segment of every arm and every edge of every land
polygon. The tests answer "does this ray or segment cross an obstacle?" for many points at
once; they know nothing of waves (a direction is just a unit vector).
"""

from __future__ import annotations

import numpy as np

_EPS = 1e-9


def layout_segments(layout, include_land=True):
    """All obstacle segments of a layout.

    Parameters
    ----------
    layout : harbor.geometry.layout.Layout
    include_land : bool
        Include the edges of land polygons (exterior and holes).

    Returns
    -------
    segments : numpy.ndarray, shape (m, 2, 2)
        ``segments[i] = [[xa, ya], [xb, yb]]`` (m).
    owner : list of str
        For each segment, ``"arm:<index>"`` or ``"land:<index>"``.
    open_ends : numpy.ndarray of bool, shape (m, 2)
        True where the segment's start / end is a free head: a ray that just touches a
        free head passes (it is on the head's shadow boundary), while a ray through a
        joint of a polyline or a rooted end is blocked.
    """
    segs, owner, opens = [], [], []
    for i, arm in enumerate(layout.arms):
        p = np.asarray(arm.line, float)
        n = len(p) - 1
        for j, (a, b) in enumerate(zip(p[:-1], p[1:])):
            segs.append((a, b))
            owner.append(f"arm:{i}")
            opens.append((j == 0 and not arm.rooted_start, j == n - 1 and not arm.rooted_end))
    if include_land:
        for i, land in enumerate(layout.lands):
            rings = [land.outline.exterior, *land.outline.interiors]
            for ring in rings:
                c = np.asarray(ring.coords, float)
                for a, b in zip(c[:-1], c[1:]):
                    segs.append((a, b))
                    owner.append(f"land:{i}")
                    opens.append((False, False))
    if not segs:
        return np.zeros((0, 2, 2)), owner, np.zeros((0, 2), bool)
    return np.array(segs, float), owner, np.array(opens, bool)


def _cross(ax, ay, bx, by):
    return ax * by - ay * bx


def ray_blocked(px, py, direction, segments, skip=None, open_ends=None):
    """True where the ray from each point in ``direction`` crosses any segment.

    Parameters
    ----------
    px, py : numpy.ndarray
        Ray origins (m), same shape.
    direction : array_like, shape (2,)
        Unit vector of the ray.
    segments : numpy.ndarray, shape (m, 2, 2)
        Obstacles.
    skip : array_like of bool, shape (m,), optional
        Segments to ignore.
    open_ends : array_like of bool, shape (m, 2), optional
        Segment ends that a ray may graze without being blocked (free heads).

    Returns
    -------
    numpy.ndarray of bool, shape of ``px``

    Notes
    -----
    A crossing at the ray's origin (within 1e-9 of the layout scale) does not count, so
    a ray that starts on an obstacle (a breakwater head) is not blocked by it.
    """
    vx, vy = float(direction[0]), float(direction[1])
    blocked = np.zeros(np.shape(px), bool)
    scale = _scale(segments)
    for i, ((ax, ay), (bx, by)) in enumerate(segments):
        if skip is not None and skip[i]:
            continue
        ex, ey = bx - ax, by - ay
        den = _cross(vx, vy, ex, ey)
        if abs(den) < 1e-14 * np.hypot(ex, ey):
            continue
        wx, wy = ax - px, ay - py
        t = _cross(wx, wy, ex, ey) / den
        s = _cross(wx, wy, vx, vy) / den
        lo = (s > _EPS) if (open_ends is not None and open_ends[i, 0]) else (s >= -_EPS)
        hi = (s < 1 - _EPS) if (open_ends is not None and open_ends[i, 1]) else (s <= 1 + _EPS)
        blocked |= (t > _EPS * scale) & lo & hi
    return blocked


def segment_blocked(px, py, qx, qy, segments, skip=None):
    """True where the straight path from P to Q crosses any segment (endpoints excluded).

    Parameters
    ----------
    px, py : numpy.ndarray
        Start points (m).
    qx, qy : float or numpy.ndarray
        End points (m), broadcast against P.
    segments : numpy.ndarray, shape (m, 2, 2)
    skip : array_like of bool, optional
        Segments to ignore.

    Returns
    -------
    numpy.ndarray of bool
    """
    px, py, qx, qy = np.broadcast_arrays(px, py, qx, qy)
    dx, dy = qx - px, qy - py
    blocked = np.zeros(px.shape, bool)
    for i, ((ax, ay), (bx, by)) in enumerate(segments):
        if skip is not None and skip[i]:
            continue
        ex, ey = bx - ax, by - ay
        den = _cross(dx, dy, ex, ey)
        ok = np.abs(den) > 1e-14 * np.hypot(ex, ey) * (np.hypot(dx, dy) + 1e-300)
        wx, wy = ax - px, ay - py
        with np.errstate(divide="ignore", invalid="ignore"):
            t = _cross(wx, wy, ex, ey) / den
            s = _cross(wx, wy, dx, dy) / den
        blocked |= ok & (t > _EPS) & (t < 1 - _EPS) & (s >= -_EPS) & (s <= 1 + _EPS)
    return blocked


def _scale(segments):
    if len(segments) == 0:
        return 1.0
    return float(np.max(np.abs(segments))) or 1.0


def inside_land(px, py, layout):
    """True where a point lies inside (or on the boundary of) any land polygon."""
    import shapely

    inside = np.zeros(np.shape(px), bool)
    for land in layout.lands:
        inside |= shapely.intersects_xy(land.outline, px, py)
    return inside


def distance_to_arms(px, py, layout):
    """Shortest distance (m) from each point to any arm."""
    return distance_to_lines(px, py, [arm.line for arm in layout.arms])


def distance_to_lines(px, py, lines):
    """Shortest distance from each point to any of some polylines (same units).

    Parameters
    ----------
    px, py : numpy.ndarray
        Points, broadcastable.
    lines : sequence of array_like
        Polylines, each (n, 2) with n >= 1.

    Returns
    -------
    numpy.ndarray
        Distances, inf when there is no line.
    """
    px = np.asarray(px, float)
    py = np.asarray(py, float)
    d2 = np.full(np.broadcast(px, py).shape, np.inf)
    # point-segment distances in numpy: building a shapely point per grid node costs more
    # than the distances themselves
    for line in lines:
        line = np.asarray(line, float).reshape(-1, 2)
        if line.shape[0] == 1:
            line = np.vstack([line, line])
        for (ax, ay), (bx, by) in zip(line[:-1], line[1:]):
            ex, ey = bx - ax, by - ay
            ee = ex * ex + ey * ey
            t = ((px - ax) * ex + (py - ay) * ey) / ee if ee > 0 else np.zeros_like(d2)
            t = np.clip(t, 0.0, 1.0)
            d2 = np.minimum(d2, (px - ax - t * ex) ** 2 + (py - ay - t * ey) ** 2)
    return np.sqrt(d2)


def diffracting_edges(layout):
    """Points of the arms that can diffract: every free head and every interior vertex.

    Parameters
    ----------
    layout : harbor.geometry.layout.Layout

    Returns
    -------
    list of (numpy.ndarray, tuple of numpy.ndarray)
        ``(vertex, directions)``: the vertex (m) and the unit vectors from it along its
        adjacent segments (one for a free head, two for a bend). Whether a bend
        actually diffracts depends on the wave direction (see
        :func:`harbor.solver.layout.general_field`).
    """
    out = []
    for arm in layout.arms:
        p = np.asarray(arm.line, float)
        n = len(p)

        def unit(v):
            return v / np.hypot(*v)

        if not arm.rooted_start:
            out.append((p[0].copy(), (unit(p[1] - p[0]),)))
        for i in range(1, n - 1):
            out.append((p[i].copy(), (unit(p[i - 1] - p[i]), unit(p[i + 1] - p[i]))))
        if not arm.rooted_end:
            out.append((p[-1].copy(), (unit(p[-2] - p[-1]),)))
    return out
