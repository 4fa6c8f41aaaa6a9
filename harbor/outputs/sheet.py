"""The PDF sheet: the sheltering map at a standard scale with a title block.

One A4-landscape page: the map of :mod:`harbor.outputs.maps` printed at a round scale
(1:N with N in the 1-2-2.5-5 series), its colour bar and key, the validity warnings, the
full cautions and a title block whose fields follow ISO 7200 (title, supplementary
title, document type and status, identification, date of issue, creator, approver,
responsible department, sheet number), plus the CRS and the scale.
"""

from __future__ import annotations

import textwrap
from pathlib import Path

from matplotlib.patches import Rectangle

from harbor.cautions import result_cautions
from harbor.outputs._atomic import atomic_path, slug
from harbor.outputs.labels import draw_point_table
from harbor.outputs.maps import draw_colorbar, draw_legend, draw_map, method_reason
from harbor.outputs.read import crs_label, sea_info, sea_name, title_lines, warning_lines
from harbor.outputs.style import (INK, MUTED, OVER_COLOUR, new_figure, sea_label,
                                  standard_scale, wrap_to)

MM = 1.0 / 25.4  # inches per millimetre
DOCUMENT_TYPE = "Preliminary sheltering map"
DOCUMENT_STATUS = "PRELIMINARY \u2014 not for construction"
TB_ROWS = (0.50, 0.40, 0.40, 0.42)  # title-block row heights, inches, top to bottom
TB_WIDTH = 180 * MM  # the ISO 7200 maximum width


def _wrap(text: str, width_in: float, fontsize: float) -> list[str]:
    return wrap_to(text, width_in, fontsize)


def _text_block(fig, x, y_top, width, max_height, heading, items, fontsize=6.8,
                colour=INK, bullet="\u2013 ", more="continued on the next page"):
    """Write a heading and wrapped bullet items downwards from ``y_top`` (inches).

    Items that do not fit in ``max_height`` are left for a continuation page: a last
    line says how many and where, so the block never runs into the title block.
    Returns ``(height used in inches, items not printed)``.
    """
    fw, fh = fig.get_size_inches()
    line_h = fontsize * 1.3 / 72.0
    fig.text(x / fw, y_top / fh, heading, fontsize=fontsize + 1.2, fontweight="bold",
             color=colour, va="top")
    y = y_top - (fontsize + 1.2) * 1.5 / 72.0
    lines = []
    rest = []
    for i, item in enumerate(items):
        wrapped = _wrap(item, width - 0.12, fontsize)
        block = [bullet + wrapped[0]] + ["   " + w for w in wrapped[1:]]
        reserve = 1 if i < len(items) - 1 else 0  # room for the "+n more" line
        if (len(lines) + len(block) + reserve) * line_h > max_height - (y_top - y) + 1e-9:
            lines.append(f"(+{len(items) - i} more: {more})")
            rest = list(items[i:])
            break
        lines.extend(block)
    if lines:
        fig.text(x / fw, y / fh, "\n".join(lines), fontsize=fontsize, color=colour, va="top",
                 linespacing=1.3)
    return (y_top - y) + len(lines) * line_h, rest


def _block_height(items, width, fontsize) -> float:
    """Height (inches) of a :func:`_text_block` holding all ``items``."""
    n = sum(len(_wrap(it, width - 0.12, fontsize)) for it in items)
    return (fontsize + 1.2) * 1.5 / 72.0 + n * fontsize * 1.3 / 72.0


def _title_block(fig, x0, y0, result, info, scale, sheet_number, sheet_count, name):
    """Draw the ISO 7200-style title block with its lower-left corner at (x0, y0) inches.

    Width 180 mm (the ISO 7200 maximum) and four rows; the fields that belong to people
    (responsible department, prepared by, approved by) are left empty for the engineers
    who prepare and sign the sheet (the program is named in the provenance).
    """
    fw, fh = fig.get_size_inches()
    width = TB_WIDTH
    rows = TB_ROWS
    height = sum(rows)

    def box(x, y, w, h, label, value, size=8.0, bold=False, colour=INK):
        fig.add_artist(Rectangle((x / fw, y / fh), w / fw, h / fh, fill=False,
                                 edgecolor=INK, linewidth=0.6))
        fig.text((x + 0.05) / fw, (y + h - 0.04) / fh, label, fontsize=5.2, color=MUTED,
                 va="top")
        lines = _wrap(value, w - 0.1, size)
        if len(lines) > 2:
            lines = lines[:2]
            lines[1] = textwrap.shorten(lines[1] + " \u2026", len(lines[1]), placeholder=" \u2026")
        fig.text((x + 0.05) / fw, (y + 0.06) / fh, "\n".join(lines), fontsize=size,
                 color=colour, va="bottom", fontweight="bold" if bold else "normal",
                 linespacing=1.1)

    title, _, _ = title_lines(result, info)
    created = str(result.attrs.get("created", ""))
    date = created[:10] if len(created) >= 10 else created
    stem = Path(str(result.attrs.get("scenario", "") or "scenario")).stem
    ident = f"{slug(stem, 'scenario')}/{slug(name)}"
    right_w = 62 * MM
    left_w = width - right_w
    y = y0 + height
    # Row 1: title | document type
    y -= rows[0]
    box(x0, y, left_w, rows[0], "Title", title, size=10, bold=True)
    box(x0 + left_w, y, right_w, rows[0], "Document type", DOCUMENT_TYPE, size=8.5)
    # Row 2: supplementary title (sea state) | document status
    y -= rows[1]
    box(x0, y, left_w, rows[1], "Supplementary title (sea state)", sea_label(info, math=False),
        size=7.2)
    box(x0 + left_w, y, right_w, rows[1], "Document status", DOCUMENT_STATUS, size=8,
        bold=True, colour=OVER_COLOUR)
    # Row 3: method | identification number
    y -= rows[2]
    box(x0, y, left_w, rows[2], "Method", info["method"] or str(result.attrs.get("method", "")),
        size=7.2)
    box(x0 + left_w, y, right_w, rows[2], "Identification number", ident, size=7.2)
    # Row 4: responsible dept | prepared by | approved by | date | CRS | scale | sheet
    y -= rows[3]
    cells = [("Responsible department", "", 30), ("Prepared by", "", 24),
             ("Approved by", "", 26), ("Date of issue", date, 22),
             ("CRS", crs_label(result), 28), ("Scale", f"1:{scale:,.0f}".replace(",", "\u2009")
                                              + " (A4)", 28),
             ("Sheet", f"{sheet_number} / {sheet_count}", 22)]
    x = x0
    for label, value, w_mm in cells:
        box(x, y, w_mm * MM, rows[3], label, value, size=7.2)
        x += w_mm * MM
    return height


def sheet_pages(result, sea, sheet_number=1, sheet_count=1, show="kd"):
    """The pages of the PDF sheet of one sea state, as matplotlib figures.

    Parameters
    ----------
    result : xarray.Dataset
        Solved result from :func:`harbor.solve` (everything drawn comes from it).
    sea : str, int or Sea
        The sea state.
    sheet_number, sheet_count : int
        Printed as "n / N" in the title block.
    show : {"kd", "height"}
        Colour by K' or by wave height (m).

    Returns
    -------
    list of matplotlib.figure.Figure
        The A4-landscape map sheet, then as many continuation pages as the validity
        warnings of this sea state need (every warning is printed; none is cut).
    """
    name = sea_name(result, sea)
    info = sea_info(result, name)
    fig = new_figure()
    fw, fh = fig.get_size_inches()
    left, right, bottom, top = _frame(fig)

    tb_height = sum(TB_ROWS)
    side_w = 2.75
    map_box = (left + 0.62, bottom + tb_height + 0.55, right - left - 0.62 - side_w - 1.05,
               top - bottom - tb_height - 0.55 - 0.45)
    x = result["x"].values
    y = result["y"].values
    # The printed 1:N is in ground metres: a CRS whose scale factor k is not 1 (Web
    # Mercator: k = 1.41 at 45 degrees) holds k ground metres' worth of units per metre.
    k = float(result.attrs.get("scale_factor", 1.0) or 1.0)
    dx, dy = float(x.max() - x.min()) / k, float(y.max() - y.min()) / k
    min_n = max(dx / (map_box[2] * 0.0254), dy / (map_box[3] * 0.0254))
    scale = standard_scale(min_n)
    drawn = draw_map(fig, map_box, result, name, show=show, scale=scale,
                     label_fontsize=6.5, halign="center", valign="center")
    draw_colorbar(fig, drawn)
    # The heading sits just above the map (which is centred in its field).
    y_head = min(top - 0.12, drawn["ax"].get_position().y1 * fh + 0.4)
    fig.text(drawn["ax"].get_position().x0, y_head / fh, f"{drawn['label'].split(' [')[0]} \u2014 "
             f"sea state '{name}'", fontsize=10, fontweight="bold", color=INK, va="top")

    side_x = right - side_w - 0.1
    legend = draw_legend(fig, drawn, (side_x, top - 0.25), fontsize=6.8)
    # Measure the key so the notes start below it.
    renderer = fig.canvas.get_renderer()
    y_notes = top - 0.25
    if legend is not None:
        bb = legend.get_window_extent(renderer)
        y_notes = bb.y0 / fig.dpi - 0.2
    if drawn["points"]:
        y_notes -= draw_point_table(fig, drawn, (side_x, y_notes), side_w, fontsize=6.8,
                                    max_rows=12) + 0.15
    warns = warning_lines(result, sea=name)
    room = y_notes - (bottom + tb_height + 0.15)
    # The cautions are printed in full whatever happens; the warnings get the rest and
    # continue on further pages.
    cautions = result_cautions(result)
    caution_h = _block_height(list(cautions), side_w, 6.8)
    size = 6.8
    while caution_h > room - 0.6 and size > 5.0:
        size -= 0.4
        caution_h = _block_height(list(cautions), side_w, size)
    used, rest = _text_block(fig, side_x, y_notes, side_w, room - caution_h - 0.12,
                             f"Validity warnings ({len(warns)})",
                             warns or ["None reported for this sea state."], fontsize=size)
    _text_block(fig, side_x, y_notes - used - 0.12, side_w, caution_h + 0.05, "Cautions",
                list(cautions), fontsize=size)

    _title_block(fig, right - TB_WIDTH, bottom, result, info, scale,
                 sheet_number, sheet_count, name)
    # Left of the title block: provenance.
    prov_w = (right - TB_WIDTH) - left - 0.15
    prov = [f"Scenario file: {result.attrs.get('scenario', '') or '(built in code)'}",
            f"Computed with harbor {result.attrs.get('harbor_version', '')} on "
            f"{result.attrs.get('created', '')}",
            f"Work CRS: {crs_label(result)}; meridian convergence "
            f"{float(result.attrs.get('convergence_deg', 0.0) or 0.0):+.3f}\u00b0 "
            "(north arrow shows true north)",
            f"Method: {info['method'] or result.attrs.get('method', '')}",
            *([f"Why this method: {method_reason(result, name)}"]
              if method_reason(result, name) else []),
            "Values are read from the computed result; distances can be measured at the "
            "printed scale."
            + (f" (ground metres; the CRS's scale factor {k:.4g} is taken out)"
               if abs(k - 1.0) > 5e-4 else "")]
    _text_block(fig, left + 0.1, bottom + tb_height - 0.05, prov_w, tb_height - 0.1,
                "Provenance", prov, fontsize=6.2, colour=MUTED, bullet="")
    pages = [fig]
    pages += text_pages(f"Validity warnings for sea state '{name}' (continued)", rest,
                        result.attrs.get("title", ""))
    return pages


def _frame(fig):
    """Draw the ISO 5457 frame (20 mm filing margin on the left, 10 mm elsewhere);
    returns its (left, right, bottom, top) in inches."""
    fw, fh = fig.get_size_inches()
    left, right, bottom, top = 20 * MM, fw - 10 * MM, 10 * MM, fh - 10 * MM
    fig.add_artist(Rectangle((left / fw, bottom / fh), (right - left) / fw, (top - bottom) / fh,
                             fill=False, edgecolor=INK, linewidth=1.2))
    return left, right, bottom, top


def text_pages(heading, items, title="", fontsize=8.0, columns=2):
    """A4-landscape pages listing ``items`` in full (as many pages as they need).

    Parameters
    ----------
    heading : str
        Printed at the top of each page.
    items : sequence of str
        The entries (warnings, cautions); each is wrapped, never cut.
    title : str
        The scenario title, printed small above the heading.
    fontsize : float
        Text size, pt.
    columns : int
        Text columns per page.

    Returns
    -------
    list of matplotlib.figure.Figure
        Empty when there are no items.
    """
    items = list(items)
    pages = []
    while items:
        fig = new_figure()
        fw, fh = fig.get_size_inches()
        left, right, bottom, top = _frame(fig)
        if title:
            fig.text((left + 0.2) / fw, (top - 0.2) / fh, str(title), fontsize=8, color=MUTED,
                     va="top")
        fig.text((left + 0.2) / fw, (top - 0.4) / fh, heading, fontsize=12, fontweight="bold",
                 color=INK, va="top")
        col_w = (right - left - 0.4 - 0.3 * (columns - 1)) / columns
        for c in range(columns):
            if not items:
                break
            x = left + 0.2 + c * (col_w + 0.3)
            last = c == columns - 1
            _, items = _text_block(fig, x, top - 0.85, col_w, top - 0.85 - bottom - 0.2, "",
                                   items, fontsize=fontsize,
                                   more="continued on the next page" if last
                                   else "continued in the next column")
        pages.append(fig)
    return pages


def write_pdf(pages, path, title="", subject=DOCUMENT_TYPE):
    """Write figures as the pages of one PDF file, atomically.

    Parameters
    ----------
    pages : sequence of matplotlib.figure.Figure
    path : str or os.PathLike
    title, subject : str
        PDF metadata.

    Returns
    -------
    pathlib.Path
    """
    from matplotlib.backends.backend_pdf import PdfPages

    with atomic_path(path) as tmp:
        with PdfPages(tmp, metadata={"Title": title, "Subject": subject,
                                     "Creator": "harbor"}) as pdf:
            for fig in pages:
                pdf.savefig(fig, facecolor="white")
    return Path(path)


def pdf_sheet(result, sea, path, sheet_number=1, sheet_count=1, show="kd", keep=None):
    """Write the A4-landscape PDF sheet of one sea state (more pages if the warnings
    need them).

    Parameters
    ----------
    result : xarray.Dataset
        Solved result from :func:`harbor.solve`; nothing else is needed.
    sea : str, int or Sea
        The sea state.
    path : str or os.PathLike
        Output PDF file; written atomically.
    sheet_number, sheet_count : int
        Printed as "n / N" in the title block.
    show : {"kd", "height"}
        Colour by K' or by wave height (m).
    keep : dict, optional
        When given, ``keep[sea name]`` receives the drawn pages (for the report).

    Returns
    -------
    pathlib.Path
        The written file.

    Notes
    -----
    The map is printed at the largest standard scale 1:N (N = 1, 2, 2.5 or 5 x 10^k)
    at which the computed area fits the map field, so a ruler on the printed A4 sheet
    measures ground distances as N x paper distance. Nothing is recomputed: values
    come from the result. Every validity warning of the sea state is printed: those
    that do not fit beside the map continue on a second page.

    References
    ----------
    .. [1] ISO 7200:2004. Technical product documentation - Data fields in title blocks
       and document headers. International Organization for Standardization, Geneva.
    .. [2] ISO 5455:1979. Technical drawings - Scales. International Organization for
       Standardization, Geneva.
    .. [3] ISO 5457:1999. Technical product documentation - Sizes and layout of drawing
       sheets. International Organization for Standardization, Geneva.
    """
    name = sea_name(result, sea)
    pages = sheet_pages(result, name, sheet_number, sheet_count, show)
    if keep is not None:
        keep[name] = pages
    return write_pdf(pages, path, title=f"{name} - {result.attrs.get('title', '')}")
