"""Scenario files (TOML) -> validated objects.

The data classes here are the contract between the scenario reader, the solver and the
outputs. ``load_scenario`` (below) reads and validates a file.
"""

from __future__ import annotations

from dataclasses import dataclass, field

from harbor.geometry.layout import Layout, Point


@dataclass(frozen=True)
class Sea:
    """One sea state.

    Parameters
    ----------
    name : str
        The sea state's name.
    kind : {"regular", "random"}
        Regular (monochromatic, long-crested) or directional random sea.
    height : float
        H (regular) or H1/3 (random), m.
    period : float
        T (regular) or T1/3 (random), s.
    from_deg : float
        Direction the waves come from, degrees clockwise from true north (nautical).
    spreading : float
        Mitsuyasu s_max (random seas only), default 10.
    spectrum : str
        ``"bretschneider-mitsuyasu"`` (default) or ``"jonswap"`` (random seas only).
    peak_period : float or None
        Spectral peak period Tp (s) for JONSWAP; default 1.05 T1/3.
    gamma : float
        JONSWAP peak enhancement factor, default 3.3.
    """

    name: str
    kind: str
    height: float
    period: float
    from_deg: float
    spreading: float = 10.0
    spectrum: str = "bretschneider-mitsuyasu"
    peak_period: float | None = None
    gamma: float = 3.3


@dataclass(frozen=True)
class GridSpec:
    """The computation grid: spacing (m) and bounds ``(xmin, ymin, xmax, ymax)`` in the
    work frame (m); bounds are always filled in by the reader (a default is derived from
    the layout and points when the file gives none)."""

    spacing: float
    bounds: tuple


@dataclass(frozen=True)
class Scenario:
    """A validated scenario.

    Attributes
    ----------
    path : str
        The file it was read from ("" when built in code).
    title : str
    site : harbor.geometry.site.Site
    layout : harbor.geometry.layout.Layout
    seas : tuple of Sea
    points : tuple of harbor.geometry.layout.Point
    grid : GridSpec
    """

    path: str
    title: str
    site: object
    layout: Layout
    seas: tuple = field(default_factory=tuple)
    points: tuple = field(default_factory=tuple)
    grid: GridSpec | None = None

    def sea(self, name: str) -> Sea:
        """Return the sea state called ``name`` (KeyError if none)."""
        for s in self.seas:
            if s.name == name:
                return s
        raise KeyError(name)
