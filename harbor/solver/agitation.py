"""Which method answers a sea state, and the full-field model of a scenario.

Two ways to the answer, one result (DESIGN.md sect. 1): the screening methods (closed-form
kernels over the layout) and the full-field method (:mod:`harbor.solver.fullfield`, the
mild-slope equation by finite elements over the real bathymetry with partially reflecting
boundaries). :func:`choose_method` decides per sea state, with the reason in one sentence;
:func:`model_for` builds the full-field model of a scenario in its ground frame.
"""

from __future__ import annotations

import dataclasses
import os

import numpy as np

from harbor.errors import InputError

#: The full-field method's name as results, maps and tables show it.
METHOD_FULL_FIELD = ("full-field mild-slope finite elements (P2, absorbing layer, partially "
                     "reflecting walls)")

#: Share of the machine's memory that one full-field factorisation may take when the
#: method is chosen automatically.
MEMORY_SHARE = 0.5

#: Largest number of unknowns of one factorisation chosen automatically (beyond this a
#: laptop's factorisation takes minutes per period).
MAX_AUTO_UNKNOWNS = 3_000_000

#: Share of the wet grid nodes outside the screening methods' measured validity above
#: which ``auto`` hands a sea state to the full-field method even when no point is
#: concerned.
INVALID_GRID_SHARE = 0.05

#: Largest mesh (unknowns) of one frequency band of a random sea; shorter bands are
#: solved at the period that fits (:meth:`harbor.solver.fullfield.HarbourModel.random`).
#: None: the engine's default.
BAND_CAP = None


def band_cap():
    """The band cap in force (unknowns)."""
    from harbor.solver.fullfield import harbour as _h

    return BAND_CAP if BAND_CAP is not None else getattr(_h, "DEFAULT_MAX_UNKNOWNS", None)


#: Reason sentences (one place, used by results, maps and ``check``).
REASONS = {
    "named": "named in the scenario (method = \"{m}\")",
    "forced": "asked for with --method {m}",
    "bathymetry": "auto: the depth varies over the harbour (a survey is given), which the "
                  "screening methods, at one constant depth, cannot represent",
    "reflection": "auto: reflection coefficients are given for the harbour's boundaries; "
                  "the screening methods leave reflection from land out and take every "
                  "arm as a fully reflecting wall",
    "validity": "auto: {what} outside the screening methods' measured validity ({codes})",
    "screening": "auto: the screening methods are inside their measured validity here",
    "too-large": "auto: the full-field method is needed ({why}) but too large for this "
                 "machine ({size}); screening used, and flagged",
}


@dataclasses.dataclass(frozen=True)
class Choice:
    """The method chosen for one sea state.

    Attributes
    ----------
    method : str
        ``"full-field"`` or a screening method key (``"auto"`` for the screening
        methods' own choice, ``"general"``, ``"superposition"``, ``"exact"``, ``"field"``).
    reason : str
        One sentence: why.
    needed : str or None
        When the screening methods answer although the full-field method was wanted
        (too large), what it was wanted for.
    estimate : dict or None
        For the full-field method: ``unknowns``, ``memory`` (bytes), ``seconds`` (all
        periods of the sea state), from :func:`estimate`.
    """

    method: str
    reason: str
    needed: str | None = None
    estimate: dict | None = None

    @property
    def full_field(self) -> bool:
        return self.method == "full-field"


def machine_memory() -> float:
    """Physical memory of this machine (bytes); 8 GB when it cannot be read."""
    try:
        return float(os.sysconf("SC_PAGE_SIZE") * os.sysconf("SC_PHYS_PAGES"))
    except (ValueError, OSError, AttributeError):  # pragma: no cover - not POSIX
        return 8.0 * 2**30


def has_survey(scenario) -> bool:
    """True when the scenario's depth varies (a ``[bathymetry]`` survey)."""
    b = getattr(scenario, "bathymetry", None)
    return b is not None and not getattr(b, "is_constant", True)


def sea_periods(sea, n_freq=None):
    """The wave periods (s) a full-field solution of a sea state factorises.

    Parameters
    ----------
    sea : harbor.study.scenario.Sea
    n_freq : int, optional
        Frequency bands of a random sea (default the spectra's default).

    Returns
    -------
    numpy.ndarray
        One period for a regular sea; one per frequency band for a random sea.
    """
    if sea.kind == "regular":
        return np.array([float(sea.period)])
    from harbor.waves.spectra import random_components

    kw = {} if n_freq is None else {"n_freq": n_freq}
    comps = random_components(1.0, sea.period, s_max=sea.spreading, spectrum=sea.spectrum,
                              peak_period=sea.peak_period, gamma=sea.gamma, n_dir=1, **kw)
    return np.sort(1.0 / np.unique(np.asarray(comps.frequency)))


def estimate(model, periods, random=False, n_directions=1):
    """Cost of full-field solutions of some periods, before any is solved.

    Parameters
    ----------
    model : harbor.solver.fullfield.HarbourModel
    periods : array_like
        Periods (s).
    random : bool
        The periods are the bands of a random sea: bands whose mesh would exceed the
        engine's cap (:data:`harbor.solver.fullfield.harbour.DEFAULT_MAX_UNKNOWNS`) are
        solved at the capped period, as :meth:`HarbourModel.random` does.
    n_directions : int
        Directions (back-substitutions) per period.

    Returns
    -------
    dict
        ``unknowns`` (largest factorisation), ``memory`` (bytes, the largest peak),
        ``seconds`` (all periods, this machine when quiet), ``periods``, ``capped``
        (number of bands solved at the capped period).
    """
    periods = [float(t) for t in np.atleast_1d(periods)]
    cap = band_cap() if random else None
    e = model.estimate(periods, n_directions=n_directions, max_unknowns=cap)
    return {"unknowns": int(np.max(e.unknowns)), "memory": float(e.max_peak_bytes),
            "seconds": float(e.total_seconds), "periods": periods,
            "capped": int(np.sum(e.capped))}


def _validity_findings(scenario, sea, wet_xy, point_xy):
    """Codes and where of the screening methods' measured-invalid findings."""
    from harbor.solver.accuracy import invalid_mask
    from harbor.solver.assemble import _sea_wavelength, ground_scenario

    ground = ground_scenario(scenario)
    site = scenario.site
    L = _sea_wavelength(sea, ground.site)
    alpha = float(ground.site.travel_angle(sea.from_deg))
    xy = np.concatenate([np.asarray(point_xy, float).reshape(-1, 2),
                         np.asarray(wet_xy, float).reshape(-1, 2)])
    gx, gy = site.to_ground(xy[:, 0], xy[:, 1])
    bad, found = invalid_mask(ground.layout, L, alpha, np.atleast_1d(gx), np.atleast_1d(gy))
    n = len(np.asarray(point_xy).reshape(-1, 2))
    return found, bad[:n], bad[n:]


def choose_method(scenario, sea, method=None, point_xy=None, wet_xy=None, model=None,
                  memory=None):
    """The method for one sea state of a scenario, and why.

    Parameters
    ----------
    scenario : harbor.study.scenario.Scenario
    sea : harbor.study.scenario.Sea
    method : str, optional
        A method asked for on the command line or in the API (overrides the
        scenario's ``method``); ``None`` or ``"auto"``: the scenario's.
    point_xy, wet_xy : array_like, shape (n, 2), optional
        The points and the wet grid nodes (work frame, m) the answer is wanted at.
    model : harbor.solver.fullfield.HarbourModel, optional
        For the size estimate (built with :func:`model_for` when needed).
    memory : float, optional
        Memory available (bytes); default :data:`MEMORY_SHARE` of the machine's.

    Returns
    -------
    Choice

    Notes
    -----
    ``auto`` takes the full-field method when the harbour has a depth survey, when
    reflection coefficients are given for any arm or land (even 1: the screening
    methods neglect reflection from land altogether), or when a finding of the
    screening methods' accuracy table (:func:`harbor.solver.accuracy.invalid_mask`:
    overlapping heads, bends near heads, grazing or oblique heads, short detached
    breakwaters, narrow misaligned entrances) covers a point or more than
    :data:`INVALID_GRID_SHARE` of the wet grid; and only when its largest
    factorisation fits in memory and has at most :data:`MAX_AUTO_UNKNOWNS` unknowns.
    Otherwise the screening methods answer (their own choice among the exact gap
    solution, the Penney & Price superposition and the general method).
    """
    point_xy = np.zeros((0, 2)) if point_xy is None else np.asarray(point_xy, float)
    wet_xy = np.zeros((0, 2)) if wet_xy is None else np.asarray(wet_xy, float)
    asked = method if method not in (None, "auto") else None
    named = asked or (scenario.method if scenario.method != "auto" else None)
    if named:
        why = REASONS["forced" if asked else "named"].format(m=named)
        if named == "full-field":
            return Choice("full-field", why)
        return Choice("auto" if named == "screening" else named, why)

    reasons = []
    if has_survey(scenario):
        reasons.append(("bathymetry", REASONS["bathymetry"]))
    if scenario.reflection:
        reasons.append(("reflection", REASONS["reflection"]))
    if not reasons:
        found, bad_p, bad_g = _validity_findings(scenario, sea, wet_xy, point_xy)
        if found and (bad_p.any() or (bad_g.size and bad_g.mean() > INVALID_GRID_SHARE)):
            codes = ", ".join(dict.fromkeys(n.code for n in found))
            what = (f"{int(bad_p.sum())} of the points are" if bad_p.any()
                    else f"{100 * bad_g.mean():.0f} % of the map is")
            reasons.append(("validity", REASONS["validity"].format(what=what, codes=codes)))
    if not reasons:
        return Choice("auto", REASONS["screening"])
    why = reasons[0][1]
    if model is None:
        model = model_for(scenario, points=np.concatenate([point_xy, wet_xy]))
    est = estimate(model, sea_periods(sea), random=sea.kind == "random",
                   n_directions=1 if sea.kind == "regular" else _n_dir())
    budget = MEMORY_SHARE * machine_memory() if memory is None else float(memory)
    if est["memory"] > budget or est["unknowns"] > MAX_AUTO_UNKNOWNS:
        size = (f"about {est['unknowns']:,} unknowns and {est['memory'] / 2**30:.1f} GB "
                f"for its largest factorisation")
        short = why.split(": ", 1)[-1].split(" (")[0]
        return Choice("auto", REASONS["too-large"].format(why=short, size=size),
                      needed=why, estimate=est)
    return Choice("full-field", why, estimate=est)


def _n_dir():
    from harbor.waves.spectra import DEFAULT_N_DIR

    return DEFAULT_N_DIR


def ground_bathymetry(scenario):
    """The scenario's bathymetry evaluated in its ground frame (m), or its depth."""
    b = getattr(scenario, "bathymetry", None)
    site = scenario.site
    if b is None:
        return float(site.depth)
    if getattr(site, "_to_ground", None) is None or b.is_constant:
        return b

    def interp(xg, yg):
        xw, yw = site.from_ground(xg, yg)
        return b._interp(np.asarray(xw, float).ravel(), np.asarray(yw, float).ravel())

    ext = None
    if b.extent is not None:
        x0, y0, x1, y1 = b.extent
        gx, gy = site.to_ground(np.array([x0, x1, x1, x0]), np.array([y0, y0, y1, y1]))
        ext = (float(gx.min()), float(gy.min()), float(gx.max()), float(gy.max()))
    return dataclasses.replace(b, extent=ext, _interp=interp)


def model_for(scenario, points=None, grid=None, **kwargs):
    """The full-field model of a scenario, in its ground frame.

    Parameters
    ----------
    scenario : harbor.study.scenario.Scenario
    points : array_like, shape (n, 2), optional
        Where the answer is wanted (work frame, m); default the scenario's points.
    grid : tuple of array_like, optional
        ``(x, y)`` 1-D grid coordinates in the GROUND frame (m); most callers pass the
        grid nodes as ``points`` instead, since the work frame's grid is not aligned
        with the ground frame in general.
    **kwargs
        Passed to :class:`harbor.solver.fullfield.HarbourModel` (``points_per_wavelength``,
        ``min_depth``, ...).

    Returns
    -------
    harbor.solver.fullfield.HarbourModel
        Its points are the given points in the ground frame, in the same order; its
        directions are ground-frame directions (``ground_site.travel_angle``); its
        bathymetry is the scenario's survey (or constant ``[site] depth``), the exterior
        depth ``[site] depth`` when a survey is given; its walls the scenario's
        reflection coefficients (unlisted walls reflect fully, the edge of dry ground
        absorbs) and footprints.
    """
    from harbor.solver.assemble import ground_scenario
    from harbor.solver.fullfield import HarbourModel

    site = scenario.site
    if points is None:
        points = np.array([p.at for p in scenario.points], float).reshape(-1, 2)
    pts = np.asarray(points, float).reshape(-1, 2)
    gx, gy = site.to_ground(pts[:, 0], pts[:, 1])
    gpts = np.column_stack([np.atleast_1d(gx), np.atleast_1d(gy)])
    ground = ground_scenario(scenario)
    bath = ground_bathymetry(scenario)
    kw = dict(kwargs)
    if not isinstance(bath, float):
        kw.setdefault("exterior_depth", float(site.depth))
    kw.setdefault("g", float(site.g))
    refl = {k: (tuple(v) if isinstance(v, (list, tuple)) else v)
            for k, v in scenario.reflection.items()}
    try:
        return HarbourModel(ground.layout, bath, points=gpts, grid=grid, reflection=refl,
                            footprints=dict(scenario.footprints), **kw)
    except InputError as e:
        raise InputError(e.problem, file=scenario.path or None, where=e.where,
                         key=e.key) from None
