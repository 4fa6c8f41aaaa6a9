"""Layout alternatives x a wave climate: berth downtime of every alternative, one result.

A planning study compares several layouts (entrance position and width, an extra spur,
a longer lee arm), each a scenario file, against one climate table. The work is cut at
the grain of the solves: one task is one (alternative, period, spreading), with all the
directions of the table that share them solved and all their rows' heights reduced on
the worker; only the small arrays of K', heights and exceedances at the points come
back. The tasks run through :mod:`harbor.study.executor` (serial, threads, an embedded
Dask cluster or a remote one), and every sum is taken afterwards over the rows in the
order of the table, so the numbers are the same on every backend.

The diffraction coefficient of a linear solution does not depend on the incident height,
so each distinct (period, direction, spreading) is solved once, at unit height.

The grain is chosen for the full-field method as well: there one (alternative, period,
spreading) is one factorisation per frequency band serving all the directions of the
task, and the mesh travels in the shared payload beside the scenarios (once per worker,
:mod:`harbor.study.executor`); only :func:`solve_group` changes.
"""

from __future__ import annotations

import dataclasses
from pathlib import Path

import numpy as np

from harbor.errors import InputError

#: Cost of solving one directional random sea at a few points with the screening
#: methods (measured 0.15-0.25 s on the demo harbour, one core; memory well below this).
SCREENING_SOLVE = (0.25, 150 * 2**20)

# --------------------------------------------------------------------------- worker side

def _solve_direction(scenario, method, period, from_deg, spreading, name):
    """K' at the scenario's points for one directional random sea at unit height."""
    from harbor.solver import assemble
    from harbor.study.scenario import Sea

    sea = Sea(name=name, kind="random", height=1.0, period=period, from_deg=from_deg,
              spreading=spreading)
    ds = assemble.solve(dataclasses.replace(scenario, seas=(sea,)), grid=False,
                        method=method)
    # sentences about this internal per-direction sea would only confuse the table
    warnings = list(dict.fromkeys(n for n in assemble.notices(ds) if name not in n))
    return ds.point_kd.values[0].copy(), float(ds.sea_reaching.values[0]), warnings


def _task_sea(task, direction, name="climate case"):
    from harbor.study.scenario import Sea

    return Sea(name=name, kind="random", height=1.0, period=task["period"],
               from_deg=direction, spreading=task["spreading"])


def _task_choice(scenario, method, task, model=None):
    """The method of one task, decided once for all its directions (the reasons of
    :func:`harbor.solver.agitation.choose_method` that depend on the direction are
    taken over the task's directions: any direction needing the full field takes the
    whole task there, so one factorisation per band serves them all)."""
    from harbor.solver import agitation

    pts = np.array([p.at for p in scenario.points], float).reshape(-1, 2)
    first = None
    for d in task["directions"]:
        c = agitation.choose_method(scenario, _task_sea(task, d), method=method,
                                    point_xy=pts, model=model)
        first = first or c
        if c.full_field or c.needed:
            return c
    return first


#: Longest full-field climate study (seconds, estimated) that ``auto`` runs; beyond it
#: the screening methods answer, flagged (``--method full-field`` runs it anyway).
CLIMATE_FULL_FIELD_BUDGET = 1800.0


def plan_tasks(shared, tasks, budget=CLIMATE_FULL_FIELD_BUDGET):
    """Decide the method of every task of a study before any is solved.

    Parameters
    ----------
    shared : dict
        As for :func:`solve_group`.
    tasks : list of dict
        Gains ``choice`` (:class:`harbor.solver.agitation.Choice`) each.
    budget : float
        Seconds: when ``auto`` would send tasks to the full-field method for longer than
        this in all (estimated), those tasks go to the screening methods instead, and
        their results say so.

    Returns
    -------
    dict
        ``full_field`` (tasks), ``seconds`` (estimated, full-field tasks), ``memory``
        (bytes, largest), ``downgraded`` (bool).
    """
    import dataclasses as _dc

    from harbor.solver import agitation
    from harbor.solver.assemble import _grid_corners, _lazy_model

    models = {}
    total, mem, n_ff = 0.0, 0.0, 0
    for t in tasks:
        sc = shared["scenarios"][t["alternative"]]
        # one (lazy) model per alternative: its domains are cached per period, so the
        # choice's estimate and the study's estimate share them
        m = models.get(t["alternative"])
        if m is None:
            pts = np.array([p.at for p in sc.points], float).reshape(-1, 2)
            m = models[t["alternative"]] = _lazy_model(
                sc, np.concatenate([pts, _grid_corners(sc)]))
        c = _task_choice(sc, shared["method"], t, model=m)
        if c.full_field:
            e = agitation.estimate(m, agitation.sea_periods(_task_sea(t, t["directions"][0])),
                                   random=True, n_directions=len(t["directions"])
                                   * agitation._n_dir())
            c = _dc.replace(c, estimate=e)
            total += e["seconds"]
            mem = max(mem, e["memory"])
            n_ff += 1
        t["choice"] = c
    downgraded = False
    auto = shared["method"] in (None, "auto") and all(
        sc.method == "auto" for sc in shared["scenarios"].values())
    if auto and n_ff and total > budget:
        downgraded = True
        for t in tasks:
            c = t["choice"]
            if c.full_field:
                why = c.reason.split(": ", 1)[-1].split(" (")[0]
                t["choice"] = agitation.Choice(
                    "auto", agitation.REASONS["too-large"].format(
                        why=why, size=f"about {total / 60:.0f} min of full-field solves for "
                                      f"the whole climate; --method full-field runs them"),
                    needed=c.reason, estimate=c.estimate)
    return {"full_field": 0 if downgraded else n_ff, "seconds": total, "memory": mem,
            "downgraded": downgraded}


def _full_field_group(scenario, task, choice):
    """K' at the points for every direction of a task by the full-field method: one
    factorisation per frequency band for all the directions."""
    from harbor.solver.agitation import model_for
    from harbor.waves.spectra import random_components

    from harbor.solver.assemble import _grid_corners

    # the model of harbor.solve: the points and the map's area
    pts = np.array([p.at for p in scenario.points], float).reshape(-1, 2)
    model = model_for(scenario, points=np.concatenate([pts, _grid_corners(scenario)]))
    site = scenario.site
    ground = site.ground_site() if not site.is_lonlat else site
    comps = random_components(1.0, task["period"], s_max=task["spreading"])
    dirs = [float(np.degrees(ground.travel_angle(d))) for d in task["directions"]]
    from harbor.solver.agitation import band_cap

    res = model.random(comps, dirs, max_unknowns=band_cap())
    if not isinstance(res, (list, tuple)):  # an engine that takes one direction at a time
        res = [res] + [model.random(comps, d, max_unknowns=band_cap()) for d in dirs[1:]]
    w = float(np.sum(comps.weight))
    kd = [r.kd_points[:len(pts)].copy() for r in res]
    reach = [float(r.reaching / w) if w > 0 else 0.0 for r in res]
    warns = list(dict.fromkeys(str(n) for n in model.notices))
    return kd, reach, warns


def solve_group(shared, task):
    """One task: every direction of one (alternative, period, spreading).

    Parameters
    ----------
    shared : dict
        ``{"scenarios": {name: Scenario}, "method": str}``: the payload every task
        reads (sent once per worker).
    task : dict
        ``alternative`` (name), ``period`` (T1/3, s), ``spreading`` (s_max),
        ``directions`` (tuple of directions the waves come from, degrees true),
        ``names`` (a sea-state name per direction, for warnings), and optionally
        ``heights`` (H1/3 of the rows, m) with ``direction_of`` (index into
        ``directions`` per row).

    Returns
    -------
    dict
        ``kd`` (directions, points), ``reaching`` (directions,), ``warnings`` (list of
        str), and with rows ``point_height`` and ``exceeds`` (rows, points).

    Notes
    -----
    Per row i with direction d(i): :math:`H_{i,j} = K_{eff,j}(T, \\theta_{d(i)}, s) H_i`
    and :math:`E_{i,j} = [H_{i,j} > H_{lim,j}]` (Goda 2010, linear superposition of
    the directional spectrum at unit height).

    References
    ----------
    .. [1] Goda, Y. (2010). *Random Seas and Design of Maritime Structures* (3rd ed.).
       World Scientific.
    """
    sc = shared["scenarios"][task["alternative"]]
    kd, reach, warns = [], [], []
    choice = task.get("choice") or _task_choice(sc, shared["method"], task)
    if choice.full_field:
        kd, reach, warns = _full_field_group(sc, task, choice)
    else:
        m = shared["method"] if choice.method == "auto" and shared["method"] != "auto" \
            else ("screening" if choice.method == "auto" else choice.method)
        for d, name in zip(task["directions"], task["names"]):
            k, r, w = _solve_direction(sc, m, task["period"], d, task["spreading"], name)
            kd.append(k)
            reach.append(r)
            warns.extend(x for x in w if x not in warns)
        if choice.needed:
            warns.append(f"{choice.reason} (T1/3 {task['period']:g} s)")
    out = {"kd": np.array(kd), "reaching": np.array(reach), "warnings": warns,
           "method": choice.method, "reason": choice.reason}
    if task.get("heights") is not None:
        lim = np.array([np.inf if p.limit is None else p.limit for p in sc.points])
        h = out["kd"][np.asarray(task["direction_of"], int)] \
            * np.asarray(task["heights"], float)[:, None]
        out["point_height"] = h
        out["exceeds"] = h > lim[None, :]
    return out


# --------------------------------------------------------------------------- client side

def group_tasks(alternative, periods, froms, spreads, heights=None, first_name=1):
    """Cut the rows of one alternative into (period, spreading) tasks.

    Parameters
    ----------
    alternative : str
    periods, froms, spreads : array_like
        T1/3 (s), direction the waves come from (degrees true, 0-360), s_max per row.
    heights : array_like, optional
        H1/3 per row (m), to reduce the heights on the worker.
    first_name : int
        Number of the first distinct case (sea-state names ``climate case N``).

    Returns
    -------
    tasks : list of dict
        For :func:`solve_group`, in order of first appearance.
    rows_of : list of numpy.ndarray
        Row positions each task covers.
    cases : list of tuple
        Distinct (period, from, spreading) in order of first appearance, and the
        (task, direction) each lives in is ``case_at[case]``.
    case_at : dict
    """
    from_n = np.mod(np.asarray(froms, float), 360.0)
    keys = list(zip(np.asarray(periods, float).tolist(), from_n.tolist(),
                    np.asarray(spreads, float).tolist()))
    cases = list(dict.fromkeys(keys))
    groups = {}
    case_at = {}
    for c in cases:
        g = groups.setdefault((c[0], c[2]), [])
        case_at[c] = (list(groups).index((c[0], c[2])), len(g))
        g.append(c[1])
    number = {c: first_name + i for i, c in enumerate(cases)}
    tasks, rows_of = [], []
    for (t, s), dirs in groups.items():
        rows = np.array([i for i, k in enumerate(keys) if (k[0], k[2]) == (t, s)], int)
        task = {"alternative": alternative, "period": t, "spreading": s,
                "directions": tuple(dirs),
                "names": tuple(f"climate case {number[(t, d, s)]}" for d in dirs)}
        if heights is not None:
            task["heights"] = np.asarray(heights, float)[rows]
            task["direction_of"] = np.array([case_at[keys[i]][1] for i in rows], int)
        tasks.append(task)
        rows_of.append(rows)
    return tasks, rows_of, cases, case_at


def count_tasks(table, n_alternatives=1):
    """Number of tasks of a climate study: distinct (period, spreading) per alternative.

    Parameters
    ----------
    table : pandas.DataFrame
        From :func:`harbor.study.climate.read_climate`.
    n_alternatives : int

    Returns
    -------
    int
    """
    keys = zip(table["period"].to_numpy(float).tolist(),
               table["spreading"].to_numpy(float).tolist())
    return len(set(keys)) * int(n_alternatives)


def table_estimate(table):
    """Per-task cost of the screening tasks of a climate table.

    Parameters
    ----------
    table : pandas.DataFrame
        From :func:`harbor.study.climate.read_climate`.

    Returns
    -------
    harbor.study.executor.TaskEstimate
        :data:`SCREENING_SOLVE` times the most directions any (period, spreading) has.
    """
    from harbor.study.executor import TaskEstimate

    f = np.mod(table["from"].to_numpy(float), 360.0)
    per = {}
    for t, d, s in zip(table["period"].to_numpy(float), f, table["spreading"].to_numpy(float)):
        per.setdefault((t, s), set()).add(d)
    n = max((len(v) for v in per.values()), default=1)
    return TaskEstimate(SCREENING_SOLVE[0] * n, SCREENING_SOLVE[1])


def screening_estimate(tasks):
    """Per-task cost of screening tasks (the longest task's directions).

    Parameters
    ----------
    tasks : list of dict

    Returns
    -------
    harbor.study.executor.TaskEstimate
    """
    from harbor.study.executor import TaskEstimate

    n = max((len(t["directions"]) for t in tasks), default=1)
    return TaskEstimate(SCREENING_SOLVE[0] * n, SCREENING_SOLVE[1])


def solve_cases(scenario, cases, method="auto", executor=None, workers=None,
                progress=None, display=None):
    """K' of distinct (period, direction, spreading) cases at a scenario's points.

    Parameters
    ----------
    scenario : harbor.study.scenario.Scenario
    cases : list of tuple
        Distinct (T1/3 in s, direction the waves come from in degrees true, s_max).
    method : str
        Passed to :func:`harbor.solve`.
    executor : harbor.study.executor.Executor, optional
        Default: threads (serial when ``workers`` is 1 or there are few tasks).
    workers : int, optional
        Threads when no executor is given.
    progress : callable, optional
        ``progress(name, done, total)`` after each task.
    display : bool, optional
        Dask's progress bar on stderr instead (default: as the executor says).

    Returns
    -------
    list of tuple
        ``(kd, reaching, warnings, method)`` per case, in the order of ``cases``;
        ``method`` names the method of the case's task and why.
    """
    from harbor.study.executor import make_executor

    p, f, s = (np.array([c[i] for c in cases], float) for i in range(3))
    tasks, _, order, case_at = group_tasks("", p, f, s)
    shared = {"scenarios": {"": scenario}, "method": method}
    plan_tasks(shared, tasks)
    own = executor is None
    if own:
        kind = "serial" if workers == 1 or len(tasks) < 2 else "threads"
        executor = make_executor(kind, workers=workers, n_tasks=len(tasks))
    try:
        res = executor.map(solve_group, shared, tasks, progress=progress, display=display,
                           label="climate cases")
    finally:
        if own:
            executor.close()
    out = []
    for c in order:
        t, j = case_at[c]
        out.append((res[t]["kd"][j], float(res[t]["reaching"][j]), res[t]["warnings"],
                    _method_label(res[t])))
    return out


def _method_label(res):
    """'full-field (why)' or 'screening (why)' for a task's result."""
    m = res.get("method", "auto")
    kind = "full-field" if m == "full-field" else ("screening" if m == "auto" else m)
    return f"{kind}: {res.get('reason', '')}".rstrip(": ")


#: Keys of an ``[[alternative]]`` table of a scenario file.
ALTERNATIVE_KEYS = ("name", "arm", "land", "point", "leave_out")
_REPLACEABLE = ("arm", "land", "point")


def _raw_toml(path):
    try:
        import tomllib as toml
    except ModuleNotFoundError:  # pragma: no cover - Python 3.10
        import tomli as toml
    return toml.loads(Path(path).read_bytes().decode("utf-8"))


def has_alternatives(path) -> bool:
    """Whether a (valid) scenario file has ``[[alternative]]`` tables.

    Parameters
    ----------
    path : str or os.PathLike

    Returns
    -------
    bool
    """
    return bool(_raw_toml(path).get("alternative"))


def load_alternatives(path):
    """A scenario file and its layout alternatives.

    Parameters
    ----------
    path : str or os.PathLike
        Scenario file (TOML). Besides the keys of a scenario it may hold
        ``[[alternative]]`` tables, each a variant of the file's own layout::

            [[alternative]]
            name = "west head +20 m"       # required, unique
            leave_out = ["old spur"]        # arms, land or points to remove (by name)
            [[alternative.arm]]             # replaces the arm of that name, or adds one
            name = "west arm"
            line = [[302804.8, 4985898.0], [302673.8, 4986178.9], [302850.5, 4986261.4]]
            [[alternative.point]]           # the same for [[alternative.land]], points
            name = "new berth"
            at = [302930.0, 4986180.0]
            limit = 0.3

        Arms, land and points given in an alternative take the place of those of the
        same name (or are added); everything else (site, seas, grid) is the file's.

    Returns
    -------
    scenarios : list of Scenario
        The file's own layout first, then one per ``[[alternative]]``.
    names : list of str
        The file name without ``.toml`` for the first, then each alternative's name.

    Raises
    ------
    InputError
        Naming the file, the alternative and the key: anything
        :func:`harbor.load_scenario` rejects (in the file or in an alternative's layout),
        an unknown key, a missing or repeated name, a ``leave_out`` name that the file
        does not have.
    """
    import copy
    import difflib

    from harbor.study.scenario import load_scenario, scenario_from_dict

    base = load_scenario(path)                 # the whole file is valid TOML and a scenario
    file = str(path)
    data = _raw_toml(path)
    alts = data.pop("alternative", None) or []
    stem = Path(file).stem
    if not isinstance(alts, list) or not all(isinstance(a, dict) for a in alts):
        raise InputError("must be tables: write [[alternative]] (double brackets)",
                         file=file, key="alternative")
    scs, names = [base], [stem]
    present = {k: [t.get("name") for t in data.get(k, []) if isinstance(t, dict)]
               for k in _REPLACEABLE}
    for i, alt in enumerate(alts, 1):
        where = f"[[alternative]] {i}"
        for k in alt:
            if k not in ALTERNATIVE_KEYS:
                near = difflib.get_close_matches(str(k), ALTERNATIVE_KEYS, n=1, cutoff=0.5)
                hint = (f"; did you mean '{near[0]}'?" if near
                        else f"; valid keys: {', '.join(ALTERNATIVE_KEYS)}")
                raise InputError(f"unknown key{hint}", file=file, where=where, key=str(k))
        name = alt.get("name")
        if not isinstance(name, str) or not name.strip():
            raise InputError("every alternative needs a name (text)", file=file,
                             where=where, key="name")
        name = name.strip()
        where = f"[[alternative]] '{name}'"
        if name in names:
            raise InputError(f"the name '{name}' is used twice (the file's own layout is "
                             f"called '{stem}')", file=file, where=where, key="name")
        leave = alt.get("leave_out", [])
        if not isinstance(leave, list) or not all(isinstance(x, str) for x in leave):
            raise InputError("must be a list of names", file=file, where=where,
                             key="leave_out")
        known = [n for v in present.values() for n in v if n]
        for x in leave:
            if x not in known:
                near = difflib.get_close_matches(x, known, n=1)
                hint = f" (did you mean '{near[0]}'?)" if near else ""
                raise InputError(f"no arm, land or point named '{x}' in the file{hint}",
                                 file=file, where=where, key="leave_out")
        d = copy.deepcopy(data)
        for kind in _REPLACEABLE:
            items = [t for t in d.get(kind, []) if not (isinstance(t, dict)
                                                        and t.get("name") in leave)]
            new = alt.get(kind, [])
            if not isinstance(new, list) or not all(isinstance(t, dict) for t in new):
                raise InputError(f"must be tables: write [[alternative.{kind}]]", file=file,
                                 where=where, key=kind)
            for t in new:
                at = [j for j, o in enumerate(items) if o.get("name") == t.get("name")
                      and t.get("name") is not None]
                if at:
                    items[at[0]] = t
                else:
                    items.append(t)
            if items or kind in d:
                d[kind] = items
        try:
            sc = scenario_from_dict(d, path=file)
        except InputError as e:
            raise InputError(e.problem, file=file,
                             where=f"{where}: {e.where}" if e.where else where,
                             key=e.key) from None
        scs.append(sc)
        names.append(name)
    return scs, names


def _names(scenarios, names):
    if names is not None:
        names = [str(n) for n in names]
        if len(names) != len(scenarios):
            raise InputError(f"{len(names)} names for {len(scenarios)} alternatives",
                             key="names")
        if len(set(names)) != len(names):
            raise InputError("alternative names must differ", key="names")
        return names
    out = []
    for i, sc in enumerate(scenarios, 1):
        base = Path(sc.path).stem if sc.path else (sc.title or f"alternative {i}")
        name, k = base, 2
        while name in out:
            name, k = f"{base} ({k})", k + 1
        out.append(name)
    return out


def compare_alternatives(scenarios, table, method="auto", names=None, executor=None,
                         scheduler=None, workers=None, kind="auto", progress=None,
                         display=None):
    """Downtime of every berth under every layout alternative for one wave climate.

    Parameters
    ----------
    scenarios : sequence of Scenario or path
        The alternatives (scenario files or objects from :func:`harbor.load_scenario`);
        a file with ``[[alternative]]`` tables gives its own layout and each of them
        (:func:`load_alternatives`). Their own sea states are not used. Berths are matched by point name; points
        without a ``limit`` are left out.
    table : str, os.PathLike or pandas.DataFrame
        The climate (see :func:`harbor.study.climate.read_climate`).
    method : {"auto", "general", "superposition", "exact"}
        Passed to :func:`harbor.solve`.
    names : sequence of str, optional
        Names of the alternatives; default the file names without ``.toml`` (the
        title for a scenario built in code; the ``name`` of an ``[[alternative]]``).
    executor : harbor.study.executor.Executor, optional
        Where to run; default one from :func:`harbor.study.executor.make_executor`
        with ``kind``, ``scheduler`` and ``workers`` (closed afterwards).
    scheduler : str, optional
        Address of an existing Dask scheduler (default: ``HARBOR_SCHEDULER``).
    workers : int, optional
        Threads or worker processes at most.
    kind : {"auto", "serial", "threads", "local"}
        Backend when no scheduler is given.
    progress : callable, optional
        ``progress(name, done, total)`` after each task.
    display : bool, optional
        Dask's own progress bar on stderr (default: as the executor says).

    Returns
    -------
    xarray.Dataset
        Dimensions ``alternative``, ``point``, ``sector`` (centre, degrees true: 0, 30,
        ..., 330) and ``row`` (climate table row, 1-based). Variables: ``downtime``
        (alternative, point, sector; % of all time: the sectors add up to the total),
        ``downtime_total`` (alternative, point; %), ``limit`` (alternative, point; m),
        ``occurrence`` (sector; % of time), ``kd``, ``point_height`` (m), ``exceeds``
        (alternative, row, point) and ``reaching`` (alternative, row). Row coordinates
        ``row_height`` (m), ``row_period`` (s), ``row_from`` (degrees true),
        ``row_spreading``, ``row_percent`` (%), ``row_sector``; alternative coordinates
        ``alternative_title`` and ``alternative_file``. NaN (and ``exceeds`` False)
        where an alternative has no such berth. Attributes: ``warnings`` (list of str),
        ``cases`` (distinct solves), ``tasks``, ``executor``,
        ``table_file``, ``cautions``.

    Raises
    ------
    InputError
        A bad scenario or table, an alternative without a point with a limit, an
        unreachable scheduler.

    Notes
    -----
    For alternative a, berth j and sector c, with rows i of percentage :math:`p_i`,

    .. math::

        D_{a,j,c} = \\sum_{i \\in c} p_i \\,
        [K_{eff,a,j}(T_i, \\theta_i, s_i) \\, H_i > H_{lim,a,j}],
        \\qquad D_{a,j} = \\sum_c D_{a,j,c}

    summed over the rows in table order after all tasks are back (the same numbers
    whatever the order in which the tasks finished).

    References
    ----------
    .. [1] Goda, Y., Takayama, T., & Suzuki, Y. (1978). Diffraction diagrams for
       directional random waves. *Proc. 16th International Conference on Coastal
       Engineering*, ASCE, 628-650.
    .. [2] Goda, Y. (2010). *Random Seas and Design of Maritime Structures* (3rd ed.).
       World Scientific.
    """
    import xarray as xr

    from harbor.cautions import CAUTION_SHORT
    from harbor.solver.assemble import BREAKING_RATIO
    from harbor.study.climate import SECTORS, climate_table, percent_warning, sector_of
    if isinstance(scenarios, (str, Path)) or not hasattr(scenarios, "__len__"):
        scenarios = [scenarios]
    scs, given = [], []
    for s in scenarios:
        if isinstance(s, (str, Path)):
            more, their = load_alternatives(s)
            scs.extend(more)
            given.extend(their if len(more) > 1 else [None])
        else:
            scs.append(s)
            given.append(None)
    if not scs:
        raise InputError("no alternative given: at least one scenario is needed",
                         key="scenario")
    if names is None and any(g is not None for g in given):
        auto = _names(scs, None)
        names = [g if g is not None else a for g, a in zip(given, auto)]
    alts = _names(scs, names)
    tab = climate_table(table)
    limited = {}
    for a, sc in zip(alts, scs):
        pts = tuple(p for p in sc.points if p.limit is not None)
        if not pts:
            raise InputError("no [[point]] has a limit; downtime needs `limit = ...` "
                             "(allowable wave height, m) on at least one point",
                             file=sc.path or None, key="limit")
        limited[a] = dataclasses.replace(sc, points=pts)
    berths = list(dict.fromkeys(p.name for sc in limited.values() for p in sc.points))

    warnings = []
    w = percent_warning(tab)
    if w:
        warnings.append(w)
    H = tab["height"].to_numpy(float)
    T = tab["period"].to_numpy(float)
    F = np.mod(tab["from"].to_numpy(float), 360.0)
    S = tab["spreading"].to_numpy(float)
    pct = tab["percent"].to_numpy(float)
    sect = sector_of(F)
    nr, na, nb = len(tab), len(alts), len(berths)

    tasks, where, ncases = [], [], 0
    for a in alts:
        ts, rows_of, cases, _ = group_tasks(a, T, F, S, heights=H, first_name=ncases + 1)
        ncases += len(cases)
        tasks.extend(ts)
        where.extend((a, r) for r in rows_of)
    shared = {"scenarios": limited, "method": method}
    plan_tasks(shared, tasks)
    own = executor is None
    if own:
        from harbor.study.executor import make_executor

        executor = make_executor(kind, scheduler=scheduler, workers=workers,
                                 n_tasks=len(tasks), estimate=screening_estimate(tasks),
                                 display=bool(display))
    try:
        res = executor.map(solve_group, shared, tasks, progress=progress, display=display,
                           label="alternative cases")
        described = executor.describe()
    finally:
        if own:
            executor.close()

    kd = np.full((na, nr, nb), np.nan)
    height = np.full((na, nr, nb), np.nan)
    exceeds = np.zeros((na, nr, nb), bool)
    reach = np.full((na, nr), np.nan)
    limit = np.full((na, nb), np.nan)
    col = {a: [berths.index(p.name) for p in limited[a].points] for a in alts}
    for ia, a in enumerate(alts):
        limit[ia, col[a]] = [p.limit for p in limited[a].points]
    per_alt = {}
    for task, (a, rows), r in zip(tasks, where, res):
        ia, cj = alts.index(a), col[a]
        idx = np.ix_([ia], rows, cj)
        kd[idx] = r["kd"][task["direction_of"]][None]
        height[idx] = r["point_height"][None]
        exceeds[idx] = r["exceeds"][None]
        reach[ia, rows] = r["reaching"][task["direction_of"]]
        for x in r["warnings"]:
            per_alt.setdefault(x, [])
            if a not in per_alt[x]:
                per_alt[x].append(a)
    # a warning every alternative gives is said once; the others name their alternative
    for x, owners in per_alt.items():
        x = x if len(owners) == na else f"alternative(s) {', '.join(repr(o) for o in owners)}: {x}"
        if x not in warnings:
            warnings.append(x)

    # sums over the rows in table order: independent of the order the tasks finished
    weighted = pct[None, :, None] * exceeds                      # (alt, row, berth)
    in_sector = sect[:, None] == np.array(SECTORS)[None, :]      # (row, sector)
    down = np.einsum("arb,rc->abc", weighted, in_sector.astype(float))
    total = weighted.sum(axis=1)
    missing = np.isnan(limit)
    down[missing] = np.nan
    total[missing] = np.nan
    occurrence = (pct[:, None] * in_sector).sum(axis=0)

    for ia, a in enumerate(alts):
        hb = BREAKING_RATIO * limited[a].site.depth
        over = np.nan_to_num(height[ia]) > hb
        if over.any():
            bad = tab.index[over.any(axis=1)]
            listed = ", ".join(str(x) for x in bad[:10]) + (" ..." if len(bad) > 10 else "")
            pre = f"alternative '{a}': " if na > 1 else ""
            warnings.append(f"{pre}heights above the depth-limited breaking height 0.78 h = "
                            f"{hb:.2f} m in climate rows {listed} (flagged, not changed: "
                            "waves there would break)")
        far = reach[ia] < 0.5
        if far.any():
            pre = f"alternative '{a}': " if na > 1 else ""
            warnings.append(f"{pre}{int(far.sum())} climate row(s) ({pct[far].sum():.1f} % "
                            "of time) come from directions that mostly do not reach the "
                            "harbour from open water")
    absent = [(a, b) for ia, a in enumerate(alts) for jb, b in enumerate(berths)
              if missing[ia, jb]]
    if absent:
        warnings.append("berth(s) without a limited point in some alternatives (NaN there): "
                        + "; ".join(f"'{b}' in '{a}'" for a, b in absent[:10]))

    ds = xr.Dataset(
        {
            "downtime": (("alternative", "point", "sector"), down,
                         {"units": "%", "long_name": "downtime from the sector (% of all "
                          "time the height at the point exceeds its limit)"}),
            "downtime_total": (("alternative", "point"), total,
                               {"units": "%", "long_name": "downtime, all directions"}),
            "limit": (("alternative", "point"), limit,
                      {"units": "m", "long_name": "allowable wave height"}),
            "occurrence": (("sector",), occurrence,
                           {"units": "%", "long_name": "time the waves come from the sector"}),
            "kd": (("alternative", "row", "point"), kd,
                   {"units": "1", "long_name": "effective diffraction coefficient K'"}),
            "point_height": (("alternative", "row", "point"), height,
                             {"units": "m", "long_name": "H1/3 at the point"}),
            "exceeds": (("alternative", "row", "point"), exceeds,
                        {"long_name": "height above the limit"}),
            "reaching": (("alternative", "row"), reach,
                         {"units": "1", "long_name": "share of the energy reaching the "
                          "layout from open water"}),
        },
        coords={
            "alternative": alts,
            "alternative_title": ("alternative", [limited[a].title for a in alts]),
            "alternative_file": ("alternative", [limited[a].path for a in alts]),
            "point": berths,
            "sector": ("sector", np.array(SECTORS), {"units": "degree",
                                                       "long_name": "sector centre, from, "
                                                       "degrees true"}),
            "row": tab.index.to_numpy(),
            "row_height": ("row", H, {"units": "m"}),
            "row_period": ("row", T, {"units": "s"}),
            "row_from": ("row", tab["from"].to_numpy(float), {"units": "degree"}),
            "row_spreading": ("row", S),
            "row_percent": ("row", pct, {"units": "%"}),
            "row_sector": ("row", sect, {"units": "degree"}),
        },
        attrs={
            "warnings": list(warnings),
            "cases": ncases,
            "tasks": len(tasks),
            "executor": described,
            "table_file": str(tab.attrs.get("file") or ""),
            "cautions": CAUTION_SHORT,
        },
    )
    return ds
