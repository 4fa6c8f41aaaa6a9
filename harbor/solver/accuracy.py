"""Where the general-layout method is accurate, and the full-field check of a scenario.

Two things, both following from the measurements of docs/accuracy.md sect. 3 (the
general method -- geometric optics plus each lit head's diffracted wave -- against an
independent finite-element solution of the same problem):

* :func:`accuracy_warnings` flags the layouts that fall in the bad part of that table
  (the general method off by more than about 0.05 in K' over much of the lee);
* :func:`field_method_solve` runs the finite-element solution
  (:func:`harbor.solver.field.solve_field`) for one regular sea of a scenario, so that a
  screening result can be checked on a small harbour.
"""

from __future__ import annotations

import numpy as np
import shapely

from harbor.errors import InputError
from harbor.solver.field import solve_field

__all__ = ["accuracy_warnings", "field_method_solve", "field_method_notes",
           "MAX_FIELD_WAVELENGTHS"]

#: Largest side of the field method's region, in wavelengths. A square of this side (plus
#: the margin and the absorbing layer) is about a million unknowns at 10 edges per
#: wavelength: a few GB and a few minutes for the sparse LU on this class of machine.
MAX_FIELD_WAVELENGTHS = 40.0


# ---------------------------------------------------------------------------------------
# The field method for a scenario
# ---------------------------------------------------------------------------------------

def _sea_of(scenario, sea):
    if isinstance(sea, str):
        try:
            return scenario.sea(sea)
        except KeyError:
            names = ", ".join(f"'{s.name}'" for s in scenario.seas) or "none"
            raise InputError(f"no sea state called '{sea}' (the file has {names})",
                             file=scenario.path or None, key="sea") from None
    return sea


def _rooted_ends(arm):
    p = np.asarray(arm.line, float)
    out = []
    if arm.rooted_start:
        out.append((0, p[0], p[0] - p[1]))
    if arm.rooted_end:
        out.append((len(p) - 1, p[-1], p[-1] - p[-2]))
    return out


def _insert_vertex(line, q, scale):
    """``line`` with the point ``q`` (on it) made a vertex; returns (line, q used)."""
    d = np.hypot(line[:, 0] - q[0], line[:, 1] - q[1])
    if d.min() <= 1e-9 * scale:
        return line, line[int(np.argmin(d))].copy()
    seg = shapely.LineString(line)
    s = seg.project(shapely.Point(q))
    cum = np.concatenate([[0.0], np.cumsum(np.hypot(*np.diff(line, axis=0).T))])
    i = int(np.clip(np.searchsorted(cum, s), 1, len(line) - 1))
    return np.insert(line, i, q, axis=0), q


def _field_barriers(layout, h):
    """Barrier polylines for the finite-element solution, and the arms whose rooted
    ends are on neither modelled land nor another arm (those ends diffract there).

    A rooted end within half a mesh edge of a land polygon is pushed half a mesh edge
    into the land along its end segment, so that the arm crosses the land's edge and the
    mesher joins the two (the stub inside the land is masked with it). A rooted end on
    another arm is moved onto that arm, which gets a vertex there, so that the two meet
    in one mesh node instead of leaving a sliver of water between them.
    """
    land = layout.land_union()
    lines = [np.asarray(a.line, float).copy() for a in layout.arms]
    scale = max(float(np.ptp(np.concatenate(lines), axis=0).max()), h)
    loose = []
    for k, arm in enumerate(layout.arms):
        for i, end, out in _rooted_ends(arm):
            dist = float(land.distance(shapely.Point(end))) if not land.is_empty else np.inf
            if dist <= 0.5 * h:
                lines[k][i] = end + (dist + 0.5 * h) * out / np.hypot(*out)
                continue
            best = None
            for j in range(len(lines)):
                if j == k:
                    continue
                other = shapely.LineString(lines[j])
                dj = float(other.distance(shapely.Point(end)))
                if dj <= 0.5 * h and (best is None or dj < best[0]):
                    best = (dj, j, other)
            if best is None:
                loose.append(arm.name)
                continue
            _, j, other = best
            q = np.asarray(other.interpolate(other.project(shapely.Point(end))).coords[0])
            lines[j], q = _insert_vertex(lines[j], q, scale)
            lines[k][i] = q
    for poly in layout.lands:
        for g in shapely.get_parts(poly.outline):
            for ring in [g.exterior, *g.interiors]:
                lines.append(np.asarray(ring.coords, float))
    return lines, sorted(set(loose))


def _region(layout, px, py, wavelength):
    """The rectangle solved: the points, every free head and every bend, plus a quarter
    wavelength. A rooted end outside it runs into the absorbing layer, so a long arm acts
    as one running on to the shore."""
    pts = [np.column_stack([px, py])]
    for arm in layout.arms:
        p = np.asarray(arm.line, float)
        keep = np.ones(len(p), bool)
        keep[0] = not arm.rooted_start
        keep[-1] = not arm.rooted_end
        pts.append(p[keep])
    allp = np.concatenate(pts)
    lo = allp.min(axis=0)
    hi = allp.max(axis=0)
    pad = 0.25 * wavelength
    return (float(lo[0] - pad), float(lo[1] - pad), float(hi[0] + pad), float(hi[1] + pad))


def field_method_notes(scenario, sea=None, points_per_wavelength=10.0):
    """How the field method's problem differs from the screening methods' (for outputs).

    Parameters
    ----------
    scenario : harbor.study.scenario.Scenario
    sea : harbor.study.scenario.Sea or str, optional
        Unused except to name the wavelength; default the first regular sea.
    points_per_wavelength : float, optional
        Mesh edges per wavelength, as given to :func:`field_method_solve`.

    Returns
    -------
    list of str
        One sentence each: land edges are reflecting walls; arms declared rooted but on
        neither modelled land nor another arm diffract at that end.

    Notes
    -----
    Pure geometry apart from the mesh edge used to decide whether a rooted end touches
    land (L / points_per_wavelength, L from ``sea``).
    """
    from harbor.waves.dispersion import wavelength as _wavelength

    site = scenario.site
    if sea is None:
        regular = [s for s in scenario.seas if s.kind == "regular"]
        if not regular:
            return []
        sea = regular[0]
    sea = _sea_of(scenario, sea)
    L = float(_wavelength(sea.period, site.depth, site.g))
    _, loose = _field_barriers(scenario.layout, L / float(points_per_wavelength))
    out = []
    if scenario.layout.lands:
        out.append("field method: land edges are fully reflecting walls (the screening "
                   "methods neglect reflection from land), so a closed basin can show "
                   "standing waves the screening maps do not; land and rooted arms that "
                   "run out of the solved area towards the waves act as if cut off at "
                   "its edge")
    for name in loose:
        out.append(f"field method: arm '{name}' has an end declared rooted but on neither "
                   f"modelled land nor another arm; the field method lets that end "
                   f"diffract as a free head")
    return out


def field_method_solve(scenario, sea, px, py, points_per_wavelength=10.0):
    """Full-field finite-element solution for one regular sea of a scenario at points.

    Parameters
    ----------
    scenario : harbor.study.scenario.Scenario
        From :func:`harbor.load_scenario`; its arms and land in the work frame (m).
    sea : harbor.study.scenario.Sea or str
        A regular sea state (or its name).
    px, py : array_like
        Points (m, work frame), broadcast together.
    points_per_wavelength : float, optional
        Mesh edges per wavelength (default 10: K' to about 0.01, docs/accuracy.md).

    Returns
    -------
    numpy.ndarray of complex
        Surface elevation normalised by the incident amplitude (incident phase zero at
        the work-frame origin, time factor exp(-i w t)), shape of the broadcast points;
        NaN on land. K' is its modulus.

    Raises
    ------
    InputError
        For a random sea (the field method solves one regular sea at a time), or when
        the points, heads and bends span more than :data:`MAX_FIELD_WAVELENGTHS`
        wavelengths in x or y.

    Notes
    -----
    The Helmholtz equation is solved by :func:`harbor.solver.field.solve_field` (P2
    finite elements, perfectly matched layer, sparse LU) over the bounding box of the
    points, the free heads and the bends of the arms plus a quarter wavelength (rooted
    ends may lie outside it: the arm then runs on into the absorbing layer), with L from the linear dispersion
    relation w^2 = g k tanh(k h) at the scenario's depth and the direction of travel
    from :meth:`harbor.geometry.site.Site.travel_angle`. Every arm is a thin, rigid,
    fully reflecting barrier; every land polygon's edges are such barriers too
    (reflecting, unlike the screening methods, which neglect reflection from land), and
    points on land are masked. An arm end declared rooted and lying on land is joined to
    the land's edge; one declared rooted away from modelled land diffracts in this
    method (see :func:`field_method_notes`). Land or an arm that runs out of the solved
    area towards the waves acts as if cut off at its edge (docs/accuracy.md sect. 2).

    References
    ----------
    Berenger, J.-P. (1994). A perfectly matched layer for the absorption of
    electromagnetic waves. Journal of Computational Physics 114(2), 185-200.

    Ihlenburg, F. (1998). Finite Element Analysis of Acoustic Scattering. Applied
    Mathematical Sciences 132, Springer, New York.
    """
    from harbor.waves.dispersion import wavelength as _wavelength

    sea = _sea_of(scenario, sea)
    file = scenario.path or None
    if sea.kind != "regular":
        raise InputError(f"the field method solves regular seas only; sea '{sea.name}' is "
                         f"'{sea.kind}' (use the screening methods for random seas)",
                         file=file, where=f"[[sea]] '{sea.name}'", key="kind")
    site = scenario.site
    L = float(_wavelength(sea.period, site.depth, site.g))
    alpha = float(np.degrees(site.travel_angle(sea.from_deg)))
    px, py = np.broadcast_arrays(np.asarray(px, float), np.asarray(py, float))
    shape = px.shape
    x, y = px.ravel(), py.ravel()
    if x.size == 0:
        return np.zeros(shape, complex)
    if not (np.all(np.isfinite(x)) and np.all(np.isfinite(y))):
        raise InputError("points must be finite coordinates in m", file=file, key="x, y")
    if not scenario.layout.arms:
        raise InputError("the field method needs at least one arm", file=file, key="arm")
    region = _region(scenario.layout, x, y, L)
    w, hgt = region[2] - region[0], region[3] - region[1]
    if max(w, hgt) > MAX_FIELD_WAVELENGTHS * L:
        raise InputError(
            f"the field method is limited to {MAX_FIELD_WAVELENGTHS:g} x "
            f"{MAX_FIELD_WAVELENGTHS:g} wavelengths; the points, heads and bends span "
            f"{w:.0f} m x {hgt:.0f} m = {w / L:.1f} x {hgt / L:.1f} wavelengths "
            f"(L = {L:.1f} m at T = {sea.period:g} s, depth {site.depth:g} m): narrow the "
            f"grid bounds or ask for fewer points", file=file, where=f"[[sea]] '{sea.name}'",
            key="period")
    barriers, _ = _field_barriers(scenario.layout, L / float(points_per_wavelength))
    sol = solve_field(barriers, L, alpha, region, points_per_wavelength=points_per_wavelength)
    u = sol.at(x, y)
    dry = scenario.layout.in_land(x, y)
    u[dry] = np.nan
    return u.reshape(shape)
