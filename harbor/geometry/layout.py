"""The layout: breakwater arms, land and the points of interest, in the work frame.

Geometry only: shapes and coordinates, never waves. All coordinates are metres in the
site's work frame (the scenario CRS itself when it is projected in metres; a local
transverse Mercator projection when the scenario is in EPSG:4326 lon/lat).
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
import shapely


@dataclass(frozen=True)
class Arm:
    """A breakwater arm: a thin, rigid, fully reflecting, non-overtopped polyline.

    Parameters
    ----------
    name : str
        The arm's name from the scenario.
    line : numpy.ndarray, shape (n, 2)
        Vertices in the work frame (m), n >= 2, consecutive vertices distinct.
    rooted_start, rooted_end : bool
        True when that end is on land (or declared rooted) and so does not diffract;
        False when it is a free head that diffracts.
    """

    name: str
    line: np.ndarray
    rooted_start: bool = False
    rooted_end: bool = False

    def heads(self):
        """Yield ``(tip, inward)`` for each free head.

        ``tip`` is the head's position (m) and ``inward`` the unit vector from the tip
        along its end segment into the arm.
        """
        pts = np.asarray(self.line, float)
        if not self.rooted_start:
            d = pts[1] - pts[0]
            yield pts[0].copy(), d / np.hypot(*d)
        if not self.rooted_end:
            d = pts[-2] - pts[-1]
            yield pts[-1].copy(), d / np.hypot(*d)

    @property
    def geometry(self) -> shapely.LineString:
        return shapely.LineString(self.line)


@dataclass(frozen=True)
class Land:
    """A land polygon (m, work frame)."""

    name: str
    outline: shapely.Polygon


@dataclass(frozen=True)
class Point:
    """A point of interest: a berth, mooring or slipway.

    Parameters
    ----------
    name : str
        The point's name.
    at : tuple of float
        (x, y) in the work frame (m).
    limit : float or None
        Allowable wave height (m), if given.
    """

    name: str
    at: tuple
    limit: float | None = None


@dataclass(frozen=True)
class Join:
    """An arm end that was moved onto another arm or onto land, or one that was not.

    Attributes
    ----------
    arm : str
        Name of the arm whose end it is.
    end : str
        ``"start"`` or ``"end"``.
    target : str
        ``"arm '<name>'"`` or ``"land '<name>'"``: what it was joined to (or nearly met).
    distance : float
        How far the end was from it (m).
    joined : bool
        True: moved onto it (within :data:`JOIN_TOLERANCE`); False: a near miss, left
        alone (within :data:`NEAR_MISS`).
    """

    arm: str
    end: str
    target: str
    distance: float
    joined: bool = True


@dataclass(frozen=True)
class Layout:
    """Arms and land of one harbour.

    ``joins`` records the arm ends that :func:`join_ends` moved onto another arm or land
    (and the near misses it left alone), so that a check can say so.
    """

    arms: tuple = field(default_factory=tuple)
    lands: tuple = field(default_factory=tuple)
    joins: tuple = field(default_factory=tuple)

    # Helpers (geometry only). The data fields above are the contract; these read them.

    def heads(self):
        """Return the free (diffracting) heads of all arms.

        Returns
        -------
        list of tuple
            ``(arm_name, end, tip, inward)`` with ``end`` ``"start"`` or ``"end"``,
            ``tip`` the head's position (m, work frame) and ``inward`` the unit vector
            from the tip along its end segment into the arm.
        """
        out = []
        for arm in self.arms:
            ends = [e for e, rooted in (("start", arm.rooted_start),
                                        ("end", arm.rooted_end)) if not rooted]
            for end, (tip, inward) in zip(ends, arm.heads()):
                out.append((arm.name, end, tip, inward))
        return out

    def bounds(self) -> tuple:
        """Bounding box ``(xmin, ymin, xmax, ymax)`` of the arms (m, work frame);
        land is left out because a shore polygon may extend far inland."""
        if not self.arms:
            raise ValueError("the layout has no arms")
        pts = np.concatenate([np.asarray(a.line, float) for a in self.arms])
        return (float(pts[:, 0].min()), float(pts[:, 1].min()),
                float(pts[:, 0].max()), float(pts[:, 1].max()))

    def land_union(self):
        """All land polygons as one shapely geometry (an empty polygon when none)."""
        if not self.lands:
            return shapely.Polygon()
        return shapely.union_all([land.outline for land in self.lands])

    def arms_union(self):
        """All arms as one shapely geometry (a MultiLineString)."""
        return shapely.MultiLineString([np.asarray(a.line, float) for a in self.arms])

    def in_land(self, x, y):
        """Whether points lie on land (inside or on the boundary of a land polygon).

        Parameters
        ----------
        x, y : float or array_like
            Work-frame coordinates, m (broadcast together).

        Returns
        -------
        numpy.ndarray of bool
            True on land.
        """
        x, y = np.broadcast_arrays(np.asarray(x, float), np.asarray(y, float))
        out = np.zeros(x.shape, bool)
        for land in self.lands:
            shapely.prepare(land.outline)
            out |= shapely.intersects_xy(land.outline, x, y)
        return out


#: Arm ends within this distance (m) of another arm or of land are joined to it: moved
#: onto the nearest point of that arm (its end, or a point of its side) or land edge. It
#: covers coordinates rounded to 0.1 m (each end off by up to 0.07 m, two ends by up to
#: 0.14 m) with margin, and is far below any opening that could be meant as an entrance.
JOIN_TOLERANCE = 0.25
#: Ends farther than :data:`JOIN_TOLERANCE` but within this distance (m) of another arm
#: or land are left alone and reported as near misses ("did you mean to join?"): such a
#: slit is an entrance for the methods, which is rarely what the drawing meant.
NEAR_MISS = 2.0


def join_ends(lines, names, lands=(), tolerance=JOIN_TOLERANCE, near_miss=NEAR_MISS):
    """Join arm ends that miss another arm or land by less than a tolerance.

    Parameters
    ----------
    lines : sequence of numpy.ndarray, shape (n_i, 2)
        Arm polylines (m, work frame).
    names : sequence of str
        The arms' names.
    lands : sequence of Land, optional
        Land polygons (m, work frame).
    tolerance : float, optional
        Join distance (m), default :data:`JOIN_TOLERANCE`.
    near_miss : float, optional
        Report ends within this distance (m) that are not joined, default
        :data:`NEAR_MISS`.

    Returns
    -------
    lines : list of numpy.ndarray
        The polylines with joined ends moved (copies; the others unchanged).
    joins : list of Join
        Every end moved (``joined=True``) and every near miss (``joined=False``).

    Notes
    -----
    Each end of each arm, in order: the nearest other arm (end-to-end or end-to-side)
    or land edge within ``tolerance`` -- arms first, since a junction of two arms is
    what a drawing that misses by centimetres means -- receives the end: it is moved to
    the nearest point of that arm (an end of it within ``tolerance`` is preferred, so
    two heads drawn to meet meet at one point) or of the land's boundary. An end already
    on land or on an arm (distance below 1 mm) is left as it is and not reported. Pure
    geometry.
    """
    out = [np.array(a, float, copy=True) for a in lines]
    joins = []
    land_geoms = [(ld.name, ld.outline) for ld in lands]
    for k in range(len(out)):
        for idx, end in ((0, "start"), (-1, "end")):
            p = out[k][idx]
            q = shapely.Point(p)
            best = None
            for j in range(len(out)):
                if j == k:
                    continue
                other = shapely.LineString(out[j])
                dist = float(other.distance(q))
                if best is None or dist < best[0]:
                    ends = out[j][[0, -1]]
                    de = np.hypot(*(ends - p).T)
                    if de.min() <= tolerance:
                        target = ends[int(np.argmin(de))].copy()
                        theirs = (j, "start" if int(np.argmin(de)) == 0 else "end")
                    else:
                        target = np.asarray(other.interpolate(other.project(q)).coords[0])
                        theirs = None
                    best = (dist, f"arm '{names[j]}'", target, theirs)
            land_best = None
            for name, poly in land_geoms:
                dist = float(poly.distance(q))
                if land_best is None or dist < land_best[0]:
                    b = poly.exterior
                    target = np.asarray(b.interpolate(b.project(q)).coords[0])
                    land_best = (dist, f"land '{name}'", target, None)
            cands = [c for c in (best, land_best) if c is not None]
            if not cands:
                continue
            if any(c[0] < 1e-3 for c in cands):
                continue
            near = min(cands, key=lambda c: c[0])
            if best is not None and best[0] <= tolerance:
                near = best
            dist, target_name, target, theirs = near
            if dist <= tolerance:
                out[k][idx] = target
                joins.append(Join(names[k], end, target_name, dist, True))
                if theirs is not None:
                    # two ends meeting: the other end is joined as well
                    joins.append(Join(names[theirs[0]], theirs[1], f"arm '{names[k]}'",
                                      dist, True))
            elif dist <= near_miss:
                joins.append(Join(names[k], end, target_name, dist, False))
    return out, joins


def wet_arms(layout, tolerance=JOIN_TOLERANCE):
    """The layout without the arms that lie wholly on land.

    Parameters
    ----------
    layout : Layout
    tolerance : float, optional
        An arm whose part outside the land (grown by this distance, m) is shorter than
        it is taken as lying wholly on land: buried in it or along its edge.

    Returns
    -------
    layout : Layout
        The same layout, or a copy without those arms.
    dry : list of str
        Names of the arms left out.

    Notes
    -----
    Such an arm does nothing to the waves: the land around it already stops them (the
    screening methods neglect reflection from land, and an arm along a land edge is
    part of that edge). Pure geometry.
    """
    if not layout.lands or not layout.arms:
        return layout, []
    land = layout.land_union().buffer(tolerance)
    keep, dry = [], []
    for arm in layout.arms:
        wet = arm.geometry.difference(land)
        if wet.length <= tolerance:
            dry.append(arm.name)
        else:
            keep.append(arm)
    if not dry:
        return layout, []
    return Layout(arms=tuple(keep), lands=layout.lands, joins=layout.joins), dry
