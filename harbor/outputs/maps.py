"""Sheltering maps: a PNG of K' (or wave height) over the real layout.

The map reads only a solved result (``harbor.solve``): the field, the layout (arms, land
and heads as WKT), the points, the warnings and the CRS all travel in the Dataset; it
never recomputes physics. The drawing is split into reusable pieces (:func:`draw_map`,
:func:`draw_colorbar`, :func:`draw_legend`) so that the PDF sheet
(:mod:`harbor.outputs.sheet`) shows exactly the same map. Readers live in
:mod:`harbor.outputs.read`, the palette and round numbers in :mod:`harbor.outputs.style`,
the cartography in :mod:`harbor.outputs.cartography`, the point labels in
:mod:`harbor.outputs.labels`.
"""

from __future__ import annotations

import math
import textwrap
from pathlib import Path

import matplotlib as mpl
import numpy as np
from matplotlib import colors as mcolors
from matplotlib import patheffects
from matplotlib.lines import Line2D
from matplotlib.patches import Patch
from matplotlib.ticker import MaxNLocator

from harbor.cautions import CAUTION_SHORT, result_short_caution  # noqa: F401
from harbor.outputs._atomic import atomic_path
# Re-exported: these names were defined here before the module was split.
from harbor.outputs.cartography import (_HALO, _bleed, _drop_specks, _land_hatch,  # noqa: F401
                                        _north_arrow, _polygon_patch, _scale_bar, busy_mask,
                                        depth_field, depth_handle, depth_label,
                                        depth_range_text, draw_depth_contours, draw_walls,
                                        fit_axes_rect, open_sea_mask, true_north_vector,
                                        wall_lines)
from harbor.outputs.labels import (FLAG_COLOUR, _overlap, draw_point_table,  # noqa: F401
                                   draw_points)
from harbor.outputs.read import (arm_mask, cell_size, crs_label, layout_shapes,  # noqa: F401
                                 point_rows, sea_info, sea_name, title_lines, warning_lines)
from harbor.outputs.style import (A4_LANDSCAPE, ARM_COLOUR, CMAP, DEPTH_COLOUR,  # noqa: F401
                                  INK, KD_FILL, KD_LINES, LAND_EDGE, LAND_FACE, LAND_HATCH,
                                  LAND_HATCH_STYLE, MUTED, OK_COLOUR, OVER_COLOUR,
                                  SCALE_STEPS, compass, fill_levels, height_symbol,
                                  new_figure, nice_below, nice_step, quantity, round_number,
                                  method_reason, sea_label, standard_scale, wrap_to)

#: Hatch over the areas where the method is outside its measured validity (``~valid``).
INVALID_HATCH = "xx"
#: Least distance (inches on paper) between two labels of the same isoline level.
LABEL_SPACING_IN = 1.6
#: The same for depth contours, which are context and labelled more sparingly.
DEPTH_LABEL_SPACING_IN = 3.2
#: Words that name the full-field method in a result's ``sea_method`` (the mild-slope
#: engine; the finite-element reference solver of the accuracy checks, named "full-field
#: finite elements", takes every land edge as a rigid wall and is not meant).
FULL_FIELD_WORDS = ("mild-slope", "mild slope")


def _declutter_labels(ax, cs, fmt, fontsize, spacing_in=LABEL_SPACING_IN, avoid=(),
                      every_level=True, colour=None):
    """Label the isolines sparsely: at most one label per level within ``spacing_in``
    inches on paper, and none overlapping another label or a box in ``avoid``.

    matplotlib places a label on every piece of every line; in a cluttered basin that is
    dozens of "0.1"/"0.2" labels. The automatic positions are computed once, thinned, and
    the kept ones are placed again inline (cartographic generalisation only). With
    ``every_level`` each level keeps at least one label even where labels are crowded.
    """
    kw = {} if colour is None else {"colors": colour}
    trial = ax.clabel(cs, inline=False, fontsize=fontsize, fmt=fmt, **kw)
    if not trial:
        return []
    fig = ax.figure
    renderer = fig.canvas.get_renderer()
    kept, boxes, spots = [], list(avoid), []
    for t in trial:
        xy = np.asarray(t.get_position(), float)
        pos_in = ax.transData.transform(xy) / fig.dpi
        bb = t.get_window_extent(renderer).padded(2)
        same = [p for p, txt in spots if txt == t.get_text() and p is not None]
        if any(np.hypot(*(pos_in - p)) < spacing_in for p in same):
            continue
        if any(_overlap(bb, o) > 0 for o in boxes):
            continue
        kept.append(tuple(xy))
        boxes.append(bb)
        spots.append((pos_in, t.get_text()))
    # every level keeps at least one label, even where labels are crowded
    for t in trial if every_level else ():
        if t.get_text() not in {txt for _, txt in spots}:
            kept.append(tuple(np.asarray(t.get_position(), float)))
            spots.append((None, t.get_text()))
    for t in trial:
        t.remove()
    cs.labelTexts = []
    cs.labelXYs = []
    cs.labelCValues = []
    if not kept:
        return []
    return ax.clabel(cs, inline=True, fontsize=fontsize, fmt=fmt, inline_spacing=3,
                     manual=kept, **kw)


def _full_field_sea(result, sea) -> bool:
    """Whether sea state ``sea`` was solved by the full-field method (see
    :func:`reflection_shown`)."""
    methods = ([str(m).lower() for m in result["sea_method"].values]
               if "sea_method" in result else [])
    named = [any(w in m for w in FULL_FIELD_WORDS) for m in methods]
    if any(named):
        names = [str(s) for s in result["sea"].values]
        return bool(named[names.index(str(sea))])
    try:
        return int(result.attrs.get("full_field", 0) or 0) == 1
    except (TypeError, ValueError):
        return False


def reflection_shown(result, sea) -> bool:
    """Whether the map of ``sea`` draws the boundaries by reflection coefficient.

    Parameters
    ----------
    result : xarray.Dataset
    sea : str
        Sea state name.

    Returns
    -------
    bool
        True when the result carries walls (``wall_reflection``) and the sea state was
        solved by the full-field method: its ``sea_method`` names it, or the result's
        ``full_field`` attribute is 1 and no sea state's method name says which.

    Notes
    -----
    Only the full-field method uses the reflection coefficients; the screening methods
    treat every arm as a rigid wall and the land as a shore that takes the wave, so on
    their maps the K_r classes would describe a model that was not solved.
    """
    if "wall_reflection" not in result or result.sizes.get("wall", 0) == 0:
        return False
    return _full_field_sea(result, sea)


def _tick_locators(ax, fig):
    """Fewer ticks on a small map so that six-digit eastings never collide."""
    pos = ax.get_position()
    fw, fh = fig.get_size_inches()
    # a label like "4986200" at 7.5 pt is about 0.45 in long: leave twice that per tick
    ax.xaxis.set_major_locator(MaxNLocator(nbins=max(2, int(pos.width * fw / 0.95)),
                                           steps=[1, 2, 2.5, 5, 10]))
    ax.yaxis.set_major_locator(MaxNLocator(nbins=max(2, int(pos.height * fh / 0.95)),
                                           steps=[1, 2, 2.5, 5, 10]))


def draw_map(fig, box, result, sea, show="kd", scale=None, label_fontsize=7.5,
             halign="left", valign="top"):
    """Draw the sheltering map of one sea state into ``fig``.

    Parameters
    ----------
    fig : matplotlib.figure.Figure
    box : (left, bottom, width, height)
        Region for the map axes, inches.
    result : xarray.Dataset
        The solved result (see :func:`harbor.solve`): field, layout, points, CRS.
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
        ``extend``, ``handles`` (legend entries), ``name`` (sea state), ``points``
        (:func:`point_rows`, for :func:`draw_point_table`) and ``depth_contours`` (the
        depth contour set, None without a varying ``depth``).

    Notes
    -----
    Areas where ``valid`` is False (the method is outside its measured validity there)
    are cross-hatched and outlined in orange, and listed in the key. When the result
    holds a varying ``depth`` (y, x), light dashed depth contours (m below still water,
    labelled sparingly) lie over the colour fill and under the K' isolines; when the sea
    state was solved by the full-field method, every ``wall_*`` boundary is drawn by its
    reflection class (:func:`harbor.outputs.cartography.draw_walls`), each class present
    with its K_r range in the key. A result without these variables draws as before.
    """
    name = sea_name(result, sea)
    info = sea_info(result, name)
    var, cbar_label = quantity(show, info["random"])
    field = np.asarray(result[var].sel(sea=name).transpose("y", "x").values, float)
    x = np.asarray(result["x"].values, float)
    y = np.asarray(result["y"].values, float)
    xlim, ylim = (x.min(), x.max()), (y.min(), y.max())
    shapes = layout_shapes(result)
    h = cell_size(x, y)

    scale_factor = float(result.attrs.get("scale_factor", 1.0) or 1.0)
    ax, denom = fit_axes_rect(fig, box, xlim, ylim, scale, halign, valign, scale_factor)
    ax.set_facecolor("#f2f2f2")
    fill, lines, open_top = fill_levels(field, show, info["height"])
    wet = np.isfinite(field)
    field = _bleed(field)
    cmap = mpl.colormaps[CMAP]
    extend = "max" if open_top else "neither"
    norm = mcolors.BoundaryNorm(fill, cmap.N, extend=extend)
    cf = ax.contourf(x, y, field, levels=fill, cmap=cmap, norm=norm, extend=extend, zorder=1)
    depth = depth_field(result)
    depth_cs = None if depth is None else draw_depth_contours(ax, x, y, depth, 2.5 * h)

    # Isoline colour: white over the dark end of the map, near-black over the light end.
    def ink_for(level):
        r, g, b, _ = cmap(norm(level))
        return "white" if 0.2126 * r + 0.7152 * g + 0.0722 * b < 0.45 else "#111111"

    line_colours = [ink_for(v) for v in lines]
    scale_h = 1.0 if show == "kd" else (info["height"] if np.isfinite(info["height"]) else 1.0)
    # A full-field basin holds partial standing waves everywhere (walls and quays
    # reflect): K' swings by 0.3-0.5 within half a wavelength, and 0.1-step isolines
    # there become nests of small loops. Its isolines are generalised harder (the
    # colours still show every class; display only).
    ff = _full_field_sea(result, name)
    busy = busy_mask(field, x, y, info["wavelength"], (0.3 if ff else 0.6) * scale_h)
    open_sea = open_sea_mask(field, x, y, info["wavelength"], 1.0 * scale_h)
    line_field = np.where(arm_mask(result) | busy | open_sea, np.nan, field)
    cs = ax.contour(x, y, line_field, levels=lines, colors=line_colours, linewidths=0.7, zorder=2)
    L = info["wavelength"]
    _drop_specks(cs, max(2.5 * h, 0.5 * L) if ff and np.isfinite(L) else 2.5 * h)
    if show == "kd":
        def fmt(v):
            return f"{v:.1f}" if abs(v * 10 - round(v * 10)) < 1e-6 else f"{v:.2f}"
    else:
        step = float(fill[1] - fill[0]) if fill.size > 1 else 1.0
        dec = max(0, -math.floor(math.log10(step) + 1e-9)) + (1 if round(step / 10 ** math.floor(
            math.log10(step)), 6) == 2.5 else 0)

        def fmt(v):
            return f"{v:.{dec}f} m"
    kd_labels = _declutter_labels(ax, cs, fmt, 7)
    for t in kd_labels:
        t.set_zorder(3)
    # the north arrow and the scale bar sit in fixed corners (inches from the frame):
    # drawn now so that the depth labels can keep clear of them
    obstacles = [_north_arrow(fig, ax, float(result.attrs.get("convergence_deg", 0.0) or 0.0)),
                 _scale_bar(fig, ax, result.attrs.get("scale_factor", 1.0))]
    depth_labels = []
    if depth_cs is not None:
        renderer = fig.canvas.get_renderer()
        taken = [t.get_window_extent(renderer).padded(3) for t in [*kd_labels, *obstacles]]
        depth_labels = _declutter_labels(ax, depth_cs, lambda v: depth_label(depth_cs, v), 6,
                                         DEPTH_LABEL_SPACING_IN, taken, every_level=False,
                                         colour=DEPTH_COLOUR)
        for t in depth_labels:
            # italic, as soundings on a chart, so that "5 m" never reads as a height
            t.set_zorder(3)
            t.set_fontstyle("italic")
            t.set_path_effects([patheffects.withStroke(linewidth=1.6, foreground="white",
                                                       alpha=0.7)])

    handles = []
    if "valid" in result:
        invalid = ~np.asarray(result["valid"].sel(sea=name).transpose("y", "x").values, bool)
        invalid &= wet
        if invalid.any():
            z = invalid.astype(float)
            ax.contourf(x, y, z, levels=[0.5, 1.5], colors="none", hatches=[INVALID_HATCH],
                        zorder=4)
            ax.contour(x, y, z, levels=[0.5], colors=[FLAG_COLOUR], linewidths=1.2, zorder=4.1)
            handles.append(Patch(facecolor="none", edgecolor=FLAG_COLOUR, hatch=INVALID_HATCH,
                                 linewidth=1.2, label="method outside its validity"))

    for _, poly in shapes["lands"]:
        # Two patches: the hatch takes its own (lighter) colour, the outline a darker one.
        kw = {"edgecolor": "none", **_land_hatch()}
        p = _polygon_patch(poly, facecolor=LAND_FACE, linewidth=0.0, zorder=5, **kw)
        if p is not None:
            ax.add_patch(p)
            ax.add_patch(_polygon_patch(poly, fill=False, edgecolor=LAND_EDGE,
                                        linewidth=0.9, zorder=5.1))
    # The field jumps across an arm but is contoured between grid nodes, so a band
    # one cell wide on each side of the arm shows squeezed isolines that mean
    # nothing; the white casing of the arm covers that band.
    pts_per_m = ax.get_position().width * fig.get_size_inches()[0] * 72.0 / (xlim[1] - xlim[0])
    casing = float(np.clip(2.0 * h * pts_per_m + 1.0, 5.4, 14.0))
    for _, xy in shapes["arms"]:
        ax.plot(xy[:, 0], xy[:, 1], color=ARM_COLOUR, linewidth=3.2, solid_capstyle="butt",
                solid_joinstyle="round", zorder=7,
                path_effects=[patheffects.withStroke(linewidth=casing, foreground="white")])
    for tip in shapes["heads"]:
        ax.plot(tip[0], tip[1], marker="o", markersize=7, markerfacecolor=ARM_COLOUR,
                markeredgecolor="white", markeredgewidth=1.4, zorder=8)
    if shapes["lands"]:
        handles.append(Patch(facecolor=LAND_FACE, linewidth=0.8, label="land",
                             **{**_land_hatch(), "edgecolor": LAND_EDGE}))
    if shapes["arms"]:
        handles.append(Line2D([], [], color=ARM_COLOUR, lw=3.2, label="breakwater arm",
                              path_effects=[patheffects.withStroke(linewidth=5.4,
                                                                   foreground="white")]))
    if len(shapes["heads"]):
        handles.append(Line2D([], [], ls="", marker="o", markersize=7,
                              markerfacecolor=ARM_COLOUR, markeredgecolor="white",
                              markeredgewidth=1.4, label="diffracting head"))
    if reflection_shown(result, name):
        handles.extend(draw_walls(ax, wall_lines(result)))
    if depth_cs is not None:
        handles.append(depth_handle())

    ax.set_xlim(*xlim)
    ax.set_ylim(*ylim)
    ax.set_xlabel(f"Easting [m] ({crs_label(result)})", fontsize=8.5)
    ax.set_ylabel("Northing [m]", fontsize=8.5)
    ax.ticklabel_format(useOffset=False, style="plain")
    ax.tick_params(labelsize=7.5)
    _tick_locators(ax, fig)
    for lab in ax.get_yticklabels():
        lab.set_rotation(90)
        lab.set_va("center")

    obstacles += depth_labels
    handles.extend(draw_points(fig, ax, result, name, info, obstacles, label_fontsize))
    return {"ax": ax, "mappable": cf, "label": cbar_label, "scale": denom, "info": info,
            "levels": fill, "extend": extend, "handles": handles, "name": name,
            "points": point_rows(result, name), "depth_contours": depth_cs}


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


def sheltering_map(result, sea, path, show="kd", dpi=170):
    """Write a PNG sheltering map of one sea state, A4 landscape (297 x 210 mm).

    Parameters
    ----------
    result : xarray.Dataset
        Solved result from :func:`harbor.solve` (field, layout, points, warnings, CRS:
        nothing else is needed).
    sea : str, int or Sea
        The sea state to map.
    path : str or os.PathLike
        Output PNG file; written atomically.
    show : {"kd", "height"}
        Colour by the diffraction coefficient K' = H / H_incident or by the wave height
        H (regular) / H1/3 (random), m.
    dpi : int
        Raster resolution.

    Returns
    -------
    pathlib.Path
        The written file.

    Notes
    -----
    Nothing is computed here: colours, isolines and point values are read from the
    result. The map takes the left of the page; the key, the point table and every
    validity warning of this sea state fill the panel on the right (when they do not
    all fit, the panel says how many more there are and that the PDF report lists them
    all). The north arrow points to true north, at grid bearing -convergence.

    References
    ----------
    .. [1] Crameri, F., Shephard, G. E. and Heron, P. J. (2020). The misuse of colour in
       science communication. Nature Communications 11, 5444 (why a perceptually uniform
       colour map).
    .. [2] Nunez, J. R., Anderton, C. R. and Renslow, R. S. (2018). Optimizing colormaps
       with consideration for color vision deficiency. PLoS ONE 13(7), e0199239
       (the cividis colour map).
    """
    fig = new_figure(A4_LANDSCAPE)
    fw, fh = fig.get_size_inches()
    margin = 0.5
    name = sea_name(result, sea)
    info = sea_info(result, name)
    title, sea_line, method = title_lines(result, info)
    warns = warning_lines(result, sea=name)
    from harbor.solver.assemble import notices

    n_warn = len({n.text for n in notices(result, sea=name, level="warning")})

    foot_lines = wrap_to(result_short_caution(result), fw - 2 * margin, 7.5)
    prov = (f"harbor {result.attrs.get('harbor_version', '')}  \u00b7  "
            f"{str(result.attrs.get('created', ''))[:19].replace('T', ' ')}  \u00b7  "
            f"scenario: {result.attrs.get('scenario', '') or '(built in code)'}")
    line_h = 7.5 * 1.25 / 72.0
    foot_top = 0.36 + len(foot_lines) * line_h
    title_size = 14.0
    while len(wrap_to(title, fw - 2 * margin, title_size)) > 1 and title_size > 10.5:
        title_size -= 0.5
    # a long title wraps onto a second line (never cut); the lines below move down
    title_rows = wrap_to(title, fw - 2 * margin, title_size)[:2]
    title_line = "\n".join(title_rows)
    extra = (len(title_rows) - 1) * title_size * 1.2 / 72.0
    if depth_range_text(result):
        method += f"; {depth_range_text(result)}"
    method_lines = wrap_to(method, fw - 2 * margin, 8.5)[:2]
    reason = method_reason(result, name)
    if reason:
        method_lines += wrap_to(f"Why this method: {reason}", fw - 2 * margin, 8.5)[:2]
    head_h = 0.80 + extra + len(method_lines) * 8.5 * 1.25 / 72.0 + 0.1

    side_w = 3.3  # key, point table and warnings
    side_x = fw - margin - side_w
    map_box = (margin + 0.45, foot_top + 0.55, side_x - margin - 0.45 - 1.15,
               fh - foot_top - 0.55 - head_h)
    drawn = draw_map(fig, map_box, result, name, show)
    draw_colorbar(fig, drawn)
    pos = drawn["ax"].get_position()
    renderer = fig.canvas.get_renderer()
    # The panel starts right after the colour bar: a tall layout leaves a narrow map,
    # and the room it leaves goes to the panel (two columns when wide enough), not to
    # blank paper.
    side_x = min(side_x, pos.x1 * fw + 1.25)
    room_w = fw - margin - side_x
    two_cols = room_w >= 6.4
    col_w = (room_w - 0.3) / 2 if two_cols else room_w
    y = fh - head_h
    legend = draw_legend(fig, drawn, (side_x, y), fontsize=7.5)
    if legend is not None:
        y = legend.get_window_extent(renderer).y0 / fig.dpi - 0.2
    bottom = foot_top + 0.15
    if drawn["points"]:
        n_rows = max(1, int((y - bottom - (0.2 if two_cols else 1.0)) / (7.5 * 1.45 / 72.0)) - 3)
        y -= draw_point_table(fig, drawn, (side_x, y), min(col_w, 3.3), fontsize=7.5,
                              max_rows=n_rows) + 0.2
    if two_cols:
        wx, wy = side_x + col_w + 0.3, fh - head_h
        _warning_panel(fig, wx, wy, col_w, wy - bottom, warns, name, n_warn)
    else:
        _warning_panel(fig, side_x, y, col_w, y - bottom, warns, name, n_warn)

    fig.text(margin / fw, 1 - 0.28 / fh, title_line, fontsize=title_size, fontweight="bold",
             linespacing=1.0,
             color=INK, va="top")
    fig.text(margin / fw, 1 - (0.58 + extra) / fh, sea_line, fontsize=10.5, color=INK, va="top")
    fig.text(margin / fw, 1 - (0.80 + extra) / fh, "\n".join(method_lines), fontsize=8.5,
             color=MUTED, va="top", linespacing=1.25)
    fig.text(margin / fw, 0.34 / fh, "\n".join(foot_lines), fontsize=7.5, color=INK,
             va="bottom", linespacing=1.25)
    fig.text(margin / fw, 0.14 / fh, prov, fontsize=6.5, color=MUTED, va="bottom")
    y_rule = (foot_top + 0.08) / fh
    fig.add_artist(Line2D([margin / fw, 1 - margin / fw], [y_rule, y_rule], color="#bbbbbb",
                          lw=0.6))
    with atomic_path(path) as tmp:
        fig.savefig(tmp, dpi=dpi, format="png", facecolor="white")
    return Path(path)


def _warning_panel(fig, x, y_top, width, height, warns, sea, n_warn=None, fontsize=7.0):
    """The validity warnings of a sea state, as many as fit in ``height`` inches, then a
    line saying how many more the PDF report lists. Returns the height used."""
    fw, fh = fig.get_size_inches()
    line_h = fontsize * 1.3 / 72.0
    n = len(warns)
    n_warn = n if n_warn is None else n_warn
    notes = n - n_warn
    head = f"Validity warnings for '{sea}': {n_warn or 'none'}"
    if notes:
        head += f" (+{notes} note{'s' if notes > 1 else ''})"
    fig.text(x / fw, y_top / fh, head, fontsize=fontsize + 1, fontweight="bold",
             color=OVER_COLOUR if n_warn else INK, va="top")
    y = y_top - (fontsize + 1) * 1.6 / 72.0
    lines = []
    for i, w in enumerate(warns):
        wrapped = wrap_to(w, width - 0.15, fontsize)
        block = ["\u2013 " + wrapped[0]] + ["   " + s for s in wrapped[1:]]
        reserve = 2 if i < n - 1 else 0
        if (len(lines) + len(block) + reserve) * line_h > height - (y_top - y):
            lines.append(f"(+{n - i} more: every warning is listed in the PDF sheet "
                         "and report)")
            break
        lines.extend(block)
    if lines:
        fig.text(x / fw, y / fh, "\n".join(lines), fontsize=fontsize, color=INK, va="top",
                 linespacing=1.3)
    return (y_top - y) + len(lines) * line_h
