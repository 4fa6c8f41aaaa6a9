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

import numpy as np
import pandas as pd
import xarray as xr

from harbor.cautions import CAUTION_SHORT
from harbor.errors import InputError
from harbor.study._files import MAX_TABLE_BYTES, read_text
from harbor.study._limits import range_problem

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
    problem = range_problem(column, v, positive)
    if problem:
        raise InputError(problem, file=file, where=where, key=column)
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
    _check_total(df, file)
    return df


def _duplicates(df):
    """Pairs (first row, repeating row) of rows with the same sea state."""
    key = df[["height", "period", "from", "spreading"]].copy()
    key["from"] = np.mod(key["from"], 360.0)
    rep = key.duplicated(keep="first")
    if not rep.any():
        return []
    first = {}
    for row, k in zip(key.index, map(tuple, key.to_numpy())):
        first.setdefault(k, row)
    return [(first[tuple(key.loc[r])], r) for r in key.index[rep]]


def _check_total(df, file):
    # More than 100 % of the time is not a climate: the downtime would exceed 100 %.
    total = float(df["percent"].sum())
    if total > 100.0 + PERCENT_TOLERANCE:
        dup = _duplicates(df)
        hint = (f"; row {dup[0][1]} repeats row {dup[0][0]} (same height, period, from "
                f"and spreading){' and more' if len(dup) > 1 else ''}: merge or remove "
                "repeated rows") if dup else ""
        raise InputError(f"the percentages add up to {total:.2f}, more than 100 (within "
                         f"{PERCENT_TOLERANCE:g}){hint}", file=file, key="percent")


#: Most distinct (period, direction, spreading) cases ``harbor climate`` solves unless
#: asked for more (``--max-cases``): at about :data:`SECONDS_PER_CASE` each, 2000 cases take
#: some 15 minutes.
MAX_CLIMATE_CASES = 2000
#: Rough cost of one distinct climate case at a few points (s; measured on the demo
#: climate on two shared cores: 31-34 cases in 10-14 s).
SECONDS_PER_CASE = 0.4


def case_count(table) -> int:
    """Number of distinct (period, direction, spreading) cases of a climate table: each is
    solved once.

    Parameters
    ----------
    table : pandas.DataFrame
        From :func:`read_climate` or :func:`climate_table`.

    Returns
    -------
    int
    """
    keys = pd.DataFrame({"period": table["period"].to_numpy(float),
                         "from": np.mod(table["from"].to_numpy(float), 360.0),
                         "spreading": table["spreading"].to_numpy(float)})
    return int((~keys.duplicated()).sum())


def check_case_count(table, limit=MAX_CLIMATE_CASES) -> str:
    """The line announcing the size of a climate run; refuses one beyond ``limit``.

    Parameters
    ----------
    table : pandas.DataFrame
        From :func:`read_climate`.
    limit : int, optional
        Most distinct cases accepted (None or absent: :data:`MAX_CLIMATE_CASES`).

    Returns
    -------
    str
        ``"N climate rows, M distinct (period, direction, spreading) cases: about ..."``
        with the estimate M × :data:`SECONDS_PER_CASE` (one thread).

    Raises
    ------
    InputError
        When M > ``limit`` (key ``--max-cases``), naming M and the estimate.
    """
    if limit is None:
        limit = MAX_CLIMATE_CASES
    if isinstance(limit, bool) or not isinstance(limit, int) or limit < 1:
        raise InputError(f"must be a whole number of at least 1, got {limit!r}",
                         key="--max-cases")
    n = case_count(table)
    est = n * SECONDS_PER_CASE
    when = (f"{est:.0f} s" if est < 120 else f"{est / 60:.0f} min" if est < 7200
            else f"{est / 3600:.1f} h")
    line = (f"{len(table)} climate rows, {n} distinct (period, direction, spreading) "
            f"cases: about {when} on one core (rough estimate)")
    if n > limit:
        raise InputError(f"the table has {n:,} distinct (period, direction, spreading) "
                         f"cases, more than the {limit:,} solved without asking (about "
                         f"{when}); coarsen the table's bins or give --max-cases {n}",
                         file=table.attrs.get("file"), key="--max-cases")
    return line


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
    file = str(path)
    text = read_text(path, "climate table", MAX_TABLE_BYTES)
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


def duplicate_warning(table):
    """A warning naming rows that repeat an earlier row's sea state.

    Parameters
    ----------
    table : pandas.DataFrame
        From :func:`read_climate` or :func:`climate_table`.

    Returns
    -------
    str or None
        The warning (rows with the same height, period, direction and spreading as an
        earlier row: their percentages count again, as given), else None. A table whose
        percentages then exceed 100 is refused by the reader.
    """
    dup = _duplicates(table)
    if not dup:
        return None
    file = table.attrs.get("file")
    pre = f"{file}: " if file else ""
    listed = ", ".join(f"row {b} repeats row {a}" for a, b in dup[:5])
    more = f" and {len(dup) - 5} more" if len(dup) > 5 else ""
    return (f"{pre}{listed}{more} (same height, period, from and spreading); their "
            "percentages are added as given")


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
    # this case's own breaking and reaching notes are replaced by the climate's summary
    own = ("breaking", "not-reaching")
    return (ds.point_kd.values[0].copy(), float(ds.sea_reaching.values[0]),
            [n.text for n in assemble.notices(ds) if n.code not in own and name not in n.text])


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


def climate_downtime(scenario, table, method="auto", workers=None, progress=None, arm=None,
                     move=None, executor=None):
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
    arm, move : str and float, optional
        First move the free head of ``arm`` by ``move`` metres along its end segment
        (as :func:`harbor.study.sweep.move_head`; positive lengthens).
    executor : harbor.study.executor.Executor, optional
        Where the solves run (serial, threads, a Dask cluster); default threads as
        ``workers`` says.

    Returns
    -------
    xarray.Dataset
        Dimensions ``point`` (the points with a limit), ``sector`` (centres 0, 30, ...,
        330 degrees true) and ``row`` (the climate table's rows, by their number).
        ``limit`` (point, m), ``total`` (point, % of time above the limit),
        ``downtime`` (point, sector: % of all time, adding up to ``total``),
        ``occurrence`` (sector, % of time); per row ``height``, ``period``, ``from``,
        ``spreading``, ``percent``, ``row_sector``, ``reaching``; per row and point
        ``kd``, ``point_height`` (m), ``exceeds``. Attributes: ``warnings`` (list of
        str), ``cases``, ``table_rows``, ``file``, ``title``, ``scenario``, ``arm``,
        ``move`` (m), ``entrance_width`` (m:
        :func:`harbor.geometry.entrance.entrance_width`, the narrowest water passage
        between the structures; None when the layout has none), ``cautions``. The same
        labelled shape as :func:`harbor.study.sweep.sweep`.

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
    if (arm is None) != (move is None):
        raise InputError("arm and move go together", key="arm" if arm is None else "move")
    width = None
    if arm is not None:
        from harbor.study.sweep import MoveRejected, move_head

        try:
            scenario, width = move_head(scenario, arm, move)
        except MoveRejected as e:
            raise InputError(f"cannot move the head of '{arm}' by {move:g} m: {e}",
                             file=scenario.path or None, key="move") from None
    else:
        from harbor.geometry.entrance import entrance_width
        from harbor.solver.assemble import ground_scenario

        # the one definition, as check and sweep, in ground metres
        width = entrance_width(ground_scenario(scenario).layout)
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
    for sol in solved:
        for x in sol[2]:
            if x not in warnings:
                warnings.append(x)
    methods = list(dict.fromkeys(sol[3] for sol in solved if len(sol) > 3))

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

    from harbor.solver.agitation import has_survey

    if has_survey(scenario):
        xy = np.array([p.at for p in limited], float).reshape(-1, 2)
        hb = BREAKING_RATIO * scenario.bathymetry.depth(xy[:, 0], xy[:, 1])
        hb_text = "0.78 h (local depth)"
    else:
        hb = BREAKING_RATIO * scenario.site.depth
        hb_text = f"0.78 h = {hb:.2f} m"
    over = heights > hb            # (rows, points) against one depth or one per point
    if over.any():
        bad = tab.index[over.any(axis=1)]
        listed = ", ".join(str(r) for r in bad[:10]) + (" ..." if len(bad) > 10 else "")
        warnings.append(f"heights above the depth-limited breaking height {hb_text} "
                        f"in climate rows {listed} (flagged, not changed: waves there "
                        "would break)")
    far = reach < 0.5
    if far.any():
        warnings.append(f"{int(far.sum())} climate row(s) ({pct[far].sum():.1f} % of time) come "
                        "from directions that mostly do not reach the harbour from open water")

    names = [p.name for p in limited]
    secs = np.array(SECTORS)
    in_sector = sect[:, None] == secs[None, :]                 # (rows, sectors)
    down = np.einsum("r,rs,rp->ps", pct, in_sector, exceeds.astype(float))
    nr = heights.shape[0]
    result = xr.Dataset(
        {
            "limit": ("point", lim, {"long_name": "allowable wave height", "units": "m"}),
            "total": ("point", (pct[:, None] * exceeds).sum(axis=0),
                      {"long_name": "downtime: time the height exceeds the limit",
                       "units": "%"}),
            "downtime": (("point", "sector"), down,
                         {"long_name": "downtime with waves from the sector (of all time)",
                          "units": "%"}),
            "occurrence": ("sector", (pct[:, None] * in_sector).sum(axis=0),
                           {"long_name": "time the waves come from the sector",
                            "units": "%"}),
            "height": ("row", H, {"long_name": "H1/3 of the climate row", "units": "m"}),
            "period": ("row", tab["period"].to_numpy(float),
                       {"long_name": "T1/3 of the climate row", "units": "s"}),
            "from": ("row", tab["from"].to_numpy(float),
                     {"long_name": "direction the waves come from", "units": "degree"}),
            "spreading": ("row", tab["spreading"].to_numpy(float),
                          {"long_name": "Mitsuyasu s_max", "units": "1"}),
            "percent": ("row", pct, {"long_name": "time of the row", "units": "%"}),
            "row_sector": ("row", sect, {"long_name": "sector centre of the row",
                                         "units": "degree"}),
            "reaching": ("row", reach, {"long_name": "share of the energy reaching the "
                                                     "layout from open water", "units": "1"}),
            "kd": (("row", "point"), kd, {"long_name": "effective K'", "units": "1"}),
            "point_height": (("row", "point"), heights,
                             {"long_name": "H1/3 at the point", "units": "m"}),
            "exceeds": (("row", "point"), exceeds),
        },
        coords={"point": names, "sector": secs, "row": tab.index.to_numpy()},
        attrs=dict(cases=len(cases), table_rows=nr, file=tab.attrs.get("file"),
                   cautions=CAUTION_SHORT, title=scenario.title,
                   scenario=str(scenario.path or ""), arm=arm,
                   move=None if move is None else float(move), entrance_width=width,
                   warnings=list(warnings), methods=methods),
    )
    result["sector"].attrs.update(long_name="sector centre (direction the waves come "
                                            "from, degrees true)", units="degree")
    return result


# --------------------------------------------------------------------------- outputs




def __getattr__(name):
    # the tables, CSV text and charts moved to harbor.outputs.studies; old imports work
    from harbor.outputs import studies

    if name in studies.__all__:
        return getattr(studies, name)
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
