"""Geometry checks of the input: where a point may stand, how two arms may meet, whether an
outline encloses anything.

Geometry only (shapes and coordinates in the work frame, m); the scenario reader and the
command line call these so that each rule lives in one place.
"""

from __future__ import annotations

import numpy as np
import shapely


def layout_tolerance(size: float) -> float:
    """Distance below which two positions of a layout count as the same (m).

    Parameters
    ----------
    size : float
        Largest side of the box around the layout (m).

    Returns
    -------
    float
        max(0.01 m, 1e-6 × size): a centimetre, or the rounding of coordinates of a
        large layout.
    """
    return max(0.01, 1e-6 * float(size))


def point_problem(layout, x: float, y: float, tol: float) -> str | None:
    """Why a point of interest cannot stand at (x, y), or None when it can.

    Parameters
    ----------
    layout : harbor.geometry.layout.Layout
        Arms and land (work frame).
    x, y : float
        The point (m, work frame).
    tol : float
        Distance (m) within which the point counts as on land or on an arm
        (:func:`layout_tolerance`).

    Returns
    -------
    str or None
        ``"lies on land"``, ``"lies on the head of arm 'NAME'"``, ``"lies on a vertex of
        arm 'NAME'"`` or ``"lies on arm 'NAME'"``; None for a point in the water.

    Notes
    -----
    A point on an arm has no wave height of its own: the thin arm has two faces with
    different fields, and at a head the field is singular in its gradient.
    """
    q = shapely.Point(float(x), float(y))
    for land in layout.lands:
        if land.outline.distance(q) <= tol:
            return "lies on land"
    p = np.array([x, y], float)
    for arm in layout.arms:
        line = np.asarray(arm.line, float)
        d = np.hypot(*(line - p).T)
        if d[0] <= tol or d[-1] <= tol:
            return f"lies on the head of arm '{arm.name}'"
        if np.any(d <= tol):
            return f"lies on a vertex of arm '{arm.name}'"
        if shapely.LineString(line).distance(q) <= tol:
            return f"lies on arm '{arm.name}'"
    return None


def _directions_at(line: np.ndarray, p: np.ndarray, tol: float) -> list:
    """Angles (rad) of the directions in which ``line`` leaves point ``p`` (one at an end,
    two at an interior vertex or inside a segment)."""
    out = []
    for a, b in zip(line[:-1], line[1:]):
        ab = b - a
        L2 = float(ab @ ab)
        s = float(np.clip((p - a) @ ab / L2, 0.0, 1.0))
        if np.hypot(*(a + s * ab - p)) > tol:
            continue
        if np.hypot(*(b - p)) > tol:       # the segment leaves p towards b
            out.append(np.arctan2(*(b - p)[::-1]))
        if np.hypot(*(a - p)) > tol:       # ... and towards a
            out.append(np.arctan2(*(a - p)[::-1]))
    # a vertex is reached from two segments: keep distinct directions only
    uniq = []
    for t in out:
        if all(abs(np.angle(np.exp(1j * (t - u)))) > 1e-9 for u in uniq):
            uniq.append(t)
    return uniq


def arms_cross_at(line_a, line_b, p, tol: float) -> bool:
    """Whether two arms that meet at ``p`` cross there (rather than touch).

    Parameters
    ----------
    line_a, line_b : array_like, shape (n, 2)
        The two polylines (m, work frame).
    p : array_like, shape (2,)
        A point both pass through (m).
    tol : float
        Distance (m) within which positions coincide.

    Returns
    -------
    bool
        True when each arm passes from one side of the other to the other side at p.
        Arms that meet at an end, or meet at a corner of each and turn back (two
        breakwaters built against each other: a joint), only touch.

    Notes
    -----
    Around p each arm leaves in one direction (an end) or two (passing through). They
    cross when both pass through and the two directions of one separate the two of the
    other in angle.
    """
    a = np.asarray(line_a, float)
    b = np.asarray(line_b, float)
    p = np.asarray(p, float)
    da = _directions_at(a, p, tol)
    db = _directions_at(b, p, tol)
    if len(da) < 2 or len(db) < 2:
        return False
    base = da[0]

    def ang(t):
        return np.mod(t - base, 2 * np.pi)

    a2 = ang(da[1])
    inside = [0 < ang(t) < a2 for t in db[:2]]
    return inside[0] != inside[1]


def encloses_area(outline, tol: float) -> bool:
    """Whether a closed outline encloses an area, or is a line (all vertices within
    ``tol`` of the line through its two farthest vertices).

    Parameters
    ----------
    outline : array_like, shape (n, 2)
        Vertices (m).
    tol : float
        Distance (m) within which positions coincide.

    Returns
    -------
    bool
    """
    v = np.asarray(outline, float)
    i = int(np.argmax(np.hypot(*(v - v[0]).T)))
    j = int(np.argmax(np.hypot(*(v - v[i]).T)))
    d = v[j] - v[i]
    n = np.hypot(*d)
    if n <= tol:
        return False
    off = np.abs(d[0] * (v[:, 1] - v[i, 1]) - d[1] * (v[:, 0] - v[i, 0])) / n
    return bool(off.max() > tol)


def at_problem(scenario, x: float, y: float) -> str | None:
    """Why a point given in the scenario's CRS cannot be evaluated, or None.

    Parameters
    ----------
    scenario : harbor.study.scenario.Scenario
        Its site (CRS, work frame) and layout.
    x, y : float
        The point in the scenario's CRS (easting or longitude first).

    Returns
    -------
    str or None
        ``"is farther than ... from the layout"`` for a point whose work-frame position
        is not finite or lies more than :data:`MAX_DISTANCE` from the layout, else the
        answer of :func:`point_problem` with the scenario reader's tolerance.
    """
    wx, wy = scenario.site.to_work(np.array([float(x)]), np.array([float(y)]))
    wx, wy = float(np.ravel(wx)[0]), float(np.ravel(wy)[0])
    layout = scenario.layout
    xmin, ymin, xmax, ymax = layout.bounds()
    size = max(xmax - xmin, ymax - ymin)
    if not (np.isfinite(wx) and np.isfinite(wy)):
        return "is outside the domain of the scenario's CRS"
    cx, cy = 0.5 * (xmin + xmax), 0.5 * (ymin + ymax)
    if np.hypot(wx - cx, wy - cy) > MAX_DISTANCE:
        return (f"is {np.hypot(wx - cx, wy - cy) / 1000:.4g} km from the layout, farther "
                f"than {MAX_DISTANCE / 1000:g} km: not a point of this harbour")
    return point_problem(layout, wx, wy, layout_tolerance(size))


#: Farthest a point of interest may lie from the centre of the layout (m): the methods
#: assume one constant depth and one site frame; 100 km is far beyond any harbour.
MAX_DISTANCE = 100_000.0


#: Largest extent of a layout (arms and points, m): the longest breakwaters are a few
#: kilometres and a harbour study covers tens; a vertex farther than this from the rest
#: is a typo (a dropped digit in an easting), not a harbour.
MAX_LAYOUT_EXTENT = 100_000.0


def stray_vertex(coord_sets):
    """The vertex that makes a layout wider than :data:`MAX_LAYOUT_EXTENT`, if any.

    Parameters
    ----------
    coord_sets : sequence of (where, key, array (n, 2))
        The arms' lines and the points (m, work frame), labelled for the message.

    Returns
    -------
    tuple or None
        ``(where, key, problem)`` for the vertex farthest from the median of all
        vertices when the layout spans more than :data:`MAX_LAYOUT_EXTENT`; None
        otherwise.
    """
    allxy = np.concatenate([a for _, _, a in coord_sets])
    if float(np.ptp(allxy, axis=0).max()) <= MAX_LAYOUT_EXTENT:
        return None
    mid = np.median(allxy, axis=0)
    best = None
    for where, key, a in coord_sets:
        d = np.hypot(*(a - mid).T)
        j = int(np.argmax(d))
        if best is None or d[j] > best[0]:
            best = (float(d[j]), where, key, j, len(a))
    dist, where, key, j, n = best
    pre = f"vertex {j + 1}: " if n > 1 else ""
    return (where, key, f"{pre}lies {dist / 1000:.4g} km from the rest of the layout; a "
            f"layout spans at most {MAX_LAYOUT_EXTENT / 1000:g} km (a mistyped coordinate?)")
