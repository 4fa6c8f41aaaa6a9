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
from harbor.cautions import REFLECTION_NOTE, caution_text
from harbor.geometry.visibility import distance_to_arms, inside_land
from harbor.errors import InputError
from harbor.solver.accuracy import accuracy_warnings
from harbor.solver.layout import METHOD_GENERAL, layout_field, layout_warnings
from harbor.solver.random import random_sea_field
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


def solve(scenario, sea=None, points=None, grid=True, method="auto", progress=None):
    """Solve every sea state (or one) of a scenario over its grid and at its points.

    Parameters
    ----------
    scenario : harbor.study.scenario.Scenario
        From :func:`harbor.load_scenario`.
    sea : str, optional
        Name of one sea state; default all.
    points : sequence of (name, x, y), optional
        Extra points in the scenario's CRS (x first: easting or longitude); default the
        scenario's named points only.
    grid : bool
        Compute the grid (False: points only, much faster).
    method : {"auto", "general", "superposition", "exact", "field"}
        Force a method (see :func:`harbor.solver.layout.layout_field`); ``"field"`` runs
        the finite-element solution (regular seas, small harbours) to check a screening
        result (:func:`harbor.solver.accuracy.field_method_solve`).
    progress : callable, optional
        ``progress(sea_name, done, total)``.

    Returns
    -------
    xarray.Dataset
        dims ``sea``, ``y``, ``x``, ``point``; variables ``kd`` (K', -), ``height`` (m),
        ``period_ratio`` (-, NaN for regular seas) on (sea, y, x), NaN on land and arms;
        ``point_x``, ``point_y`` (m, work frame), ``point_limit`` (m, NaN if none),
        ``point_kd``, ``point_height``, ``point_period_ratio`` (sea, point); per sea
        ``sea_kind``, ``sea_height``, ``sea_period``, ``sea_from`` (deg true),
        ``sea_spreading``, ``sea_method``, ``sea_wavelength`` (m), ``sea_reaching`` (share
        of energy reaching the layout). Attributes: ``title``, ``scenario``, ``crs``,
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
    if points:
        for name, x, y in points:
            wx, wy = site.to_work(np.array([x]), np.array([y]))
            pts.append((name, float(wx[0]), float(wy[0]), None))
    pnames = [p[0] for p in pts]
    ppx = np.array([p[1] for p in pts], float)
    ppy = np.array([p[2] for p in pts], float)
    plim = np.array([np.nan if p[3] is None else p[3] for p in pts], float)

    if grid and scenario.grid is not None:
        gx, gy = grid_coordinates(scenario.grid)
    else:
        gx, gy = np.zeros(0), np.zeros(0)
    X, Y = np.meshgrid(gx, gy)
    dry = inside_land(X, Y, scenario.layout) if X.size else np.zeros(X.shape, bool)
    if X.size:
        h = scenario.grid.spacing
        dry |= distance_to_arms(X, Y, scenario.layout) < 1e-6 * max(h, 1.0)

    ns, ny, nx, npnt = len(seas), gy.size, gx.size, len(pnames)
    kd = np.full((ns, ny, nx), np.nan)
    ratio = np.full((ns, ny, nx), np.nan)
    pkd = np.full((ns, npnt), np.nan)
    pratio = np.full((ns, npnt), np.nan)
    methods, wavelengths, reaching = [], [], []
    warnings: list[str] = []
    wet = ~dry
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
        warnings.append(note)
    for i, s in enumerate(seas):
        cb = None
        if progress is not None:
            cb = (lambda done, total, _n=s.name: progress(_n, done, total))
        k, r, mname, reach = solve_sea(ground, s, allx, ally, method=method, progress=cb)
        nw = int(wet.sum())
        kd[i][wet] = k[:nw]
        ratio[i][wet] = r[:nw]
        pkd[i] = k[nw:]
        pratio[i] = r[nw:]
        methods.append(mname)
        L = _sea_wavelength(s, site)
        wavelengths.append(L)
        reaching.append(reach)
        more = layout_warnings(ground.layout, L, gpts)
        if method == "field":
            from harbor.solver.accuracy import field_method_notes

            more += field_method_notes(ground, s)
        else:
            alpha = float(ground.site.travel_angle(s.from_deg))
            more += accuracy_warnings(ground.layout, L, directions=[(f"sea '{s.name}'", alpha)])
        for w in more:
            if w not in warnings:
                warnings.append(w)
        if reach < 0.5:
            warnings.append(f"sea '{s.name}' (from {s.from_deg:g} deg) mostly does not reach "
                            f"the harbour from open water ({100 * reach:.0f} % of its energy "
                            f"does): its heights inside are small or zero")
        hb = BREAKING_RATIO * site.depth
        over_pts = [pnames[j] for j in range(npnt) if pkd[i, j] * s.height > hb]
        n_over = int(np.sum(kd[i] * s.height > hb))
        if over_pts or n_over:
            where = []
            if over_pts:
                where.append("points " + ", ".join(f"'{n}'" for n in over_pts))
            if n_over:
                where.append(f"{n_over} grid points")
            warnings.append(f"sea '{s.name}': heights above the depth-limited breaking height "
                            f"0.78 h = {hb:.2f} m at {' and '.join(where)} (flagged, not "
                            f"changed: waves there would break)")
    warnings.append(REFLECTION_NOTE)

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
    ds["x"].attrs.update(units="m", long_name="easting (work frame)")
    ds["y"].attrs.update(units="m", long_name="northing (work frame)")
    return ds


def check(scenario):
    """Validity warnings of a scenario without solving the grid.

    Parameters
    ----------
    scenario : harbor.study.scenario.Scenario

    Returns
    -------
    list of str
    """
    ds = solve(scenario, grid=False)
    return [w for w in ds.attrs["warnings"].split("\n") if w]
