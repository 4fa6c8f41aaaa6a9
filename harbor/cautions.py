"""The cautions of the trade and the wording of validity warnings, kept in one place.

Every output (terminal tables, maps, sheets, NetCDF and GeoJSON files, CSV comments)
takes its caution text from here so that it reads the same everywhere.
"""

from __future__ import annotations

CAUTION_SHORT = (
    "Preliminary screening only: linear diffraction over a constant depth. "
    "Final design belongs to licensed coastal engineers under local codes."
)

CAUTIONS = (
    "Results are preliminary and for screening only; they are not a design.",
    "Final design belongs to licensed coastal engineers working under local codes and "
    "standards, with site data and, where warranted, physical or full numerical models.",
    "Linear wave theory over a constant depth: refraction, shoaling, breaking, "
    "wave-current interaction, overtopping and transmission through structures are not modelled.",
    "Breakwaters are taken as thin, rigid and fully reflecting; reflection from quays, "
    "beaches and other walls inside the basin is not included.",
)


#: Validity warning attached to every solve: the methods neglect reflection inside the basin.
REFLECTION_NOTE = ("reflection from quays, shores and other walls inside the basin is "
                   "neglected: real basins can be rougher than shown")


def caution_text(sep: str = " ") -> str:
    """Return all cautions joined by ``sep``."""
    return sep.join(CAUTIONS)
