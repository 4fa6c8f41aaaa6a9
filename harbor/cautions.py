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


#: The cautions of a full-field result (the mild-slope engine), replacing the screening
#: methods' last two.
CAUTIONS_FULL_FIELD = CAUTIONS[:2] + (
    "Linear waves by the mild-slope equation over the given depths: breaking, bottom "
    "friction, wave-current interaction, non-linear and infragravity waves, overtopping "
    "and transmission through structures are not modelled; the sea outside the model is "
    "taken at constant depth.",
    "Walls reflect by their given coefficients K_r, which hold at normal incidence only "
    "(at other angles the effective reflection differs); structures are impermeable.",
)

CAUTION_SHORT_FULL_FIELD = (
    "Preliminary: linear waves by the mild-slope equation over the given depths, without "
    "breaking. Final design belongs to licensed coastal engineers under local codes."
)


def caution_lines(screening: bool = True, full_field: bool = False) -> tuple:
    """The cautions of a result, by the methods that produced it.

    Parameters
    ----------
    screening : bool
        Some sea state was answered by the screening methods.
    full_field : bool
        Some sea state was answered by the full-field method.

    Returns
    -------
    tuple of str
    """
    if full_field and not screening:
        return CAUTIONS_FULL_FIELD
    if full_field:
        return CAUTIONS[:2] + tuple(f"Screening methods: {c}" for c in CAUTIONS[2:]) + tuple(
            f"Full-field method: {c}" for c in CAUTIONS_FULL_FIELD[2:])
    return CAUTIONS


def caution_text(sep: str = " ", screening: bool = True, full_field: bool = False) -> str:
    """Return all cautions (:func:`caution_lines`) joined by ``sep``."""
    return sep.join(caution_lines(screening, full_field))


def short_caution(screening: bool = True, full_field: bool = False) -> str:
    """The one-line caution of a result, by the methods that produced it."""
    if full_field and not screening:
        return CAUTION_SHORT_FULL_FIELD
    if full_field:
        return ("Preliminary: screening methods (linear diffraction, constant depth) and "
                "the mild-slope equation (no breaking). Final design belongs to licensed "
                "coastal engineers under local codes.")
    return CAUTION_SHORT


def _result_methods(ds) -> dict:
    """``screening`` and ``full_field``: which methods produced a solved result."""
    ff = bool(int(ds.attrs.get("full_field", 0) or 0))
    methods = [str(m) for m in ds["sea_method"].values] if "sea_method" in ds else []
    scr = (not methods) or any("full-field" not in m for m in methods)
    return {"screening": scr, "full_field": ff}


def result_cautions(ds) -> tuple:
    """The cautions of a solved result (:func:`harbor.solve`), as a tuple of lines."""
    return caution_lines(**_result_methods(ds))


def result_short_caution(ds) -> str:
    """The one-line caution of a solved result."""
    return short_caution(**_result_methods(ds))


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
