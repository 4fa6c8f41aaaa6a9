"""Tables, CSV files and charts of the studies (entrance-width sweeps, berth downtime).

The studies (:mod:`harbor.study.sweep`, :mod:`harbor.study.climate`) compute and return
labelled tables; everything here only reads them, writes text or draws.
"""

from __future__ import annotations

import io
import math
from pathlib import Path

import numpy as np
import pandas as pd

from harbor.cautions import CAUTION_SHORT
from harbor.outputs.style import new_figure, wrap_to

# Nothing is imported from harbor.study (a higher layer): the study results carry what
# is shown (the sweep's verdict and widest passing width, the climate's sectors).


def sweep_rows(result):
    """The tidy table of a sweep result: one row per move, sea state and point.

    Parameters
    ----------
    result : xarray.Dataset or pandas.DataFrame
        From :func:`harbor.study.sweep.sweep` (a DataFrame is returned as it is).

    Returns
    -------
    pandas.DataFrame
        Columns ``move, entrance_width, sea, point, kd, height, limit, ok, valid``.
    """
    if isinstance(result, pd.DataFrame):
        return result
    df = result[["entrance_width", "kd", "height", "limit", "ok", "valid"]].to_dataframe()
    df = df.reset_index()[["move", "entrance_width", "sea", "point", "kd", "height", "limit",
                           "ok", "valid"]]
    df["ok"] = pd.array([pd.NA if pd.isna(v) else bool(v) for v in df["ok"]], dtype="boolean")
    df["valid"] = df["valid"].astype(bool)
    df.attrs.update(result.attrs)
    return df


def _verdict(table):
    return str(table.attrs.get("verdict", ""))


def _widest(table):
    w = table.attrs.get("widest")
    return None if w is None else (float(w[0]), float(w[1]))


def _summary(table):
    """Highest height over the sea states per head position and point (display)."""
    out = table.pivot_table(index=["move", "entrance_width"], columns="point",
                            values="height", aggfunc="max", sort=False)
    out.columns.name = None
    return out[list(dict.fromkeys(table["point"]))]


def _sectors(down):
    return [c for c in down.columns if isinstance(c, (int, np.integer))]


def sector_text(centre, width=30) -> str:
    """``"345-015"`` for the sector of ``width`` degrees centred on ``centre``."""
    return f"{(centre - width // 2) % 360:03d}-{(centre + width // 2) % 360:03d}"


# --------------------------------------------------------------------------- sweeps

def sweep_text(table) -> str:
    """The terminal table of ``harbor sweep``.

    Parameters
    ----------
    table : xarray.Dataset
        From :func:`harbor.study.sweep.sweep`.

    Returns
    -------
    str
        One line per head position: move (m), entrance width (m) and, per point, the
        highest height over the sea states (m), marked ``*`` above the point's limit.
    """
    table = sweep_rows(table)
    summ = _summary(table)
    limits = table.groupby("point", sort=False)["limit"].first()
    names = list(summ.columns)
    w = max(10, *(min(len(n), 16) + 2 for n in names))
    head = f"{'move':>8}{'width':>9}  " + "".join(f"{n[:16]:>{w}}" for n in names)
    lim = f"{'(m)':>8}{'(m)':>9}  " + "".join(
        f"{'limit ' + format(limits[n], '.2f') if not math.isnan(limits[n]) else 'no limit':>{w}}"
        for n in names)
    bad = set()
    if "valid" in table:
        bad = {(m, p) for m, p in table.loc[~table["valid"].astype(bool), ["move", "point"]]
               .itertuples(index=False)}
    lines = ["highest wave height over the sea states (m); * above the point's limit; "
             "? outside the method's measured validity",
             head, lim, "-" * len(head)]
    for (m, width), r in summ.iterrows():
        cells = []
        for n in names:
            over = not math.isnan(limits[n]) and r[n] > limits[n]
            mark = ("*" if over else " ") + ("?" if (m, n) in bad else " ")
            cells.append(f"{format(r[n], '.2f') + mark:>{w}}")
        lines.append(f"{format(m, '+g') if m else '0':>8}{width:>9.1f}  " + "".join(cells))
    return "\n".join(lines)


def sweep_csv_text(table) -> str:
    """CSV text of a sweep table: columns :data:`SWEEP_COLUMNS`, no comment lines.

    Parameters
    ----------
    table : xarray.Dataset
        From :func:`harbor.study.sweep.sweep`.

    Returns
    -------
    str
        ``ok`` is written ``true``/``false`` and left empty (as ``limit``) for points
        without a limit, like ``points.csv``; lengths in m, 6 significant digits.

    References
    ----------
    .. [1] Shafranovich, Y. (2005). Common Format and MIME Type for Comma-Separated
       Values (CSV) Files. IETF RFC 4180.
    """
    table = sweep_rows(table)
    out = table.copy()
    out["ok"] = ["" if pd.isna(v) else ("true" if v else "false") for v in table["ok"]]
    if "valid" in out:
        out["valid"] = ["true" if bool(v) else "false" for v in table["valid"]]
    buf = io.StringIO()
    out.to_csv(buf, index=False, columns=list(table.columns), lineterminator="\n",
               float_format="%.6g", na_rep="")
    return buf.getvalue()


def _limit_labels(fig, ax, limits, fontsize=7.0):
    """Label the limit lines at the right edge, pushed apart so that none overprints
    another (each keeps a thin leader to its line when moved)."""
    if not limits:
        return
    limits = sorted(limits)
    fig.canvas.draw()  # the axes' final limits and size
    to_px = ax.transData.transform
    gap = fontsize * 1.35 * fig.dpi / 72.0
    ys = [to_px((0, v))[1] for v, _, _ in limits]
    placed = []
    for y in ys:
        placed.append(max(y, placed[-1] + gap) if placed else y)
    top = ax.get_window_extent().y1
    over = placed[-1] - top if placed else 0
    if over > 0:  # shift the stack down, never below its own lines' order
        placed = [p - over for p in placed]
    x_right = ax.get_window_extent().x1
    inv = ax.transData.inverted()
    for (v, p, c), y0, y1 in zip(limits, ys, placed):
        yd = inv.transform((x_right, y1))[1]
        ax.annotate(f"limit {p} {v:.2f} m", (1.0, v), xycoords=("axes fraction", "data"),
                    xytext=(1.01, yd), textcoords=("axes fraction", "data"),
                    fontsize=fontsize, color=c, va="center", ha="left",
                    annotation_clip=False,
                    arrowprops=(dict(arrowstyle="-", color=c, lw=0.6) if abs(y1 - y0) > 1 else None))


def plot_sweep(table, path, title=None, dpi=150):
    """Write a PNG of wave height against entrance width.

    Parameters
    ----------
    table : xarray.Dataset
        From :func:`harbor.study.sweep.sweep`.
    path : str or os.PathLike
        Output PNG; written atomically.
    title : str, optional
        First title line (default the arm's name).
    dpi : int

    Returns
    -------
    pathlib.Path

    Notes
    -----
    One colour per point, one line style per sea state; each point's limit is a
    dashed horizontal line in its colour; the widest passing width (if any) is marked;
    the short caution is printed under the chart.
    """
    table = sweep_rows(table)
    from harbor.outputs._atomic import atomic_path

    fig = new_figure((10.0, 6.2))
    ax = fig.add_axes((0.08, 0.2, 0.62, 0.7))
    colours = ["#0072b2", "#d55e00", "#009e73", "#cc79a7", "#e69f00", "#56b4e9",
               "#000000", "#f0e442"]
    styles = ["-", "--", "-.", ":"]
    markers = ["o", "s", "^", "D", "v"]
    points = list(dict.fromkeys(table["point"]))
    seas = list(dict.fromkeys(table["sea"]))
    limits = []
    for a, p in enumerate(points):
        c = colours[a % len(colours)]
        for b, s in enumerate(seas):
            sub = table[(table["point"] == p) & (table["sea"] == s)].sort_values(
                "entrance_width")
            ax.plot(sub["entrance_width"], sub["height"], color=c,
                    linestyle=styles[b % len(styles)], marker=markers[b % len(markers)],
                    markersize=3.5, linewidth=1.4, label=f"{p} — {s}")
        lim = table.loc[table["point"] == p, "limit"].dropna()
        if not lim.empty:
            ax.axhline(float(lim.iloc[0]), color=c, linestyle=(0, (6, 3)), linewidth=0.9,
                       alpha=0.8)
            limits.append((float(lim.iloc[0]), p, c))
    ax.set_ylim(bottom=0)
    _limit_labels(fig, ax, limits)
    best = _widest(table)
    if best is not None:
        ax.axvline(best[0], color="#1b7a3a", linewidth=1.0)
        ax.annotate(f"widest passing: {best[0]:.1f} m", (best[0], 1.0),
                    xycoords=("data", "axes fraction"), xytext=(3, -10),
                    textcoords="offset points", fontsize=8, color="#1b7a3a")
    ax.set_xlabel("entrance width (m)")
    ax.set_ylabel("wave height at the point, H or H$_{1/3}$ (m)")
    ax.set_ylim(bottom=0)
    ax.grid(True, color="#dddddd", linewidth=0.6)
    ax.legend(loc="upper left", bbox_to_anchor=(1.13, 1.0), fontsize=7.5, frameon=False,
              title="point — sea state", title_fontsize=8)
    arm = table.attrs.get("arm", "")
    ax.set_title(title or f"Entrance-width sweep: head of '{arm}' moved along its end "
                 "segment", fontsize=11, loc="left", pad=18)
    name = table.attrs.get("title") or table.attrs.get("scenario")
    if name:
        ax.text(0.0, 1.01, str(name), transform=ax.transAxes, fontsize=8.5, color="#555555",
                va="bottom")
    foot = [_verdict(table)]
    skipped = table.attrs.get("skipped", [])
    if skipped:
        foot.append(f"skipped moves: {', '.join(f'{m:+g} m' for m, _ in skipped)}")
    foot += wrap_to(CAUTION_SHORT, 9.0, 7.5)
    fig.text(0.02, 0.02, "\n".join(foot), fontsize=7.5, va="bottom", ha="left",
             color="#555555")
    with atomic_path(path) as tmp:
        fig.savefig(tmp, dpi=dpi, format="png")
    return path


def write_sweep(table, out_dir):
    """Write ``sweep-<arm>.csv`` and ``sweep-<arm>.png`` into ``out_dir``, both or none.

    Parameters
    ----------
    table : xarray.Dataset
        From :func:`harbor.study.sweep.sweep`.
    out_dir : str or os.PathLike
        Output folder (created if missing).

    Returns
    -------
    list of pathlib.Path
    """
    from harbor.outputs._atomic import slug, write_staged

    name = slug(table.attrs.get("arm", "arm"), "arm")
    return write_staged(out_dir, [(f"sweep-{name}.csv", sweep_csv_text(table))],
                        (f"sweep-{name}.png", lambda p: plot_sweep(table, p)))


# --------------------------------------------------------------------------- climate

#: Columns of climate-rows.csv (one row per climate row and point).
ROWS_COLUMNS = ["row", "height", "period", "from", "spreading", "percent", "sector", "point",
                "kd", "point_height", "limit", "exceeds", "reaching"]


def climate_tables(result):
    """The tables of a climate result (:func:`harbor.study.climate.climate_downtime`).

    Parameters
    ----------
    result : xarray.Dataset

    Returns
    -------
    downtime : pandas.DataFrame
        Indexed by point: ``limit``, ``total`` and one column per sector centre (int).
    rows : pandas.DataFrame
        One row per climate row and point, columns :data:`ROWS_COLUMNS`.
    occurrence : pandas.Series
        % of time from each sector, indexed by sector centre.
    """
    points = [str(p) for p in result["point"].values]
    sectors = [int(c) for c in result["sector"].values]
    down = pd.DataFrame(index=pd.Index(points, name="point"))
    down["limit"] = result["limit"].values
    down["total"] = result["total"].values
    for k, c in enumerate(sectors):
        down[c] = result["downtime"].values[:, k]
    occ = pd.Series(result["occurrence"].values, index=pd.Index(sectors, name="sector"),
                    name="percent")
    nr, npnt = result.sizes["row"], len(points)

    def per_row(v):
        return np.repeat(np.asarray(result[v].values), npnt)

    rows = pd.DataFrame({
        "row": np.repeat(result["row"].values, npnt), "height": per_row("height"),
        "period": per_row("period"), "from": per_row("from"),
        "spreading": per_row("spreading"), "percent": per_row("percent"),
        "sector": per_row("row_sector"), "point": np.tile(points, nr),
        "kd": result["kd"].values.ravel(), "point_height": result["point_height"].values.ravel(),
        "limit": np.tile(result["limit"].values, nr),
        "exceeds": result["exceeds"].values.ravel(), "reaching": per_row("reaching")},
        columns=ROWS_COLUMNS)
    for t in (down, rows):
        t.attrs.update(result.attrs)
    return down, rows, occ

def _order(occurrence):
    """Sectors with any occurrence, in bearing order starting after the widest empty
    stretch (so that a NW-N-NE climate reads 300, 330, 000, 030)."""
    present = [c for c in sorted(occurrence.index) if occurrence.get(c, 0.0) > 0]
    if len(present) <= 1:
        return present
    gaps = [((present[(i + 1) % len(present)] - present[i]) % 360 or 360, i)
            for i in range(len(present))]
    _, i = max(gaps)
    return present[i + 1:] + present[:i + 1]


def downtime_text(result) -> str:
    """The terminal table of ``harbor climate``.

    Parameters
    ----------
    result : xarray.Dataset
        From :func:`climate_downtime`.

    Returns
    -------
    str
        Per point: limit (m), total downtime (%) and downtime per sector (%), for the
        sectors the climate has any time in; last line the time from each sector (%).
    """
    down, _, occ = climate_tables(result)
    order = _order(occ)
    head = f"{'point':<18}{'limit':>7}{'total':>8}  |" + "".join(f"{sector_text(c):>9}"
                                                              for c in order)
    unit = f"{'':<18}{'(m)':>7}{'(%)':>8}  |" + "".join(f"{'(%)':>9}" for _ in order)
    lines = ["downtime: % of time the wave height at the point exceeds its limit, by the "
             "sector the waves come from (degrees true)", head, unit, "-" * len(head)]
    for name, r in down.iterrows():
        lines.append(f"{str(name)[:18]:<18}{r['limit']:>7.2f}{r['total']:>8.2f}  |"
                     + "".join(f"{r[c]:>9.2f}" for c in order))
    lines.append("-" * len(head))
    lines.append(f"{'time from sector':<18}{'':>7}{occ.sum():>8.2f}  |"
                 + "".join(f"{occ[c]:>9.2f}" for c in order))
    methods = list(result.attrs.get("methods", []) or [])
    if methods:
        lines.append("method: " + "; ".join(str(m) for m in methods))
    return "\n".join(lines)


def downtime_csv_text(result) -> str:
    """CSV of the downtime table.

    Parameters
    ----------
    result : xarray.Dataset
        From :func:`climate_downtime`.

    Returns
    -------
    str
        Columns ``point,limit,total,000,030,...,330``: limit in m, the others in % of
        all time (sector columns by their centre, degrees true); no comment lines.
    """
    down, _, _ = climate_tables(result)
    d = down.reset_index()
    d.columns = ["point", "limit", "total"] + [f"{c:03d}" for c in _sectors(down)]
    buf = io.StringIO()
    d.to_csv(buf, index=False, lineterminator="\n", float_format="%.4g")
    return buf.getvalue()


def rows_csv_text(result) -> str:
    """CSV of every climate row at every point.

    Parameters
    ----------
    result : xarray.Dataset
        From :func:`climate_downtime`.

    Returns
    -------
    str
        The columns :data:`ROWS_COLUMNS` (heights in m, period in s, directions in
        degrees true, percent in %); ``exceeds`` as ``true``/``false``.
    """
    _, r, _ = climate_tables(result)
    r["exceeds"] = np.where(r["exceeds"], "true", "false")
    buf = io.StringIO()
    r.to_csv(buf, index=False, lineterminator="\n", float_format="%.6g")
    return buf.getvalue()


def plot_downtime(result, path, title=None, dpi=150):
    """Write a PNG bar chart of downtime by direction sector, one bar per point.

    Parameters
    ----------
    result : xarray.Dataset
        From :func:`climate_downtime`.
    path : str or os.PathLike
        Output PNG; written atomically.
    title : str, optional
        Title line.
    dpi : int

    Returns
    -------
    str or os.PathLike
        ``path``.

    Notes
    -----
    Grey bars: the percentage of time the waves come from the sector; coloured bars
    inside them: the percentage of time each point's height exceeds its limit with
    waves from that sector. The legend gives each point's limit and total downtime.
    """
    from harbor.outputs._atomic import atomic_path

    down, _, occ = climate_tables(result)
    order = _order(occ) or _sectors(down)
    colours = ["#0072b2", "#d55e00", "#009e73", "#cc79a7", "#e69f00", "#56b4e9",
               "#000000", "#f0e442"]
    fig = new_figure((10.0, 6.0))
    ax = fig.add_axes((0.07, 0.22, 0.58, 0.68))
    x = np.arange(len(order))
    ax.bar(x, [occ[c] for c in order], width=0.9, color="#e3e3e3", edgecolor="#bbbbbb",
           label="time from the sector")
    n = max(len(down), 1)
    w = 0.8 / n
    for k, (name, r) in enumerate(down.iterrows()):
        ax.bar(x - 0.4 + w * (k + 0.5), [r[c] for c in order], width=w * 0.92,
               color=colours[k % len(colours)],
               label=f"{name} (limit {r['limit']:.2f} m): {r['total']:.1f} % of time")
    # the centre on the first line, the range smaller on the second: readable side by
    # side even with all twelve sectors
    ax.set_xticks(x, [f"{c:03d}°" for c in order], fontsize=8)
    for xi, c in zip(x, order):
        ax.annotate(sector_text(c), (xi, 0), xycoords=("data", "axes fraction"),
                    xytext=(0, -20), textcoords="offset points", ha="center", va="top",
                    fontsize=6.2 if len(order) > 8 else 7, color="#555555")
    ax.set_xlabel("direction the waves come from (sector centre and range, degrees true)",
                  labelpad=16)
    ax.set_ylabel("% of time")
    ax.grid(True, axis="y", color="#dddddd", linewidth=0.6)
    ax.set_axisbelow(True)
    ax.legend(loc="upper left", bbox_to_anchor=(1.02, 1.0), fontsize=7.5, frameon=False,
              title="downtime (height > limit)", title_fontsize=8)
    ax.set_title(title or "Berth downtime by wave direction", fontsize=11, loc="left", pad=18)
    name = down.attrs.get("title") or down.attrs.get("scenario")
    if name:
        ax.text(0.0, 1.01, str(name), transform=ax.transAxes, fontsize=8.5, color="#555555",
                va="bottom")
    src = result.attrs.get("file")
    foot = [f"climate: {Path(src).name if src else 'table'}, "
            f"{result.attrs.get('table_rows', '?')} rows, "
            f"{occ.sum():.1f} % of time; {result.attrs.get('cases', '?')} distinct "
            "(period, direction, spreading) cases solved"]
    foot += wrap_to(CAUTION_SHORT, 9.0, 7.5)
    fig.text(0.02, 0.02, "\n".join(foot), fontsize=7.5, va="bottom", ha="left",
             color="#555555")
    with atomic_path(path) as tmp:
        fig.savefig(tmp, dpi=dpi, format="png")
    return path


def write_climate(result, out_dir, title=None):
    """Write ``downtime.csv``, ``climate-rows.csv`` and ``downtime.png``, all or none.

    Parameters
    ----------
    result : xarray.Dataset
    out_dir : str or os.PathLike
        Output folder (created if missing).
    title : str, optional
        Chart title.

    Returns
    -------
    list of pathlib.Path
    """
    from harbor.outputs._atomic import write_staged

    return write_staged(out_dir, [("downtime.csv", downtime_csv_text(result)),
                                  ("climate-rows.csv", rows_csv_text(result))],
                        ("downtime.png", lambda p: plot_downtime(result, p, title=title)))


__all__ = ["sweep_rows", "climate_tables", "downtime_csv_text", "downtime_text", "plot_downtime", "plot_sweep",
           "rows_csv_text", "sweep_csv_text", "sweep_text", "write_climate", "write_sweep"]
