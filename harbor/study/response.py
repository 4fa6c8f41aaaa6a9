r"""Long-period response of a basin: amplification at the points against wave period.

:func:`response_curve` solves the scenario's harbour with the full-field method
(:class:`harbor.solver.fullfield.HarbourModel`) for regular long waves over a range of
periods, one mesh and one factorisation per period, and finds the basin's natural
periods as the peaks of its response, each refined by a few more periods around it.
A planner reads from it whether a berth sits near a seiche node (little vertical motion,
strong horizontal currents) or an antinode (large vertical motion) of each mode.

The result is an :class:`xarray.Dataset`; :mod:`harbor.outputs.response` draws and
writes it without recomputing anything.
"""

from __future__ import annotations

import datetime as _dt
import math
import time

import numpy as np
import shapely
import xarray as xr

from harbor import __version__
from harbor.cautions import Notice, as_notice
from harbor.errors import InputError

__all__ = ["response_curve", "basin_probes", "MAX_PERIODS", "DEFAULT_RANGE",
           "DEFAULT_COUNT", "METHOD_RESPONSE"]

#: Most periods one curve may ask for (each is one mesh and one factorisation).
MAX_PERIODS = 400

#: Default period range (s): the band of harbour seiches and infragravity waves.
DEFAULT_RANGE = (30.0, 300.0)

#: Default number of periods, spaced evenly in log T.
DEFAULT_COUNT = 60

#: A point is called an antinode of a mode where its amplification is at least this share
#: of the largest in the basin, a node where it is at most :data:`NODE_SHARE`.
ANTINODE_SHARE = 0.7
NODE_SHARE = 0.3

#: A peak of the basin response counts as a natural period when it stands at least this
#: share of its height above the lower of the troughs on either side.
PEAK_PROMINENCE = 0.05

#: ... and at least this many times the median basin response over the range.
PEAK_OVER_MEDIAN = 1.5

#: Lattice points placed in the basin to find modes whatever the points' positions.
N_PROBES = 150

METHOD_RESPONSE = ("full-field finite elements (mild-slope equation, P2), regular long "
                   "waves, one solve per period; natural periods at the peaks of the "
                   "basin's mean response, refined by Brent's parabolic search")

NOTE_UNDAMPED = ("linear, frictionless response: no bottom friction, no entrance losses "
                 "and no non-linear effects, so amplification at the natural periods is an "
                 "upper bound (real peaks are lower and wider); the natural periods "
                 "themselves are the robust result")

NOTE_FULL = ("every wall and the edge of dry ground reflect fully (K_r = 1): long waves "
             "reflect almost fully from beaches and rubble mounds, whose reflection "
             "coefficients for wind waves would damp the seiches far too much (Battjes "
             "1974: reflection grows with the surf similarity parameter); use "
             "reflection='scenario' (--reflection scenario) for the scenario's K_r")

NOTE_DEFINITION = ("amplification = |eta| / incident amplitude: a straight reflecting coast "
                   "alone gives 2 (incident plus reflected wave)")


def _positive_periods(t_min, t_max, n, periods):
    """The coarse periods (s), checked; user mistakes raise InputError."""
    if periods is not None:
        try:
            p = np.asarray(periods, float).ravel()
        except (TypeError, ValueError):
            raise InputError("periods must be numbers (s)", key="periods") from None
        if p.size == 0:
            raise InputError("periods is empty", key="periods")
        if not np.all(np.isfinite(p)) or np.any(p <= 0):
            raise InputError("periods must be positive finite numbers (s)", key="periods")
        p = np.unique(p)
        if p.size > MAX_PERIODS:
            raise InputError(f"{p.size} periods asked; at most {MAX_PERIODS} (each is one "
                             f"mesh and one factorisation)", key="periods")
        return p
    for name, v in (("t_min", t_min), ("t_max", t_max)):
        if not (isinstance(v, (int, float, np.floating, np.integer)) and math.isfinite(v)
                and v > 0):
            raise InputError(f"{name} must be a positive number of seconds, got {v!r}",
                             key=name)
    if not t_min < t_max:
        raise InputError(f"t_min ({t_min:g} s) must be less than t_max ({t_max:g} s)",
                         key="t_min")
    if not isinstance(n, (int, np.integer)) or isinstance(n, bool):
        raise InputError(f"n must be a whole number of periods, got {n!r}", key="n")
    if n < 3:
        raise InputError(f"n must be at least 3 periods to find a peak, got {n}", key="n")
    if n > MAX_PERIODS:
        raise InputError(f"n = {n} periods asked; at most {MAX_PERIODS} (each is one mesh "
                         f"and one factorisation)", key="n")
    return np.geomspace(float(t_min), float(t_max), int(n))


def basin_probes(layout, points, n=N_PROBES):
    """Lattice points in the water of the basin (m, work frame), to find its modes.

    Parameters
    ----------
    layout : harbor.geometry.layout.Layout
        Arms and land (m, work frame).
    points : numpy.ndarray, shape (m, 2)
        The points of interest (m, work frame).
    n : int
        About this many probes.

    Returns
    -------
    numpy.ndarray, shape (k, 2)

    Notes
    -----
    The basin is taken as the water inside the convex hull of the arms' vertices and the
    points (their bounding box when that hull is flat). Probes closer than a twentieth of
    the lattice step to an arm or to land are left out (the field is singular at heads
    and corners, and a point on a thin arm has two values).
    """
    parts = [np.asarray(points, float).reshape(-1, 2)]
    parts += [np.asarray(a.line, float) for a in layout.arms]
    allp = np.concatenate(parts)
    if len(allp) < 2:
        return np.zeros((0, 2))
    hull = shapely.MultiPoint(allp).convex_hull
    if hull.area <= 0:
        hull = shapely.MultiPoint(allp).envelope
    if hull.area <= 0:
        return np.zeros((0, 2))
    land = layout.land_union()
    water = hull if land.is_empty else hull.difference(land)
    if water.is_empty or water.area <= 0:
        return np.zeros((0, 2))
    step = math.sqrt(water.area / max(int(n), 1))
    x0, y0, x1, y1 = water.bounds
    xs = np.arange(x0 + 0.5 * step, x1, step)
    ys = np.arange(y0 + 0.5 * step, y1, step)
    X, Y = (v.ravel() for v in np.meshgrid(xs, ys))
    keep = shapely.contains_xy(water, X, Y)
    X, Y = X[keep], Y[keep]
    pts = shapely.points(X, Y)
    clear = np.ones(X.size, bool)
    if layout.arms:
        clear &= shapely.distance(layout.arms_union(), pts) > 0.05 * step
    if not land.is_empty:
        clear &= shapely.distance(land.boundary, pts) > 0.05 * step
    return np.column_stack([X[clear], Y[clear]])


def _model(scenario, points_work):
    """The full-field model of the scenario at work-frame points (ground frame inside)."""
    from harbor.solver.agitation import model_for

    return model_for(scenario, points=points_work)


#: Reflection coefficients that make every wall, and the edge of dry ground, reflect
#: fully (the default for long waves, see :func:`response_curve`).
FULL_REFLECTION = {"default": 1.0, "dry": 1.0}


def _direction(scenario, from_deg):
    """(from, degrees true; travel, degrees counter-clockwise from +x in the ground frame)."""
    from harbor.solver.assemble import ground_scenario

    if from_deg is None:
        if not scenario.seas:
            raise InputError("the scenario has no sea state to take the wave direction "
                             "from; give one", key="direction")
        from_deg = float(scenario.seas[0].from_deg)
    try:
        from_deg = float(from_deg)
    except (TypeError, ValueError):
        raise InputError(f"direction must be degrees true, got {from_deg!r}",
                         key="direction") from None
    if not (math.isfinite(from_deg) and 0.0 <= from_deg <= 360.0):
        raise InputError(f"direction must lie in 0-360 degrees true, got {from_deg:g}",
                         key="direction")
    ground = ground_scenario(scenario)
    return from_deg, float(np.degrees(ground.site.travel_angle(from_deg)))


def response_curve(scenario, periods=None, t_min=DEFAULT_RANGE[0], t_max=DEFAULT_RANGE[1],
                   n=DEFAULT_COUNT, direction=None, points=None, progress=None,
                   refine=True, probes=True, reflection="full"):
    r"""The basin's response to regular long waves, and its natural periods.

    Parameters
    ----------
    scenario : harbor.study.scenario.Scenario
        From :func:`harbor.load_scenario`.
    periods : array_like, optional
        Wave periods T (s) to solve; default ``n`` periods from ``t_min`` to ``t_max``
        spaced evenly in log T.
    t_min, t_max : float
        Period range (s), 0 < t_min < t_max. Default 30-300 s.
    n : int
        Number of periods, 3 to :data:`MAX_PERIODS`.
    direction : float, optional
        Direction the waves come from (degrees true). Default: the scenario's first sea
        state's.
    points : sequence of (name, x, y), optional
        Points in the scenario's CRS used INSTEAD of the scenario's points (checked as
        the ``[[point]]`` tables: not on land, arms, heads or vertices).
    progress : callable, optional
        ``progress(name, done, total)`` after each period solved.
    refine : bool
        Refine each natural period by a few more solves around its peak.
    probes : bool
        Add hidden lattice points in the basin (:func:`basin_probes`) so that a mode is
        found even where every point of interest lies on its node.
    reflection : {"full", "scenario"}
        ``"full"`` (default): every wall and the edge of dry ground reflect fully
        (K_r = 1), as long waves do from beaches and rubble mounds; ``"scenario"``: the
        scenario's reflection coefficients (usually chosen for wind waves).

    Returns
    -------
    xarray.Dataset
        Dims ``period`` (s, ascending; the refinement's periods included), ``point``,
        ``mode`` (1 = the longest natural period). Variables:

        - ``amplification`` (period, point): :math:`|\eta| / a` (-), with a the incident
          amplitude; ``phase`` (period, point): arg η (degrees), relative to the
          incident wave's crest at the model's origin, time factor exp(-iωt);
        - ``basin_response`` (period): :math:`\sqrt{\overline{|\eta|^2}}` over the
          points and the basin probes (-), whose peaks are the natural periods;
        - ``refined`` (period): True for periods added while refining a peak;
          ``unknowns`` (period): size of the finite-element system;
        - ``natural_period`` (mode, s), ``natural_response`` (mode, -),
          ``mode_amplification`` (mode, point, -), ``mode_share`` (mode, point: the
          point's amplification over the largest in the basin at that period) and
          ``mode_position`` (mode, point: ``"antinode"`` where the share is at least
          0.7, ``"node"`` where at most 0.3, else ``"between"``);
        - ``point_x``, ``point_y`` (m, work frame), ``point_x_crs``, ``point_y_crs``;
        - the notices along ``notice`` (``notice_code``, ``notice_text`` ...).

        Attributes: ``title``, ``scenario``, ``method``, ``direction_from`` (degrees
        true), ``direction_travel`` (degrees counter-clockwise from +x, ground frame),
        ``t_min``, ``t_max``, ``probes`` (number), ``natural_periods`` (list, s) and
        ``natural_period_1``, ``natural_period_2`` ... (s), ``definition``,
        ``cautions``, ``harbor_version``, ``created``, ``seconds`` (wall-clock).

    Raises
    ------
    harbor.errors.InputError
        Bad range (non-positive, t_min >= t_max, fewer than 3 or more than
        :data:`MAX_PERIODS` periods), a bad direction, a bad point, or no points.

    Notes
    -----
    Each period is a regular-sea solve of the mild-slope equation (Berkhoff 1972)

    .. math:: \nabla\cdot(c c_g \nabla\eta) + k^2 c c_g \eta = 0

    over the harbour with its walls' reflection and an absorbing layer outside, so
    radiation through the entrance is the only damping when the walls reflect fully.
    In a closed rectangular basin of length l and depth h the natural periods are
    Merian's :math:`T_n = 2 l / (n \sqrt{g h})` for long waves, or with linear
    dispersion :math:`T_n = 2\pi / \omega_n`, :math:`\omega_n^2 = g k_n \tanh k_n h`,
    :math:`k_n = n\pi/l`; a basin behind a narrow mouth also has the Helmholtz (grave)
    mode, :math:`T_H = 2\pi\sqrt{A (l_c + l') / (g h b)}` (A basin area, b and l_c the
    mouth's width and length, l' its added length) (Rabinovich 2009). The natural periods
    are the local maxima of the basin response
    :math:`R(T) = \sqrt{\overline{|\eta|^2}}` over the coarse periods that stand at
    least :data:`PEAK_PROMINENCE` of their height above the neighbouring troughs and
    reach :data:`PEAK_OVER_MEDIAN` times the median of R over the range, each
    refined by Brent's bounded search (successive parabolic interpolation) between its
    neighbours, to 0.1 % of the period in at most 8 further solves.

    References
    ----------
    Berkhoff, J. C. W. (1972). Computation of combined refraction-diffraction. Proc.
    13th International Conference on Coastal Engineering, ASCE, 471-490.

    Merian, J. R. (1828). Ueber die Bewegung tropfbarer Flüssigkeiten in Gefässen.
    Basel (the formula as given by Wilson 1972 and Rabinovich 2009).

    Rabinovich, A. B. (2009). Seiches and harbor oscillations. In Kim, Y. C. (ed.),
    Handbook of Coastal and Ocean Engineering, World Scientific, 193-236.

    Brent, R. P. (1973). Algorithms for Minimization without Derivatives. Prentice-Hall,
    ch. 5.

    Battjes, J. A. (1974). Surf similarity. Proc. 14th International Conference on
    Coastal Engineering, ASCE, 466-480.
    """
    import dataclasses

    from harbor.cautions import caution_text, short_caution
    from harbor.solver.assemble import given_points, notices_variables

    t_start = time.perf_counter()
    coarse = _positive_periods(t_min, t_max, n, periods)
    from_deg, travel = _direction(scenario, direction)
    if reflection not in ("full", "scenario"):
        raise InputError(f"reflection must be 'full' or 'scenario', got {reflection!r}",
                         key="reflection")
    model_scenario = scenario
    if reflection == "full":
        model_scenario = dataclasses.replace(scenario, reflection=dict(FULL_REFLECTION))
    site = scenario.site
    if points:
        pts = [(name, float(x), float(y)) for name, x, y in given_points(scenario, points)]
        if len({p[0] for p in pts}) < len(pts):
            raise InputError("two points have the same name", key="points")
    else:
        pts = [(p.name, float(p.at[0]), float(p.at[1])) for p in scenario.points]
    if not pts:
        raise InputError("the response curve needs points: the scenario has none and "
                         "none were given", file=scenario.path or None, key="points")
    names = [p[0] for p in pts]
    P = np.array([[p[1], p[2]] for p in pts], float)
    probe = basin_probes(scenario.layout, P) if probes else np.zeros((0, 2))
    evalp = np.concatenate([P, probe])
    npt = len(P)

    notes: list[Notice] = []
    engine: dict[str, tuple] = {}     # the engine's notices by code: (first, periods)
    solved: dict[float, tuple] = {}
    total = [coarse.size]

    def solve_one(T):
        key = round(float(T), 9)
        if key in solved:
            return solved[key]
        u, info, used, error = None, {}, float(T), None
        try:
            # the mesher can fail on one period's geometry: a period 0.3 % away gives
            # another mesh, and the curve records the period actually solved
            for Tt in (float(T), float(T) * 1.003, float(T) / 1.003):
                try:
                    model = _model(model_scenario, evalp)
                    r = model.regular(Tt, travel)
                except RuntimeError as e:
                    error = e
                    continue
                used, u, info = Tt, np.asarray(r.points, complex), r.info
                if Tt != float(T):
                    shifted.append(float(T))
                for w in model.notices:
                    w = as_notice(w)
                    if w.code == "field-from-land":
                        # the model brings no wave in at this period: not a calm basin
                        # but no answer, so it must neither draw a zero nor make a
                        # false peak
                        unreached.append(Tt)
                        u = np.full(len(evalp), np.nan + 0j)
                    engine.setdefault(w.code, (w, []))[1].append(Tt)
                break
            if u is None:
                u = np.full(len(evalp), np.nan + 0j)
                notes.append(Notice("response-skipped", f"period {T:.4g} s could not be "
                                    f"meshed ({error}); it is left out of the curve"))
        finally:
            if progress is not None:
                progress("response", min(len(solved) + 1, total[0]), total[0])
        amp = np.abs(u)
        inside = np.isfinite(amp)
        basin = float(np.sqrt(np.mean(amp[inside] ** 2))) if inside.any() else np.nan
        solved[key] = (used, u, basin, int(info.get("unknowns", 0)), key)
        return solved[key]

    unreached: list[float] = []
    shifted: list[float] = []
    refined_keys = set()
    for T in coarse:
        solve_one(T)
    R = np.array([solved[round(float(T), 9)][2] for T in coarse])
    peaks = _peaks(R)
    natural = []
    for i in peaks:
        if refine and 0 < i < coarse.size - 1:
            total[0] += 8
            best = _refine(solve_one, coarse[i - 1], coarse[i], coarse[i + 1],
                           refined_keys, solved)
        else:
            best = solved[round(float(coarse[i]), 9)]
        natural.append(best)
    if refine:
        # a sharp resonance can fall between two periods and raise neither; the phase
        # of the field still turns by about half a cycle across it
        Uc = np.array([solved[round(float(T), 9)][1] for T in coarse])
        for i in _phase_turns(Uc, peaks):
            total[0] += 12
            best = _refine(solve_one, coarse[i], 0.5 * (coarse[i] + coarse[i + 1]),
                           coarse[i + 1], refined_keys, solved, maxiter=12)
            ends = max(R[i], R[i + 1])
            if np.isfinite(best[2]) and best[2] > ends * (1.0 + PEAK_PROMINENCE) \
                    and best[2] >= PEAK_OVER_MEDIAN * float(np.nanmedian(R)) \
                    and coarse[i] < best[4] < coarse[i + 1]:
                natural.append(best)
    natural = sorted({b[4]: b for b in natural}.values(), key=lambda b: -b[0])

    # the curve: every period solved, ascending
    keys = sorted(solved, key=lambda k: solved[k][0])
    # a shifted period may land on one already solved: keep one of each
    keys = [k for i, k in enumerate(keys)
            if i == 0 or solved[k][0] != solved[keys[i - 1]][0]]
    per = np.array([solved[k][0] for k in keys])
    U = np.array([solved[k][1] for k in keys]).reshape(len(keys), len(evalp))
    basin = np.array([solved[k][2] for k in keys])
    unknowns = np.array([solved[k][3] for k in keys], int)
    refined = np.array([k in refined_keys for k in keys], bool)
    amp = np.abs(U[:, :npt])
    phase = np.degrees(np.angle(U[:, :npt]))
    phase[~np.isfinite(amp)] = np.nan

    nat_T = np.array([b[0] for b in natural], float)
    nat_R = np.array([b[2] for b in natural], float)
    m_amp = np.full((len(natural), npt), np.nan)
    m_share = np.full((len(natural), npt), np.nan)
    m_pos = np.full((len(natural), npt), "", dtype=object)
    for j, b in enumerate(natural):
        a = np.abs(b[1])
        top = np.nanmax(a) if np.isfinite(a).any() else np.nan
        m_amp[j] = a[:npt]
        m_share[j] = a[:npt] / top
        m_pos[j] = np.where(m_share[j] >= ANTINODE_SHARE, "antinode",
                            np.where(m_share[j] <= NODE_SHARE, "node", "between"))
        m_pos[j][~np.isfinite(m_share[j])] = ""

    notes = _engine_notices(engine, len(solved)) + notes
    notes += _range_notices(coarse, R, peaks)
    if unreached:
        notes.append(Notice("response-unreached", f"at {len(unreached)} period(s) between "
                            f"{min(unreached):.4g} and {max(unreached):.4g} s the model "
                            f"finds the waves from {from_deg:g} deg true travelling from the "
                            f"land across the coast where the land leaves the model area, "
                            f"so no wave reaches the harbour: those periods are left out "
                            f"of the curve (blank in the CSV) and of the search for natural "
                            f"periods"))
    if np.all(np.nan_to_num(amp) == 0):
        notes.append(Notice("response-no-waves", f"no wave reaches the points from "
                            f"{from_deg:g} deg true at any period: choose another "
                            f"direction"))
    if shifted:
        notes.append(Notice("response-shifted", f"{len(shifted)} period(s) could not be "
                            f"meshed as asked and were solved 0.3 % away (the curve gives "
                            f"the period solved)", level="note"))
    if reflection == "full":
        notes.append(Notice("response-walls-full", NOTE_FULL, level="note"))
    notes.append(Notice("response-undamped", NOTE_UNDAMPED, level="note"))
    notes = list(dict.fromkeys(notes))

    if points:
        pcx = np.array([float(x) for _, x, _ in points])
        pcy = np.array([float(y) for _, _, y in points])
    else:
        pcx, pcy = site.from_work(P[:, 0], P[:, 1])
    attrs = dict(
        title=scenario.title, scenario=str(scenario.path), method=METHOD_RESPONSE,
        direction_from=from_deg, direction_travel=travel,
        t_min=float(coarse.min()), t_max=float(coarse.max()), probes=int(len(probe)),
        natural_periods=[float(t) for t in nat_T], definition=NOTE_DEFINITION,
        depth=float(site.depth), crs=site.work_crs.to_string(),
        scenario_crs=str(site.crs_code),
        cautions=caution_text(screening=False, full_field=True),
        caution_short=short_caution(screening=False, full_field=True), reflection=reflection,
        harbor_version=__version__,
        created=_dt.datetime.now(_dt.timezone.utc).replace(microsecond=0).isoformat(),
        seconds=float(time.perf_counter() - t_start))
    for j, t in enumerate(nat_T, 1):
        attrs[f"natural_period_{j}"] = float(t)
    ds = xr.Dataset(
        data_vars=dict(
            amplification=(("period", "point"), amp,
                           {"long_name": "amplification |eta| / incident amplitude",
                            "units": "1"}),
            phase=(("period", "point"), phase,
                   {"long_name": "phase of eta relative to the incident wave at the "
                                 "model origin", "units": "degree"}),
            basin_response=(("period",), basin,
                            {"long_name": "rms amplification over the points and basin "
                                          "probes", "units": "1"}),
            refined=(("period",), refined,
                     {"long_name": "period added while refining a natural period"}),
            unknowns=(("period",), unknowns, {"long_name": "finite-element unknowns"}),
            natural_period=(("mode",), nat_T, {"units": "s"}),
            natural_response=(("mode",), nat_R, {"units": "1"}),
            mode_amplification=(("mode", "point"), m_amp, {"units": "1"}),
            mode_share=(("mode", "point"), m_share,
                        {"long_name": "amplification over the largest in the basin",
                         "units": "1"}),
            mode_position=(("mode", "point"), m_pos),
            point_x=(("point",), P[:, 0], {"units": "m"}),
            point_y=(("point",), P[:, 1], {"units": "m"}),
            point_x_crs=(("point",), np.asarray(pcx, float)),
            point_y_crs=(("point",), np.asarray(pcy, float)),
            **notices_variables(notes),
        ),
        coords=dict(period=per, point=names, mode=np.arange(1, len(natural) + 1)),
        attrs=attrs,
    )
    ds["period"].attrs.update(units="s", long_name="wave period")
    return ds


def _peaks(R):
    """Indices of the local maxima of R that stand out by :data:`PEAK_PROMINENCE`."""
    from scipy.signal import find_peaks

    ok = np.isfinite(R)
    r = np.where(ok, R, 0.0)
    idx, props = find_peaks(r, prominence=0.0)
    keep = props["prominences"] >= PEAK_PROMINENCE * r[idx]
    # a peak needs solved periods on both sides: the edge of a gap is not a resonance
    keep &= ok[np.maximum(idx - 1, 0)] & ok[np.minimum(idx + 1, r.size - 1)]
    # and it must amplify: a bump in a calm stretch of the curve is not a seiche (and
    # may be no more than the difference between two periods' meshes)
    if ok.any():
        keep &= r[idx] >= PEAK_OVER_MEDIAN * float(np.median(R[ok]))
    return [int(i) for i in idx[keep]]


def _phase_turns(U, peaks, turn=90.0, share=0.3):
    """Intervals (i, i + 1) of the coarse periods across which the field's phase turns.

    Parameters
    ----------
    U : numpy.ndarray of complex, shape (n_periods, n_points)
        The field at the evaluation points, coarse periods ascending.
    peaks : list of int
        Peaks already found (their neighbouring intervals are skipped).
    turn : float
        Median phase change (degrees) over the points that marks an interval.
    share : float
        Only points whose amplitude at both ends is at least this share of the largest
        at that period count (the phase is meaningless near a node).

    Returns
    -------
    list of int
    """
    out = []
    near = set()
    for i in peaks:
        near.update((i - 1, i))
    A = np.abs(U)
    with np.errstate(invalid="ignore"):
        top = np.nanmax(np.where(np.isfinite(A), A, np.nan), axis=1, initial=0.0)
    for i in range(U.shape[0] - 1):
        if i in near:
            continue
        a, b = U[i], U[i + 1]
        ok = np.isfinite(a) & np.isfinite(b)
        ok &= (np.abs(a) >= share * top[i]) & (np.abs(b) >= share * top[i + 1])
        ok &= (np.abs(a) > 0) & (np.abs(b) > 0)
        if not ok.any():
            continue
        d = np.degrees(np.abs(np.angle(b[ok] / a[ok])))
        if np.median(d) > turn:
            out.append(i)
    return out


def _refine(solve_one, a, b, c, refined_keys, solved, maxiter=8):
    """Brent's bounded search for the peak between periods a < b < c (s)."""
    from scipy.optimize import minimize_scalar

    before = set(solved)

    def neg(T):
        return -solve_one(T)[2]

    minimize_scalar(neg, bounds=(float(a), float(c)), method="bounded",
                    options={"xatol": 1e-3 * float(b), "maxiter": maxiter})
    refined_keys.update(set(solved) - before)
    # the best period solved between a and c, the coarse one included
    inside = [solved[k] for k in solved if a <= k <= c]
    return max(inside, key=lambda s: s[2] if np.isfinite(s[2]) else -np.inf)


def _engine_notices(engine, n_solved):
    """The engine's notices once per code, saying at which periods they were given.

    The same limitation recurs at many periods with period-dependent figures (a blend
    over one wavelength); one sentence each, with the figures of the first period.
    """
    out = []
    for code, (first, periods) in engine.items():
        p = sorted(set(periods))
        if len(p) == 1:
            where = f"at {p[0]:.4g} s"
        else:
            where = (f"at {len(p)} of {n_solved} periods, {p[0]:.4g}-{p[-1]:.4g} s; "
                     f"figures for {periods[0]:.4g} s")
        out.append(Notice(code, f"{first.text} ({where})", sea=first.sea,
                          point=first.point, level=first.level))
    return out


def _range_notices(coarse, R, peaks):
    """Warnings about the range: the response still rising at either end."""
    out = []
    r = np.where(np.isfinite(R), R, np.nan)
    if r.size >= 3 and np.isfinite(r[-3:]).all() and r[-1] > r[-2] > r[-3]:
        out.append(Notice("response-range-edge", f"the response still rises at the "
                          f"longest period ({coarse[-1]:.4g} s): a natural period (often "
                          f"the Helmholtz or grave mode) may lie beyond the range"))
    if r.size >= 3 and np.isfinite(r[:3]).all() and r[0] > r[1] > r[2]:
        out.append(Notice("response-range-edge", f"the response still rises towards the "
                          f"shortest period ({coarse[0]:.4g} s): a natural period may lie "
                          f"below the range"))
    if not peaks:
        out.append(Notice("response-no-peak", "no natural period found in the range: the "
                          "response has no peak there"))
    return out
