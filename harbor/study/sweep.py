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
import xarray as xr
import shapely

from harbor.cautions import CAUTION_SHORT
from harbor.errors import InputError
from harbor.geometry.entrance import entrance_width
from harbor.solver.assemble import ground_scenario

#: Columns of the sweep table and of its CSV file (contract of issue 6).
SWEEP_COLUMNS = ["move", "entrance_width", "sea", "point", "kd", "height", "limit", "ok"]
#: The table's columns: the contract columns, then ``valid`` (False where the value is
#: outside its method's measured validity, the result's ``point_valid``).
TABLE_COLUMNS = SWEEP_COLUMNS + ["valid"]

#: Narrowest gap (m) a moved head may leave to another arm or land. A thin-barrier model
#: says nothing useful about a slit narrower than this, and no navigable entrance is
#: this narrow (common practice); it also rejects an arm slid alongside another at a
#: hair's breadth, which the exact-crossing test alone would let through.
MIN_GAP = 1.0

#: Most positions one sweep may ask for (each is a full solve of every sea state).
MAX_MOVES = 400


class MoveRejected(ValueError):
    """A head position that the layout cannot take (the reason is the message)."""


# --------------------------------------------------------------------------- geometry

def _tolerance(layout) -> float:
    # the scenario reader's rule (harbor.geometry.checks.tolerance)
    from harbor.geometry.checks import layout_tolerance

    return layout_tolerance(layout)


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
    # moves and distances are ground metres; the layout is in the scenario CRS, whose
    # lengths are k times ground lengths at the site (k = 1.79 in Web Mercator at 56 N)
    k = float(getattr(scenario.site, "scale_factor", 1.0) or 1.0)
    if move * k <= -(seg - tol):
        raise MoveRejected(f"shortens the arm by {-move:g} m, past the other vertex of its "
                           f"end segment ({seg / k:.1f} m long)")
    new_head = head + move * k * (head - other) / seg
    line[h] = new_head
    new_arm = dataclasses.replace(old, line=line)
    geom = shapely.LineString(line)
    from harbor.geometry import checks

    try:
        checks.clean_arm_line(line, tol)
    except checks.GeometryError:
        raise MoveRejected("the arm would cross itself") from None
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
            if gap / k < MIN_GAP:
                raise MoveRejected(f"the arm would pass {gap / k:.2f} m from '{a.name}', "
                                   f"less than {MIN_GAP:g} m (entrance closed)")
    arms_new = tuple(new_arm if k == i else a for k, a in enumerate(layout.arms))
    try:
        checks.check_crossings([np.asarray(a.line, float) for a in arms_new], tol)
    except checks.GeometryError as e:
        raise MoveRejected(f"the arm would cross or touch '{arms_new[e.other].name}'"
                           if e.index == i else
                           f"the arm would cross or touch '{arms_new[e.index].name}'") from None
    if scenario.points:
        # the rule of the scenario reader and of solve(points=): no point on an arm
        probs = checks.point_problems(dataclasses.replace(layout, arms=arms_new),
                                      [p.at[0] for p in scenario.points],
                                      [p.at[1] for p in scenario.points], tol)
        for pt, prob in zip(scenario.points, probs):
            if prob is not None and "arm" in prob and f"'{old.name}'" in prob:
                raise MoveRejected(f"the arm would run over the point '{pt.name}'")
    others = [shapely.LineString(a.line) for a in layout.arms if a is not old]
    dists = [g.distance(p) for g in others]
    if not land.is_empty:
        dists.append(land.distance(p))
    width = float(min(dists)) / k if dists else math.inf
    if width < MIN_GAP:
        raise MoveRejected(f"the head would be {width:.2f} m from another arm or land, "
                           f"less than {MIN_GAP:g} m (entrance closed)")
    moved = dataclasses.replace(scenario, layout=dataclasses.replace(layout, arms=arms_new))
    # the reported width is the one entrance width of every command (geometry.entrance)
    passage = entrance_width(ground_scenario(moved).layout)
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
    xarray.Dataset
        Dimensions ``move`` (the accepted moves, m), ``sea`` and ``point``:
        ``entrance_width`` (move, m), ``kd`` and ``height`` (move, sea, point; m: H or
        H1/3), ``limit`` (point, m, NaN when none), ``ok`` (1 height <= limit, 0 above,
        NaN without a limit), ``valid`` (False where the value is outside its method's
        measured validity), ``method`` (move, sea). Attributes: ``arm``, ``skipped``
        (list of ``(move, reason)``), ``warnings`` (list of str), ``widest``
        (``(width, move)`` or None, see :func:`widest_ok`), ``verdict``, ``title``,
        ``scenario``, ``cautions``. The same labelled shape as
        :func:`harbor.study.climate.climate_downtime`; :func:`sweep_table` gives the
        tidy table (the rows of the CSV file).

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
        scenario.sea(sea, key="--sea")  # the did-you-mean InputError
    moves = [float(m) for m in np.atleast_1d(np.asarray(moves, float))]
    done, skipped, warnings = [], [], []
    for n, m in enumerate(moves, 1):
        try:
            moved, width = move_head(scenario, arm, m)
        except MoveRejected as e:
            skipped.append((m, str(e)))
        else:
            ds = assemble.solve(moved, sea=sea, grid=False, method=method)
            for w in assemble.notices(ds, sea=sea):
                if w.text not in warnings:
                    warnings.append(w.text)
            done.append((m, width, ds))
        if progress is not None:
            progress(f"sweep '{arm}'", n, len(moves))
    seas = [sea] if sea is not None else [s.name for s in scenario.seas]
    points = [p.name for p in scenario.points]
    shape = (len(done), len(seas), len(points))
    kd, height = np.full(shape, np.nan), np.full(shape, np.nan)
    valid = np.ones(shape, bool)
    method_names = np.full(shape[:2], "", dtype=object)
    for i, (_, _, ds) in enumerate(done):
        kd[i] = ds.point_kd.values
        height[i] = ds.point_height.values
        if "point_valid" in ds:
            valid[i] = ds.point_valid.values
        method_names[i] = [str(v) for v in ds.sea_method.values]
    limit = np.array([np.nan if p.limit is None else p.limit for p in scenario.points], float)
    with np.errstate(invalid="ignore"):
        ok = np.where(np.isnan(limit), np.nan, (height <= limit).astype(float))
    result = xr.Dataset(
        {"entrance_width": ("move", np.array([w for _, w, _ in done], float),
                            {"long_name": "entrance width: moved head to the nearest other "
                                          "arm or land", "units": "m"}),
         "kd": (("move", "sea", "point"), kd, {"long_name": "K' at the point", "units": "1"}),
         "height": (("move", "sea", "point"), height,
                    {"long_name": "wave height at the point (H or H1/3)", "units": "m"}),
         "limit": ("point", limit, {"long_name": "allowable wave height", "units": "m"}),
         "ok": (("move", "sea", "point"), ok,
                {"long_name": "height <= limit (1) or above it (0); NaN without a limit",
                 "flag_values": [0.0, 1.0], "flag_meanings": "over ok"}),
         "valid": (("move", "sea", "point"), valid,
                   {"long_name": "value inside the measured validity of its method"}),
         "method": (("move", "sea"), method_names)},
        coords={"move": np.array([m for m, _, _ in done], float), "sea": seas,
                "point": points},
        attrs=dict(arm=arm, skipped=skipped, warnings=warnings, cautions=CAUTION_SHORT,
                   title=scenario.title, scenario=str(scenario.path or "")))
    result["move"].attrs.update(long_name="distance the head moved along its end segment "
                                          "(positive lengthens)", units="m")
    table = sweep_table(result)
    result.attrs["widest"] = widest_ok(table) if not table.empty else None
    result.attrs["verdict"] = verdict(table)
    return result


def sweep_table(result):
    """A sweep result as a tidy table: one row per move, sea state and point.

    Parameters
    ----------
    result : xarray.Dataset
        From :func:`sweep`.

    Returns
    -------
    pandas.DataFrame
        Columns :data:`TABLE_COLUMNS` (``ok`` nullable boolean, NA without a limit);
        ``attrs`` those of the result.
    """
    nm, ns, npnt = (result.sizes[d] for d in ("move", "sea", "point"))
    rep = ns * npnt
    ok = result["ok"].values.ravel()
    df = pd.DataFrame({
        "move": np.repeat(result["move"].values, rep),
        "entrance_width": np.repeat(result["entrance_width"].values, rep),
        "sea": np.tile(np.repeat([str(v) for v in result["sea"].values], npnt), nm),
        "point": np.tile([str(v) for v in result["point"].values], nm * ns),
        "kd": result["kd"].values.ravel(), "height": result["height"].values.ravel(),
        "limit": np.tile(result["limit"].values, nm * ns),
        "ok": pd.array([pd.NA if np.isnan(v) else bool(v) for v in ok], dtype="boolean"),
        "valid": result["valid"].values.ravel().astype(bool)}, columns=TABLE_COLUMNS)
    df.attrs.update(result.attrs)
    return df


def _as_table(table):
    return sweep_table(table) if isinstance(table, xr.Dataset) else table


def widest_ok(table):
    """The widest entrance at which every point with a limit meets it in every sea state.

    Parameters
    ----------
    table : xarray.Dataset or pandas.DataFrame
        From :func:`sweep` (or its :func:`sweep_table`).

    Returns
    -------
    (float, float) or None
        ``(entrance_width, move)`` in metres, or None when no position passes (or no
        point has a limit; see :func:`has_limits`).
    """
    table = _as_table(table)
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
    table : xarray.Dataset or pandas.DataFrame
        From :func:`sweep` (or its :func:`sweep_table`).

    Returns
    -------
    bool
    """
    table = _as_table(table)
    return bool(table["limit"].notna().any())


def verdict(table) -> str:
    """The one-line answer of a sweep, as printed by ``harbor sweep``.

    Parameters
    ----------
    table : xarray.Dataset or pandas.DataFrame
        From :func:`sweep` (or its :func:`sweep_table`).

    Returns
    -------
    str
        The widest passing entrance width (see :func:`widest_ok`), or why there is none.
    """
    table = _as_table(table)
    if table.empty:
        return "no position of the head could be computed (every move was skipped)"
    if not has_limits(table):
        return "no point has a limit: add `limit = ...` to the [[point]] tables to screen"
    best = widest_ok(table)
    if best is None:
        return ("no swept entrance width (from "
                f"{table['entrance_width'].min():.1f} to {table['entrance_width'].max():.1f} m) "
                "lets every point meet its limit in every sea state")
    text = ("widest entrance at which every point meets its limit in every sea state: "
            f"{best[0]:.1f} m (move {best[1]:+g} m)")
    if "valid" in table:
        at = table[(table["move"] == best[1]) & table["limit"].notna()]
        if not at["valid"].astype(bool).all():
            text += (" -- but some of those values are outside their method's measured "
                     "validity (see the warnings): do not rely on this width")
    return text


def sweep_summary(table):
    """The highest height over the sea states at each point, for each head position.

    Parameters
    ----------
    table : xarray.Dataset or pandas.DataFrame
        From :func:`sweep` (or its :func:`sweep_table`).

    Returns
    -------
    pandas.DataFrame
        Index (``move``, ``entrance_width``), one column per point: the largest height
        (m) over the sea states at that position.
    """
    table = _as_table(table)
    out = table.pivot_table(index=["move", "entrance_width"], columns="point",
                            values="height", aggfunc="max", sort=False)
    out.columns.name = None
    return out[list(dict.fromkeys(table["point"]))]




def __getattr__(name):
    # the tables, CSV text and charts moved to harbor.outputs.studies; old imports work
    from harbor.outputs import studies

    if name in studies.__all__:
        return getattr(studies, name)
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")
