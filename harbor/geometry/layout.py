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
class Layout:
    """Arms and land of one harbour."""

    arms: tuple = field(default_factory=tuple)
    lands: tuple = field(default_factory=tuple)

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
