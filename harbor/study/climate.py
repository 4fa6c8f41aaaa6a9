"""Berth downtime from a wave climate (a scatter table of random sea states).

A climate table lists sea states -- H1/3, T1/3, the direction they come from and the
percentage of time each occurs (a hindcast or buoy scatter table) -- and optionally the
Mitsuyasu s_max of each. For every point with an allowable height, the downtime is the
percentage of time its wave height exceeds that height, in total and by the 30-degree
sector the waves come from.

The diffraction coefficient of a linear solution does not depend on the incident height,
so each distinct (period, direction, spreading) is solved once, at unit height, and its
K' scales every row that shares it.
"""

from __future__ import annotations

import csv
import dataclasses
import io
import math
from pathlib import Path
from typing import NamedTuple

import numpy as np
import pandas as pd

from harbor.cautions import CAUTION_SHORT
from harbor.errors import InputError

#: Required columns of a climate table; ``spreading`` is optional.
CLIMATE_COLUMNS = ("height", "period", "from", "percent")
#: Default Mitsuyasu s_max when the table has no ``spreading`` (wind sea, Goda 2010).
DEFAULT_SPREADING = 10.0
#: Width of a direction sector (degrees); sectors are centred on 0, 30, ..., 330.
SECTOR_DEG = 30
SECTORS = tuple(range(0, 360, SECTOR_DEG))
#: The percentages of a table should add up to 100 within this (percentage points).
PERCENT_TOLERANCE = 1.0
#: Below this many distinct cases they are solved one after the other (a pool of
#: threads is not worth starting for two or three).
PARALLEL_FROM = 4

CLIMATE_EXAMPLE = """example:
  harbor climate scenarios/demo.toml --table scenarios/demo-climate.csv --out screening
  harbor climate scenarios/demo.toml --table scenarios/demo-climate.csv \\
      --arm "west arm" --move 30 --out screening-60m

The table is CSV with a header row: height,period,from,percent[,spreading]
(H1/3 in m, T1/3 in s, direction the waves come from in degrees true, percentage of
time; s_max, default 10). Each row is a directional random sea. Writes downtime.csv
(point,limit,total and one column per 30-degree sector, by its centre 000 ... 330),
climate-rows.csv (every row at every point) and downtime.png. With --arm and --move
the head of that arm is first moved as in `harbor sweep`.
"""


class ClimateResult(NamedTuple):
    """What :func:`climate_downtime` returns (unpacks as a tuple)."""

    downtime: pd.DataFrame
    rows: pd.DataFrame
    occurrence: pd.Series
    warnings: list


# --------------------------------------------------------------------------- reading

def sector_of(from_deg):
    """Centre (degrees) of the 30-degree sector a direction falls in.

    Parameters
    ----------
    from_deg : float or array_like
        Direction the waves come from, degrees true.

    Returns
    -------
    numpy.ndarray of int
        0, 30, ..., 330. Sectors are half-open, [c - 15, c + 15): 345 to 15 is
        sector 0 (north), 15 itself is sector 30.
    """
    d = np.mod(np.asarray(from_deg, float), 360.0)
    return (np.floor((d + SECTOR_DEG / 2) / SECTOR_DEG).astype(int) % len(SECTORS)) * SECTOR_DEG


def sector_label(centre: int) -> str:
    """The range of a direction sector as text.

    Parameters
    ----------
    centre : int
        Sector centre, degrees (0, 30, ..., 330).

    Returns
    -------
    str
        ``"345-015"`` for the sector centred on 0, and so on.
    """
    lo = (centre - SECTOR_DEG // 2) % 360
    hi = (centre + SECTOR_DEG // 2) % 360
    return f"{lo:03d}-{hi:03d}"


def _cell(raw, file, where, column, *, positive=False, lo=None, hi=None):
    s = "" if raw is None else str(raw).strip()
    if s == "":
        raise InputError("empty cell", file=file, where=where, key=column)
    try:
        v = float(s)
    except ValueError:
        raise InputError(f"not a number: {s!r}", file=file, where=where, key=column) from None
    if not math.isfinite(v):
        raise InputError(f"must be a finite number, got {s!r}", file=file, where=where,
                         key=column)
    if v < 0:
        raise InputError(f"must not be negative, got {v:g}", file=file, where=where,
                         key=column)
    if positive and v == 0:
        raise InputError("must be positive, got 0", file=file, where=where, key=column)
    if lo is not None and not (lo <= v <= hi):
        raise InputError(f"must be between {lo:g} and {hi:g} degrees, got {v:g}", file=file,
                         where=where, key=column)
    return v


def _validate(header, records, file, lines):
    import difflib

    cols = [str(c).strip().lower() for c in header]
    missing = [c for c in CLIMATE_COLUMNS if c not in cols]
    if missing:
        hints = []
        for m in missing:
            near = difflib.get_close_matches(m, cols, n=1, cutoff=0.5)
            if near:
                hints.append(f"'{near[0]}' for '{m}'?")
        hint = f" (did you mean {', '.join(hints)})" if hints else ""
        raise InputError(f"missing column(s) {', '.join(missing)}{hint}; a climate table "
                         f"needs the columns {','.join(CLIMATE_COLUMNS)} (spreading "
                         f"optional)", file=file, where="header")
    if len(set(cols)) != len(cols):
        dup = sorted({c for c in cols if cols.count(c) > 1})
        raise InputError(f"column(s) {', '.join(dup)} appear more than once", file=file,
                         where="header")
    idx = {c: cols.index(c) for c in cols}
    has_spread = "spreading" in idx
    out = []
    for n, (rec, line) in enumerate(zip(records, lines), 1):
        where = f"row {n}" + (f" (line {line})" if line is not None else "")
        if len(rec) < len(cols):
            rec = list(rec) + [""] * (len(cols) - len(rec))
        elif len(rec) > len(cols):
            raise InputError(f"{len(rec)} cells but the header has {len(cols)} columns",
                             file=file, where=where)
        h = _cell(rec[idx["height"]], file, where, "height")
        t = _cell(rec[idx["period"]], file, where, "period", positive=True)
        d = _cell(rec[idx["from"]], file, where, "from", lo=0.0, hi=360.0)
        p = _cell(rec[idx["percent"]], file, where, "percent")
        s = DEFAULT_SPREADING
        if has_spread and str(rec[idx["spreading"]]).strip() != "":
            s = _cell(rec[idx["spreading"]], file, where, "spreading", positive=True)
        out.append((n, line, h, t, d, p, s))
    if not out:
        raise InputError("the table has a header but no data rows", file=file)
    df = pd.DataFrame(out, columns=["row", "line", "height", "period", "from", "percent",
                                    "spreading"]).set_index("row")
    df.attrs["file"] = file
    return df


def read_climate(path):
    """Read and validate a climate table (CSV).

    Parameters
    ----------
    path : str or os.PathLike
        CSV file with a header row naming at least ``height`` (H1/3, m), ``period``
        (T1/3, s), ``from`` (direction the waves come from, degrees true, 0-360) and
        ``percent`` (percentage of time, %); optionally ``spreading`` (Mitsuyasu s_max,
        default 10; an empty cell takes the default). Column names are case-blind,
        other columns are ignored, lines starting with ``#`` and blank lines are
        skipped.

    Returns
    -------
    pandas.DataFrame
        Index ``row`` (1-based data row); columns ``line`` (line of the file),
        ``height``, ``period``, ``from``, ``percent``, ``spreading``.

    Raises
    ------
    InputError
        Naming the file, the row (and line) and the column: missing or duplicated
        columns, empty or non-numeric cells, negative values, a zero period or
        spreading, a direction outside 0-360, a table without data rows, an unreadable
        file.

    References
    ----------
    .. [1] Shafranovich, Y. (2005). Common Format and MIME Type for Comma-Separated
       Values (CSV) Files. IETF RFC 4180.
    """
    p = Path(path)
    file = str(path)
    if not p.exists():
        raise InputError("file not found", file=file)
    if p.is_dir():
        raise InputError("is a directory, not a climate table", file=file)
    try:
        text = p.read_bytes().decode("utf-8-sig")
    except UnicodeDecodeError:
        raise InputError("not UTF-8 text", file=file) from None
    except OSError as e:
        raise InputError(f"cannot read the file ({e.strerror})", file=file) from None
    header, records, lines = None, [], []
    try:
        for line_no, rec in _numbered_rows(text):
            if header is None:
                header = rec
            else:
                records.append(rec)
                lines.append(line_no)
    except csv.Error as e:
        raise InputError(f"CSV error: {e}", file=file) from None
    if header is None:
        raise InputError("the file is empty (a header row height,period,from,percent is "
                         "needed)", file=file)
    return _validate(header, records, file, lines)


def _numbered_rows(text):
    reader = csv.reader(io.StringIO(text))
    for rec in reader:
        if not rec or all(not c.strip() for c in rec) or rec[0].lstrip().startswith("#"):
            continue
        yield reader.line_num, rec


def climate_table(table):
    """A validated climate table from a file path or a DataFrame.

    Parameters
    ----------
    table : str, os.PathLike or pandas.DataFrame
        A CSV file (see :func:`read_climate`) or a DataFrame with the same columns.

    Returns
    -------
    pandas.DataFrame
        As :func:`read_climate` (``line`` is None for a DataFrame).
    """
    if isinstance(table, pd.DataFrame):
        if "line" in table.columns and table.index.name == "row":
            return table
        recs = table.astype(object).where(table.notna(), "").values.tolist()
        return _validate(list(table.columns), recs, table.attrs.get("file"),
                         [None] * len(recs))
    return read_climate(table)


def percent_warning(table):
    """A warning when the percentages do not add up to 100.

    Parameters
    ----------
    table : pandas.DataFrame
        From :func:`read_climate` or :func:`climate_table`.

    Returns
    -------
    str or None
        The warning (naming the file and the sum) when the sum is off 100 by more than
        :data:`PERCENT_TOLERANCE` percentage points, else None.
    """
    total = float(table["percent"].sum())
    if abs(total - 100.0) > PERCENT_TOLERANCE:
        file = table.attrs.get("file")
        pre = f"{file}: " if file else ""
        return (f"{pre}the percentages add up to {total:.2f}, not 100 (within "
                f"{PERCENT_TOLERANCE:g}); downtime is computed from them as given")
    return None


# --------------------------------------------------------------------------- solving

def _solve_case(scenario, method, case, name):
    """K' at the scenario's points for one (period, from, spreading), at unit height."""
    from harbor.solver import assemble
    from harbor.study.scenario import Sea

    period, from_deg, spreading = case
    sea = Sea(name=name, kind="random", height=1.0, period=period, from_deg=from_deg,
              spreading=spreading)
    ds = assemble.solve(dataclasses.replace(scenario, seas=(sea,)), grid=False,
                        method=method)
    return (ds.point_kd.values[0].copy(), float(ds.sea_reaching.values[0]),
            [w for w in ds.attrs["warnings"].split("\n") if w and name not in w])


def _threads_safe() -> bool:
    """Whether the solver may run in several threads at once: its compiled kernels release
    the GIL and hold no thread pool of their own, and its LAPACK calls are serialised
    (harbor.solver.kernels.gap), so it may."""
    return True


def _run_cases(scenario, cases, method, workers, progress, executor=None):
    # Through the one executor of every study (harbor.study.executor): by default
    # threads in this process (measured on the demo climate, 2 shared cores: serial
    # 10-14 s, two threads 7-13 s, two processes 14-18 s), or the executor given.
    from harbor.study.alternatives import solve_cases

    return solve_cases(scenario, cases, method=method, executor=executor, workers=workers,
                       progress=progress)


def climate_downtime(scenario, table, method="auto", workers=None, progress=None,
                     executor=None):
    """Downtime of every point with a limit under a wave climate.

    Parameters
    ----------
    scenario : harbor.study.scenario.Scenario
        The layout and the points (its own sea states are not used).
    table : str, os.PathLike or pandas.DataFrame
        The climate: columns ``height`` (H1/3, m), ``period`` (T1/3, s), ``from``
        (degrees true), ``percent`` (% of time), optional ``spreading`` (s_max); see
        :func:`read_climate`.
    method : {"auto", "general", "superposition", "exact"}
        Passed to :func:`harbor.solve`.
    workers : int, optional
        Threads to spread the distinct cases over (default: the machine's cores; 1
        solves them one after the other).
    progress : callable, optional
        ``progress(name, done, total)`` after each task (one task solves every
        direction of one (period, spreading)).
    executor : harbor.study.executor.Executor, optional
        Where the solves run (serial, threads, a Dask cluster); default threads as
        ``workers`` says.

    Returns
    -------
    ClimateResult
        ``downtime``: DataFrame indexed by point, columns ``limit`` (m), ``total`` (%)
        and one column per sector centre 0, 30, ..., 330 (%, of all time: the sector
        columns add up to ``total``). ``rows``: one row per climate row and point,
        columns ``row, height, period, from, spreading, percent, sector, point, kd,
        point_height, limit, exceeds, reaching``. ``occurrence``: % of time from each
        sector. ``warnings``: list of str.

    Raises
    ------
    InputError
        Bad table (see :func:`read_climate`), or no point of the scenario has a limit.

    Notes
    -----
    Each row i is a directional random sea (Bretschneider-Mitsuyasu spectrum,
    Mitsuyasu spreading) with H1/3 = H_i. In linear theory K' depends on the layout,
    the period, the direction and the spreading but not on the height, so with
    :math:`K_{eff,j}(T, \\theta, s)` solved once per distinct case at unit height,

    .. math::

        D_j = \\sum_i p_i \\, [K_{eff,j}(T_i, \\theta_i, s_i) H_i > H_{lim,j}],
        \\qquad D_{j,c} = \\sum_{i \\in c} p_i [\\ldots]

    for point j and direction sector c, with :math:`p_i` the row's percentage as given.

    References
    ----------
    .. [1] Goda, Y., Takayama, T., & Suzuki, Y. (1978). Diffraction diagrams for
       directional random waves. *Proc. 16th International Conference on Coastal
       Engineering*, ASCE, 628-650.
    .. [2] Goda, Y. (2010). *Random Seas and Design of Maritime Structures* (3rd ed.).
       World Scientific.
    .. [3] Mitsuyasu, H., et al. (1975). Observations of the directional spectrum of
       ocean waves using a cloverleaf buoy. *J. Phys. Oceanogr.*, 5(4), 750-760.
    """
    tab = climate_table(table)
    limited = tuple(p for p in scenario.points if p.limit is not None)
    if not limited:
        raise InputError("no [[point]] has a limit; downtime needs `limit = ...` (allowable "
                         "wave height, m) on at least one point", file=scenario.path or None,
                         key="limit")
    sc = dataclasses.replace(scenario, points=limited)
    warnings = []
    w = percent_warning(tab)
    if w:
        warnings.append(w)

    from_norm = np.mod(tab["from"].to_numpy(float), 360.0)
    keys = list(zip(tab["period"].to_numpy(float), from_norm, tab["spreading"].to_numpy(float)))
    cases = list(dict.fromkeys(keys))
    solved = _run_cases(sc, cases, method, workers, progress, executor)
    where = {c: i for i, c in enumerate(cases)}
    for _, _, ws in solved:
        for x in ws:
            if x not in warnings:
                warnings.append(x)

    case_of = np.array([where[k] for k in keys])
    kd = np.array([s[0] for s in solved])[case_of]             # (rows, points)
    reach = np.array([s[1] for s in solved])[case_of]
    H = tab["height"].to_numpy(float)
    lim = np.array([p.limit for p in limited], float)
    heights = kd * H[:, None]
    exceeds = heights > lim[None, :]
    pct = tab["percent"].to_numpy(float)
    sect = sector_of(from_norm)

    from harbor.solver.assemble import BREAKING_RATIO

    hb = BREAKING_RATIO * scenario.site.depth
    over = heights > hb
    if over.any():
        bad = tab.index[over.any(axis=1)]
        listed = ", ".join(str(r) for r in bad[:10]) + (" ..." if len(bad) > 10 else "")
        warnings.append(f"heights above the depth-limited breaking height 0.78 h = {hb:.2f} m "
                        f"in climate rows {listed} (flagged, not changed: waves there "
                        "would break)")
    far = reach < 0.5
    if far.any():
        warnings.append(f"{int(far.sum())} climate row(s) ({pct[far].sum():.1f} % of time) come "
                        "from directions that mostly do not reach the harbour from open water")

    names = [p.name for p in limited]
    down = pd.DataFrame(index=pd.Index(names, name="point"))
    down["limit"] = lim
    down["total"] = (pct[:, None] * exceeds).sum(axis=0)
    for c in SECTORS:
        m = sect == c
        down[c] = (pct[m, None] * exceeds[m]).sum(axis=0)
    occurrence = pd.Series({c: float(pct[sect == c].sum()) for c in SECTORS},
                           name="percent")
    occurrence.index.name = "sector"

    nr, npnt = heights.shape
    rows = pd.DataFrame({
        "row": np.repeat(tab.index.to_numpy(), npnt),
        "height": np.repeat(H, npnt),
        "period": np.repeat(tab["period"].to_numpy(float), npnt),
        "from": np.repeat(tab["from"].to_numpy(float), npnt),
        "spreading": np.repeat(tab["spreading"].to_numpy(float), npnt),
        "percent": np.repeat(pct, npnt),
        "sector": np.repeat(sect, npnt),
        "point": np.tile(names, nr),
        "kd": kd.ravel(),
        "point_height": heights.ravel(),
        "limit": np.tile(lim, nr),
        "exceeds": exceeds.ravel(),
        "reaching": np.repeat(reach, npnt),
    })
    for df in (down, rows):
        df.attrs.update(cases=len(cases), table_rows=nr, file=tab.attrs.get("file"),
                        cautions=CAUTION_SHORT)
    return ClimateResult(down, rows, occurrence, warnings)


# --------------------------------------------------------------------------- outputs

def _order(occurrence):
    """Sectors with any occurrence, in bearing order starting after the widest empty
    stretch (so that a NW-N-NE climate reads 300, 330, 000, 030)."""
    present = [c for c in SECTORS if occurrence.get(c, 0.0) > 0]
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
    result : ClimateResult
        From :func:`climate_downtime`.

    Returns
    -------
    str
        Per point: limit (m), total downtime (%) and downtime per sector (%), for the
        sectors the climate has any time in; last line the time from each sector (%).
    """
    down, occ = result.downtime, result.occurrence
    order = _order(occ)
    head = f"{'point':<18}{'limit':>7}{'total':>8}  |" + "".join(f"{sector_label(c):>9}"
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
    return "\n".join(lines)


def downtime_csv_text(result) -> str:
    """CSV of the downtime table.

    Parameters
    ----------
    result : ClimateResult
        From :func:`climate_downtime`.

    Returns
    -------
    str
        Columns ``point,limit,total,000,030,...,330``: limit in m, the others in % of
        all time (sector columns by their centre, degrees true); no comment lines.
    """
    d = result.downtime.reset_index()
    d.columns = ["point", "limit", "total"] + [f"{c:03d}" for c in SECTORS]
    buf = io.StringIO()
    d.to_csv(buf, index=False, lineterminator="\n", float_format="%.4g")
    return buf.getvalue()


def rows_csv_text(result) -> str:
    """CSV of every climate row at every point.

    Parameters
    ----------
    result : ClimateResult
        From :func:`climate_downtime`.

    Returns
    -------
    str
        The columns of ``result.rows`` (heights in m, period in s, directions in
        degrees true, percent in %); ``exceeds`` as ``true``/``false``.
    """
    r = result.rows.copy()
    r["exceeds"] = np.where(r["exceeds"], "true", "false")
    buf = io.StringIO()
    r.to_csv(buf, index=False, lineterminator="\n", float_format="%.6g")
    return buf.getvalue()


def plot_downtime(result, path, title=None, dpi=150):
    """Write a PNG bar chart of downtime by direction sector, one bar per point.

    Parameters
    ----------
    result : ClimateResult
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
    from harbor.outputs.maps import new_figure, wrap_to

    down, occ = result.downtime, result.occurrence
    order = _order(occ) or list(SECTORS)
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
    ax.set_xticks(x, [f"{c:03d}\n{sector_label(c)}" for c in order], fontsize=8)
    ax.set_xlabel("direction the waves come from (sector centre and range, degrees true)")
    ax.set_ylabel("% of time")
    ax.grid(True, axis="y", color="#dddddd", linewidth=0.6)
    ax.set_axisbelow(True)
    ax.legend(loc="upper left", bbox_to_anchor=(1.02, 1.0), fontsize=7.5, frameon=False,
              title="downtime (height > limit)", title_fontsize=8)
    ax.set_title(title or "Berth downtime by wave direction", fontsize=11, loc="left")
    src = result.downtime.attrs.get("file")
    foot = [f"climate: {Path(src).name if src else 'table'}, "
            f"{result.downtime.attrs.get('table_rows', '?')} rows, "
            f"{occ.sum():.1f} % of time; {result.downtime.attrs.get('cases', '?')} distinct "
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
    result : ClimateResult
    out_dir : str or os.PathLike
        Output folder (created if missing).
    title : str, optional
        Chart title.

    Returns
    -------
    list of pathlib.Path
    """
    from harbor.outputs._atomic import staging_dir

    files = ["downtime.csv", "climate-rows.csv", "downtime.png"]
    with staging_dir(out_dir) as (stage, staged):
        for f, text in ((files[0], downtime_csv_text(result)),
                        (files[1], rows_csv_text(result))):
            with open(stage / f, "w", encoding="utf-8", newline="") as fh:
                fh.write(text)
            staged.append(f)
        plot_downtime(result, stage / files[2], title=title)
        staged.append(files[2])
    return [Path(out_dir) / f for f in files]
