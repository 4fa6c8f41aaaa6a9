"""Outputs of a comparison of layout alternatives: CSV tables, a chart, a terminal table.

Everything here reads only the Dataset of
:func:`harbor.study.alternatives.compare_alternatives`; nothing is recomputed.
"""

from __future__ import annotations

import io
import textwrap
from pathlib import Path

import numpy as np

#: Files written by :func:`write_alternatives`, in this order.
FILES = ("alternatives.csv", "alternatives-rows.csv", "alternatives.png")
_COLOURS = ["#0072b2", "#d55e00", "#009e73", "#cc79a7", "#e69f00", "#56b4e9", "#000000",
            "#f0e442"]


def _fmt(v, spec):
    return "" if v is None or (isinstance(v, float) and np.isnan(v)) else format(v, spec)


def alternatives_csv_text(ds) -> str:
    """CSV of the downtime of every berth under every alternative.

    Parameters
    ----------
    ds : xarray.Dataset
        From :func:`harbor.study.alternatives.compare_alternatives`.

    Returns
    -------
    str
        Columns ``alternative,point,limit,total,000,030,...,330``: limit in m, the
        others in % of all time (sector columns by their centre, degrees true). Empty
        cells where an alternative has no such berth.
    """
    sectors = [int(c) for c in ds.sector.values]
    lines = [",".join(["alternative", "point", "limit", "total"]
                      + [f"{c:03d}" for c in sectors])]
    for a in ds.alternative.values:
        for p in ds.point.values:
            lim = float(ds.limit.sel(alternative=a, point=p))
            if np.isnan(lim):
                continue
            tot = float(ds.downtime_total.sel(alternative=a, point=p))
            sec = ds.downtime.sel(alternative=a, point=p).values
            lines.append(",".join([_csv(a), _csv(p), _fmt(lim, ".4g"), _fmt(tot, ".4g")]
                                  + [_fmt(float(v), ".4g") for v in sec]))
    return "\n".join(lines) + "\n"


def _csv(s) -> str:
    s = str(s)
    return '"' + s.replace('"', '""') + '"' if any(c in s for c in ',"\n') else s


def alternatives_rows_csv_text(ds) -> str:
    """CSV of every climate row at every berth under every alternative.

    Parameters
    ----------
    ds : xarray.Dataset
        From :func:`harbor.study.alternatives.compare_alternatives`.

    Returns
    -------
    str
        Columns ``alternative,row,height,period,from,spreading,percent,sector,point,kd,
        point_height,limit,exceeds,reaching`` (heights in m, period in s, directions in
        degrees true, percent in %); ``exceeds`` as ``true``/``false``.
    """
    import pandas as pd

    na, nr, nb = ds.kd.shape
    a = np.repeat(ds.alternative.values, nr * nb)
    df = pd.DataFrame({
        "alternative": a,
        "row": np.tile(np.repeat(ds.row.values, nb), na),
        "height": np.tile(np.repeat(ds.row_height.values, nb), na),
        "period": np.tile(np.repeat(ds.row_period.values, nb), na),
        "from": np.tile(np.repeat(ds.row_from.values, nb), na),
        "spreading": np.tile(np.repeat(ds.row_spreading.values, nb), na),
        "percent": np.tile(np.repeat(ds.row_percent.values, nb), na),
        "sector": np.tile(np.repeat(ds.row_sector.values, nb), na),
        "point": np.tile(ds.point.values, na * nr),
        "kd": ds.kd.values.ravel(),
        "point_height": ds.point_height.values.ravel(),
        "limit": np.repeat(ds.limit.values[:, None, :], nr, axis=1).ravel(),
        "exceeds": np.where(ds.exceeds.values.ravel(), "true", "false"),
        "reaching": np.repeat(ds.reaching.values, nb, axis=1).ravel(),
    })
    df = df[~np.isnan(df["limit"].to_numpy(float))]
    buf = io.StringIO()
    df.to_csv(buf, index=False, lineterminator="\n", float_format="%.6g")
    return buf.getvalue()


def alternatives_text(ds) -> str:
    """The terminal table: total downtime (%) per berth (rows) and alternative (columns).

    Parameters
    ----------
    ds : xarray.Dataset
        From :func:`harbor.study.alternatives.compare_alternatives`.

    Returns
    -------
    str
    """
    alts = [str(a) for a in ds.alternative.values]
    w = max(10, *(len(a) + 2 for a in alts))
    head = f"{'point':<18}" + "".join(f"{a[:w - 2]:>{w}}" for a in alts)
    lines = ["downtime (% of time the height at the berth exceeds its limit), per "
             "alternative; limit (m) in brackets", head, "-" * len(head)]
    for p in ds.point.values:
        cells = []
        for a in ds.alternative.values:
            lim = float(ds.limit.sel(alternative=a, point=p))
            tot = float(ds.downtime_total.sel(alternative=a, point=p))
            cells.append(f"{'-':>{w}}" if np.isnan(lim)
                         else f"{f'{tot:.2f} ({lim:.2f})':>{w}}")
        lines.append(f"{str(p)[:18]:<18}" + "".join(cells))
    return "\n".join(lines)


def plot_alternatives(ds, path, title=None, dpi=150):
    """Write a PNG chart of downtime per berth, the alternatives side by side.

    Parameters
    ----------
    ds : xarray.Dataset
        From :func:`harbor.study.alternatives.compare_alternatives`.
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
    One group of bars per berth, one bar per alternative (its total downtime, the
    value written on it); under each berth its limit (the range when the alternatives
    give it different limits). The legend names each alternative by its name, file
    and title; the foot gives the climate and the cautions.
    """
    from harbor.outputs._atomic import atomic_path
    from harbor.outputs.style import MUTED, new_figure, wrap_to

    alts = [str(a) for a in ds.alternative.values]
    berths = [str(p) for p in ds.point.values]
    tot = ds.downtime_total.values                     # (alternative, point)
    lim = ds.limit.values
    fig = new_figure((10.0, 6.0))
    ax = fig.add_axes((0.08, 0.26, 0.56, 0.64))
    x = np.arange(len(berths))
    width = 0.8 / max(len(alts), 1)
    top = np.nanmax(tot) if np.isfinite(tot).any() else 0.0
    for k, a in enumerate(alts):
        xs = x - 0.4 + width * (k + 0.5)
        vals = np.nan_to_num(tot[k])
        t = str(ds.alternative_title.values[k])
        f = Path(str(ds.alternative_file.values[k])).name
        label = a + (f" ({f})" if f and f != f"{a}.toml" else "")
        if t:
            label += "\n" + "\n".join(textwrap.wrap(t, 40)[:2])
        ax.bar(xs, vals, width=width * 0.92, color=_COLOURS[k % len(_COLOURS)],
               label=label)
        for xi, v, missing in zip(xs, vals, np.isnan(tot[k])):
            ax.text(xi, v + 0.01 * max(top, 1.0), "n/a" if missing else f"{v:.1f}",
                    ha="center", va="bottom", fontsize=7)
    ticks = []
    for j, b in enumerate(berths):
        lj = lim[:, j][np.isfinite(lim[:, j])]
        lt = (f"limit {lj.min():.2f} m" if lj.size and lj.min() == lj.max()
              else f"limit {lj.min():.2f}-{lj.max():.2f} m" if lj.size else "")
        ticks.append(f"{b}\n{lt}")
    ax.set_xticks(x, ticks, fontsize=8)
    ax.set_ylabel("downtime, % of time (height > limit)")
    ax.set_ylim(0, max(top * 1.15, 1.0))
    ax.grid(True, axis="y", color="#dddddd", linewidth=0.6)
    ax.set_axisbelow(True)
    ax.legend(loc="upper left", bbox_to_anchor=(1.02, 1.0), fontsize=7.5, frameon=False,
              title="alternative (scenario)", title_fontsize=8)
    ax.set_title(title or "Berth downtime under each layout alternative", fontsize=11,
                 loc="left")
    src = ds.attrs.get("table_file") or "table"
    foot = [f"climate: {Path(src).name}, {ds.sizes['row']} rows, "
            f"{float(ds.occurrence.sum()):.1f} % of time; {ds.attrs.get('cases', '?')} "
            f"distinct solves in {ds.attrs.get('tasks', '?')} tasks"]
    foot += wrap_to(str(ds.attrs.get("cautions", "")), 9.0, 7.5)
    fig.text(0.02, 0.02, "\n".join(foot), fontsize=7.5, va="bottom", ha="left",
             color=MUTED)
    with atomic_path(path) as tmp:
        fig.savefig(tmp, dpi=dpi, format="png")
    return path


def write_alternatives(ds, out_dir, title=None):
    """Write ``alternatives.csv``, ``alternatives-rows.csv`` and ``alternatives.png``,
    all or none.

    Parameters
    ----------
    ds : xarray.Dataset
        From :func:`harbor.study.alternatives.compare_alternatives`.
    out_dir : str or os.PathLike
        Output folder (created if missing).
    title : str, optional
        Chart title.

    Returns
    -------
    list of pathlib.Path
    """
    from harbor.outputs._atomic import write_staged

    return write_staged(out_dir, [(FILES[0], alternatives_csv_text(ds)),
                                  (FILES[1], alternatives_rows_csv_text(ds))],
                        (FILES[2], lambda p: plot_alternatives(ds, p, title=title)))
