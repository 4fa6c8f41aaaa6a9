"""Point markers, their labels (placed where they hide least, with leader lines when
moved away) and the point table beside a map.
"""

from __future__ import annotations

import textwrap

import numpy as np
from matplotlib.backends.backend_agg import FigureCanvasAgg
from matplotlib.lines import Line2D
from matplotlib import transforms
from matplotlib.text import Text

from harbor.outputs.cartography import _HALO
from harbor.outputs.read import layout_shapes, point_rows, verdict
from harbor.outputs.style import INK, MUTED, OK_COLOUR, OVER_COLOUR, height_symbol


#: Ring drawn around a point whose value is outside its method's validity.
FLAG_COLOUR = "#e07b00"
FLAG_TEXT = "outside method validity"


def draw_points(fig, ax, result, name, info, obstacles, fontsize):
    """Mark each point of sea state ``name`` and place its label where it hides least.

    Parameters
    ----------
    fig : matplotlib.figure.Figure
    ax : matplotlib.axes.Axes
        The map axes (data in m, work frame).
    result : xarray.Dataset
    name : str
        Sea state.
    info : dict
        :func:`harbor.outputs.read.sea_info` of the sea state.
    obstacles : list of matplotlib artists
        Things labels must not cover (north arrow, scale bar).
    fontsize : float
        Label size, pt.

    Returns
    -------
    list of matplotlib artists
        Legend handles for the kinds of points drawn.

    Notes
    -----
    Each label tries eight places next to its point, then two farther rings joined to
    the point by a leader line; the place with the least overlap with other labels,
    markers, arms and the frame wins. A point whose value is outside its method's
    validity (``point_valid`` False) gets an orange ring and the words
    "outside method validity" in its label, so it never reads as a plain "ok".
    """
    rows = point_rows(result, name)
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
        if not row["valid"]:
            ax.plot(row["x"], row["y"], ls="", marker="o", markersize=14, markerfacecolor="none",
                    markeredgecolor=FLAG_COLOUR, markeredgewidth=2.0, zorder=11.5, clip_on=False)

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
    for _, line in layout_shapes(result)["arms"]:
        xy = ax.transData.transform(line)
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
        text = f"{row['name']}\n{val}" + ("" if row["valid"] else f"\n{FLAG_TEXT}")
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
    if any(not r["valid"] for r in rows):
        handles.append(Line2D([], [], ls="", marker="o", markersize=10, markerfacecolor="none",
                              markeredgecolor=FLAG_COLOUR, markeredgewidth=2.0,
                              label="value outside its method's validity (see warnings)"))
    return handles


_draw_points = draw_points


def _overlap(a, b) -> float:
    w = min(a.x1, b.x1) - max(a.x0, b.x0)
    h = min(a.y1, b.y1) - max(a.y0, b.y0)
    return w * h if w > 0 and h > 0 else 0.0


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
    # DejaVu Sans averages about 0.55 em a glyph; a longer name wraps onto a second line
    # rather than being cut
    name_chars = max(6, int(name_w / (0.55 * em)))
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
        word = verdict(row)
        colour = {True: OK_COLOUR, False: OVER_COLOUR, None: INK}[row["ok"]]
        parts = textwrap.wrap(row["name"], name_chars) or [""]
        put([parts[0], h, lim, word], colour=colour)
        for extra in parts[1:]:
            y -= line_h
            put([extra, "", "", ""], colour=colour)
        y -= line_h
    if any(not r["valid"] for r in shown):
        fig.text(x0 / fw, y / fh, "?  value outside its method's validity: see the warnings",
                 fontsize=fontsize - 0.5, color=FLAG_COLOUR, va="top")
        y -= line_h
    if len(shown) < len(rows):
        fig.text(x0 / fw, y / fh, f"(+{len(rows) - len(shown)} more: see points.csv)",
                 fontsize=fontsize, color=MUTED, va="top")
        y -= line_h
    return anchor[1] - y
