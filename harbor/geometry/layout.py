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
