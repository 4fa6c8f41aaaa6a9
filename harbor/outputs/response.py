"""The basin response curve as a chart (``response.png``) and tables (``response.csv``,
``natural-periods.csv``).

Everything here reads the Dataset of :func:`harbor.study.response.response_curve`;
nothing is recomputed.
"""

from __future__ import annotations

import io
import math
from pathlib import Path


from harbor.cautions import CAUTION_SHORT
from harbor.outputs.style import new_figure, wrap_to

#: Columns of response.csv (one row per period and point).
RESPONSE_COLUMNS = ["period_s", "point", "amplification", "phase_deg", "basin_response",
                    "refined"]

#: Columns of natural-periods.csv (one row per natural period and point).
NATURAL_COLUMNS = ["mode", "period_s", "basin_response", "point", "amplification",
                   "share_of_basin_max", "position"]

_COLOURS = ["#0072b2", "#d55e00", "#009e73", "#cc79a7", "#e69f00", "#56b4e9", "#000000",
            "#f0e442"]


def _num(v, fmt):
    return "" if v is None or not math.isfinite(float(v)) else format(float(v), fmt)


def response_csv_text(ds) -> str:
    """CSV text of the curve: columns :data:`RESPONSE_COLUMNS`.

    Parameters
    ----------
    ds : xarray.Dataset
        From :func:`harbor.study.response.response_curve`.

    Returns
    -------
    str
        Period in s (6 significant digits), amplification |eta|/a (-, 4 decimals), phase in
        degrees (1 decimal), ``refined`` ``true`` for periods added around a peak; empty
        fields where a period could not be solved or a point is dry.

    References
    ----------
    Shafranovich, Y. (2005). Common Format and MIME Type for Comma-Separated Values
    (CSV) Files. IETF RFC 4180.
    """
    import csv

    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    w.writerow(RESPONSE_COLUMNS)
    amp = ds["amplification"].values
    ph = ds["phase"].values
    basin = ds["basin_response"].values
    ref = ds["refined"].values
    for i, T in enumerate(ds["period"].values):
        for j, p in enumerate(ds["point"].values):
            w.writerow([f"{float(T):.6g}", str(p), _num(amp[i, j], ".4f"),
                        _num(ph[i, j], ".1f"), _num(basin[i], ".4f"),
                        "true" if bool(ref[i]) else "false"])
    return buf.getvalue()


def natural_csv_text(ds) -> str:
    """CSV text of the natural periods: columns :data:`NATURAL_COLUMNS`.

    Parameters
    ----------
    ds : xarray.Dataset
        From :func:`harbor.study.response.response_curve`.

    Returns
    -------
    str
        One row per natural period (mode 1 the longest) and point: the point's
        amplification at that period, its share of the largest amplification in the
        basin, and ``antinode`` / ``node`` / ``between``. A header only when no natural
        period was found.
    """
    import csv

    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    w.writerow(NATURAL_COLUMNS)
    for k, m in enumerate(ds["mode"].values):
        for j, p in enumerate(ds["point"].values):
            w.writerow([int(m), f"{float(ds['natural_period'].values[k]):.6g}",
                        _num(ds["natural_response"].values[k], ".4f"), str(p),
                        _num(ds["mode_amplification"].values[k, j], ".4f"),
                        _num(ds["mode_share"].values[k, j], ".3f"),
                        str(ds["mode_position"].values[k, j])])
    return buf.getvalue()


def response_text(ds) -> str:
    """A short plain-text summary: the natural periods and where each point sits."""
    lines = []
    nat = ds["natural_period"].values
    if nat.size == 0:
        lines.append(f"no natural period found between {ds.attrs['t_min']:g} and "
                     f"{ds.attrs['t_max']:g} s")
    for k, T in enumerate(nat):
        where = ", ".join(f"{p} {ds['mode_position'].values[k, j] or '-'} "
                          f"({_num(ds['mode_amplification'].values[k, j], '.2f')})"
                          for j, p in enumerate(ds["point"].values))
        lines.append(f"T{k + 1} = {float(T):.1f} s (basin rms amplification "
                     f"{float(ds['natural_response'].values[k]):.2f}): {where}")
    return "\n".join(lines)


def plot_response(ds, path, title=None, dpi=150):
    """Write a PNG of amplification against period, natural periods marked.

    Parameters
    ----------
    ds : xarray.Dataset
        From :func:`harbor.study.response.response_curve`.
    path : str or os.PathLike
        Output PNG; written atomically.
    title : str, optional
        First title line.
    dpi : int

    Returns
    -------
    pathlib.Path

    Notes
    -----
    One line per point and the basin's rms response in grey; a logarithmic period axis
    when the range spans a factor of 3 or more; each natural period a vertical line
    labelled T1, T2 ... with its value; the node/antinode table, the method, the
    direction, the notices and the caution under the chart.
    """
    from harbor.outputs._atomic import atomic_path
    from harbor.solver.assemble import notices

    fig = new_figure((11.0, 7.4))
    ax = fig.add_axes((0.07, 0.36, 0.66, 0.55))
    T = ds["period"].values
    amp = ds["amplification"].values
    for j, p in enumerate(ds["point"].values):
        ax.plot(T, amp[:, j], color=_COLOURS[j % len(_COLOURS)], linewidth=1.4,
                label=str(p))
    ax.plot(T, ds["basin_response"].values, color="#888888", linestyle="--",
            linewidth=1.0, label="basin (rms)")
    t0, t1 = float(ds.attrs["t_min"]), float(ds.attrs["t_max"])
    if t1 / t0 >= 3.0:
        ax.set_xscale("log")
        from matplotlib.ticker import FuncFormatter

        ax.xaxis.set_major_formatter(FuncFormatter(lambda v, _: f"{v:g}"))
        ax.xaxis.set_minor_formatter(FuncFormatter(
            lambda v, _: f"{v:g}" if str(f"{v:g}")[0] in "235" else ""))
    ax.set_xlim(t0, t1)
    ax.set_ylim(bottom=0)
    for k, Tn in enumerate(ds["natural_period"].values):
        ax.axvline(float(Tn), color="#1b5e20", linewidth=0.9, linestyle=(0, (4, 2)))
        # upright along its line, so that close natural periods keep legible labels
        ax.annotate(f"T{k + 1} = {float(Tn):.1f} s", (float(Tn), 1.0),
                    xycoords=("data", "axes fraction"), xytext=(-2, -4),
                    textcoords="offset points", fontsize=7.5, color="#1b5e20", va="top",
                    ha="right", rotation=90,
                    bbox=dict(boxstyle="square,pad=0.1", fc="white", ec="none", alpha=0.8))
    ax.set_xlabel("wave period T (s)")
    ax.set_ylabel("amplification |η| / incident amplitude")
    ax.grid(True, which="both", color="#e3e3e3", linewidth=0.6)
    ax.legend(loc="upper left", bbox_to_anchor=(1.02, 1.0), fontsize=8, frameon=False,
              title="point", title_fontsize=8.5)
    ax.set_title(title or "Basin response to long waves: amplification against period",
                 fontsize=11, loc="left", pad=18)
    name = ds.attrs.get("title") or ds.attrs.get("scenario")
    if name:
        ax.text(0.0, 1.01, f"{name} — waves from {ds.attrs['direction_from']:g}° true",
                transform=ax.transAxes, fontsize=8.5, color="#555555", va="bottom")
    # where each point sits on each mode, beside the chart
    side = ["natural periods:"]
    for k, Tn in enumerate(ds["natural_period"].values):
        side.append(f"T{k + 1} = {float(Tn):.1f} s")
        for j, p in enumerate(ds["point"].values):
            side.append(f"  {str(p)[:18]}: {ds['mode_position'].values[k, j] or '-'}")
    if len(side) == 1:
        side.append("none found in the range")
    if len(side) > 26:
        side = side[:25] + ["  ... (natural-periods.csv)"]
    fig.text(0.76, 0.36, "\n".join(side), fontsize=7.2, va="bottom", ha="left",
             color="#333333", family="monospace")
    foot = wrap_to(f"method: {ds.attrs['method']}", 10.3, 7.2)
    foot += wrap_to(ds.attrs.get("definition", ""), 10.3, 7.2)
    items = list(dict.fromkeys(notices(ds)))
    items = [n for n in items if n.level == "warning"] + \
        [n for n in items if n.level != "warning"]
    for n in items:
        foot += wrap_to(f"{n.level}: {n.text}", 10.3, 7.2)
    caution = wrap_to(ds.attrs.get("caution_short", CAUTION_SHORT), 10.3, 7.2)
    if len(foot) + len(caution) > 18:
        foot = foot[:17 - len(caution)] + ["... (all warnings: harbor seiche's output)"]
    fig.text(0.02, 0.02, "\n".join(foot + caution), fontsize=7.2, va="bottom", ha="left",
             color="#555555")
    with atomic_path(path) as tmp:
        fig.savefig(tmp, dpi=dpi, format="png")
    return Path(path)


def write_response(ds, out_dir, title=None):
    """Write ``response.csv``, ``natural-periods.csv`` and ``response.png``: all or none.

    Parameters
    ----------
    ds : xarray.Dataset
        From :func:`harbor.study.response.response_curve`.
    out_dir : str or os.PathLike
        Output folder (created if missing).
    title : str, optional
        First title line of the chart.

    Returns
    -------
    list of pathlib.Path
    """
    from harbor.outputs._atomic import write_staged

    return write_staged(out_dir, [("response.csv", response_csv_text(ds)),
                                  ("natural-periods.csv", natural_csv_text(ds))],
                        ("response.png", lambda p: plot_response(ds, p, title=title)))
