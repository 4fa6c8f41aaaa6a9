"""Plausible ranges of the numbers a user gives (scenario keys, climate columns).

A value outside its range is not a different harbour but a slip (a unit error, a typo, a
test of the program); it is refused at the reader with one line naming the key and the
range, before anything is solved. The ranges are wide on purpose: they stop nonsense, not
unusual sites.
"""

from __future__ import annotations

import math
import numbers

#: key -> (lowest, highest, unit, why). Bounds are inclusive.
RANGES = {
    # the deepest ocean trench is about 11 km; below 0.1 m there is no navigable water
    "depth": (0.1, 11_000.0, "m", "water depth"),
    # gravity at the Earth's surface is 9.76-9.84 m/s^2 (common practice); 981 is cm/s^2
    "g": (9.7, 9.9, "m/s^2", "gravity at the Earth's surface is 9.76-9.84 m/s^2"),
    # the highest measured sea states are below 30 m (from memory); 100 m stops unit
    # slips (cm, mm) and overflowing numbers without judging a study's extremes
    "height": (0.001, 100.0, "m", "wave height; measured sea states stay below 30 m"),
    "limit": (0.001, 100.0, "m", "allowable wave height"),
    # percentage of time of one climate row
    "percent": (0.0, 100.0, "%", "a percentage of time"),
    # wind waves and swell 1-30 s, long waves up to several minutes (common practice)
    "period": (0.5, 600.0, "s", "wave period"),
    "peak_period": (0.5, 600.0, "s", "spectral peak period"),
    # Goda's s_max: 10 wind sea, 25 and 75 swell; above a few hundred the sea is
    # long-crested for any purpose (common practice)
    "spreading": (1.0, 1000.0, "", "s_max"),
    # JONSWAP peak enhancement: 1 to about 7 (common practice)
    "gamma": (1.0, 20.0, "", "JONSWAP peak enhancement"),
    "spacing": (0.01, 10_000.0, "m", "grid spacing"),
}

#: Largest magnitude of a projected coordinate (m or ft): the widest projected CRS spans
#: about 4e7 m; a larger number is a slip, whatever the CRS.
MAX_COORDINATE = 1e8

#: JONSWAP peak period over T1/3: Tp / T1/3 is about 1.05-1.13 for gamma 1-7 (Goda 2010,
#: sect. 2.3); outside these bounds the two periods cannot describe the same sea.
PEAK_RATIO = (0.8, 1.5)

#: Vertex limits of one polyline: a breakwater has a few to a few hundred vertices; a shore
#: line traced from a chart a few thousand to tens of thousands.
MAX_ARM_VERTICES = 10_000
MAX_LAND_VERTICES = 200_000


def as_real(v):
    """``float(v)`` for a real number (not a bool), None for anything else or a number too
    large to be a float (a 400-digit integer)."""
    if isinstance(v, bool) or not isinstance(v, numbers.Real):
        return None
    try:
        return float(v)
    except (OverflowError, ValueError):
        return math.inf


def range_problem(key: str, v: float, positive: bool = False) -> str | None:
    """Why ``v`` is not a plausible value of ``key`` (None when it is, or no range).

    Parameters
    ----------
    key : str
        A scenario key or climate column (``"depth"``, ``"g"``, ...).
    v : float
        Its value (finite).
    positive : bool
        Whether the reader asked for a strictly positive value (a zero lower bound
        is then open); when it did not, an exact zero is always accepted.

    Returns
    -------
    str or None
        The problem, for an :class:`harbor.errors.InputError`.
    """
    if key not in RANGES:
        return None
    lo, hi, unit, why = RANGES[key]
    if v == 0 and not positive:
        return None          # a zero where the reader allows one (a calm climate row)
    u = f" {unit}" if unit else ""
    if v < lo or v > hi or (positive and lo == 0 and v <= 0):
        low = f"more than {lo:g}" if (positive and lo == 0) else f"at least {lo:g}"
        return (f"{v:g}{u} is not plausible: must be {low} and at most {hi:g}{u} "
                f"({why})")
    return None
