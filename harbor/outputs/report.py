"""The combined PDF report of a run: what a consultant sends to a client.

One file, A4 landscape throughout: a cover page (title, status, the sea states and the
methods, the berth table with every point's height, limit and verdict in every sea
state, blank fields for the people who prepare, check and approve it), one sheet per sea
state (:func:`harbor.outputs.sheet.sheet_pages`), every validity warning and note
grouped by sea state, and the cautions in full. Everything is read from the result.
"""

from __future__ import annotations

import numpy as np
from matplotlib.lines import Line2D

from harbor.cautions import result_cautions
from harbor.outputs.cartography import depth_range_text
from harbor.outputs.maps import method_reason
from harbor.outputs.read import point_rows, sea_info, sea_name, verdict
from harbor.outputs.sheet import DOCUMENT_STATUS, _frame, sheet_pages, text_pages, write_pdf
from harbor.outputs.style import INK, MUTED, OK_COLOUR, OVER_COLOUR, new_figure, wrap_to
from harbor.outputs.labels import FLAG_COLOUR

REPORT_TYPE = "Preliminary harbour sheltering report"


def _cover_pages(result, seas):
    """The cover page and, for many points, continuation pages of the berth table."""
    title = str(result.attrs.get("title", "") or "Harbour layout")
    infos = [sea_info(result, s) for s in seas]
    rows = {s: point_rows(result, s) for s in seas}
    names = [r["name"] for r in rows[seas[0]]] if seas else []
    pages = []
    i0 = 0
    first = True
    while first or i0 < len(names):
        fig = new_figure()
        fw, fh = fig.get_size_inches()
        left, right, bottom, top = _frame(fig)
        x = left + 0.25
        y = top - 0.3

        def put(text, size=8.0, colour=INK, weight="normal", dx=0.0, ha="left"):
            fig.text((x + dx) / fw, y / fh, text, fontsize=size, color=colour,
                     fontweight=weight, va="top", ha=ha)

        if first:
            put(REPORT_TYPE, 9, MUTED)
            y -= 0.25
            for ln in wrap_to(title, right - left - 0.5, 16)[:2]:
                put(ln, 16, weight="bold")
                y -= 0.3
            put(DOCUMENT_STATUS, 10, OVER_COLOUR, "bold")
            y -= 0.25
            put(f"Scenario file: {result.attrs.get('scenario', '') or '(built in code)'}   "
                f"\u00b7   computed {result.attrs.get('created', '')} with harbor "
                f"{result.attrs.get('harbor_version', '')}   \u00b7   depth "
                f"{result.attrs.get('depth', '')} m"
                + (f" ({depth_range_text(result)})" if depth_range_text(result) else ""),
                7.5, MUTED)
            y -= 0.3
            put("Sea states and methods", 10, weight="bold")
            y -= 0.22
            for inf in infos:
                hs, ts = ("H1/3", "T1/3") if inf["random"] else ("H", "T")
                line = (f"'{inf['name']}': {inf['kind']}, {hs} {inf['height']:.2f} m, "
                        f"{ts} {inf['period']:.1f} s, from {inf['from']:.0f}\u00b0 true"
                        + (f", s_max {inf['spreading']:.0f}" if inf["random"] else "")
                        + f" \u2014 {inf['method']}")
                reason = method_reason(result, inf["name"])
                if reason:
                    line += f" (why: {reason})"
                for ln in wrap_to(line, right - left - 0.6, 7.5):
                    put(ln, 7.5)
                    y -= 0.15
            y -= 0.15
            first = False
        put("Berth table: wave height (m; H for regular, H1/3 for random seas), limit and "
            "verdict", 10, weight="bold")
        y -= 0.25
        if not names:
            put("No points of interest in this scenario.", 8)
            pages.append(fig)
            break
        name_w = 2.2
        col_w = min(1.3, (right - left - 0.5 - name_w - 0.7) / max(len(seas), 1))
        put("point", 7.5, MUTED)
        put("limit", 7.5, MUTED, dx=name_w + 0.5, ha="right")
        for k, s in enumerate(seas):
            for j, ln in enumerate(wrap_to(s, col_w - 0.1, 7.5)[:2]):
                fig.text((x + name_w + 0.7 + (k + 1) * col_w - 0.1) / fw, (y - j * 0.13) / fh, ln,
                         fontsize=7.5, color=MUTED, va="top", ha="right")
        y -= 0.32
        line_h = 0.17
        while i0 < len(names) and y - line_h > bottom + 1.1:
            j = i0
            lim = rows[seas[0]][j]["limit"]
            put(names[j], 7.5)
            put("\u2013" if lim is None else f"{lim:.2f}", 7.5, dx=name_w + 0.5, ha="right")
            for k, s in enumerate(seas):
                r = rows[s][j]
                hv = "n/a" if not np.isfinite(r["height"]) else f"{r['height']:.2f}"
                word = verdict(r)
                colour = {True: OK_COLOUR, False: OVER_COLOUR, None: INK}[r["ok"]]
                if r["ok"] is not None and not r["valid"]:
                    colour = FLAG_COLOUR
                fig.text((x + name_w + 0.7 + (k + 1) * col_w - 0.1) / fw, y / fh,
                         f"{hv} {word:<5}".rstrip(), fontsize=7.5, color=colour, va="top",
                         ha="right", family="monospace")
            y -= line_h
            i0 += 1
        y -= 0.1
        put("ok: meets its limit; OVER: above it; ?: the method is outside its measured "
            "validity at that point in that sea state (see the warnings): do not rely on "
            "the verdict.", 7, MUTED)
        # people, not the program, prepare, check and approve a report
        yb = bottom + 0.55
        for k, label in enumerate(("Prepared by", "Checked by", "Approved by", "Date")):
            xx = left + 0.25 + k * 2.6
            fig.text(xx / fw, yb / fh, label, fontsize=7, color=MUTED, va="bottom")
            fig.add_artist(Line2D(
                [xx / fw, (xx + 2.3) / fw], [(yb - 0.2) / fh] * 2, color=INK, lw=0.6))
        pages.append(fig)
    return pages


def pdf_report(result, path, seas=None, show="kd", sheets=None):
    """Write the combined PDF report of a run.

    Parameters
    ----------
    result : xarray.Dataset
        Solved result from :func:`harbor.solve`; nothing else is needed.
    path : str or os.PathLike
        Output PDF; written atomically.
    seas : sequence of str, optional
        Sea states to include (default all).
    show : {"kd", "height"}
        What the map sheets colour.
    sheets : dict, optional
        Sea state -> its pages from :func:`harbor.outputs.sheet.sheet_pages`, when they
        are already drawn (:func:`harbor.outputs.write_all` draws each sheet once for
        both files).

    Returns
    -------
    pathlib.Path

    Notes
    -----
    Pages: the cover with the berth table (continued when there are many points), one
    map sheet per sea state (with its own continuation pages), then every validity
    warning and note grouped by sea state, then the cautions in full. No warning is
    cut or summarised.
    """
    names = [sea_name(result, s) for s in (seas if seas is not None else
                                           [str(v) for v in result["sea"].values])]
    title = str(result.attrs.get("title", ""))
    pages = _cover_pages(result, names)
    for i, name in enumerate(names):
        if sheets is not None and name in sheets:
            pages += sheets[name]
        else:
            pages += sheet_pages(result, name, i + 1, len(names), show)
    from harbor.solver.assemble import notices

    items = list(dict.fromkeys(notices(result)))
    general = [n.text for n in items if n.sea is None]
    listed = [f"Every sea state: {t}" for t in general]
    for name in names:
        listed += [f"Sea state '{name}': {n.text}" for n in items if n.sea == name]
    pages += text_pages("Validity warnings and notes", listed or ["None reported."], title)
    pages += text_pages("Cautions", list(result_cautions(result)), title, fontsize=9,
                        columns=1)
    return write_pdf(pages, path, title=f"{title} - {REPORT_TYPE}", subject=REPORT_TYPE)
