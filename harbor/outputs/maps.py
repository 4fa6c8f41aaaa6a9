"""Sheltering maps: a PNG of K' (or wave height) over the real layout.

The map reads a solved result (``harbor.solve``) and the scenario it came from; it never
recomputes physics. The drawing is split into reusable pieces (:func:`draw_map`,
:func:`draw_colorbar`, :func:`draw_legend`) so that the PDF sheet
(:mod:`harbor.outputs.sheet`) shows exactly the same map.
"""

from __future__ import annotations

import math
import textwrap
from pathlib import Path

import matplotlib as mpl
import numpy as np
import shapely
from matplotlib import colors as mcolors
from matplotlib import patheffects, transforms
from matplotlib.backends.backend_agg import FigureCanvasAgg
from matplotlib.figure import Figure
from matplotlib.lines import Line2D
from matplotlib.patches import Circle, Patch, PathPatch, Polygon as MplPolygon, Rectangle
from matplotlib.path import Path as MplPath
from matplotlib.text import Text

from harbor.cautions import CAUTION_SHORT
from harbor.errors import InputError
from harbor.outputs._atomic import atomic_path

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

_HALO = [patheffects.withStroke(linewidth=3.0, foreground="white")]


def _land_hatch() -> dict:
    """Patch keywords of the land hatch; matplotlib < 3.10 takes the hatch colour from
    the edge colour, so the hatch patch then gets the hatch colour as its (zero-width)
    edge."""
    if hasattr(Patch, "set_hatchcolor"):
        return dict(hatch=LAND_HATCH_STYLE, hatchcolor=LAND_HATCH)
    return dict(hatch=LAND_HATCH_STYLE, edgecolor=LAND_HATCH)


# --------------------------------------------------------------------------- result reading

def sea_name(result, sea) -> str:
    """Return the name of sea state ``sea`` in ``result``.

    Parameters
    ----------
    result : xarray.Dataset
        A solved result.
    sea : str, int or object with ``.name``
        The sea state's name, its index, or a scenario ``Sea``.

    Returns
    -------
    str

    Raises
    ------
    harbor.errors.InputError
        If the result has no such sea state.
    """
    names = [str(s) for s in result["sea"].values]
    if isinstance(sea, (int, np.integer)) and not isinstance(sea, bool):
        if 0 <= sea < len(names):
            return names[sea]
    else:
        name = str(getattr(sea, "name", sea))
        if name in names:
            return name
    raise InputError(f"no sea state {sea!r} in the result (it has: {', '.join(names) or 'none'})",
                     key="sea")


def sea_info(result, name: str) -> dict:
    """Collect the per-sea attributes of ``name`` as plain Python values."""
    r = result.sel(sea=name)

    def get(var, default=float("nan")):
        if var not in r:
            return default
        v = r[var].values
        return v.item() if hasattr(v, "item") else v

    kind = str(get("sea_kind", "regular"))
    return {
        "name": name,
        "kind": kind,
        "random": kind == "random",
        "height": float(get("sea_height")),
        "period": float(get("sea_period")),
        "from": float(get("sea_from")),
        "spreading": float(get("sea_spreading")),
        "method": str(get("sea_method", result.attrs.get("method", ""))),
        "wavelength": float(get("sea_wavelength")),
    }


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


def crs_label(result) -> str:
    """A short name of the work CRS for axis labels (``EPSG:32630`` when it has a code)."""
    crs = str(result.attrs.get("crs", ""))
    if crs.upper().startswith("EPSG:"):
        return crs.upper()
    try:
        import pyproj

        c = pyproj.CRS.from_user_input(result.attrs.get("crs_wkt") or crs)
        code = c.to_epsg()
        if code:
            return f"EPSG:{code}"
        if "tmerc" in crs or "Transverse Mercator" in c.to_wkt():
            return "local transverse Mercator"
        return c.name
    except Exception:  # a label must never stop a map
        return crs[:40] or "site frame"


def nice_step(span: float, target: int = 5) -> float:
    """A round step (1, 2, 2.5 or 5 x 10^n) dividing ``span`` into about ``target`` parts."""
    raw = span / max(target, 1)
    if raw <= 0 or not np.isfinite(raw):
        return 1.0
    exp = math.floor(math.log10(raw))
    for m in (1.0, 2.0, 2.5, 5.0, 10.0):
        if m * 10 ** exp >= raw:
            return m * 10 ** exp
    return 10.0 ** (exp + 1)


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


# --------------------------------------------------------------------------- layout

def fit_axes_rect(fig, box, xlim, ylim, scale=None, halign="left", valign="top"):
    """Place an axes of equal aspect inside ``box`` (inches) and return it.

    Parameters
    ----------
    fig : matplotlib.figure.Figure
    box : (left, bottom, width, height)
        Available region in inches from the figure's lower-left corner.
    xlim, ylim : (min, max)
        Data extent in metres.
    scale : float, optional
        If given, print at exactly 1:scale (metres of ground per metre of paper); the
        axes may then be smaller than ``box``. Otherwise the largest equal-aspect box.
    halign : {"left", "center"}
        Horizontal placement of the axes inside ``box``.
    valign : {"top", "center"}
        Vertical placement of the axes inside ``box``.

    Returns
    -------
    (matplotlib.axes.Axes, float)
        The axes (placed in ``box`` as asked) and the printed scale denominator.
    """
    left, bottom, width, height = box
    dx, dy = xlim[1] - xlim[0], ylim[1] - ylim[0]
    if scale is None:
        s = min(width / dx, height / dy)  # inches per metre
    else:
        s = 39.37007874 / scale
    w, h = dx * s, dy * s
    fw, fh = fig.get_size_inches()
    if halign == "center":
        left += max(0.0, (width - w) / 2)
    top = bottom + height - (max(0.0, (height - h) / 2) if valign == "center" else 0.0)
    rect = (left / fw, (top - h) / fh, w / fw, h / fh)
    ax = fig.add_axes(rect)
    ax.set_xlim(*xlim)
    ax.set_ylim(*ylim)
    ax.set_aspect("equal", adjustable="box")
    return ax, 1.0 / (s * 0.0254)


SCALE_STEPS = (1.0, 1.25, 1.5, 2.0, 2.5, 3.0, 4.0, 5.0, 6.0, 7.5)


def standard_scale(min_denominator: float) -> float:
    """The smallest usual scale 1:N with N >= ``min_denominator`` (so the map fits).

    N is one of 1, 1.25, 1.5, 2, 2.5, 3, 4, 5, 6, 7.5 x 10^n: the ISO 5455 series
    (1, 2, 5) plus the intermediate scales of a metric scale rule (common practice),
    so the printed map is never less than 80 % of the size that would fit.
    """
    exp = math.floor(math.log10(min_denominator))
    for m in (*SCALE_STEPS, 10.0):
        n = m * 10 ** exp
        if n >= min_denominator * (1 - 1e-9):
            return n
    return 10.0 ** (exp + 1)


# --------------------------------------------------------------------------- drawing

def _polygon_patch(poly, **kw):
    """A PathPatch for a shapely (Multi)Polygon, holes included."""
    verts, codes = [], []
    for part in shapely.get_parts(poly):
        for ring in [part.exterior, *part.interiors]:
            xy = np.asarray(ring.coords)
            if len(xy) < 3:
                continue
            verts.append(xy)
            c = np.full(len(xy), MplPath.LINETO, dtype=np.uint8)
            c[0] = MplPath.MOVETO
            c[-1] = MplPath.CLOSEPOLY
            codes.append(c)
    if not verts:
        return None
    return PathPatch(MplPath(np.concatenate(verts), np.concatenate(codes)), **kw)


def true_north_vector(convergence_deg: float) -> np.ndarray:
    """Unit vector (east, north components of the work frame) pointing to true north.

    Parameters
    ----------
    convergence_deg : float
        Meridian convergence gamma, degrees (grid bearing = true bearing - gamma).

    Returns
    -------
    numpy.ndarray, shape (2,)
        (sin b, cos b) with b = -gamma the grid bearing of true north.

    Notes
    -----
    On an equal-aspect map the page's up direction is grid north, so this is also the
    direction of the north arrow on the page.

    References
    ----------
    Snyder, J. P. (1987). Map Projections - A Working Manual. U.S. Geological Survey
    Professional Paper 1395.
    """
    b = math.radians(-float(convergence_deg))
    return np.array([math.sin(b), math.cos(b)])


def _north_arrow(fig, ax, convergence_deg: float, inset=(0.6, 0.62)):
    """Draw a north arrow pointing to TRUE north near the axes' top-right corner.

    True north lies at grid bearing ``-convergence_deg`` (grid bearing = true bearing -
    convergence), i.e. the arrow is turned counter-clockwise from the page's up
    direction by the convergence. Drawn in inches so that it stays a clean shape
    whatever the data extent.
    """
    # Centred a fixed distance (inches) in from the top-right corner, so that the arrow
    # and its label stay inside the frame whatever the map's printed size.
    tr = (fig.dpi_scale_trans + transforms.ScaledTranslation(-inset[0], -inset[1],
                                                             fig.dpi_scale_trans)
          + transforms.ScaledTranslation(1.0, 1.0, ax.transAxes))
    u = true_north_vector(convergence_deg)
    n = np.array([u[1], -u[0]])
    r = 0.32
    artists = [Circle((0, 0), r, transform=tr, facecolor="white", edgecolor=MUTED,
                      linewidth=0.8, alpha=0.92, zorder=20)]
    tip, tail = 0.25 * u, -0.2 * u
    left = MplPolygon([tip, tail - 0.085 * n, -0.05 * u], closed=True, transform=tr,
                      facecolor=INK, edgecolor=INK, linewidth=0.6, zorder=21)
    right = MplPolygon([tip, tail + 0.085 * n, -0.05 * u], closed=True, transform=tr,
                       facecolor="white", edgecolor=INK, linewidth=0.6, zorder=21)
    for a in (*artists, left, right):
        ax.add_artist(a)
        a.set_clip_on(False)
    ax.text(*((r + 0.1) * u), "N", transform=tr, ha="center", va="center",
            fontsize=11, fontweight="bold", color=INK, zorder=22, clip_on=False,
            path_effects=_HALO)
    ax.text(0.0, -r - 0.09, "true north" + (f"\nconvergence {convergence_deg:+.2f}\u00b0"
                                            if abs(convergence_deg) >= 0.005 else ""),
            transform=tr, ha="center", va="top", fontsize=6.5, color=INK, zorder=22,
            clip_on=False, bbox=dict(boxstyle="round,pad=0.2", facecolor="white",
                                     edgecolor="none", alpha=0.85))
    return artists[0]


def nice_below(v: float) -> float:
    """The largest round number (1, 2 or 5 x 10^n) not above ``v`` (halves stay round)."""
    exp = math.floor(math.log10(v))
    for m in (5.0, 2.0, 1.0):
        if m * 10 ** exp <= v * (1 + 1e-9):
            return m * 10 ** exp
    return 10.0 ** (exp - 1) * 5.0


def _scale_bar(fig, ax, scale_factor=1.0):
    """Draw a scale bar (round length, ground metres) in the lower-left corner of the map.

    ``scale_factor`` is the result's ``scale_factor`` (map units per ground metre at
    the site), so that the bar shows ground metres in any CRS.

    Sized on paper, not in data units: at most 1.6 in and 30 % of the map width, so the
    labels never crowd on a small map; the middle label is dropped below 0.9 in.
    """
    fw, _ = fig.get_size_inches()
    x0, x1 = ax.get_xlim()
    ax_w = ax.get_position().width * fw
    m_per_in = (x1 - x0) / ax_w / float(scale_factor or 1.0)
    length = nice_below(min(1.6, 0.3 * ax_w) * m_per_in)
    bar = length / m_per_in
    tr = fig.dpi_scale_trans + transforms.ScaledTranslation(0.0, 0.0, ax.transAxes)
    ox, oy, th = 0.22, 0.28, 0.055
    bg = Rectangle((ox - 0.12, oy - 0.2), bar + 0.24 + 0.18, th + 0.3, transform=tr,
                   facecolor="white", edgecolor=MUTED, linewidth=0.6, alpha=0.92, zorder=18)
    ax.add_artist(bg)
    half = bar / 2
    ax.add_artist(Rectangle((ox, oy), half, th, transform=tr, facecolor=INK, edgecolor=INK,
                            lw=0.6, zorder=19))
    ax.add_artist(Rectangle((ox + half, oy), half, th, transform=tr, facecolor="white",
                            edgecolor=INK, lw=0.6, zorder=19))
    labels = [(0.0, "0"), (bar, f"{length:g} m")]
    if bar >= 0.9:
        labels.insert(1, (half, f"{length / 2:g}"))
    for v, lab in labels:
        ax.text(ox + v, oy - 0.03, lab, transform=tr, ha="center", va="top", fontsize=7.5,
                color=INK, zorder=19)
    return bg


def arm_mask(x, y, scenario) -> np.ndarray:
    """Grid nodes too close to an arm for contouring: True where a node is within
    0.71 grid spacings of any arm.

    Parameters
    ----------
    x, y : numpy.ndarray
        1-D node coordinates (m).
    scenario : Scenario or None
        Supplies the arms; ``None`` masks nothing.

    Returns
    -------
    numpy.ndarray of bool, shape (len(y), len(x))

    Notes
    -----
    K' jumps across a thin arm, but contouring interpolates between the nodes on either
    side, which would draw every level as a spurious line along the arm. Every grid cell
    that an arm crosses has a corner within h / sqrt(2) of the arm (h the spacing), so
    masking those nodes masks exactly the cells that straddle it; isolines then stop
    about one cell short of the arm instead of running along it.
    """
    layout = getattr(scenario, "layout", None) if scenario is not None else None
    arms = [np.asarray(a.line, float) for a in getattr(layout, "arms", ())]
    X, Y = np.meshgrid(np.asarray(x, float), np.asarray(y, float))
    if not arms:
        return np.zeros(X.shape, bool)
    h = max(float(np.max(np.abs(np.diff(x)))) if len(x) > 1 else 0.0,
            float(np.max(np.abs(np.diff(y)))) if len(y) > 1 else 0.0)
    geom = shapely.MultiLineString(arms)
    shapely.prepare(geom)
    return shapely.dwithin(geom, shapely.points(X, Y), h / math.sqrt(2.0) * 1.001)


def _cell(x, y) -> float:
    """Largest grid spacing (m)."""
    d = [float(np.max(np.abs(np.diff(v)))) for v in (x, y) if len(v) > 1]
    return max(d) if d else 0.0


def busy_mask(field, x, y, wavelength, threshold) -> np.ndarray:
    """Nodes in a standing-wave zone: where the field ranges over more than
    ``threshold`` within half a wavelength.

    Parameters
    ----------
    field : numpy.ndarray (ny, nx)
        K' or height; NaN on land.
    x, y : numpy.ndarray
        Node coordinates (m).
    wavelength : float
        L (m) of the sea state, read from the result; NaN disables the mask.
    threshold : float
        Range (same units as ``field``) above which isolines are left out.

    Returns
    -------
    numpy.ndarray of bool

    Notes
    -----
    In front of a reflecting arm a regular sea forms standing waves: K' swings from 0 to
    2 every half wavelength, and isolines at 0.1 steps there become a dense hatching
    that hides the map. Where max - min over a window of L/2 exceeds ``threshold`` the
    isolines are left out and the colours alone show the pattern (cartographic
    generalisation: no value is changed, exports keep every isoline).
    """
    f = np.asarray(field, float)
    h = _cell(x, y)
    if not (np.isfinite(wavelength) and wavelength > 0 and h > 0) or f.size == 0:
        return np.zeros(f.shape, bool)
    from scipy import ndimage

    n = max(3, int(round(0.5 * wavelength / h)) | 1)
    hi = ndimage.maximum_filter(np.where(np.isnan(f), -np.inf, f), size=n, mode="nearest")
    lo = ndimage.minimum_filter(np.where(np.isnan(f), np.inf, f), size=n, mode="nearest")
    return np.isfinite(hi - lo) & (hi - lo > threshold)


def open_sea_mask(field, x, y, wavelength, ceiling) -> np.ndarray:
    """Nodes in the open, unsheltered sea: where the field reaches ``ceiling`` within
    one wavelength.

    Parameters
    ----------
    field : numpy.ndarray (ny, nx)
        K' or height; NaN on land.
    x, y : numpy.ndarray
        Node coordinates (m).
    wavelength : float
        L (m) of the sea state, read from the result; NaN disables the mask.
    ceiling : float
        K' = 1 (or the incident height, m): the level of the undisturbed sea.

    Returns
    -------
    numpy.ndarray of bool

    Notes
    -----
    Seaward of the arms the field undulates about K' = 1 (partial standing waves of the
    reflected sea, Fresnel ripples along the shadow boundaries, the directional
    quadrature of a random sea), and isolines of 0.8 or 0.9 there are scattered loops
    that read as noise. A node whose neighbourhood of one wavelength reaches the
    undisturbed level is taken as open sea; its isolines are left out while the colour
    fill still shows every value (cartographic generalisation: the exports keep every
    isoline). Sheltered water, whose K' stays below 1 over a wavelength, keeps its
    isolines.
    """
    f = np.asarray(field, float)
    h = _cell(x, y)
    if not (np.isfinite(wavelength) and wavelength > 0 and h > 0) or f.size == 0:
        return np.zeros(f.shape, bool)
    from scipy import ndimage

    n = max(3, int(round(wavelength / h)) | 1)
    hi = ndimage.maximum_filter(np.where(np.isnan(f), -np.inf, f), size=n, mode="nearest")
    return hi >= ceiling


def _drop_specks(cs, min_size: float):
    """Remove contour pieces smaller than ``min_size`` (m) across: closed specks where
    a noisy field just touches a level (K' = 1.0 in open water) carry no information."""
    from matplotlib.path import Path as _P

    new = []
    for path in cs.get_paths():
        if path.codes is None or len(path.vertices) == 0:
            new.append(path)
            continue
        starts = np.flatnonzero(path.codes == _P.MOVETO)
        ends = np.append(starts[1:], len(path.vertices))
        keep_v, keep_c = [], []
        for a, b in zip(starts, ends):
            v = path.vertices[a:b]
            if np.hypot(*(v.max(axis=0) - v.min(axis=0))) >= min_size:
                keep_v.append(v)
                keep_c.append(path.codes[a:b])
        if keep_v:
            new.append(_P(np.concatenate(keep_v), np.concatenate(keep_c)))
        else:
            new.append(_P(np.zeros((0, 2))))
    cs.set_paths(new)


def _bleed(field: np.ndarray, cells: int = 2) -> np.ndarray:
    """Extend valid values into NaN cells by up to ``cells`` cells, for display only.

    The result is NaN on land cells, so filled contours stop up to one cell short of the
    land outline and leave a blank sliver; land is drawn on top, so spreading the nearest
    values a cell or two under it closes the sliver without showing anything new on the
    water. Values in the file exports are never altered.
    """
    f = np.array(field, float)
    for _ in range(cells):
        nan = np.isnan(f)
        if not nan.any() or nan.all():
            break
        p = np.pad(f, 1, constant_values=np.nan)
        neigh = np.stack([p[:-2, 1:-1], p[2:, 1:-1], p[1:-1, :-2], p[1:-1, 2:]])
        cnt = np.sum(~np.isnan(neigh), axis=0)
        mean = np.nansum(neigh, axis=0) / np.maximum(cnt, 1)
        f = np.where(nan & (cnt > 0), mean, f)
    return f


def draw_map(fig, box, result, scenario, sea, show="kd", scale=None, label_fontsize=7.5,
             halign="left", valign="top"):
    """Draw the sheltering map of one sea state into ``fig``.

    Parameters
    ----------
    fig : matplotlib.figure.Figure
    box : (left, bottom, width, height)
        Region for the map axes, inches.
    result : xarray.Dataset
        The solved result (see :func:`harbor.solve`).
    scenario : harbor.study.scenario.Scenario or None
        Supplies arms, land and point limits; ``None`` draws the field and points only.
    sea : str, int or Sea
        Which sea state.
    show : {"kd", "height"}
        Colour the map by K' or by wave height.
    scale : float, optional
        Print scale denominator (see :func:`fit_axes_rect`).
    label_fontsize : float
        Point-label size (pt).
    halign, valign : str
        Placement of the map in ``box`` (see :func:`fit_axes_rect`).

    Returns
    -------
    dict
        ``ax``, ``mappable`` (for the colour bar), ``label`` (colour-bar label),
        ``scale`` (printed scale denominator), ``info`` (sea attributes), ``levels``,
        ``extend``, ``handles`` (legend entries), ``name`` (sea state) and ``points``
        (:func:`point_rows`, for :func:`draw_point_table`).
    """
    name = sea_name(result, sea)
    info = sea_info(result, name)
    var, cbar_label = quantity(show, info["random"])
    field = np.asarray(result[var].sel(sea=name).transpose("y", "x").values, float)
    x = np.asarray(result["x"].values, float)
    y = np.asarray(result["y"].values, float)
    xlim, ylim = (x.min(), x.max()), (y.min(), y.max())

    ax, denom = fit_axes_rect(fig, box, xlim, ylim, scale, halign, valign)
    ax.set_facecolor("#f2f2f2")
    fill, lines, open_top = fill_levels(field, show, info["height"])
    field = _bleed(field)
    cmap = mpl.colormaps[CMAP]
    extend = "max" if open_top else "neither"
    norm = mcolors.BoundaryNorm(fill, cmap.N, extend=extend)
    cf = ax.contourf(x, y, field, levels=fill, cmap=cmap, norm=norm, extend=extend, zorder=1)

    # Isoline colour: white over the dark end of the map, near-black over the light end.
    def ink_for(level):
        r, g, b, _ = cmap(norm(level))
        return "white" if 0.2126 * r + 0.7152 * g + 0.0722 * b < 0.45 else "#111111"

    line_colours = [ink_for(v) for v in lines]
    scale_h = 1.0 if show == "kd" else (info["height"] if np.isfinite(info["height"]) else 1.0)
    busy = busy_mask(field, x, y, info["wavelength"], 0.6 * scale_h)
    open_sea = open_sea_mask(field, x, y, info["wavelength"], 1.0 * scale_h)
    line_field = np.where(arm_mask(x, y, scenario) | busy | open_sea, np.nan, field)
    cs = ax.contour(x, y, line_field, levels=lines, colors=line_colours, linewidths=0.7, zorder=2)
    _drop_specks(cs, 2.5 * _cell(x, y))
    if show == "kd":
        def fmt(v):
            return f"{v:.1f}" if abs(v * 10 - round(v * 10)) < 1e-6 else f"{v:.2f}"
    else:
        step = float(fill[1] - fill[0]) if fill.size > 1 else 1.0
        dec = max(0, -math.floor(math.log10(step) + 1e-9)) + (1 if round(step / 10 ** math.floor(
            math.log10(step)), 6) == 2.5 else 0)

        def fmt(v):
            return f"{v:.{dec}f} m"
    labels = ax.clabel(cs, inline=True, fontsize=7, fmt=fmt, inline_spacing=3)
    for t in labels:
        t.set_zorder(3)

    layout = getattr(scenario, "layout", None) if scenario is not None else None
    handles = []
    if layout is not None:
        for land in getattr(layout, "lands", ()):
            # Two patches: the hatch takes its own (lighter) colour, the outline a darker one.
            kw = {"edgecolor": "none", **_land_hatch()}
            p = _polygon_patch(land.outline, facecolor=LAND_FACE, linewidth=0.0, zorder=5, **kw)
            if p is not None:
                ax.add_patch(p)
                ax.add_patch(_polygon_patch(land.outline, fill=False, edgecolor=LAND_EDGE,
                                            linewidth=0.9, zorder=5.1))
        # The field jumps across an arm but is contoured between grid nodes, so a band
        # one cell wide on each side of the arm shows squeezed isolines that mean
        # nothing; the white casing of the arm covers that band.
        pts_per_m = ax.get_position().width * fig.get_size_inches()[0] * 72.0 / (xlim[1] - xlim[0])
        cell = float(np.nanmax(np.abs(np.diff(x)))) if x.size > 1 else 0.0
        casing = float(np.clip(2.0 * cell * pts_per_m + 1.0, 5.4, 14.0))
        for arm in getattr(layout, "arms", ()):
            xy = np.asarray(arm.line, float)
            ax.plot(xy[:, 0], xy[:, 1], color=ARM_COLOUR, linewidth=3.2, solid_capstyle="butt",
                    solid_joinstyle="round", zorder=7,
                    path_effects=[patheffects.withStroke(linewidth=casing, foreground="white")])
            for tip, _inward in arm.heads():
                ax.plot(tip[0], tip[1], marker="o", markersize=7, markerfacecolor=ARM_COLOUR,
                        markeredgecolor="white", markeredgewidth=1.4, zorder=8)
        if getattr(layout, "lands", ()):
            handles.append(Patch(facecolor=LAND_FACE, linewidth=0.8, label="land",
                                 **{**_land_hatch(), "edgecolor": LAND_EDGE}))
        if getattr(layout, "arms", ()):
            handles.append(Line2D([], [], color=ARM_COLOUR, lw=3.2, label="breakwater arm",
                                  path_effects=[patheffects.withStroke(linewidth=5.4,
                                                                       foreground="white")]))
            handles.append(Line2D([], [], ls="", marker="o", markersize=7,
                                  markerfacecolor=ARM_COLOUR, markeredgecolor="white",
                                  markeredgewidth=1.4, label="breakwater head (diffracting)"))

    ax.set_xlim(*xlim)
    ax.set_ylim(*ylim)
    ax.set_xlabel(f"Easting [m] ({crs_label(result)})", fontsize=8.5)
    ax.set_ylabel("Northing [m]", fontsize=8.5)
    ax.ticklabel_format(useOffset=False, style="plain")
    ax.tick_params(labelsize=7.5)
    for lab in ax.get_yticklabels():
        lab.set_rotation(90)
        lab.set_va("center")

    obstacles = [_north_arrow(fig, ax, float(result.attrs.get("convergence_deg", 0.0) or 0.0)),
                 _scale_bar(fig, ax, result.attrs.get("scale_factor", 1.0))]
    point_handles = _draw_points(fig, ax, result, scenario, name, info, obstacles,
                                 label_fontsize)
    handles.extend(point_handles)
    return {"ax": ax, "mappable": cf, "label": cbar_label, "scale": denom, "info": info,
            "levels": fill, "extend": extend, "handles": handles, "name": name,
            "points": point_rows(result, scenario, name)}


def point_rows(result, scenario, name):
    """Per-point values for sea ``name``: list of dicts (name, x, y, kd, height, limit, ok).

    ``limit`` comes from the result (``point_limit``), falling back to the scenario's
    points; ``ok`` is ``None`` when there is no limit or no height (point on land).
    """
    if "point" not in result.dims or result.sizes.get("point", 0) == 0:
        return []
    limits_s = {p.name: p.limit for p in getattr(scenario, "points", ())} if scenario else {}
    r = result.sel(sea=name)
    rows = []
    for i, pname in enumerate(result["point"].values):
        pname = str(pname)
        lim = float(result["point_limit"].values[i]) if "point_limit" in result else float("nan")
        if not np.isfinite(lim) and limits_s.get(pname) is not None:
            lim = float(limits_s[pname])
        h = float(r["point_height"].values[i]) if "point_height" in r else float("nan")
        kd = float(r["point_kd"].values[i]) if "point_kd" in r else float("nan")
        pr = float(r["point_period_ratio"].values[i]) if "point_period_ratio" in r else float("nan")
        ok = None
        if np.isfinite(lim) and np.isfinite(h):
            ok = bool(h <= lim)
        rows.append({"name": pname, "x": float(result["point_x"].values[i]),
                     "y": float(result["point_y"].values[i]), "kd": kd, "height": h,
                     "period_ratio": pr, "limit": lim if np.isfinite(lim) else None, "ok": ok})
    return rows


def _draw_points(fig, ax, result, scenario, name, info, obstacles, fontsize):
    """Mark each point and place its label where it hides the least."""
    rows = point_rows(result, scenario, name)
    if not rows:
        return []
    hs = height_symbol(info["random"])
    markers = []
    style = {True: dict(marker="o", markerfacecolor=OK_COLOUR),
             False: dict(marker="X", markerfacecolor=OVER_COLOUR),
             None: dict(marker="o", markerfacecolor="white")}
    for row in rows:
        (m,) = ax.plot(row["x"], row["y"], ls="", markersize=8, markeredgecolor=INK,
                       markeredgewidth=1.0, zorder=12, clip_on=False, **style[row["ok"]])
        markers.append(m)

    canvas = fig.canvas if isinstance(fig.canvas, FigureCanvasAgg) else FigureCanvasAgg(fig)
    renderer = canvas.get_renderer()
    ax_box = ax.get_window_extent(renderer)
    placed = [o.get_window_extent(renderer) for o in obstacles]
    # Markers weigh as much as the arms: a label must never hide a point.
    # Another point's marker keeps a wider berth, so no label sits beside the wrong point.
    own_boxes = [m.get_window_extent(renderer).expanded(1.3, 1.3) for m in markers]
    other_boxes = [m.get_window_extent(renderer).expanded(3.0, 3.0) for m in markers]
    # Labels must not hide the structures: sample the arms densely as small obstacles
    # that weigh much more than another label, so a label crosses an arm only when no
    # other place is left.
    px = fig.dpi / 72.0
    arm_boxes = []
    layout = getattr(scenario, "layout", None) if scenario is not None else None
    for arm in getattr(layout, "arms", ()):
        xy = ax.transData.transform(np.asarray(arm.line, float))
        for p0, p1 in zip(xy[:-1], xy[1:]):
            n = max(2, int(np.hypot(*(p1 - p0)) / (3.0 * px)) + 1)
            for t in np.linspace(0.0, 1.0, n):
                cx, cy = p0 + t * (p1 - p0)
                arm_boxes.append(transforms.Bbox([[cx - 3 * px, cy - 3 * px],
                                                  [cx + 3 * px, cy + 3 * px]]))
    near = [(9, 7, "left", "bottom"), (9, -7, "left", "top"), (-9, 7, "right", "bottom"),
            (-9, -7, "right", "top"), (0, 11, "center", "bottom"),
            (0, -11, "center", "top"), (14, 0, "left", "center"), (-14, 0, "right", "center")]
    # Farther rings, with a thin leader line back to the point.
    far = [(f * dx, f * dy, ha, va) for f in (2.0, 3.5) for dx, dy, ha, va in near]
    candidates = [(c, False) for c in near] + [(c, True) for c in far]
    # The label carries the name and the height; the limit and the verdict are in the
    # marker (and in the point table beside the map), which keeps labels short enough
    # to fit a small basin.
    for i, row in enumerate(rows):
        marker_boxes = [own_boxes[j] if j == i else other_boxes[j] for j in range(len(rows))]
        if not np.isfinite(row["height"]):
            val = "no value (land / off grid)"
        else:
            val = f"{hs} = {row['height']:.2f} m"
        text = f"{row['name']}\n{val}"
        colour = {True: OK_COLOUR, False: OVER_COLOUR, None: INK}[row["ok"]]
        best, best_score = None, None
        for (dx, dy, ha, va), leader in candidates:
            t = ax.annotate(text, (row["x"], row["y"]), xytext=(dx, dy), textcoords="offset points",
                            ha=ha, va=va, fontsize=fontsize, color=colour, zorder=14,
                            annotation_clip=False, linespacing=1.15,
                            bbox=dict(boxstyle="round,pad=0.25", facecolor="white",
                                      edgecolor=colour, linewidth=0.6, alpha=0.9),
                            arrowprops=(dict(arrowstyle="-", color=colour, lw=0.9,
                                             shrinkA=0, shrinkB=4, path_effects=_HALO)
                                        if leader else None))
            # The text extent excludes its rounded box (pad 0.25 em) and a little air.
            # (Text's extent, not the Annotation's, which would include the leader line.)
            t.update_positions(renderer)
            bb = Text.get_window_extent(t, renderer).padded((0.25 * fontsize + 1.5) * px)
            score = sum(_overlap(bb, p) for p in placed)
            score += 40.0 * sum(_overlap(bb, p) for p in arm_boxes + marker_boxes)
            # Leaving the map frame is worse than touching another label.
            outside = max(0, ax_box.x0 - bb.x0) + max(0, bb.x1 - ax_box.x1) \
                + max(0, ax_box.y0 - bb.y0) + max(0, bb.y1 - ax_box.y1)
            score += 4 * outside * bb.height
            # A far place must buy a real improvement: a leader line costs a little.
            score += (0.02 * abs(dx) + 0.02 * abs(dy)) * bb.width * bb.height / 10.0 \
                if leader else 0.0
            if best_score is None or score < best_score - 1e-9:
                if best is not None:
                    best[0].remove()
                best, best_score = (t, bb), score
            else:
                t.remove()
            if best_score == 0:
                break
        placed.append(best[1])
    handles = []
    kinds = {r["ok"] for r in rows}
    if True in kinds:
        handles.append(Line2D([], [], ls="", markersize=8, markeredgecolor=INK,
                              label="point: meets its limit", **style[True]))
    if False in kinds:
        handles.append(Line2D([], [], ls="", markersize=8, markeredgecolor=INK,
                              label="point: over its limit", **style[False]))
    if None in kinds:
        handles.append(Line2D([], [], ls="", markersize=8, markeredgecolor=INK,
                              label="point (no limit given)", **style[None]))
    return handles


def _overlap(a, b) -> float:
    w = min(a.x1, b.x1) - max(a.x0, b.x0)
    h = min(a.y1, b.y1) - max(a.y0, b.y0)
    return w * h if w > 0 and h > 0 else 0.0


def draw_colorbar(fig, drawn, rect=None, orientation="vertical"):
    """Add the colour bar of a drawn map; ``rect`` in inches, default: right of the map."""
    ax = drawn["ax"]
    fw, fh = fig.get_size_inches()
    if rect is None:
        pos = ax.get_position()
        rect = ((pos.x1 * fw) + 0.18, pos.y0 * fh, 0.16, pos.height * fh)
    cax = fig.add_axes((rect[0] / fw, rect[1] / fh, rect[2] / fw, rect[3] / fh))
    levels = drawn["levels"]
    ticks = levels if len(levels) <= 16 else levels[::2]
    cb = fig.colorbar(drawn["mappable"], cax=cax, orientation=orientation, ticks=ticks,
                      spacing="proportional")
    cb.set_label(drawn["label"], fontsize=8.5)
    cb.ax.tick_params(labelsize=7.5)
    return cb


def draw_legend(fig, drawn, anchor, fontsize=7.5):
    """Draw the map key with its upper-left corner at ``anchor`` (inches)."""
    fw, fh = fig.get_size_inches()
    if not drawn["handles"]:
        return None
    return fig.legend(handles=drawn["handles"], loc="upper left",
                      bbox_to_anchor=(anchor[0] / fw, anchor[1] / fh), fontsize=fontsize,
                      frameon=False, title="Key", title_fontsize=fontsize + 0.5,
                      alignment="left", handlelength=2.2, borderaxespad=0.0)


def draw_point_table(fig, drawn, anchor, width, fontsize=7.5, max_rows=None):
    """Tabulate the points of a drawn map: name, height, limit and verdict.

    Parameters
    ----------
    fig : matplotlib.figure.Figure
    drawn : dict
        Returned by :func:`draw_map`.
    anchor : (float, float)
        Upper-left corner, inches from the figure's lower-left corner.
    width : float
        Width available, inches; long names are shortened to fit.
    fontsize : float
        Text size, pt.
    max_rows : int, optional
        Rows to show at most; the rest are counted in a last line.

    Returns
    -------
    float
        Height used, inches (0 when the map has no points).
    """
    rows = drawn.get("points") or []
    if not rows:
        return 0.0
    fw, fh = fig.get_size_inches()
    width = min(width, 3.0)  # a wider table only separates a name from its values
    random = drawn["info"]["random"]
    hs = "H1/3" if random else "H"
    line_h = fontsize * 1.45 / 72.0
    em = fontsize / 72.0
    # Right-aligned number columns at fixed widths; the name takes what is left.
    cols = [("height", f"{hs} [m]", 5.2 * em), ("limit", "limit [m]", 5.4 * em),
            ("ok", "", 4.2 * em)]
    name_w = max(0.6, width - sum(c[2] for c in cols))
    name_chars = max(6, int(name_w / (0.55 * em)) - 1)
    x0, y = anchor
    fig.text(x0 / fw, y / fh, "Points", fontsize=fontsize + 0.5, color=INK, va="top")
    y -= (fontsize + 0.5) * 1.6 / 72.0

    def put(values, colour=INK, weight="normal"):
        fig.text(x0 / fw, y / fh, values[0], fontsize=fontsize, color=colour, va="top",
                 fontweight=weight)
        x = x0 + name_w
        for (_, _, w), v in zip(cols, values[1:]):
            x += w
            fig.text(x / fw, y / fh, v, fontsize=fontsize, color=colour, va="top", ha="right",
                     fontweight=weight)

    put(["point", *[c[1] for c in cols]], colour=MUTED)
    y -= line_h
    fig.add_artist(Line2D([x0 / fw, (x0 + width) / fw], [(y + 0.25 * line_h) / fh] * 2,
                          color="#bbbbbb", lw=0.5))
    shown = rows if max_rows is None else rows[:max_rows]
    for row in shown:
        h = f"{row['height']:.2f}" if np.isfinite(row["height"]) else "–"
        lim = f"{row['limit']:.2f}" if row["limit"] is not None else "–"
        verdict = {True: "ok", False: "OVER", None: ""}[row["ok"]]
        colour = {True: OK_COLOUR, False: OVER_COLOUR, None: INK}[row["ok"]]
        put([textwrap.shorten(row["name"], name_chars, placeholder="…"), h, lim, verdict],
            colour=colour)
        y -= line_h
    if len(shown) < len(rows):
        fig.text(x0 / fw, y / fh, f"(+{len(rows) - len(shown)} more: see points.csv)",
                 fontsize=fontsize, color=MUTED, va="top")
        y -= line_h
    return anchor[1] - y


def title_lines(result, scenario, info) -> tuple[str, str, str]:
    """(title, sea-state line, method line) shared by the map and the sheet."""
    title = str(result.attrs.get("title") or getattr(scenario, "title", "") or "Harbour layout")
    method = f"Method: {info['method']}" if info["method"] else ""
    extra = []
    if np.isfinite(info["wavelength"]):
        extra.append(f"L = {info['wavelength']:.1f} m at the {'significant ' if info['random'] else ''}period")
    depth = result.attrs.get("depth")
    if depth not in (None, ""):
        try:
            extra.append(f"depth {float(depth):g} m")
        except (TypeError, ValueError):
            pass
    if extra:
        method += ("; " if method else "") + ", ".join(extra)
    return title, "Sea state " + sea_label(info), method


def warning_lines(result) -> list[str]:
    """The validity warnings of the result as a list of non-empty lines."""
    return [w.strip() for w in str(result.attrs.get("warnings", "") or "").splitlines()
            if w.strip()]


def wrap_to(text: str, width_in: float, fontsize: float) -> list[str]:
    """Wrap ``text`` to a width in inches (DejaVu Sans averages about 0.55 em a glyph)."""
    chars = max(20, int(width_in * 72.0 / (fontsize * 0.55)))
    return textwrap.wrap(text, chars) or [""]


def new_figure(size=A4_LANDSCAPE) -> Figure:
    """A pyplot-free figure (Agg canvas) so that maps can be drawn from any thread."""
    fig = Figure(figsize=size)
    FigureCanvasAgg(fig)
    return fig


# --------------------------------------------------------------------------- public

def sheltering_map(result, scenario, sea, path, show="kd", dpi=170):
    """Write a PNG sheltering map of one sea state.

    Parameters
    ----------
    result : xarray.Dataset
        Solved result from :func:`harbor.solve` (variables ``kd``, ``height`` on
        (sea, y, x) in metres of the work frame; per-sea and per-point variables; attributes
        ``title``, ``crs``, ``convergence_deg``, ``warnings`` ...).
    scenario : harbor.study.scenario.Scenario or None
        The scenario solved (arms, land and point limits are drawn from it).
    sea : str, int or Sea
        The sea state to map.
    path : str or os.PathLike
        Output PNG file; written atomically.
    show : {"kd", "height"}
        Colour by the diffraction coefficient K' = H / H_incident or by the wave height
        H (regular) / H1/3 (random), m.
    dpi : int
        Raster resolution; the figure is A4 landscape (297 x 210 mm).

    Returns
    -------
    pathlib.Path
        The written file.

    Notes
    -----
    Nothing is computed here: colours, isolines and point values are read from the
    result. The north arrow points to true north, at grid bearing -convergence (grid
    bearing = true bearing - convergence).

    References
    ----------
    .. [1] Crameri, F., Shephard, G. E. and Heron, P. J. (2020). The misuse of colour in
       science communication. Nature Communications 11, 5444 (why a perceptually uniform
       colour map).
    .. [2] Nunez, J. R., Anderton, C. R. and Renslow, R. S. (2018). Optimizing colormaps
       with consideration for color vision deficiency. PLoS ONE 13(7), e0199239
       (the cividis colour map).
    """
    x = result["x"].values
    y = result["y"].values
    tall = float(y.max() - y.min()) > 1.15 * float(x.max() - x.min())
    # A4 portrait for a layout taller than wide, so the map is not a thin strip.
    fig = new_figure(A4_LANDSCAPE[::-1] if tall else A4_LANDSCAPE)
    fw, fh = fig.get_size_inches()
    margin = 0.75
    name = sea_name(result, sea)
    info = sea_info(result, name)
    title, sea_line, method = title_lines(result, scenario, info)

    # Footer first (wrapped to the page), so the map takes what is left above it.
    warns = warning_lines(result)
    foot = []
    if warns:
        first = textwrap.shorten(warns[0], 150, placeholder="...")
        if len(warns) > 1 or first != warns[0]:
            foot.append(f"Validity warning: {first} (+{len(warns) - 1} more: full list on the "
                        "PDF sheet and in the NetCDF file).")
        else:
            foot.append(f"Validity warning: {first}.")
    foot.append(CAUTION_SHORT)
    foot_lines = [ln for item in foot for ln in wrap_to(item, fw - 2 * margin + 0.25, 7.5)]
    prov = (f"harbor {result.attrs.get('harbor_version', '')}  \u00b7  "
            f"{str(result.attrs.get('created', ''))[:19].replace('T', ' ')}  \u00b7  "
            f"scenario: {result.attrs.get('scenario', '') or getattr(scenario, 'path', '') or '(in code)'}")
    line_h = 7.5 * 1.25 / 72.0
    foot_top = 0.38 + len(foot_lines) * line_h
    title_size = 14.0
    while len(wrap_to(title, fw - 2 * margin, title_size)) > 1 and title_size > 10.5:
        title_size -= 0.5
    head_lines = [textwrap.shorten(title, len(wrap_to(title, fw - 2 * margin, title_size)[0]),
                                   placeholder=" ..."), sea_line, method]

    method_size = 8.5 if not tall else 7.5
    method_lines = wrap_to(method, fw - 2 * margin + 0.2, method_size)[:2]
    head_h = 0.80 + len(method_lines) * method_size * 1.25 / 72.0 + 0.1
    side = 3.15 if not tall else 2.9
    drawn = draw_map(fig, (margin, foot_top + 0.75, fw - margin - side,
                           fh - foot_top - 0.75 - head_h), result, scenario, name, show)
    draw_colorbar(fig, drawn)
    pos = drawn["ax"].get_position()
    key_x = pos.x1 * fw + 1.15
    legend = draw_legend(fig, drawn, (key_x, pos.y1 * fh), fontsize=7.5 if not tall else 7.0)
    y_table = pos.y1 * fh
    if legend is not None:
        y_table = legend.get_window_extent(fig.canvas.get_renderer()).y0 / fig.dpi - 0.25
    room = y_table - pos.y0 * fh
    fs = 7.5 if not tall else 7.0
    draw_point_table(fig, drawn, (key_x, y_table), fw - margin + 0.25 - key_x, fontsize=fs,
                     max_rows=max(1, int(room / (fs * 1.45 / 72.0)) - 3))

    fig.text(margin / fw, 1 - 0.28 / fh, head_lines[0], fontsize=title_size, fontweight="bold",
             color=INK, va="top")
    fig.text(margin / fw, 1 - 0.58 / fh, sea_line, fontsize=10.5 if not tall else 9.5,
             color=INK, va="top")
    fig.text(margin / fw, 1 - 0.80 / fh, "\n".join(method_lines), fontsize=method_size,
             color=MUTED, va="top", linespacing=1.25)
    fig.text(margin / fw, 0.38 / fh, "\n".join(foot_lines), fontsize=7.5, color=INK,
             va="bottom", linespacing=1.25)
    fig.text(margin / fw, 0.16 / fh, prov, fontsize=6.5, color=MUTED, va="bottom")
    y_rule = (foot_top + 0.12) / fh
    fig.add_artist(Line2D([margin / fw, 1 - 0.5 / fw], [y_rule, y_rule], color="#bbbbbb",
                          lw=0.6))
    with atomic_path(path) as tmp:
        fig.savefig(tmp, dpi=dpi, format="png", facecolor="white")
    return Path(path)
