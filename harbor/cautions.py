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


#: Validity note attached to every screening solve: the methods neglect reflection inside
#: the basin.
REFLECTION_NOTE = ("reflection from quays, shores and other walls inside the basin is "
                   "neglected: real basins can be rougher than shown")


def caution_text(sep: str = " ") -> str:
    """Return all cautions joined by ``sep``."""
    return sep.join(CAUTIONS)


class Notice(str):
    """A validity warning or note: a plain sentence that also carries what it is about.

    A ``Notice`` *is* its sentence (a :class:`str`), so it prints, joins and compares as
    text; it also carries a stable ``code`` for programs, the sea state and the point it
    concerns (``None``: all of them) and a ``level``.

    Parameters
    ----------
    code : str
        Stable short identifier, e.g. ``"overlapping-heads"``, ``"breaking"``.
    text : str
        The sentence shown to the user: names the arm, point or sea state, the number
        that triggered it and what it means for the result.
    sea : str, optional
        Name of the sea state it concerns; ``None`` for every sea state.
    point : str, optional
        Name of the point it concerns; ``None`` for none in particular.
    level : {"warning", "note"}
        ``"warning"``: a result is outside a method's validity or physically doubtful;
        ``"note"``: a standing limitation worth knowing.
    """

    LEVELS = ("warning", "note")

    def __new__(cls, code, text, sea=None, point=None, level="warning"):
        if level not in cls.LEVELS:
            raise ValueError(f"level must be one of {cls.LEVELS}, got {level!r}")
        obj = super().__new__(cls, text)
        obj.code = str(code)
        obj.sea = None if sea in (None, "") else str(sea)
        obj.point = None if point in (None, "") else str(point)
        obj.level = level
        return obj

    @property
    def text(self) -> str:
        """The sentence, as a plain :class:`str`."""
        return str.__str__(self)

    def __getnewargs__(self):
        return (self.code, self.text, self.sea, self.point, self.level)

    def __reduce__(self):
        return (Notice, self.__getnewargs__())

    def __repr__(self) -> str:
        return (f"Notice({self.code!r}, {self.text!r}, sea={self.sea!r}, "
                f"point={self.point!r}, level={self.level!r})")

    def for_sea(self, sea) -> "Notice":
        """The same notice attributed to sea state ``sea``."""
        return Notice(self.code, self.text, sea=sea, point=self.point, level=self.level)


def as_notice(item, code="general", **kw) -> Notice:
    """Return ``item`` as a :class:`Notice` (plain strings get ``code``)."""
    if isinstance(item, Notice):
        return item
    return Notice(code, str(item), **kw)
