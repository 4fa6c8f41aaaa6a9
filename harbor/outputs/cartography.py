"""Cartography of the maps: equal-aspect axes at a print scale, north arrow to true
north, scale bar, land patches, and the display-only generalisation of isolines
(standing-wave and open-sea masks, specks, the sliver under land).
"""

from __future__ import annotations

import math

import numpy as np
import shapely
from matplotlib import patheffects, transforms
from matplotlib.patches import Circle, Patch, PathPatch, Polygon as MplPolygon, Rectangle
from matplotlib.path import Path as MplPath

from harbor.outputs.read import cell_size
from harbor.outputs.style import (DEPTH_COLOUR, DEPTH_DASHES, DEPTH_HALO, DEPTH_LINEWIDTH,
                                  INK, LAND_HATCH, LAND_HATCH_STYLE, MUTED,
                                  REFLECTION_CLASSES, nice_below, nice_step,
                                  reflection_class, reflection_range)


_HALO = [patheffects.withStroke(linewidth=3.0, foreground="white")]


def _land_hatch() -> dict:
    """Patch keywords of the land hatch; matplotlib < 3.10 takes the hatch colour from
    the edge colour, so the hatch patch then gets the hatch colour as its (zero-width)
    edge."""
    if hasattr(Patch, "set_hatchcolor"):
        return dict(hatch=LAND_HATCH_STYLE, hatchcolor=LAND_HATCH)
    return dict(hatch=LAND_HATCH_STYLE, edgecolor=LAND_HATCH)


def fit_axes_rect(fig, box, xlim, ylim, scale=None, halign="left", valign="top",
                  scale_factor=1.0):
    """Place an axes of equal aspect inside ``box`` (inches) and return it.

    Parameters
    ----------
    fig : matplotlib.figure.Figure
    box : (left, bottom, width, height)
        Available region in inches from the figure's lower-left corner.
    xlim, ylim : (min, max)
        Data extent in work-frame (CRS) units.
    scale : float, optional
        If given, print at exactly 1:scale (metres of ground per metre of paper); the
        axes may then be smaller than ``box``. Otherwise the largest equal-aspect box.
    halign : {"left", "center"}
        Horizontal placement of the axes inside ``box``.
    valign : {"top", "center"}
        Vertical placement of the axes inside ``box``.
    scale_factor : float
        The result's ``scale_factor``: work-frame length per ground metre at the site
        (1 for ground metres; about 1.41 for Web Mercator at 45 degrees of latitude).

    Returns
    -------
    (matplotlib.axes.Axes, float)
        The axes (placed in ``box`` as asked) and the printed scale denominator in
        ground units (ground metres per metre of paper).

    Notes
    -----
    With s the paper length per CRS unit, a ground distance d_g spans
    d_crs = k d_g CRS units (k the scale factor) and s k d_g on paper, so the print
    scale is 1:N with N = 1 / (s k). A projected CRS is conformal, so k is the same in
    every direction at the site (Snyder 1987).

    References
    ----------
    Snyder, J. P. (1987). Map Projections - A Working Manual. U.S. Geological Survey
    Professional Paper 1395.
    """
    k = float(scale_factor) if scale_factor and np.isfinite(float(scale_factor)) else 1.0
    left, bottom, width, height = box
    dx, dy = xlim[1] - xlim[0], ylim[1] - ylim[0]
    if scale is None:
        s = min(width / dx, height / dy)  # inches per CRS unit
    else:
        s = 39.37007874 / (scale * k)
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
    return ax, 1.0 / (s * 0.0254 * k)


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
    h = cell_size(x, y)
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
    h = cell_size(x, y)
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


# ------------------------------------------------------------ bathymetry and boundaries

def depth_field(result):
    """The still-water depth of a result at its grid nodes, when it varies.

    Parameters
    ----------
    result : xarray.Dataset
        A result of :func:`harbor.solve`; the variable ``depth`` (y, x), m below still
        water, NaN on land and arms, is optional (older results have none).

    Returns
    -------
    numpy.ndarray (ny, nx) or None
        None when the result has no ``depth`` grid, when its attribute ``constant`` is
        1, or when it holds one value everywhere: a constant depth draws no contours.
    """
    if "depth" not in result.data_vars or set(result["depth"].dims) != {"y", "x"}:
        return None
    var = result["depth"]
    try:
        if int(var.attrs.get("constant", 0) or 0) == 1:
            return None
    except (TypeError, ValueError):
        pass
    d = np.asarray(var.transpose("y", "x").values, float)
    fin = d[np.isfinite(d)]
    if fin.size < 4 or float(fin.max() - fin.min()) <= 1e-6 * max(1.0, float(np.abs(fin).max())):
        return None
    return d


def depth_range_text(result) -> str:
    """``depths 1.5-18.0 m over the map`` for a result with a varying depth, else ""."""
    d = depth_field(result)
    if d is None:
        return ""
    return f"depths {np.nanmin(d):.1f}\u2013{np.nanmax(d):.1f} m over the map"


def depth_levels(depth, target: int = 6) -> np.ndarray:
    """Round depths (m) for the contours of a depth grid: about ``target`` levels.

    Parameters
    ----------
    depth : numpy.ndarray
        Depths, m; NaN ignored.
    target : int
        About how many contours to draw.

    Returns
    -------
    numpy.ndarray
        Levels strictly inside (min, max), at a round step (1, 2, 2.5 or 5 x 10^n m);
        empty when the range is too small for one.
    """
    fin = np.asarray(depth, float)
    fin = fin[np.isfinite(fin)]
    if fin.size == 0:
        return np.zeros(0)
    lo, hi = float(fin.min()), float(fin.max())
    step = nice_step(hi - lo, target)
    first = step * math.floor(lo / step + 1.0 + 1e-9)
    levels = np.round(np.arange(first, hi - 1e-9 * step, step), 10)
    return levels[(levels > lo) & (levels < hi)]


def draw_depth_contours(ax, x, y, depth, min_size):
    """Draw light depth contours (the context under the K' isolines).

    Parameters
    ----------
    ax : matplotlib.axes.Axes
        The map axes (work frame).
    x, y : numpy.ndarray
        Node coordinates.
    depth : numpy.ndarray (ny, nx)
        Still-water depth, m (:func:`depth_field`).
    min_size : float
        Contour pieces smaller than this across (work-frame units) are left out.

    Returns
    -------
    matplotlib.contour.QuadContourSet or None
        None when no round depth lies inside the range.

    Notes
    -----
    Thin dashed lines with a faint white halo, above the colour fill and below the K'
    isolines (zorder 1.6): they give the bathymetry without hiding the field. A
    surveyed channel edge that runs obliquely across the grid steps from node to node;
    the contours are drawn from the depth smoothed over about one grid cell (a
    Gaussian of sigma = 1 cell, normalised over the wet nodes), so they run smoothly
    and stay within about a cell of the isobath (cartographic generalisation: the
    result's depths are not changed, and nothing is drawn beyond the wet nodes).
    """
    levels = depth_levels(depth)
    if levels.size == 0:
        return None
    smooth = _smooth(depth)
    # A dredged basin or channel is a plateau at a round depth: contoured at exactly
    # that value the line wanders through the rounding noise of the plateau. Such a
    # level is drawn a hair deeper (2 % of the step), on the plateau's edge; it keeps
    # its round name (see :func:`depth_label`).
    step = float(np.diff(levels).min()) if levels.size > 1 else max(abs(levels[0]), 1.0)
    wet = smooth[np.isfinite(smooth)]
    drawn = np.array([v + 0.02 * step if np.mean(np.abs(wet - v) < 1e-3 * step) > 0.01
                      else v for v in levels])
    cs = ax.contour(x, y, smooth, levels=drawn, colors=[DEPTH_COLOUR],
                    linewidths=DEPTH_LINEWIDTH, linestyles=[DEPTH_DASHES], zorder=1.6)
    cs.set_path_effects([patheffects.withStroke(linewidth=DEPTH_LINEWIDTH + 1.1,
                                                foreground=DEPTH_HALO, alpha=0.45)])
    _drop_specks(cs, min_size)
    cs.harbor_step = step
    return cs


def depth_label(cs, value) -> str:
    """The name of a drawn depth contour: its round depth in metres (``6 m``)."""
    step = getattr(cs, "harbor_step", None)
    if step:
        value = round(float(value) / step) * step
    return f"{round(float(value), 6):g} m"


def _smooth(depth, sigma: float = 1.0) -> np.ndarray:
    """Gaussian smoothing (sigma in cells) of a grid with NaN, normalised over the
    finite nodes; NaN stays NaN."""
    from scipy import ndimage

    d = np.asarray(depth, float)
    wet = np.isfinite(d)
    num = ndimage.gaussian_filter(np.where(wet, d, 0.0), sigma, mode="constant")
    den = ndimage.gaussian_filter(wet.astype(float), sigma, mode="constant")
    with np.errstate(invalid="ignore", divide="ignore"):
        return np.where(wet & (den > 0), num / np.where(den > 0, den, 1.0), np.nan)


def depth_handle():
    """The key entry of the depth contours."""
    from matplotlib.lines import Line2D

    return Line2D([], [], color=DEPTH_COLOUR, lw=DEPTH_LINEWIDTH + 0.2, ls=DEPTH_DASHES,
                  label="depth contour (m below still water)")


def wall_lines(result) -> list:
    """The boundaries of a result with their reflection coefficients.

    Parameters
    ----------
    result : xarray.Dataset
        A result carrying ``wall_wkt`` (LineString or MultiLineString WKT, work frame),
        ``wall_reflection`` (K_r, 0-1) and ``wall_owner`` along dimension ``wall``.

    Returns
    -------
    list of dict
        ``owner`` (arm or land name), ``kr`` (float), ``lines`` (list of (n, 2) arrays);
        empty when the result has no walls.
    """
    if "wall_wkt" not in result or "wall_reflection" not in result:
        return []
    owners = (result["wall_owner"].values if "wall_owner" in result
              else [""] * result.sizes.get("wall", 0))
    out = []
    for wkt, kr, owner in zip(result["wall_wkt"].values, result["wall_reflection"].values,
                              owners):
        kr = float(kr)
        if not np.isfinite(kr):
            continue
        try:
            geom = shapely.from_wkt(str(wkt))
        except shapely.errors.GEOSException:  # an unreadable boundary is not drawn
            continue
        if geom is None:
            continue
        lines = [np.asarray(g.coords, float) for g in shapely.get_parts(geom)
                 if not g.is_empty and len(g.coords) >= 2]
        if lines:
            out.append({"owner": str(owner), "kr": kr, "lines": lines})
    return out


def _kr(v: float) -> str:
    """K_r as printed: one decimal, two when the second is not zero (1.0, 0.95, 0.4)."""
    return f"{v:.1f}" if abs(v * 10 - round(v * 10)) < 1e-6 else f"{v:.2f}"


def _owners_text(walls) -> str:
    """``west arm 0.45, basin quay 1.0`` (the first three, then how many more)."""
    seen = list(dict.fromkeys((w["owner"], round(w["kr"], 2)) for w in walls))
    parts = [f"{o} {_kr(k)}" if o else _kr(k) for o, k in seen[:3]]
    if len(seen) > 3:
        parts.append(f"+{len(seen) - 3} more")
    return ", ".join(parts)


def draw_walls(ax, walls, label_width=46):
    """Draw each boundary with the line style of its reflection class.

    Parameters
    ----------
    ax : matplotlib.axes.Axes
        The map axes (work frame).
    walls : list of dict
        :func:`wall_lines`.
    label_width : int
        Characters per line of the key entries.

    Returns
    -------
    list of matplotlib.lines.Line2D
        One key entry per class present, with its K_r range and the boundaries in it.

    Notes
    -----
    The classes are :data:`harbor.outputs.style.REFLECTION_CLASSES` (fully reflecting
    K_r >= 0.9, partly reflecting 0.3-0.9, absorbing < 0.3). The line runs over the arm
    or the land outline (zorder 7.4: above the arms, below the heads and the points),
    with a white halo so that it reads on any K' colour.
    """
    import textwrap

    from matplotlib.lines import Line2D

    by_class = {}
    for w in walls:
        by_class.setdefault(reflection_class(w["kr"]), []).append(w)
    handles = []
    for i in sorted(by_class):
        _, name, colour, dashes, lw, caps = REFLECTION_CLASSES[i]
        halo = [patheffects.withStroke(linewidth=lw + 1.6, foreground="white", alpha=0.8)]
        for w in by_class[i]:
            for xy in w["lines"]:
                ax.plot(xy[:, 0], xy[:, 1], color=colour, lw=lw, ls=dashes,
                        solid_capstyle="butt", dash_capstyle=caps, zorder=7.4,
                        path_effects=halo)
        rng = reflection_range(i).replace("K_r", "$K_r$")
        text = f"{name} boundary, {rng}"
        owners = textwrap.wrap("here: " + _owners_text(by_class[i]), label_width)
        handles.append(Line2D([], [], color=colour, lw=lw, ls=dashes, dash_capstyle=caps,
                              label="\n".join([text, *owners]), path_effects=halo))
    return handles
