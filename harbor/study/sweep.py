"""Entrance-width sweeps: move one breakwater head and watch the berths.

The planner's first question about an entrance is how wide it may be. A sweep moves the
free head of one arm along its end segment, keeps everything else, and solves every sea
state at the scenario's points for each position. The result is a table (one row per
move, sea state and point) and a chart of height against entrance width.

Geometry (moving the head, the entrance width, rejected moves) lives here with the
table; the physics is :func:`harbor.solve`'s.
"""

from __future__ import annotations

import dataclasses
import difflib
import io
import math

import numpy as np
import pandas as pd
import shapely

from harbor.cautions import CAUTION_SHORT
from harbor.errors import InputError
from harbor.geometry.entrance import entrance_width

#: Columns of the sweep table and of its CSV file (contract of issue 6).
SWEEP_COLUMNS = ["move", "entrance_width", "sea", "point", "kd", "height", "limit", "ok"]

#: Narrowest gap (m) a moved head may leave to another arm or land. A thin-barrier model
#: says nothing useful about a slit narrower than this, and no navigable entrance is
#: this narrow (common practice); it also rejects an arm slid alongside another at a
#: hair's breadth, which the exact-crossing test alone would let through.
MIN_GAP = 1.0

#: Most positions one sweep may ask for (each is a full solve of every sea state).
MAX_MOVES = 400

SWEEP_EXAMPLE = """example:
  harbor sweep scenarios/demo.toml --arm "west arm" --move -40 60 10 --out screening
  harbor sweep scenarios/demo.toml --arm "east arm" --move 0 50 5 --sea "storm N"

Moves the free head of the arm along its end segment by each distance from MIN to MAX
in steps of STEP metres (positive lengthens the arm and narrows the entrance), solves
every sea state (or --sea) at the scenario's points, and writes sweep-<arm>.csv
(columns move,entrance_width,sea,point,kd,height,limit,ok) and sweep-<arm>.png. Moves
that would make arms cross, put the head in land or shorten the arm past the other end
of its end segment are reported and skipped.
"""


class MoveRejected(ValueError):
    """A head position that the layout cannot take (the reason is the message)."""


# --------------------------------------------------------------------------- geometry

def _tolerance(layout) -> float:
    # the same rule as the scenario reader: max(1 cm, 1e-6 x layout size)
    b = layout.bounds()
    return max(0.01, 1e-6 * max(b[2] - b[0], b[3] - b[1]))


def find_arm(scenario, name):
    """The index of the arm called ``name`` and which end is its free head.

    Parameters
    ----------
    scenario : harbor.study.scenario.Scenario
    name : str
        The arm's name as written in the scenario.

    Returns
    -------
    index : int
        Position of the arm in ``scenario.layout.arms``.
    end : {"start", "end"}
        The free (diffracting) end.

    Raises
    ------
    InputError
        If no arm has that name (the nearest name is suggested) or if the arm does not
        have exactly one free head (both ends rooted, or a detached breakwater with two
        heads: which one to move would be a guess).
    """
    arms = scenario.layout.arms
    names = [a.name for a in arms]
    if name not in names:
        near = difflib.get_close_matches(name, names, n=1)
        hint = f" (did you mean '{near[0]}'?)" if near else f" (known: {', '.join(names)})"
        raise InputError(f"no arm named '{name}'{hint}", file=scenario.path or None,
                         key="--arm")
    i = names.index(name)
    arm = arms[i]
    free = [e for e, rooted in (("start", arm.rooted_start), ("end", arm.rooted_end))
            if not rooted]
    if len(free) != 1:
        what = "both ends are rooted" if not free else "both ends are free heads"
        raise InputError(f"arm '{name}' must have exactly one free head to be swept; "
                         f"{what}", file=scenario.path or None, key="--arm")
    return i, free[0]


def move_head(scenario, arm, move):
    """The scenario with one arm's free head moved along its end segment.

    Parameters
    ----------
    scenario : harbor.study.scenario.Scenario
    arm : str
        Name of an arm with exactly one free head.
    move : float
        Distance (m): positive extends the arm beyond its head along the end segment's
        outward direction, negative shortens it along the end segment.

    Returns
    -------
    moved : harbor.study.scenario.Scenario
        A copy with the new head; the rest of the layout, the seas and points unchanged.
    width : float
        Entrance width (m) of the moved layout,
        :func:`harbor.geometry.entrance.entrance_width` (the narrowest water passage
        between the structures).

    Raises
    ------
    InputError
        For an unknown arm or one without exactly one free head (see :func:`find_arm`).
    MoveRejected
        When the move shortens the arm to or past the other vertex of its end segment,
        makes the arm cross itself or another arm, puts the head in (or the arm across)
        land, runs the arm over a point of interest, or leaves less than
        :data:`MIN_GAP` to another arm or land.

    Notes
    -----
    With :math:`P_h` the head and :math:`P_o` the other vertex of the end segment, the
    new head is :math:`P_h + m (P_h - P_o)/|P_h - P_o|`. A move is rejected when the
    head comes within :data:`MIN_GAP` of another arm or land; the width reported is
    :func:`harbor.geometry.entrance.entrance_width`.
    """
    i, end = find_arm(scenario, arm)
    layout = scenario.layout
    old = layout.arms[i]
    line = np.array(old.line, float)
    h, o = (0, 1) if end == "start" else (-1, -2)
    head, other = line[h].copy(), line[o].copy()
    seg = float(np.hypot(*(head - other)))
    tol = _tolerance(layout)
    move = float(move)
    if not math.isfinite(move):
        raise MoveRejected(f"move {move} is not a finite distance")
    if move <= -(seg - tol):
        raise MoveRejected(f"shortens the arm by {-move:g} m, past the other vertex of its "
                           f"end segment ({seg:.1f} m long)")
    new_head = head + move * (head - other) / seg
    line[h] = new_head
    new_arm = dataclasses.replace(old, line=line)
    geom = shapely.LineString(line)
    if not geom.is_simple:
        raise MoveRejected("the arm would cross itself")
    land = layout.land_union()
    p = shapely.Point(new_head)
    if not land.is_empty and land.intersects(p):
        raise MoveRejected("the head would be in land")
    if move > 0:
        ext = shapely.LineString([head, new_head])
        if not land.is_empty and land.intersects(ext):
            raise MoveRejected("the arm would run across land")
        for a in layout.arms:
            gap = shapely.LineString(a.line).distance(ext) if a is not old else math.inf
            if gap <= tol:
                raise MoveRejected(f"the arm would cross or touch '{a.name}'")
            if gap < MIN_GAP:
                raise MoveRejected(f"the arm would pass {gap:.2f} m from '{a.name}', less "
                                   f"than {MIN_GAP:g} m (entrance closed)")
    for pt in scenario.points:
        if geom.distance(shapely.Point(pt.at)) <= tol:
            raise MoveRejected(f"the arm would run over the point '{pt.name}'")
    others = [shapely.LineString(a.line) for a in layout.arms if a is not old]
    dists = [g.distance(p) for g in others]
    if not land.is_empty:
        dists.append(land.distance(p))
    width = float(min(dists)) if dists else math.inf
    if width < MIN_GAP:
        raise MoveRejected(f"the head would be {width:.2f} m from another arm or land, "
                           f"less than {MIN_GAP:g} m (entrance closed)")
    arms = tuple(new_arm if k == i else a for k, a in enumerate(layout.arms))
    moved = dataclasses.replace(scenario, layout=dataclasses.replace(layout, arms=arms))
    # the reported width is the one entrance width of every command (geometry.entrance)
    passage = entrance_width(moved.layout)
    return moved, (width if passage is None else passage)


def move_range(lo, hi, step):
    """The moves of ``--move MIN MAX STEP``: MIN, MIN+STEP, ... up to MAX inclusive.

    Parameters
    ----------
    lo, hi, step : float
        Metres; ``step > 0`` and ``lo <= hi`` (``lo == hi`` gives one move).

    Returns
    -------
    numpy.ndarray
        The moves (m), rounded to micrometres so that 0.1-steps print cleanly.

    Raises
    ------
    InputError
        For a non-positive step, MIN > MAX, non-finite values or more than
        :data:`MAX_MOVES` positions.
    """
    vals = [float(v) for v in (lo, hi, step)]
    if not all(math.isfinite(v) for v in vals):
        raise InputError("--move needs three finite numbers MIN MAX STEP", key="--move")
    lo, hi, step = vals
    if step <= 0:
        raise InputError(f"STEP must be positive, got {step:g}", key="--move")
    if lo > hi:
        raise InputError(f"MIN ({lo:g}) must not exceed MAX ({hi:g})", key="--move")
    n = int(math.floor((hi - lo) / step + 1e-9)) + 1
    if n > MAX_MOVES:
        raise InputError(f"{n} positions asked for, more than {MAX_MOVES}; use a larger "
                         "STEP", key="--move")
    return np.round(lo + step * np.arange(n), 6)


# --------------------------------------------------------------------------- the sweep

def sweep(scenario, arm, moves, sea=None, method="auto", progress=None):
    """K' and wave height at every point for each position of one breakwater head.

    Parameters
    ----------
    scenario : harbor.study.scenario.Scenario
        From :func:`harbor.load_scenario`.
    arm : str
        Name of the arm whose free head moves (it must have exactly one).
    moves : sequence of float
        Distances (m) along the end segment; positive lengthens the arm.
    sea : str, optional
        One sea state's name; default every sea state of the scenario.
    method : {"auto", "general", "superposition", "exact"}
        Passed to :func:`harbor.solve`.
    progress : callable, optional
        ``progress(name, done, total)`` after each position.

    Returns
    -------
    pandas.DataFrame
        Columns ``move`` (m), ``entrance_width`` (m), ``sea``, ``point``, ``kd`` (K'),
        ``height`` (m: H or H1/3), ``limit`` (m, NaN when the point has none), ``ok``
        (nullable boolean: height <= limit; NA without a limit). One row per accepted
        move, sea state and point. ``attrs``: ``arm``, ``skipped`` (list of
        ``(move, reason)``), ``methods`` (dict move -> list of method names per sea),
        ``warnings`` (list of str), ``cautions``.

    Raises
    ------
    InputError
        Unknown arm or sea, or an arm without exactly one free head.

    Notes
    -----
    Each position is a full solve of the layout (:func:`harbor.solve`, points only), so
    every method choice of the solver applies: a collinear entrance is solved with
    :func:`harbor.gap` across the moved gap (width B, centre midway between the heads).
    Moves the layout cannot take (see :func:`move_head`) are skipped, not fatal.

    References
    ----------
    .. [1] Penney, W. G., & Price, A. T. (1952). The diffraction theory of sea waves and
       the shelter afforded by breakwaters. *Phil. Trans. R. Soc. Lond. A*, 244(882),
       236-253.
    .. [2] Goda, Y. (2010). *Random Seas and Design of Maritime Structures* (3rd ed.).
       World Scientific, ch. 3 (wave diffraction in harbours).
    """
    from harbor.solver import assemble

    find_arm(scenario, arm)
    if sea is not None:
        try:
            scenario.sea(sea)
        except KeyError:
            names = [s.name for s in scenario.seas]
            raise InputError(f"no sea state named '{sea}' (known: {', '.join(names)})",
                             file=scenario.path or None, key="--sea") from None
    moves = [float(m) for m in np.atleast_1d(np.asarray(moves, float))]
    rows, skipped, methods, warnings = [], [], {}, []
    for n, m in enumerate(moves, 1):
        try:
            moved, width = move_head(scenario, arm, m)
        except MoveRejected as e:
            skipped.append((m, str(e)))
        else:
            ds = assemble.solve(moved, sea=sea, grid=False, method=method)
            methods[m] = [str(v) for v in ds.sea_method.values]
            for w in ds.attrs["warnings"].split("\n"):
                if w and w not in warnings:
                    warnings.append(w)
            lim = ds.point_limit.values
            for a, s in enumerate(ds.sea.values):
                for b, p in enumerate(ds.point.values):
                    kd = float(ds.point_kd.values[a, b])
                    hgt = float(ds.point_height.values[a, b])
                    limit = float(lim[b])
                    ok = pd.NA if math.isnan(limit) else bool(hgt <= limit)
                    rows.append((m, width, str(s), str(p), kd, hgt, limit, ok))
        if progress is not None:
            progress(f"sweep '{arm}'", n, len(moves))
    df = pd.DataFrame(rows, columns=SWEEP_COLUMNS)
    df["ok"] = df["ok"].astype("boolean")
    df.attrs.update(arm=arm, skipped=skipped, methods=methods, warnings=warnings,
                    cautions=CAUTION_SHORT)
    return df


def widest_ok(table):
    """The widest entrance at which every point with a limit meets it in every sea state.

    Parameters
    ----------
    table : pandas.DataFrame
        From :func:`sweep`.

    Returns
    -------
    (float, float) or None
        ``(entrance_width, move)`` in metres, or None when no position passes (or no
        point has a limit; see :func:`has_limits`).
    """
    lim = table[table["limit"].notna()]
    if lim.empty:
        return None
    passing = lim.groupby("move")["ok"].all()
    passing = passing[passing.astype(bool)]
    if passing.empty:
        return None
    ok = table[table["move"].isin(passing.index)]
    best = ok.loc[ok["entrance_width"].idxmax()]
    return float(best["entrance_width"]), float(best["move"])


def has_limits(table) -> bool:
    """Whether any point in a sweep table has a limit.

    Parameters
    ----------
    table : pandas.DataFrame
        From :func:`sweep`.

    Returns
    -------
    bool
    """
    return bool(table["limit"].notna().any())


def verdict(table) -> str:
    """The one-line answer of a sweep, as printed by ``harbor sweep``.

    Parameters
    ----------
    table : pandas.DataFrame
        From :func:`sweep`.

    Returns
    -------
    str
        The widest passing entrance width (see :func:`widest_ok`), or why there is none.
    """
    if table.empty:
        return "no position of the head could be computed (every move was skipped)"
    if not has_limits(table):
        return "no point has a limit: add `limit = ...` to the [[point]] tables to screen"
    best = widest_ok(table)
    if best is None:
        return ("no swept entrance width (from "
                f"{table['entrance_width'].min():.1f} to {table['entrance_width'].max():.1f} m) "
                "lets every point meet its limit in every sea state")
    return ("widest entrance at which every point meets its limit in every sea state: "
            f"{best[0]:.1f} m (move {best[1]:+g} m)")


def sweep_summary(table):
    """The highest height over the sea states at each point, for each head position.

    Parameters
    ----------
    table : pandas.DataFrame
        From :func:`sweep`.

    Returns
    -------
    pandas.DataFrame
        Index (``move``, ``entrance_width``), one column per point: the largest height
        (m) over the sea states at that position.
    """
    out = table.pivot_table(index=["move", "entrance_width"], columns="point",
                            values="height", aggfunc="max", sort=False)
    out.columns.name = None
    return out[list(dict.fromkeys(table["point"]))]


def sweep_text(table) -> str:
    """The terminal table of ``harbor sweep``.

    Parameters
    ----------
    table : pandas.DataFrame
        From :func:`sweep`.

    Returns
    -------
    str
        One line per head position: move (m), entrance width (m) and, per point, the
        highest height over the sea states (m), marked ``*`` above the point's limit.
    """
    summ = sweep_summary(table)
    limits = table.groupby("point", sort=False)["limit"].first()
    names = list(summ.columns)
    w = max(10, *(min(len(n), 16) + 2 for n in names))
    head = f"{'move':>8}{'width':>9}  " + "".join(f"{n[:16]:>{w}}" for n in names)
    lim = f"{'(m)':>8}{'(m)':>9}  " + "".join(
        f"{'limit ' + format(limits[n], '.2f') if not math.isnan(limits[n]) else 'no limit':>{w}}"
        for n in names)
    lines = ["highest wave height over the sea states (m); * above the point's limit",
             head, lim, "-" * len(head)]
    for (m, width), r in summ.iterrows():
        cells = []
        for n in names:
            over = not math.isnan(limits[n]) and r[n] > limits[n]
            cells.append(f"{format(r[n], '.2f') + ('*' if over else ' '):>{w}}")
        lines.append(f"{format(m, '+g') if m else '0':>8}{width:>9.1f}  " + "".join(cells))
    return "\n".join(lines)


def sweep_csv_text(table) -> str:
    """CSV text of a sweep table: columns :data:`SWEEP_COLUMNS`, no comment lines.

    Parameters
    ----------
    table : pandas.DataFrame
        From :func:`sweep`.

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
    out = table.copy()
    out["ok"] = ["" if pd.isna(v) else ("true" if v else "false") for v in table["ok"]]
    buf = io.StringIO()
    out.to_csv(buf, index=False, columns=SWEEP_COLUMNS, lineterminator="\n",
               float_format="%.6g", na_rep="")
    return buf.getvalue()


def plot_sweep(table, path, title=None, dpi=150):
    """Write a PNG of wave height against entrance width.

    Parameters
    ----------
    table : pandas.DataFrame
        From :func:`sweep`.
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
    from harbor.outputs._atomic import atomic_path
    from harbor.outputs.maps import new_figure, wrap_to

    fig = new_figure((10.0, 6.2))
    ax = fig.add_axes((0.08, 0.2, 0.62, 0.7))
    colours = ["#0072b2", "#d55e00", "#009e73", "#cc79a7", "#e69f00", "#56b4e9",
               "#000000", "#f0e442"]
    styles = ["-", "--", "-.", ":"]
    markers = ["o", "s", "^", "D", "v"]
    points = list(dict.fromkeys(table["point"]))
    seas = list(dict.fromkeys(table["sea"]))
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
            ax.annotate(f"limit {p} {float(lim.iloc[0]):.2f} m", (1.0, float(lim.iloc[0])),
                        xycoords=("axes fraction", "data"), xytext=(3, 0),
                        textcoords="offset points", va="center", fontsize=7, color=c)
    best = widest_ok(table)
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
                 "segment", fontsize=11, loc="left")
    foot = [verdict(table)]
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
    table : pandas.DataFrame
        From :func:`sweep`.
    out_dir : str or os.PathLike
        Output folder (created if missing).

    Returns
    -------
    list of pathlib.Path
    """
    from pathlib import Path

    from harbor.outputs._atomic import slug, staging_dir

    name = slug(table.attrs.get("arm", "arm"), "arm")
    files = [f"sweep-{name}.csv", f"sweep-{name}.png"]
    with staging_dir(out_dir) as (stage, staged):
        with open(stage / files[0], "w", encoding="utf-8", newline="") as fh:
            fh.write(sweep_csv_text(table))
        staged.append(files[0])
        plot_sweep(table, stage / files[1])
        staged.append(files[1])
    return [Path(out_dir) / f for f in files]
