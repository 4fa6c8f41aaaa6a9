"""The look of every drawn output: palette, paper sizes, text wrapping, round numbers,
sea-state labels and the fixed K' classes.

No matplotlib at import time (:func:`new_figure` loads it), so the exporters and the
studies can use these helpers without paying for a plotting library.
"""

from __future__ import annotations

import math
import textwrap

import numpy as np

from harbor.errors import InputError

# Our palette. The fill colour map is matplotlib's "cividis" (perceptually uniform and
# readable with the common colour-vision deficiencies); everything drawn over it is
# either very dark with a white halo or white, so it stays visible on both ends.
# Our palette. The fill colour map is matplotlib's "cividis" (perceptually uniform and
# readable with the common colour-vision deficiencies); everything drawn over it is
# either very dark with a white halo or white, so it stays visible on both ends.
CMAP = "cividis"


# Land is a very light neutral grey under a fine diagonal hatch: no class of the colour
# map is that light and unsaturated (cividis runs from dark blue through mid grey to
# yellow), and the hatch tells land from water even in a grey-scale copy.
LAND_FACE = "#efefed"


LAND_HATCH = "#9d9d9d"


LAND_EDGE = "#4d4d4d"


LAND_HATCH_STYLE = "//////"


ARM_COLOUR = "#161616"


INK = "#222222"


MUTED = "#555555"


OK_COLOUR = "#1b7a3a"


OVER_COLOUR = "#b3261e"


A4_LANDSCAPE = (11.69, 8.27)  # inches


# Depth contours are context, not the message: thin, dashed, a blue grey that reads on
# both ends of cividis without competing with the K' isolines (solid, black or white).
DEPTH_COLOUR = "#5b7f9e"
DEPTH_HALO = "#ffffff"
DEPTH_LINEWIDTH = 0.55
DEPTH_DASHES = (0, (5.0, 2.5))

# Boundaries by reflection coefficient K_r: our own symbology. A hue per class, and a
# line pattern so that a grey-scale copy still tells them apart: solid for walls that
# send the wave back, dashed for partial reflectors, dotted for absorbing edges.
# (lower K_r bound of the class, label, colour, dash pattern, line width in pt, caps);
# the absorbing class is a row of round dots, which reads even over the land outline.
REFLECTION_CLASSES = (
    (0.9, "fully reflecting", "#7b2d8e", "solid", 2.2, "butt"),
    (0.3, "partly reflecting", "#d6589e", (0, (3.0, 1.6)), 2.2, "butt"),
    (0.0, "absorbing", "#1f9a8a", (0, (0.05, 1.9)), 3.2, "round"),
)


def reflection_class(kr: float) -> int:
    """Index in :data:`REFLECTION_CLASSES` of a reflection coefficient.

    Parameters
    ----------
    kr : float
        Reflection coefficient K_r (ratio of reflected to incident wave height, 0-1).

    Returns
    -------
    int
        0: fully reflecting (K_r >= 0.9), 1: partly reflecting (0.3 <= K_r < 0.9),
        2: absorbing (K_r < 0.3).

    Notes
    -----
    The bounds are our display classes, not a rule of the computation (which uses
    each boundary's own K_r). They follow the usual grouping of coastal structures:
    vertical walls and caissons reflect almost fully, rubble mounds partly, beaches
    and absorbing slopes little (common practice; Goda 2010 tabulates
    K_r 0.7-1.0 for vertical walls, 0.3-0.6 for rubble mounds, 0.05-0.2 for beaches,
    from memory).

    References
    ----------
    Goda, Y. (2010). Random Seas and Design of Maritime Structures, 3rd ed. World
    Scientific, Singapore.
    """
    for i, (low, *_rest) in enumerate(REFLECTION_CLASSES):
        if float(kr) >= low - 1e-9:
            return i
    return len(REFLECTION_CLASSES) - 1


def reflection_range(index: int) -> str:
    """The K_r range of a class as plain text, e.g. ``0.3 <= K_r < 0.9``."""
    low = REFLECTION_CLASSES[index][0]
    high = REFLECTION_CLASSES[index - 1][0] if index > 0 else None
    if high is None:
        return f"K_r \u2265 {low:g}"
    if low <= 0:
        return f"K_r < {high:g}"
    return f"{low:g} \u2264 K_r < {high:g}"


_COMPASS = ["N", "NNE", "NE", "ENE", "E", "ESE", "SE", "SSE",
            "S", "SSW", "SW", "WSW", "W", "WNW", "NW", "NNW"]


def compass(deg: float) -> str:
    """16-point compass name of a bearing in degrees."""
    return _COMPASS[int(round((deg % 360.0) / 22.5)) % 16]


def height_symbol(random: bool, math: bool = True) -> str:
    """The wave-height symbol: H (regular) or H1/3 (random)."""
    if random:
        return r"$H_{1/3}$" if math else "H1/3"
    return r"$H$" if math else "H"


def sea_label(info: dict, math: bool = True) -> str:
    """One line describing a sea state, e.g. ``storm SW - random sea, H1/3 2.00 m, ...``."""
    hs = height_symbol(info["random"], math)
    ts = (r"$T_{1/3}$" if math else "T1/3") if info["random"] else (r"$T$" if math else "T")
    kind = "directional random sea" if info["random"] else "regular sea"
    s = (f"'{info['name']}': {kind}, {hs} = {info['height']:.2f} m, {ts} = {info['period']:.1f} s, "
         f"from {info['from']:.0f}\u00b0 true ({compass(info['from'])})")
    if info["random"] and np.isfinite(info["spreading"]):
        s += (r", $s_{max}$" if math else ", s_max") + f" = {info['spreading']:.0f}"
    return s


def quantity(show: str, random: bool) -> tuple[str, str]:
    """Return ``(variable, colour-bar label)`` for ``show`` in {"kd", "height"}."""
    if show == "kd":
        if random:
            return "kd", "K' (effective, random sea) [-]"
        return "kd", "K' diffraction coefficient [-]"
    if show == "height":
        if random:
            return "height", r"significant wave height $H_{1/3}$ [m]"
        return "height", r"wave height $H$ [m]"
    raise InputError(f"show must be 'kd' or 'height', not {show!r}", key="show")


def nice_step(span: float, target: int = 5) -> float:
    """A round step (1, 2, 2.5 or 5 x 10^n) dividing ``span`` into about ``target`` parts."""
    raw = span / max(target, 1)
    if raw <= 0 or not np.isfinite(raw):
        return 1.0
    return round_number(raw, (1.0, 2.0, 2.5, 5.0))


KD_FILL = np.round(np.concatenate([np.arange(0.0, 1.0001, 0.1), np.arange(1.25, 2.0001, 0.25)]),
                   10)
"""Fill classes of K': 0.1 steps to 1 (K' = 1 is the incident height), then 0.25 steps to 2.

Fixed, so that a given K' has the same colour on every map, sheet and diagram."""


KD_LINES = np.round(np.arange(0.1, 0.9001, 0.1), 10)
"""K' isolines drawn on maps and diagrams: the sheltered range only (0.1 ... 0.9)."""


def fill_levels(values: np.ndarray, show: str, sea_height: float):
    """Filled-contour levels, line levels and whether the top end is open.

    K' uses the fixed classes :data:`KD_FILL` (0.1 steps from 0 to 1, 0.25 steps from 1
    to 2; values above 2 fall in an open top class) and isolines at 0.1 ... 0.9 only:
    above 0.9 the field of the open sea undulates about 1 (reflection, Fresnel ripples)
    and isolines there are clutter, not information. Heights use a round step.
    """
    finite = values[np.isfinite(values)]
    vmax = float(finite.max()) if finite.size else 1.0
    if show == "kd":
        return KD_FILL.copy(), KD_LINES.copy(), vmax > KD_FILL[-1] + 1e-9
    hmax = max(vmax, sea_height if np.isfinite(sea_height) else 0.0, 1e-3)
    step = nice_step(hmax, 10)
    top = step * math.ceil(hmax / step - 1e-9)
    fill = np.round(np.arange(0.0, top + step / 2, step), 10)
    lines = fill[1:-1] if fill.size > 2 else fill
    if np.isfinite(sea_height) and sea_height > 0:
        # As for K': no isolines at or above 0.95 of the incident height.
        lines = lines[lines < 0.95 * sea_height] if np.any(lines < 0.95 * sea_height) else lines
    return fill, lines, False


SCALE_STEPS = (1.0, 1.25, 1.5, 2.0, 2.5, 3.0, 4.0, 5.0, 6.0, 7.5)


def standard_scale(min_denominator: float) -> float:
    """The smallest usual scale 1:N with N >= ``min_denominator`` (so the map fits).

    N is one of 1, 1.25, 1.5, 2, 2.5, 3, 4, 5, 6, 7.5 x 10^n: the ISO 5455 series
    (1, 2, 5) plus the intermediate scales of a metric scale rule (common practice),
    so the printed map is never less than 80 % of the size that would fit.
    """
    return round_number(min_denominator, SCALE_STEPS)


def nice_below(v: float) -> float:
    """The largest round number (1, 2 or 5 x 10^n) not above ``v`` (halves stay round)."""
    return round_number(v, (1.0, 2.0, 5.0), up=False)


def wrap_to(text: str, width_in: float, fontsize: float) -> list[str]:
    """Wrap ``text`` to a width in inches (DejaVu Sans averages about 0.55 em a glyph)."""
    chars = max(20, int(width_in * 72.0 / (fontsize * 0.55)))
    return textwrap.wrap(text, chars) or [""]


def new_figure(size=A4_LANDSCAPE):
    """A pyplot-free figure (Agg canvas) so that maps can be drawn from any thread."""
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure

    fig = Figure(figsize=size)
    FigureCanvasAgg(fig)
    return fig


def round_number(value: float, mantissas=(1.0, 2.0, 5.0), up: bool = True) -> float:
    """The nearest "round" number m x 10^n at or above (``up``) or at or below ``value``.

    Parameters
    ----------
    value : float
        Positive number.
    mantissas : sequence of float
        Allowed m in [1, 10), increasing.
    up : bool
        Round up (the smallest round number >= value) or down (the largest <= value).

    Returns
    -------
    float
        ``value`` itself when it is already round (to 1e-9 relative).

    Notes
    -----
    The one rounding rule behind tick steps, scale-bar lengths, print scales and default
    grid spacings (the 1-2-5 series of ISO 3 / ISO 5455 and its common extensions).
    """
    v = float(value)
    if not (v > 0 and math.isfinite(v)):
        return 1.0
    exp = math.floor(math.log10(v))
    ms = sorted(float(m) for m in mantissas)
    if up:
        for e in (exp - 1, exp):
            for m in ms:
                if m * 10 ** e >= v * (1 - 1e-9):
                    return m * 10 ** e
        return ms[0] * 10 ** (exp + 1)
    for e in (exp + 1, exp):
        for m in reversed(ms):
            if m * 10 ** e <= v * (1 + 1e-9):
                return m * 10 ** e
    return ms[-1] * 10 ** (exp - 1)


def method_reason(result, sea) -> str:
    """Why the method of sea state ``sea`` was used (the result's ``sea_method_reason``).

    Parameters
    ----------
    result : xarray.Dataset
    sea : str
        Sea state name.

    Returns
    -------
    str
        The sentence, or "" when the result carries none (older results).
    """
    if "sea_method_reason" not in result:
        return ""
    v = result["sea_method_reason"].sel(sea=sea).values
    v = v.item() if hasattr(v, "item") else v
    text = "" if v is None else str(v).strip()
    return "" if text.lower() in ("", "nan", "none") else text
