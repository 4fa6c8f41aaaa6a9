"""Solve a scenario: every sea state over the grid and at the points, as one labelled result.

The result is an :class:`xarray.Dataset` (contract in DESIGN.md sect. 2 and in
:func:`solve`). Outputs read it; they never recompute physics.
"""

from __future__ import annotations

import dataclasses
import datetime as _dt

import numpy as np
import shapely
import xarray as xr

from harbor import __version__
from harbor.cautions import REFLECTION_NOTE, Notice, as_notice, caution_text
from harbor.geometry.visibility import distance_to_arms, inside_land
from harbor.errors import InputError
from harbor.solver.accuracy import accuracy_warnings, invalid_mask  # noqa: F401
from harbor.solver.layout import METHOD_GENERAL, layout_field, layout_warnings
from harbor.solver.random import random_sea_field
from harbor.solver.resolution import grid_notices
from harbor.waves.dispersion import wavelength as _wavelength
from harbor.waves.spectra import BM_PEAK_RATIO, jonswap_peak_period, random_components

METHOD_FIELD = "full-field finite elements (P2, absorbing layer), land edges reflecting"

#: Depth-limited breaking height as a fraction of the depth (common practice).
BREAKING_RATIO = 0.78



def grid_coordinates(grid):
    """1-D x and y coordinates (m) of a :class:`harbor.study.scenario.GridSpec`."""
    xmin, ymin, xmax, ymax = grid.bounds
    h = grid.spacing
    x = xmin + h * np.arange(int(np.floor((xmax - xmin) / h + 1e-9)) + 1)
    y = ymin + h * np.arange(int(np.floor((ymax - ymin) / h + 1e-9)) + 1)
    return x, y


def ground_scenario(scenario):
    """The scenario carried to its site's local ground frame (true distances).

    Parameters
    ----------
    scenario : harbor.study.scenario.Scenario

    Returns
    -------
    Scenario
        Arms, land and points in :attr:`harbor.geometry.site.Site.ground_crs` (m) and
        the site seen from there (:meth:`~harbor.geometry.site.Site.ground_site`); the
        scenario itself when its work frame is already the ground frame (EPSG:4326).
        Lengths measured in it (arm lengths, entrance widths, distances to heads) are
        ground lengths whatever the scenario CRS's scale factor.
    """
    site = scenario.site
    if getattr(site, "_to_ground", None) is None:
        return scenario

    def tr(a):
        x, y = site.to_ground(a[:, 0], a[:, 1])
        return np.column_stack([np.atleast_1d(x), np.atleast_1d(y)])

    lay = scenario.layout
    arms = tuple(dataclasses.replace(a, line=tr(np.asarray(a.line, float))) for a in lay.arms)
    lands = tuple(dataclasses.replace(ld, outline=shapely.transform(ld.outline, tr))
                  for ld in lay.lands)
    pts = tuple(dataclasses.replace(p, at=tuple(float(v) for v in tr(np.array([p.at], float))[0]))
                for p in scenario.points)
    return dataclasses.replace(scenario, site=site.ground_site(),
                               layout=dataclasses.replace(lay, arms=arms, lands=lands),
                               points=pts, grid=None)


def _sea_wavelength(sea, site):
    """Wavelength (m) representative of a sea state: at T (regular) or at the peak (random)."""
    if sea.kind == "regular":
        return float(_wavelength(sea.period, site.depth, site.g))
    if sea.spectrum == "jonswap":
        tp = sea.peak_period or jonswap_peak_period(sea.period, sea.gamma)
    else:
        tp = BM_PEAK_RATIO * sea.period
    return float(_wavelength(tp, site.depth, site.g))


def solve_sea(scenario, sea, px, py, method="auto", progress=None):
    """K', period ratio and the method for one sea state at points (work frame, m).

    Parameters
    ----------
    scenario : harbor.study.scenario.Scenario
    sea : harbor.study.scenario.Sea
    px, py : numpy.ndarray
        Points (m, work frame).
    method : str
        See :func:`harbor.solver.layout.layout_field`.
    progress : callable, optional
        ``progress(done, total)`` for random seas.

    Returns
    -------
    kd : numpy.ndarray
    period_ratio : numpy.ndarray
        NaN for regular seas.
    method_name : str
    reaching : float
        Share of the sea's energy that reaches the layout from open water (0-1).
    """
    site = scenario.site
    alpha = float(site.travel_angle(sea.from_deg))
    if method == "field":
        from harbor.solver.accuracy import field_method_solve

        if sea.kind != "regular":
            raise InputError(f"--method field solves regular seas only; sea '{sea.name}' is "
                             f"random", file=scenario.path, key="--method")
        kd = np.abs(field_method_solve(scenario, sea, px, py))
        return kd, np.full(kd.shape, np.nan), METHOD_FIELD, 1.0
    if sea.kind == "regular":
        L = float(_wavelength(sea.period, site.depth, site.g))
        u, info = layout_field(scenario.layout, px, py, L, alpha, method=method)
        kd = np.abs(u)
        reaching = 1.0 if (info.lit_heads or np.any(kd > 0)) else 0.0
        return kd, np.full(kd.shape, np.nan), info.method, reaching
    comps = random_components(sea.height, sea.period, s_max=sea.spreading, spectrum=sea.spectrum,
                              peak_period=sea.peak_period, gamma=sea.gamma)
    res = random_sea_field(scenario.layout, px, py, comps, site.depth, alpha, g=site.g,
                           method=method, progress=progress)
    ranked = [(m, s) for m, s in sorted(res.methods.items(), key=lambda kv: -kv[1]) if s > 0.005]
    if len(ranked) == 1:
        name = ranked[0][0]
    else:
        # the general method also covers what the gap methods leave outside the basin
        parts = [f"{m.split(', geometric optics')[0]} for {100 * s:.0f} % of the energy"
                 for m, s in ranked if m != METHOD_GENERAL]
        name = "; ".join(parts) + "; geometric optics + head diffraction elsewhere"
    return res.kd, res.period_ratio, name, res.reaching


def _grid_corners(scenario):
    """The corners of the scenario's grid (work frame): the full-field model covers the
    map's area whether the grid or only the points are solved, so that ``harbor points``
    and ``harbor map`` solve one and the same model."""
    if scenario.grid is None:
        return np.zeros((0, 2))
    x0, y0, x1, y1 = scenario.grid.bounds
    return np.array([[x0, y0], [x1, y0], [x1, y1], [x0, y1]], float)


def _grid_nodes(scenario, grid=True):
    """Grid axes, node arrays and the dry mask (land, on an arm) of a scenario."""
    if grid and scenario.grid is not None:
        gx, gy = grid_coordinates(scenario.grid)
    else:
        gx, gy = np.zeros(0), np.zeros(0)
    X, Y = np.meshgrid(gx, gy)
    dry = inside_land(X, Y, scenario.layout) if X.size else np.zeros(X.shape, bool)
    if X.size:
        h = scenario.grid.spacing
        dry |= distance_to_arms(X, Y, scenario.layout) < 1e-6 * max(h, 1.0)
    return gx, gy, X, Y, dry


def plan(scenario, sea=None, method="auto", grid=True):
    """The method each sea state will get, and why, before anything is solved.

    Parameters
    ----------
    scenario : harbor.study.scenario.Scenario
    sea : str, optional
        One sea state's name; default all.
    method : str
        As for :func:`solve` (``"auto"``: the scenario's ``method``).
    grid : bool
        Plan for the grid and the points (as ``harbor map``) or the points only.

    Returns
    -------
    list of (harbor.study.scenario.Sea, harbor.solver.agitation.Choice)
        A full-field choice carries its ``estimate`` (unknowns and memory of the largest
        factorisation, seconds of all its periods).
    """
    from harbor.solver import agitation

    seas = [scenario.sea(sea)] if sea is not None else list(scenario.seas)
    _, _, X, Y, dry = _grid_nodes(scenario, grid)
    wet_xy = np.column_stack([X[~dry], Y[~dry]])
    pnt_xy = np.array([p.at for p in scenario.points], float).reshape(-1, 2)
    model = _lazy_model(scenario, np.concatenate([wet_xy, pnt_xy]))
    out = []
    for s in seas:
        if method == "field":
            out.append((s, agitation.Choice("field",
                                            agitation.REASONS["forced"].format(m="field"))))
            continue
        c = agitation.choose_method(scenario, s, method=method, point_xy=pnt_xy,
                                    wet_xy=wet_xy, model=model)
        if c.full_field and c.estimate is None:
            c = dataclasses.replace(c, estimate=agitation.estimate(
                model, agitation.sea_periods(s), random=s.kind == "random"))
        out.append((s, c))
    return out


class _lazy_model:
    """The scenario's full-field model, built on first use and shared by its sea states
    (factorisations are cached per period inside it)."""

    def __init__(self, scenario, points):
        self.scenario = scenario
        self.points = points
        self._model = None

    def get(self):
        if self._model is None:
            from harbor.solver.agitation import model_for

            self._model = model_for(self.scenario, points=self.points)
        return self._model

    def __getattr__(self, name):  # the estimate reads the model's region and settings
        return getattr(self.get(), name)


#: Share of a random sea's energy in capped frequency bands above which its full-field
#: values are flagged (outside the method's validity).
CAPPED_SHARE_VALID = 0.05


def solve_sea_full_field(ground, sea, model, progress=None):
    """K', period ratio, method and notices of one sea state by the full-field method.

    Parameters
    ----------
    ground : harbor.study.scenario.Scenario
        The scenario in its ground frame (:func:`ground_scenario`).
    sea : harbor.study.scenario.Sea
    model : harbor.solver.fullfield.HarbourModel
        From :func:`harbor.solver.agitation.model_for`; its points are where the
        answer is wanted.
    progress : callable, optional
        ``progress(done, total)`` per frequency band.

    Returns
    -------
    kd, period_ratio : numpy.ndarray
        At the model's points; NaN on land and dry ground (period ratio NaN for
        regular seas).
    method_name : str
    reaching : float
        Share of the energy that reaches the model from open water.
    notices : list of harbor.cautions.Notice
        The model's notices raised while solving this sea state.

    References
    ----------
    Berkhoff, J. C. W. (1972). Computation of combined refraction-diffraction. Proc. 13th
    International Conference on Coastal Engineering, ASCE, 471-490.
    Goda, Y., Takayama, T. and Suzuki, Y. (1978). Diffraction diagrams for directional
    random waves. Proc. 16th ICCE, ASCE, 628-650.
    """
    from harbor.solver.agitation import METHOD_FULL_FIELD

    before = len(model.notices)
    direction = float(np.degrees(ground.site.travel_angle(sea.from_deg)))
    if sea.kind == "regular":
        if progress:
            progress(0, 1)
        u, reach = model._directions(sea.period, [direction])
        kd = np.abs(u[:, 0])
        ratio = np.full(kd.shape, np.nan)
        reaching = 1.0 if bool(reach[0]) else 0.0
        if progress:
            progress(1, 1)
    else:
        comps = random_components(sea.height, sea.period, s_max=sea.spreading,
                                  spectrum=sea.spectrum, peak_period=sea.peak_period,
                                  gamma=sea.gamma)
        from harbor.solver.agitation import band_cap

        res = model.random(comps, direction, progress=progress, max_unknowns=band_cap())
        n = len(model.points)
        kd, ratio = res.kd_points[:n], res.ratio_points[:n]
        w = float(np.sum(comps.weight))
        reaching = float(res.reaching / w) if w > 0 else 0.0
        capped = set(round(float(t), 9) for t in res.info.get("capped_periods", ()))
        if capped and w > 0:
            f = np.asarray(comps.frequency, float)
            share = float(np.sum(np.asarray(comps.weight)[
                np.isin(np.round(1.0 / f, 9), list(capped))]) / w)
            if share > CAPPED_SHARE_VALID:
                extra_capped = Notice(
                    "full-field-capped", f"sea '{sea.name}': {100 * share:.0f} % of the "
                    f"energy is in frequency bands too short for the model's mesh (solved "
                    f"at a longer period): its K' is over-stated behind structures and is "
                    f"flagged as outside the method's validity", sea=sea.name)
                model.notices.append(extra_capped)
    # one sentence per kind: the bands of a random sea repeat them with other numbers
    fresh, seen = [], set()
    for n in model.notices[before:]:
        n = as_notice(n)
        if n.code in seen and n.code not in ("field-bands-capped",):
            continue
        seen.add(n.code)
        fresh.append(n.for_sea(sea.name))
    return kd, ratio, METHOD_FULL_FIELD, reaching, fresh


def wall_variables(layout, reflection):
    """The reflecting boundaries as Dataset variables, for maps and tables.

    Parameters
    ----------
    layout : harbor.geometry.layout.Layout
        Work frame (m).
    reflection : dict
        :attr:`harbor.study.scenario.Scenario.reflection` (names not listed: 1.0).

    Returns
    -------
    dict
        Along dimension ``wall``: ``wall_wkt`` (LineString, work frame m),
        ``wall_reflection`` (K_r, -) and ``wall_owner`` (arm or land name); one entry per
        arm and per run of consecutive land edges that share one K_r.
    """
    wkt, kr, owner = [], [], []
    for a in layout.arms:
        wkt.append(shapely.to_wkt(a.geometry, rounding_precision=3))
        kr.append(float(reflection.get(a.name, 1.0)))
        owner.append(a.name)
    for ld in layout.lands:
        ring = np.asarray(ld.outline.exterior.coords)
        v = reflection.get(ld.name, 1.0)
        edges = (np.full(len(ring) - 1, float(v)) if np.ndim(v) == 0
                 else np.asarray(v, float))
        if len(edges) != len(ring) - 1:
            edges = np.full(len(ring) - 1, float(np.mean(edges)))
        # runs of equal K_r; a run may wrap round the ring's start
        start = 0
        if np.any(edges != edges[0]):
            start = int(np.flatnonzero(edges != np.roll(edges, 1))[0])
        order = np.roll(np.arange(len(edges)), -start)
        run = [order[0]]
        for e in order[1:]:
            if edges[e] == edges[run[-1]]:
                run.append(e)
                continue
            wkt.append(shapely.to_wkt(shapely.LineString(ring[run + [run[-1] + 1]]),
                                      rounding_precision=3))
            kr.append(float(edges[run[0]]))
            owner.append(ld.name)
            run = [e]
        idx = run + [run[-1] + 1]
        wkt.append(shapely.to_wkt(shapely.LineString(ring[idx]), rounding_precision=3))
        kr.append(float(edges[run[0]]))
        owner.append(ld.name)
    obj = dict(dtype=object)
    return {
        "wall_wkt": xr.DataArray(np.array(wkt, **obj), dims="wall",
                                 attrs={"long_name": "reflecting boundary (WKT, work frame, m)"}),
        "wall_reflection": xr.DataArray(np.array(kr, float), dims="wall",
                                        attrs={"long_name": "reflection coefficient K_r",
                                               "units": "1"}),
        "wall_owner": xr.DataArray(np.array(owner, **obj), dims="wall",
                                   attrs={"long_name": "arm or land of the boundary"}),
    }


def given_points(scenario, points, key="points"):
    """Check and convert points given in the scenario's CRS to the work frame.

    Parameters
    ----------
    scenario : harbor.study.scenario.Scenario
    points : sequence of (name, x, y)
        x first: easting or longitude (scenario CRS).
    key : str
        What to name in a message (``"--at"`` from the command line).

    Returns
    -------
    list of (name, x, y)
        Work frame (m).

    Raises
    ------
    harbor.errors.InputError
        A lon/lat out of range, a point outside the CRS's domain, or a point on land, on
        an arm, on a head or a vertex (:func:`harbor.geometry.checks.point_problems`,
        the rule the scenario reader applies to its ``[[point]]`` tables).
    """
    from harbor.geometry import checks
    from harbor.geometry.site import lonlat_problem

    site = scenario.site
    out = []
    for name, x, y in points or ():
        x, y = float(x), float(y)
        if not (np.isfinite(x) and np.isfinite(y)):
            raise InputError(f"point '{name}': coordinates must be finite numbers, got "
                             f"{x:g} {y:g}", file=scenario.path or None, key=key)
        if site.is_lonlat:
            prob = lonlat_problem(x, y)
            if prob:
                raise InputError(f"point '{name}': {prob}", file=scenario.path or None, key=key)
        wx, wy = site.to_work(np.array([x]), np.array([y]))
        wx, wy = float(np.atleast_1d(wx)[0]), float(np.atleast_1d(wy)[0])
        if not (np.isfinite(wx) and np.isfinite(wy)):
            raise InputError(f"point '{name}' ({x:g}, {y:g}) is outside the domain of CRS "
                             f"{site.crs_code}", file=scenario.path or None, key=key)
        out.append((str(name), wx, wy))
    if out:
        xy = np.array([(p[1], p[2]) for p in out])
        tol = checks.layout_tolerance(scenario.layout, [np.array(scenario.points[0].at)]
                                      if scenario.points else ())
        try:
            checks.check_points(scenario.layout, xy, tol)
        except checks.GeometryError as e:
            name, x, y = points[e.index][0], points[e.index][1], points[e.index][2]
            from harbor.geometry.site import format_xy

            shown = format_xy(x, y, site.is_lonlat)
            msg = e.text(lambda _: shown).replace("the point ", f"point '{name}' ", 1)
            raise InputError(msg,
                             file=scenario.path or None, key=key) from None
    return out


def solve(scenario, sea=None, points=None, grid=True, method="auto", progress=None,
          replace_points=False):
    """Solve every sea state (or one) of a scenario over its grid and at its points.

    Parameters
    ----------
    scenario : harbor.study.scenario.Scenario
        From :func:`harbor.load_scenario`.
    sea : str, optional
        Name of one sea state; default all.
    points : sequence of (name, x, y), optional
        Points in the scenario's CRS (x first: easting or longitude). They are ADDED
        after the scenario's own points (``replace_points=True``: used instead of
        them). Checked like the scenario's ``[[point]]`` tables: a point on land, on
        an arm, a head or a vertex raises :class:`harbor.errors.InputError`.
    grid : bool
        Compute the grid (False: points only, much faster).
    method : {"auto", "general", "superposition", "exact", "field"}
        Force a method (see :func:`harbor.solver.layout.layout_field`); ``"field"`` runs
        the finite-element solution (regular seas, small harbours) to check a screening
        result (:func:`harbor.solver.accuracy.field_method_solve`).
    progress : callable, optional
        ``progress(sea_name, done, total)``.
    replace_points : bool
        With ``points``: solve only at those, leaving out the scenario's points.

    Returns
    -------
    xarray.Dataset
        dims ``sea``, ``y``, ``x``, ``point``; variables ``kd`` (K', -), ``height`` (m),
        ``period_ratio`` (-, NaN for regular seas) on (sea, y, x), NaN on land and arms;
        ``point_x``, ``point_y`` (m, work frame), ``point_limit`` (m, NaN if none),
        ``point_kd``, ``point_height``, ``point_period_ratio`` (sea, point); per sea
        ``sea_kind``, ``sea_height``, ``sea_period``, ``sea_from`` (deg true),
        ``sea_spreading``, ``sea_method``, ``sea_wavelength`` (m), ``sea_reaching`` (share
        of energy reaching the layout); ``valid`` (sea, y, x) and ``point_valid`` (sea,
        point), True where the value is inside the measured validity of its method;
        the validity warnings and notes as records along dimension ``notice``
        (``notice_code``, ``notice_text``, ``notice_sea`` and ``notice_point``, "" for
        all or none, ``notice_level``; read them with :func:`notices`). Attributes: ``title``, ``scenario``, ``crs``,
        ``crs_wkt``, ``convergence_deg``, ``scale_factor`` (work-frame length over ground
        length at the site), ``ground_crs_wkt`` (the local frame of the computation),
        ``depth``, ``warnings`` (newline-joined),
        ``cautions``, ``harbor_version``, ``created``, ``method``.
    """
    seas = list(scenario.seas)
    if sea is not None:
        seas = [scenario.sea(sea)]
    site = scenario.site
    pts = [(p.name, float(p.at[0]), float(p.at[1]), p.limit) for p in scenario.points]
    extra = given_points(scenario, points)
    if points and replace_points:
        pts = []
    pts += [(name, wx, wy, None) for name, wx, wy in extra]
    if len({p[0] for p in pts}) < len(pts):
        dup = next(n for n in (p[0] for p in pts) if [q[0] for q in pts].count(n) > 1)
        raise InputError(f"two points are named '{dup}'", file=scenario.path or None,
                         key="points")
    pnames = [p[0] for p in pts]
    ppx = np.array([p[1] for p in pts], float)
    ppy = np.array([p[2] for p in pts], float)
    plim = np.array([np.nan if p[3] is None else p[3] for p in pts], float)

    gx, gy, X, Y, dry = _grid_nodes(scenario, grid)

    ns, ny, nx, npnt = len(seas), gy.size, gx.size, len(pnames)
    kd = np.full((ns, ny, nx), np.nan)
    ratio = np.full((ns, ny, nx), np.nan)
    pkd = np.full((ns, npnt), np.nan)
    pratio = np.full((ns, npnt), np.nan)
    methods, wavelengths, reaching = [], [], []
    notes: list[Notice] = []
    valid = np.ones((ns, ny, nx), bool)
    pvalid = np.ones((ns, npnt), bool)
    wet = ~dry
    from harbor.solver.agitation import has_survey

    survey = scenario.bathymetry if has_survey(scenario) else None
    if survey is None:
        gdepth = np.where(dry, np.nan, float(site.depth))
        pdepth = np.full(npnt, float(site.depth))
    else:
        gdepth = np.where(dry, np.nan, survey.depth(X, Y)) if X.size else np.zeros(X.shape)
        pdepth = survey.depth(ppx, ppy) if npnt else np.zeros(0)
    allx = np.concatenate([X[wet], ppx])
    ally = np.concatenate([Y[wet], ppy])
    # the waves are computed at every point's ground position (local frame, true scale)
    ground = ground_scenario(scenario)
    allx, ally = site.to_ground(allx, ally)
    gpx, gpy = site.to_ground(ppx, ppy)
    gpts = [(p[0], float(a), float(b)) for p, a, b in zip(pts, np.atleast_1d(gpx),
                                                        np.atleast_1d(gpy))]
    note = site.scale_note()
    if note:
        # lengths were corrected: a note, the values are right
        notes.append(Notice("crs-scale", note, level="note"))
    from harbor.solver import agitation

    wet_xy = np.column_stack([X[wet], Y[wet]])
    pnt_xy = np.column_stack([ppx, ppy])
    model = None
    reasons = []
    any_screening = False
    for i, s in enumerate(seas):
        cb = None
        if progress is not None:
            cb = (lambda done, total, _n=s.name: progress(_n, done, total))
        if method == "field":
            choice = agitation.Choice("field", agitation.REASONS["forced"].format(m="field"))
        else:
            if model is None:  # built (meshed) only if a sea state goes full-field
                model = _lazy_model(scenario, np.concatenate([wet_xy, pnt_xy,
                                                              _grid_corners(scenario)]))
            choice = agitation.choose_method(scenario, s, method=method, point_xy=pnt_xy,
                                             wet_xy=wet_xy, model=model)
        reasons.append(choice.reason)
        if choice.full_field:
            k, r, mname, reach, fnotes = solve_sea_full_field(ground, s, model.get(), cb)
            k, r = k[:allx.size], r[:allx.size]   # the grid's corners only set the model area
        else:
            any_screening = True
            k, r, mname, reach = solve_sea(ground, s, allx, ally, method=choice.method,
                                           progress=cb)
            fnotes = []
        nw = int(wet.sum())
        kd[i][wet] = k[:nw]
        ratio[i][wet] = r[:nw]
        pkd[i] = k[nw:]
        pratio[i] = r[nw:]
        methods.append(mname)
        L = _sea_wavelength(s, site)
        wavelengths.append(L)
        reaching.append(reach)
        gspec = scenario.grid
        if gspec is not None and getattr(gspec, "ground_spacing", None):
            gspec = dataclasses.replace(gspec, spacing=gspec.ground_spacing)
        more = list(fnotes) + list(grid_notices(gspec, L, s.name))
        if choice.needed:
            more.append(Notice("full-field-too-large", f"sea '{s.name}': {choice.reason}",
                               sea=s.name))
        if choice.full_field:
            pass  # the full-field method holds over the whole model (its notices say where not)
        elif choice.method == "field":
            from harbor.solver.accuracy import field_method_notes

            more += list(layout_warnings(ground.layout, L, gpts))
            more += field_method_notes(ground, s)
        else:
            more += list(layout_warnings(ground.layout, L, gpts))
            alpha = float(ground.site.travel_angle(s.from_deg))
            # measured outside the method's validity: the lee that the concerned heads'
            # and bends' waves reach, and their near field (accuracy.invalid_mask)
            bad, off = invalid_mask(ground.layout, L, alpha, allx, ally,
                                    label=f"sea '{s.name}'")
            if off:
                nw = int(wet.sum())
                valid[i][wet] = ~bad[:nw]
                pvalid[i] = ~bad[nw:]
            more += off
        if choice.needed or any(n.code == "full-field-capped" for n in fnotes):
            # the full-field method was needed here and not run (or its shortest bands
            # were not resolved): no value of this sea state is inside a measured validity
            valid[i][:] = False
            pvalid[i][:] = False
        for w in more:
            w = as_notice(w).for_sea(s.name)
            if w.code == "near-head" and w.point in pnames:
                pvalid[i, pnames.index(w.point)] = False
            notes.append(w)
        if reach < 0.5:
            notes.append(Notice(
                "not-reaching", f"sea '{s.name}' (from {s.from_deg:g} deg) mostly does not "
                f"reach the harbour from open water ({100 * reach:.0f} % of its energy "
                f"does): its heights inside are small or zero", sea=s.name))
        hb_p = BREAKING_RATIO * pdepth
        over_pts = [pnames[j] for j in range(npnt) if pkd[i, j] * s.height > hb_p[j]]
        n_over = int(np.sum(kd[i] * s.height > BREAKING_RATIO * gdepth))
        if over_pts or n_over:
            where = []
            if over_pts:
                where.append("points " + ", ".join(f"'{n}'" for n in over_pts))
            if n_over:
                where.append(f"{n_over} grid points")
            hb_text = (f"0.78 h = {BREAKING_RATIO * site.depth:.2f} m" if survey is None
                       else "0.78 h (local depth)")
            notes.append(Notice(
                "breaking", f"sea '{s.name}': heights above the depth-limited breaking "
                f"height {hb_text} at {' and '.join(where)} (flagged, not "
                f"changed: waves there would break)", sea=s.name))
    if any_screening and method != "field":
        notes.append(Notice("reflection-neglected", REFLECTION_NOTE, level="note"))
    # one sentence once in the joined text, whatever number of seas it concerns
    warnings = list(dict.fromkeys(notes))

    H = np.array([s.height for s in seas], float)
    pcx, pcy = site.from_work(ppx, ppy) if npnt else (ppx, ppy)
    ds = xr.Dataset(
        data_vars=dict(
            kd=(("sea", "y", "x"), kd, {"long_name": "diffraction coefficient K'", "units": "1"}),
            height=(("sea", "y", "x"), kd * H[:, None, None],
                    {"long_name": "wave height (H regular, H1/3 random)", "units": "m"}),
            period_ratio=(("sea", "y", "x"), ratio,
                          {"long_name": "period ratio Tm02 behind / Tm02 incident", "units": "1"}),
            point_x=(("point",), ppx, {"units": "m"}),
            point_y=(("point",), ppy, {"units": "m"}),
            point_x_crs=(("point",), pcx,
                         {"long_name": "point x in the scenario CRS (easting or longitude)"}),
            point_y_crs=(("point",), pcy,
                         {"long_name": "point y in the scenario CRS (northing or latitude)"}),
            point_limit=(("point",), plim, {"long_name": "allowable wave height", "units": "m"}),
            point_kd=(("sea", "point"), pkd, {"long_name": "diffraction coefficient K'", "units": "1"}),
            point_height=(("sea", "point"), pkd * H[:, None], {"units": "m"}),
            point_period_ratio=(("sea", "point"), pratio, {"units": "1"}),
            sea_kind=(("sea",), np.array([s.kind for s in seas], dtype=object)),
            sea_height=(("sea",), H, {"units": "m"}),
            sea_period=(("sea",), np.array([s.period for s in seas], float), {"units": "s"}),
            sea_from=(("sea",), np.array([s.from_deg for s in seas], float),
                      {"units": "degree", "long_name": "direction waves come from, true north"}),
            sea_spreading=(("sea",), np.array([s.spreading if s.kind == "random" else np.nan
                                               for s in seas], float)),
            sea_method=(("sea",), np.array(methods, dtype=object)),
            sea_wavelength=(("sea",), np.array(wavelengths), {"units": "m"}),
            sea_reaching=(("sea",), np.array(reaching), {"units": "1"}),
            sea_method_reason=(("sea",), np.array(reasons, dtype=object),
                               {"long_name": "why the sea state's method was used"}),
            depth=(("y", "x"), gdepth,
                   {"long_name": "still-water depth", "units": "m",
                    "constant": int(survey is None)}),
            valid=(("sea", "y", "x"), valid,
                   {"long_name": "value inside the measured validity of its method"}),
            point_valid=(("sea", "point"), pvalid,
                         {"long_name": "value inside the measured validity of its method"}),
            **notices_variables(notes),
        ),
        coords=dict(sea=[s.name for s in seas], x=gx, y=gy, point=pnames),
        attrs=dict(
            title=scenario.title,
            scenario=str(scenario.path),
            crs=site.work_crs.to_string(),
            scenario_crs=str(site.crs_code),
            crs_wkt=site.work_crs.to_wkt(),
            convergence_deg=float(site.convergence_deg),
            scale_factor=float(site.scale_factor),
            ground_crs_wkt=site.ground_crs.to_wkt(),
            depth=float(site.depth),
            warnings="\n".join(warnings),
            cautions=caution_text(),
            harbor_version=__version__,
            created=_dt.datetime.now(_dt.timezone.utc).replace(microsecond=0).isoformat(),
            method="; ".join(sorted(set(methods))),
        ),
    )
    ds["x"].attrs.update(units="m", long_name="easting (work frame)",
                         standard_name="projection_x_coordinate", axis="X")
    ds["y"].attrs.update(units="m", long_name="northing (work frame)",
                         standard_name="projection_y_coordinate", axis="Y")
    ds = ds.assign(layout_variables(scenario.layout))
    ds = ds.assign(wall_variables(scenario.layout, scenario.reflection))
    ds.attrs["scenario_crs_is_lonlat"] = int(bool(site.is_lonlat))
    ds.attrs["full_field"] = int(any(m == agitation.METHOD_FULL_FIELD for m in methods))
    ds.attrs["cautions"] = caution_text(screening=any_screening or not methods,
                                        full_field=bool(ds.attrs["full_field"]))
    return with_crs(ds, site.work_crs, site.work_to_lonlat)


def layout_variables(layout):
    """The layout as Dataset variables, so that outputs need nothing but the result.

    Parameters
    ----------
    layout : harbor.geometry.layout.Layout
        Arms and land in the work frame (m).

    Returns
    -------
    dict
        ``arm_wkt`` (dimension ``arm``, the arm's polyline as WKT, work frame m),
        ``arm_rooted_start``, ``arm_rooted_end`` (bool), ``land_wkt`` (dimension
        ``land``, WKT polygon) and the free heads ``head_x``, ``head_y`` (m) and
        ``head_arm`` (name of the arm) along dimension ``head``; coordinates ``arm``,
        ``land`` (names).
    """
    import shapely

    arms = list(layout.arms)
    lands = list(layout.lands)
    heads = layout.heads()
    obj = dict(dtype=object)
    return {
        "arm_wkt": xr.DataArray(np.array([shapely.to_wkt(a.geometry, rounding_precision=4)
                                          for a in arms], **obj), dims="arm",
                                coords={"arm": np.array([a.name for a in arms], **obj)},
                                attrs={"long_name": "breakwater arm polyline (WKT, work frame, m)"}),
        "arm_rooted_start": xr.DataArray(np.array([a.rooted_start for a in arms], bool),
                                         dims="arm"),
        "arm_rooted_end": xr.DataArray(np.array([a.rooted_end for a in arms], bool), dims="arm"),
        "land_wkt": xr.DataArray(np.array([shapely.to_wkt(ld.outline, rounding_precision=4)
                                           for ld in lands], **obj), dims="land",
                                 coords={"land": np.array([ld.name for ld in lands], **obj)},
                                 attrs={"long_name": "land polygon (WKT, work frame, m)"}),
        "head_x": xr.DataArray(np.array([h[2][0] for h in heads], float), dims="head",
                               attrs={"units": "m", "long_name": "free (diffracting) head easting"}),
        "head_y": xr.DataArray(np.array([h[2][1] for h in heads], float), dims="head",
                               attrs={"units": "m", "long_name": "free (diffracting) head northing"}),
        "head_arm": xr.DataArray(np.array([h[0] for h in heads], **obj), dims="head",
                                 attrs={"long_name": "arm of the head"}),
    }


def crs_variable(crs):
    """The CF grid-mapping variable of a CRS (the ``crs`` variable of a result).

    Parameters
    ----------
    crs : pyproj.CRS
        The work frame.

    Returns
    -------
    xarray.DataArray
        A scalar whose attributes are ``CRS.to_cf()`` (``grid_mapping_name``,
        projection parameters, ``crs_wkt``) plus ``spatial_ref`` (the name GDAL reads).

    References
    ----------
    .. [1] Eaton, B. et al. (2020). NetCDF Climate and Forecast (CF) Metadata
       Conventions, version 1.8, section 5.6 (grid mappings).
    """
    def plain(v):
        if v is None:
            return ""
        if isinstance(v, (bool, np.bool_)):
            return int(v)
        return v if isinstance(v, (int, float, str, np.integer, np.floating)) else str(v)

    cf = {k: plain(v) for k, v in crs.to_cf().items()}
    cf.setdefault("crs_wkt", crs.to_wkt())
    cf["spatial_ref"] = cf["crs_wkt"]
    return xr.DataArray(np.int32(0), attrs=cf)


def with_crs(ds, crs, to_lonlat):
    """Attach the grid mapping ``crs`` and 2-D ``lon``/``lat`` (WGS 84) to a result.

    Parameters
    ----------
    ds : xarray.Dataset
        With 1-D ``x``, ``y`` (m) in ``crs``.
    crs : pyproj.CRS
        The work frame.
    to_lonlat : callable
        ``to_lonlat(x, y) -> (lon, lat)`` in degrees.

    Returns
    -------
    xarray.Dataset
        The same result, the one used in memory and written to ``grid.nc``.
    """
    ds["crs"] = crs_variable(crs)
    X, Y = np.meshgrid(ds["x"].values, ds["y"].values)
    lon, lat = (to_lonlat(X, Y) if X.size else (np.zeros(X.shape), np.zeros(X.shape)))
    ds = ds.assign_coords(
        lon=(("y", "x"), np.asarray(lon, float).reshape(X.shape),
             {"standard_name": "longitude", "long_name": "longitude (WGS 84)",
              "units": "degrees_east"}),
        lat=(("y", "x"), np.asarray(lat, float).reshape(X.shape),
             {"standard_name": "latitude", "long_name": "latitude (WGS 84)",
              "units": "degrees_north"}))
    for v in ("kd", "height", "period_ratio", "valid"):
        if v in ds:
            ds[v].attrs["grid_mapping"] = "crs"
    return ds


def notices_variables(notes):
    """Dataset variables (dimension ``notice``) holding a list of notices.

    Parameters
    ----------
    notes : sequence of harbor.cautions.Notice or str

    Returns
    -------
    dict
        ``notice_code``, ``notice_text``, ``notice_sea``, ``notice_point``,
        ``notice_level``, each a tuple ``(("notice",), values)`` of strings ("" for
        none).
    """
    notes = [as_notice(n) for n in notes]

    def col(get):
        return (("notice",), np.array([get(n) or "" for n in notes], dtype=object))

    return dict(notice_code=col(lambda n: n.code), notice_text=col(lambda n: n.text),
                notice_sea=col(lambda n: n.sea), notice_point=col(lambda n: n.point),
                notice_level=col(lambda n: n.level))


def notices(ds, sea=None, level=None):
    """The validity warnings and notes of a result, as :class:`harbor.cautions.Notice`.

    Parameters
    ----------
    ds : xarray.Dataset
        A result of :func:`solve` (or a file written from one and read back).
    sea : str, optional
        Keep those that concern this sea state or every sea state.
    level : {"warning", "note"}, optional
        Keep only this level.

    Returns
    -------
    list of harbor.cautions.Notice
        In the order they were raised, each sentence once per sea state.
    """
    if "notice_text" not in ds:
        text = str(ds.attrs.get("warnings", "") or "")
        return [Notice("general", t) for t in text.split("\n") if t.strip()]
    out = []
    for code, text, s, p, lev in zip(*(ds[f"notice_{k}"].values.tolist() for k in
                                        ("code", "text", "sea", "point", "level"))):
        n = Notice(code, text, sea=s, point=p, level=lev)
        if sea is not None and n.sea not in (None, sea):
            continue
        if level is not None and n.level != level:
            continue
        out.append(n)
    return out


def points_table(scenario, at=None, sea=None, method="auto"):
    """Values at points, one record per sea state and point (what ``harbor points``
    prints), with the method and the warnings.

    Parameters
    ----------
    scenario : harbor.study.scenario.Scenario
    at : sequence of (name, x, y), optional
        Points in the scenario's CRS; when given they REPLACE the scenario's points.
        Checked as in :func:`given_points` (messages name ``--at``).
    sea : str, optional
        One sea state's name (unknown names raise the did-you-mean
        :class:`harbor.errors.InputError`).
    method : str
        Method override (see :func:`solve`).

    Returns
    -------
    rows : list of dict
        :func:`harbor.outputs.export.point_records`: sea, point, x, y (scenario CRS),
        kd, height, period_ratio, limit, ok, valid, flags, method.
    result : xarray.Dataset
        The solved result (points only), for its warnings and attributes.
    """
    from harbor.outputs.export import point_records

    if sea is not None:
        scenario.sea(sea, key="--sea")
    if at:
        given_points(scenario, at, key="--at")
    ds = solve(scenario, sea=sea, points=at or None, grid=False, method=method,
               replace_points=bool(at))
    return point_records(ds), ds


def check(scenario, method="auto", with_plan=False):
    """Validity warnings of a scenario, and the method of each sea state, before solving.

    Parameters
    ----------
    scenario : harbor.study.scenario.Scenario
    method : str
        As for :func:`solve`.
    with_plan : bool
        Also return the plan (:func:`plan`, for the grid and the points as ``harbor
        map`` solves them).

    Returns
    -------
    notices : list of harbor.cautions.Notice
        Each sentence once (the sea states it concerns are in its ``sea``, the first).
        The sea states the screening methods answer are solved at the points (seconds);
        those planned for the full-field method are not solved: a note gives their
        method, the reason and the estimated size and time.
    plan : list, only with ``with_plan``
    """
    pl = plan(scenario, method=method, grid=True)
    out = []
    site_notes_done = False
    for s, c in pl:
        if c.full_field:
            e = c.estimate or {}
            out.append(Notice("full-field-planned", f"sea '{s.name}': full-field method "
                              f"({c.reason}); estimated {e.get('unknowns', 0):,} unknowns, "
                              f"{e.get('memory', 0) / 2**30:.1f} GB and about "
                              f"{_duration(e.get('seconds', 0))} for "
                              f"{len(e.get('periods', ()))} period(s)", sea=s.name,
                              level="note"))
            continue
        one = dataclasses.replace(scenario, seas=(s,))
        m = "screening" if c.method == "auto" else c.method
        ds = solve(one, grid=False, method=m)
        for n in notices(ds):
            if n.sea is None and site_notes_done:
                continue
            out.append(n)
        site_notes_done = True
        if c.needed:
            out.append(Notice("full-field-too-large", f"sea '{s.name}': {c.reason}",
                              sea=s.name))
    notes = list(dict.fromkeys(out))
    return (notes, pl) if with_plan else notes


def _duration(seconds):
    seconds = float(seconds)
    if seconds < 90:
        return f"{max(seconds, 1):.0f} s"
    if seconds < 5400:
        return f"{seconds / 60:.0f} min"
    return f"{seconds / 3600:.1f} h"
