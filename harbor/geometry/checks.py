"""The geometry rules of a layout, in one place: arm lines, crossings, land outlines,
rooting, and whether a point may carry a value (not on land, not on an arm).

The scenario reader, :func:`harbor.solve` (``points=``), ``harbor points --at`` and the
sweep's moved heads all call these; each turns a :class:`GeometryError` into its own
message (the reader names the file, table and key). Geometry only: shapes and
coordinates in the work frame (m), never waves.
"""

from __future__ import annotations

import numpy as np
import shapely


class GeometryError(ValueError):
    """A layout or point that breaks a geometry rule.

    Parameters
    ----------
    problem : str
        Plain words; ``{at}`` in it is replaced by the caller's rendering of ``at``
        (scenario coordinates), see :meth:`text`.
    index : int, optional
        Which item (arm, land or point) of the list checked.
    other : int, optional
        The other item involved (an arm crossed).
    at : tuple of float, optional
        Where (work frame, m).
    """

    def __init__(self, problem, index=None, other=None, at=None):
        super().__init__(problem)
        self.problem = problem
        self.index = index
        self.other = other
        self.at = at

    def text(self, show_xy=None) -> str:
        """The message with ``{at}`` rendered by ``show_xy(at)`` (default 2 decimals)."""
        if "{at}" not in self.problem:
            return self.problem
        at = self.at if self.at is not None else (np.nan, np.nan)
        shown = show_xy(at) if show_xy else f"({at[0]:.2f}, {at[1]:.2f})"
        return self.problem.replace("{at}", shown)


def tolerance(size: float) -> float:
    """Distance (m) below which two places of a layout count as the same.

    Parameters
    ----------
    size : float
        Largest extent of the layout (m).

    Returns
    -------
    float
        max(0.01 m, 1e-6 x size): a centimetre, or the rounding of coordinates written
        with about seven significant digits (common practice for survey coordinates).
    """
    return max(0.01, 1e-6 * float(size))


def layout_tolerance(layout, extra_points=()) -> float:
    """:func:`tolerance` of a layout's arms (and any extra points, m)."""
    pts = [np.asarray(a.line, float) for a in layout.arms]
    pts += [np.asarray(p, float).reshape(-1, 2) for p in extra_points]
    allxy = np.concatenate(pts) if pts else np.zeros((1, 2))
    return tolerance(float(np.ptp(allxy, axis=0).max()))


def clean_arm_line(line, tol):
    """An arm's polyline with repeated vertices dropped, checked.

    Parameters
    ----------
    line : array_like, shape (n, 2)
        Vertices (m).
    tol : float
        Vertices closer than this are one (m).

    Returns
    -------
    numpy.ndarray, shape (m, 2)

    Raises
    ------
    GeometryError
        Fewer than two distinct vertices, a closed line, or a line crossing itself.
    """
    a = np.asarray(line, float)
    keep = np.r_[True, np.hypot(*np.diff(a, axis=0).T) > tol]
    a = a[keep]
    if len(a) < 2:
        raise GeometryError("needs at least two distinct vertices")
    if np.hypot(*(a[0] - a[-1])) <= tol:
        raise GeometryError("the line closes on itself (first and last vertex are the "
                            "same); an arm is an open polyline")
    if not shapely.LineString(a).is_simple:
        raise GeometryError("the arm crosses itself")
    return a


def check_crossings(lines, tol):
    """Arms may touch (end to end, end to side, or corner to corner where they turn back:
    a joint, see :func:`arms_cross_at`) but not cross or overlap.

    Parameters
    ----------
    lines : sequence of (n, 2) arrays
        Cleaned arm polylines (m).
    tol : float
        m.

    Raises
    ------
    GeometryError
        ``index`` the later arm, ``other`` the earlier one, ``at`` the crossing.
    """
    geoms = [shapely.LineString(a) for a in lines]
    for i in range(len(lines)):
        for j in range(i + 1, len(lines)):
            if geoms[i].distance(geoms[j]) > tol:
                continue
            inter = geoms[i].intersection(geoms[j])
            ends = np.array([lines[i][0], lines[i][-1], lines[j][0], lines[j][-1]])
            for geom in shapely.get_parts(inter):
                if geom.geom_type != "Point":
                    raise GeometryError("overlaps {other} along part of its length",
                                        index=j, other=i)
                p = np.array(geom.coords[0])
                if (np.min(np.hypot(*(ends - p).T)) > tol
                        and arms_cross_at(lines[i], lines[j], p, tol)):
                    raise GeometryError("crosses {other} at {at}; arms may touch at an end "
                                        "but not cross", index=j, other=i, at=tuple(p))


def clean_land_outline(outline, tol):
    """A land outline as a valid shapely polygon.

    Parameters
    ----------
    outline : array_like, shape (n, 2)
        Vertices (m); a repeated closing vertex is allowed.
    tol : float
        m.

    Returns
    -------
    shapely.Polygon

    Raises
    ------
    GeometryError
        Fewer than three distinct vertices, a self-crossing outline, or no area.
    """
    aw = np.asarray(outline, float)
    keep = np.r_[True, np.hypot(*np.diff(aw, axis=0).T) > tol]
    aw = aw[keep]
    if len(aw) > 1 and np.hypot(*(aw[0] - aw[-1])) <= tol:
        aw = aw[:-1]
    if len(aw) < 3:
        raise GeometryError("needs at least three distinct vertices")
    if not encloses_area(aw, tol):
        # before shapely, which calls a flat ring a "self-intersection"
        raise GeometryError("the outline encloses no area: its vertices lie on one line")
    poly = shapely.Polygon(aw)
    if not poly.is_valid:
        # the reason carries work-frame coordinates, which the user never wrote
        reason = shapely.is_valid_reason(poly).split("[")[0].strip()
        raise GeometryError(f"the outline is not a valid polygon ({reason}); it must not "
                            "cross itself")
    if poly.area <= 0:
        raise GeometryError("the outline encloses no area")
    return poly


def rooted_ends(lines, lands, tol, declared=None):
    """Which ends of each arm are rooted (do not diffract).

    Parameters
    ----------
    lines : sequence of (n, 2) arrays
        Arm polylines (m).
    lands : sequence of shapely.Polygon
    tol : float
        m.
    declared : sequence of {"start", "end", "both", "none", None}, optional
        The scenario's ``rooted`` per arm; None: decide from the geometry.

    Returns
    -------
    list of (bool, bool)
        (start rooted, end rooted) per arm.

    Notes
    -----
    An end inside or on a land polygon, or on another arm (a junction), is rooted;
    a declared value overrides.
    """
    land_all = shapely.union_all(list(lands)) if lands else None
    geoms = [shapely.LineString(a) for a in lines]
    declared = list(declared) if declared is not None else [None] * len(lines)
    out = []
    for k, a in enumerate(lines):
        others = [g for m, g in enumerate(geoms) if m != k]
        other = shapely.union_all(others) if others else None

        def anchored(p):
            q = shapely.Point(p)
            if land_all is not None and land_all.distance(q) <= tol:
                return True
            return other is not None and other.distance(q) <= tol

        r = declared[k]
        if r is None:
            out.append((bool(anchored(a[0])), bool(anchored(a[-1]))))
        else:
            out.append((r in ("start", "both"), r in ("end", "both")))
    return out


def point_problems(layout, x, y, tol=None):
    """Why points may not carry a value: on land, on an arm, on a head or vertex.

    Parameters
    ----------
    layout : harbor.geometry.layout.Layout
    x, y : array_like
        Work-frame coordinates (m), broadcast together.
    tol : float, optional
        m; default :func:`layout_tolerance` of the layout and the points.

    Returns
    -------
    numpy.ndarray of object
        ``None`` where the point is fine, else a phrase such as ``"is on land"``,
        ``"is more than 100 km from the layout ..."`` (:func:`far_from_layout`),
        ``"is on an arm ('west arm')"``, ``"is on the head of the arm 'west arm'"``.

    Notes
    -----
    A value on land is meaningless and one on a thin arm is the jump across it; a
    head is the singular point of the diffraction solution. Distances within ``tol``
    count as on.
    """
    x, y = np.broadcast_arrays(np.asarray(x, float), np.asarray(y, float))
    if tol is None:
        tol = layout_tolerance(layout, [np.column_stack([x.ravel(), y.ravel()])])
    out = np.full(x.shape, None, dtype=object)
    far = far_from_layout(layout, x, y)
    out[far] = (f"is more than {MAX_LAYOUT_EXTENT / 1000:g} km from the layout: not a "
                "point of this harbour")
    pts = shapely.points(np.where(far, 0.0, x), np.where(far, 0.0, y))
    land = layout.land_union()
    if not land.is_empty:
        on_land = shapely.dwithin(land, pts, tol) & ~far
        out[on_land] = "is on land"
    heads = {(a, e): tip for a, e, tip, _ in layout.heads()}
    for arm in layout.arms:
        line = np.asarray(arm.line, float)
        on = shapely.dwithin(arm.geometry, pts, tol) & (out == None) & ~far  # noqa: E711
        if not on.any():
            continue
        out[on] = f"is on an arm ('{arm.name}')"
        for end, tip in (("start", line[0]), ("end", line[-1])):
            if (arm.name, end) in heads:
                at_tip = on & (np.hypot(x - tip[0], y - tip[1]) <= tol)
                out[at_tip] = f"is on the head of an arm ('{arm.name}')"
        for v in line[1:-1]:
            at_v = on & (np.hypot(x - v[0], y - v[1]) <= tol)
            out[at_v] = f"is on a vertex of an arm ('{arm.name}')"
    return out


def check_points(layout, xy, tol=None):
    """Raise for the first point that may not carry a value.

    Parameters
    ----------
    layout : harbor.geometry.layout.Layout
    xy : array_like, shape (n, 2)
        Work frame (m).
    tol : float, optional
        See :func:`point_problems`.

    Raises
    ------
    GeometryError
        ``"the point {at} is on land"`` (or on an arm, a head, a vertex) with ``index``
        the point and ``at`` its position.
    """
    xy = np.asarray(xy, float).reshape(-1, 2)
    if not len(xy):
        return
    probs = point_problems(layout, xy[:, 0], xy[:, 1], tol)
    for i, p in enumerate(probs):
        if p is not None:
            raise GeometryError(f"the point {{at}} {p}", index=i, at=tuple(xy[i]))


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


def far_from_layout(layout, x, y):
    """Whether points lie farther than :data:`MAX_LAYOUT_EXTENT` from the layout's arms
    (or are not finite).

    Parameters
    ----------
    layout : harbor.geometry.layout.Layout
    x, y : numpy.ndarray
        Work frame (m), same shape.

    Returns
    -------
    numpy.ndarray of bool
    """
    if not layout.arms:
        return ~(np.isfinite(x) & np.isfinite(y))
    xmin, ymin, xmax, ymax = layout.bounds()
    with np.errstate(over="ignore", invalid="ignore"):
        dx = np.maximum(np.maximum(xmin - x, x - xmax), 0.0)
        dy = np.maximum(np.maximum(ymin - y, y - ymax), 0.0)
        d = np.hypot(dx, dy)
    return ~(d <= MAX_LAYOUT_EXTENT)
