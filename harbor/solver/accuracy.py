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

from harbor.cautions import Notice
from harbor.errors import InputError
from harbor.solver.layout import edge_on_arms

__all__ = ["accuracy_warnings", "invalid_mask", "field_method_solve", "field_method_notes",
           "MAX_FIELD_WAVELENGTHS"]

#: Largest side of the field method's region, in wavelengths. A square of this side (plus
#: the margin and the absorbing layer) is about a million unknowns at 10 edges per
#: wavelength: measured 70 s and 5.4 GB peak on a 2-core machine (24 L: 17 s, 2.2 GB;
#: docs/accuracy.md sect. 4).
MAX_FIELD_WAVELENGTHS = 40.0


# ---------------------------------------------------------------------------------------
# Validity rules of the general-layout method (docs/accuracy.md sect. 3)
# ---------------------------------------------------------------------------------------
#
# "Off" below means |K'_general - K'_full-field| > 0.05 over a substantial part of the lee
# (a quarter or more of it, or a median above about 0.03) for at least one measured
# approach direction. Every threshold is the edge of the measured good region; nothing is
# extrapolated beyond the layouts of the table.

#: A detached breakwater (an arm with two free heads) shorter than this many wavelengths
#: is off whatever the approach (1 L: 16-42 % of the lee off, median 0.02-0.04; 2 L at
#: 60-90 deg: 9-11 %, median 0.015-0.020).
SHORT_ARM_WAVELENGTHS = 2.0
#: Arms with two free heads at least this long stay good even for waves at 30 deg to
#: them (8 L: 5 % off, median 0.018; 4 L: 19 %, median 0.031; 2 L: 76 %).
OBLIQUE_ARM_WAVELENGTHS = 8.0
#: Waves within this angle (degrees) of the end segment of an arm whose head works with
#: another head (a shorter detached breakwater, an entrance head): 19-76 % of the lee off
#: at 30 deg, against 1-25 % at 60-90 deg, for every such layout of the table.
OBLIQUE_DEG = 30.0
#: Waves within this angle (degrees) of parallel to an arm segment: grazing incidence,
#: K' off by up to 0.6-2.0, mostly too high, beyond the head (the rows marked (g)).
GRAZING_DEG = 1.0
#: Non-collinear entrances: heads misaligned by at least this (degrees: the largest angle
#: between an end segment and the line through the two heads) ...
MISALIGNED_DEG = 30.0
#: ... and at most this many wavelengths wide are off even for waves near normal to
#: them (offset heads B = 1 L, arms turned 30 deg at B = 1 and 2 L: 22-34 % of the lee
#: off at 60-120 deg); less misaligned or wider ones measured 1-18 %.
MISALIGNED_NARROW_WAVELENGTHS = 2.0
#: Only pairs of free heads closer than this (wavelengths) are treated as an entrance.
ENTRANCE_WAVELENGTHS = 5.0
#: Overlapping heads with a channel up to this many wavelengths wide (measured 1, 2 and
#: 4 L, all off: the waves trapped between the arms are missed, up to 1-2 in K').
OVERLAP_CHANNEL_WAVELENGTHS = 4.0
#: A bend of an arm turning by at least this (degrees) ...
BEND_DEG = 30.0
#: ... within this many wavelengths (along the arm) of a free head is off (measured with
#: the wedge treatment at 90 deg: bends of 30-60 deg 1-6 L from the head 4-25 % of the
#: lee off, against 19-65 % before; gentler bends 0 %; docs/accuracy.md sect. 3a).
BEND_NEAR_HEAD_WAVELENGTHS = 6.0
#: Angles within this of a threshold (degrees) count as at the threshold: the layouts of
#: the table sit exactly on them.
_ANGLE_SLACK = 0.5


def _unit(v):
    return v / np.hypot(*v)


def _cross(u, v):
    return float(u[0] * v[1] - u[1] * v[0])


def _arm_length(arm):
    p = np.asarray(arm.line, float)
    return float(np.sum(np.hypot(*np.diff(p, axis=0).T)))


def _line_angle_deg(u, v):
    """Angle (0-90 degrees) between the lines along unit vectors u and v."""
    c = abs(float(np.dot(u, v)))
    return float(np.degrees(np.arccos(np.clip(c, 0.0, 1.0))))


def _directions(directions):
    out = []
    for item in directions or ():
        if isinstance(item, (tuple, list)):
            label, a = item
            out.append((f"{label}", float(a)))
        else:
            a = float(item)
            out.append((f"travelling towards {np.degrees(a) % 360:.0f} deg (work frame)", a))
    return out


def _entrance_pairs(layout, L):
    """Pairs of free heads on different arms closer than ENTRANCE_WAVELENGTHS."""
    heads = [(i, tip, inward) for i, arm in enumerate(layout.arms)
             for tip, inward in arm.heads()]
    out = []
    for a in range(len(heads)):
        for b in range(a + 1, len(heads)):
            i, hi, vi = heads[a]
            j, hj, vj = heads[b]
            if i == j:
                continue
            width = float(np.hypot(*(hj - hi)))
            if 0 < width < ENTRANCE_WAVELENGTHS * L:
                out.append((i, hi, vi, j, hj, vj, width))
    return out


def _ix(arms, arm):
    return next(k for k, a in enumerate(arms) if a is arm)


def accuracy_warnings(layout, wavelength, directions=()):
    """Warnings where a layout lies in the measured bad part of the general method.

    Parameters
    ----------
    layout : harbor.geometry.layout.Layout
        Arms (and land) in the work frame (m).
    wavelength : float
        Wavelength L (m).
    directions : sequence, optional
        Directions of wave travel (rad, math angle in the work frame), or
        ``(label, angle)`` pairs such as ``("sea 'storm SW'", 0.79)``. The rules on
        oblique and grazing waves are checked only for the directions given.

    Returns
    -------
    list of harbor.cautions.Notice
        One sentence per finding, naming the arm(s) and the error measured for that
        class of layout against the full-field solution; empty when the layout is in
        the measured good region.

    Notes
    -----
    Pure geometry and the wavelength. The thresholds are the module constants, each the
    edge of the good region of the table of docs/accuracy.md sect. 3 (general method
    against :func:`harbor.solver.field.solve_field`, |K'| differences over the lee):

    * an arm with two free heads (a detached breakwater) shorter than
      ``SHORT_ARM_WAVELENGTHS`` L;
    * two free heads on different arms that overlap (each lies alongside the other's
      end segment) with a channel up to ``OVERLAP_CHANNEL_WAVELENGTHS`` L wide;
    * an entrance (free heads of two arms closer than ``ENTRANCE_WAVELENGTHS`` L) whose
      heads are misaligned by ``MISALIGNED_DEG`` or more (the largest angle between an
      end segment and the line through the heads) and at most
      ``MISALIGNED_NARROW_WAVELENGTHS`` L wide;
    * a bend turning by ``BEND_DEG`` or more within ``BEND_NEAR_HEAD_WAVELENGTHS`` L
      (along the arm) of a free head;
    * for each direction given: waves within ``OBLIQUE_DEG`` of the end segment of an
      arm whose head works with another head (a detached breakwater shorter than
      ``OBLIQUE_ARM_WAVELENGTHS`` L, or a head of an entrance), and waves within
      ``GRAZING_DEG`` of parallel to a segment of an arm with a free head.

    Angles within 0.5 degrees of a threshold count as at it. For a random sea, pass the
    mean direction: the rules were measured with regular waves.

    The basin of a classic entrance (:func:`harbor.solver.layout.classic_entrance`) is
    computed with the gap solution, not the general method, so such a layout gets no
    warning here.

    References
    ----------
    Keller, J. B. (1962). Geometrical theory of diffraction. Journal of the Optical
    Society of America 52(2), 116-130.

    Penney, W. G. and Price, A. T. (1952). The diffraction theory of sea waves and the
    shelter afforded by breakwaters. Philosophical Transactions of the Royal Society of
    London A 244(882), 236-253.
    """
    from harbor.solver.layout import active_layout, classic_entrance

    layout, _ = active_layout(layout)       # arms wholly on land do nothing
    L = float(wavelength)
    if not (np.isfinite(L) and L > 0):
        raise InputError(f"wavelength must be a positive length in m, got {wavelength!r}",
                         key="wavelength")
    if not layout.arms or classic_entrance(layout, L) is not None:
        return []
    return [n for n, _ in _findings(layout, wavelength, directions)]


def _findings(layout, wavelength, directions=()):
    """The notices of :func:`accuracy_warnings`, each with the indices of the arms (of
    :func:`harbor.solver.layout.active_layout`) it concerns."""
    from harbor.solver.layout import active_layout, classic_entrance

    layout, _ = active_layout(layout)
    L = float(wavelength)
    if not layout.arms or classic_entrance(layout, L) is not None:
        return []
    ref = "docs/accuracy.md sect. 3"
    out = []
    where = []

    def add(arm_indices, notice):
        out.append(notice)
        where.append(set(arm_indices))

    arms = layout.arms
    n_free = [(not a.rooted_start) + (not a.rooted_end) for a in arms]

    # detached breakwaters
    for arm, nf in zip(arms, n_free):
        length = _arm_length(arm)
        if nf == 2 and length < SHORT_ARM_WAVELENGTHS * L:
            add({_ix(arms, arm)}, Notice(
                "detached-short", f"arm '{arm.name}' is a detached breakwater {length:.0f} m long "
                f"({length / L:.1f} L, under {SHORT_ARM_WAVELENGTHS:g} L): the general method "
                f"was measured off by more than 0.05 in K' over 16-42 % of the lee of a "
                f"1 L breakwater (median 0.02-0.04, up to 0.3 beside the heads; {ref})"))

    # pairs of heads: overlapping heads and narrow misaligned entrances
    pairs = _entrance_pairs(layout, L)
    for i, hi, vi, j, hj, vj, width in pairs:
        names = f"'{arms[i].name}' and '{arms[j].name}'"
        overlap = (np.dot(hj - hi, vi) > 0) and (np.dot(hi - hj, vj) > 0)
        if overlap:
            gap = min(abs(_cross(hj - hi, vi)), abs(_cross(hi - hj, vj)))
            if gap <= OVERLAP_CHANNEL_WAVELENGTHS * L * (1 + 1e-9):
                add({i, j}, Notice(
                    "overlapping-heads", f"the heads of {names} overlap, with a channel {gap:.0f} m "
                    f"({gap / L:.1f} L) wide between them: the general method misses the "
                    f"waves trapped between the arms and was measured off by more than 0.05 "
                    f"in K' over 17-92 % of such a lee (median 0.01-0.39, up to 0.6-1.9; "
                    f"{ref})"))
            continue
        axis = (hj - hi) / width
        mis = max(np.degrees(np.arccos(np.clip(-np.dot(vi, axis), -1, 1))),
                  np.degrees(np.arccos(np.clip(np.dot(vj, axis), -1, 1))))
        if (mis >= MISALIGNED_DEG - _ANGLE_SLACK
                and width <= MISALIGNED_NARROW_WAVELENGTHS * L * (1 + 1e-9)):
            add({i, j}, Notice(
                "misaligned-entrance", f"the entrance between {names} is {width:.0f} m ({width / L:.1f} L) wide "
                f"with heads misaligned by {mis:.0f} deg: the general method was measured "
                f"off by more than 0.05 in K' over 22-34 % of such a lee even for waves "
                f"near normal to it (median 0.02-0.035, up to 0.2; {ref})"))

    # bends near a free head
    for arm in arms:
        p = np.asarray(arm.line, float)
        if len(p) < 3:
            continue
        seg = np.diff(p, axis=0)
        seglen = np.hypot(*seg.T)
        cum = np.concatenate([[0.0], np.cumsum(seglen)])
        for k in range(1, len(p) - 1):
            turn = float(np.degrees(np.arccos(np.clip(
                np.dot(seg[k - 1], seg[k]) / (seglen[k - 1] * seglen[k]), -1, 1))))
            if turn < BEND_DEG - _ANGLE_SLACK:
                continue
            along = []
            if not arm.rooted_start:
                along.append(cum[k])
            if not arm.rooted_end:
                along.append(cum[-1] - cum[k])
            if along and min(along) <= BEND_NEAR_HEAD_WAVELENGTHS * L:
                add({_ix(arms, arm)}, Notice(
                    "bend-near-head", f"arm '{arm.name}' bends by {turn:.0f} deg {min(along):.0f} m "
                    f"({min(along) / L:.1f} L) from its head: the general method treats "
                    f"the bend as a wedge, with the head's wave diffracted again at the "
                    f"bend, and was measured off by more than 0.05 in K' over 4-25 % of "
                    f"the lee of such a dog-leg at 90 deg (up to 0.1-0.14 near the bend; "
                    f"{ref})"))

    # direction-dependent rules
    partners = set()
    for i, hi, vi, j, hj, vj, width in pairs:
        partners.update(((i, tuple(hi)), (j, tuple(hj))))
    for label, a in _directions(directions):
        d = np.array([np.cos(a), np.sin(a)])
        edge_on = edge_on_arms(layout, d, L)
        for i, (arm, nf) in enumerate(zip(arms, n_free)):
            if nf == 0 or i in edge_on:
                continue          # edge-on arms are left out by the method, which is right
            p = np.asarray(arm.line, float)
            seg = np.diff(p, axis=0)
            graze = [k for k in range(len(seg))
                     if _line_angle_deg(_unit(seg[k]), d) < GRAZING_DEG]
            if graze:
                add({i}, Notice(
                    "grazing", f"waves of {label} run within {GRAZING_DEG:g} deg of parallel to arm "
                    f"'{arm.name}': at such grazing incidence the general method was "
                    f"measured up to 0.6-2.0 off in K' (mostly too high) beyond the head "
                    f"({ref})"))
                continue
            short = nf == 2 and _arm_length(arm) < OBLIQUE_ARM_WAVELENGTHS * L
            for tip, inward in arm.heads():
                works = short or (i, tuple(tip)) in partners
                ang = _line_angle_deg(inward, d)
                if works and ang <= OBLIQUE_DEG + _ANGLE_SLACK:
                    add({i}, Notice(
                        "oblique-head", f"waves of {label} run {ang:.0f} deg to the line of arm "
                        f"'{arm.name}' at its head, whose diffraction works with another "
                        f"head's: within {OBLIQUE_DEG:g} deg the general method was "
                        f"measured off by more than 0.05 in K' over 19-76 % of the lee "
                        f"(median 0.03-0.07, up to 0.15-0.4; {ref})"))
                    break
    return list(zip(out, where))


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
        Gives the wavelength, hence the mesh edge that decides whether a rooted end
        touches land; default the first regular sea.
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

    References
    ----------
    docs/accuracy.md sect. 2 (arms and land running out of the solved area) and sect. 4.
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
        out.append(Notice("field-land-walls", "field method: land edges are fully reflecting walls (the screening "
                   "methods neglect reflection from land), so a closed basin can show "
                   "standing waves the screening maps do not; land and rooted arms that "
                   "run out of the solved area towards the waves act as if cut off at "
                   "its edge", level="note"))
    for name in loose:
        out.append(Notice("field-loose-end", f"field method: arm '{name}' has an end declared rooted but on neither "
                   f"modelled land nor another arm; the field method lets that end "
                   f"diffract as a free head"))
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
    ends may lie outside it: the arm then runs on into the absorbing layer), with L from
    the linear dispersion relation w^2 = g k tanh(k h) at the scenario's depth and the
    direction of travel from :meth:`harbor.geometry.site.Site.travel_angle`. Every arm is
    a thin, rigid, fully reflecting barrier; every land polygon's edges are such barriers
    too (reflecting, unlike the screening methods, which neglect reflection from land),
    and points on land are masked. An arm end declared rooted and lying on land (or on
    another arm) is joined to it; one declared rooted on neither diffracts in this method
    (see :func:`field_method_notes`). Land or an arm that runs out of the solved area
    towards the waves acts as if cut off at its edge (docs/accuracy.md sect. 2). The
    mesh is built about the middle of the area and the incident phase there restored,
    u(x) = exp(i k d.o) u_local(x - o), because projected coordinates of millions of
    metres leave the triangulation too few significant digits.

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
    # Mesh about a local origin: projected coordinates of millions of metres leave too few
    # significant digits for the triangulation at a mesh edge of a few metres. Moving the
    # origin multiplies the whole solution by the incident phase there.
    o = np.array([0.5 * (region[0] + region[2]), 0.5 * (region[1] + region[3])])
    # imported here: the finite-element stack is only needed by --method field, and every
    # solve (harbor check included) imports this module for its validity rules
    from harbor.solver.field import solve_field

    sol = solve_field([b - o for b in barriers], L, alpha,
                      (region[0] - o[0], region[1] - o[1], region[2] - o[0], region[3] - o[1]),
                      points_per_wavelength=points_per_wavelength)
    k = 2.0 * np.pi / L
    a = np.radians(alpha)
    u = sol.at(x - o[0], y - o[1]) * np.exp(1j * k * (o[0] * np.cos(a) + o[1] * np.sin(a)))
    dry = scenario.layout.in_land(x, y)
    u[dry] = np.nan
    return u.reshape(shape)


#: Around the heads and bends of the arms a finding concerns, values within this many
#: wavelengths are outside the measured validity even where the incident wave reaches.
INVALID_NEAR_WAVELENGTHS = 1.0


def invalid_mask(layout, wavelength, direction, px, py, label=None):
    """Where the general method is outside its measured validity for one sea state.

    Parameters
    ----------
    layout : harbor.geometry.layout.Layout
    wavelength : float
        L (m).
    direction : float
        Direction of wave travel (rad, math angle in the work frame).
    px, py : numpy.ndarray
        Points (m, work frame), 1-D.
    label : str, optional
        How the notices name the sea state (e.g. ``"sea 'storm SW'"``).

    Returns
    -------
    mask : numpy.ndarray of bool
        True where a finding of :func:`accuracy_warnings` applies.
    notices : list of harbor.cautions.Notice
        The findings (the same as :func:`accuracy_warnings` for this direction).

    Notes
    -----
    The errors of the table (docs/accuracy.md sect. 3) were measured over the lee, and
    they come from the heads and bends whose interaction the method misses. So a finding
    marks the points that the diffracted waves of the arms it concerns reach -- in line
    of sight of one of their free heads or bends -- and that are in the geometric shadow
    of the layout (the incident wave does not reach them), plus every point within
    :data:`INVALID_NEAR_WAVELENGTHS` wavelength of those heads and bends. Points in open
    water that the incident wave reaches, away from them, keep their validity (there the
    incident and reflected waves dominate). Pure geometry.
    """
    from harbor.geometry.visibility import layout_segments, ray_blocked, segment_blocked
    from harbor.solver.layout import active_layout

    px = np.asarray(px, float)
    py = np.asarray(py, float)
    found = _findings(layout, wavelength,
                      [(label, float(direction)) if label else float(direction)])
    mask = np.zeros(px.shape, bool)
    if not found or px.size == 0:
        return mask, [n for n, _ in found]
    lay, _ = active_layout(layout)
    segments, _, open_ends = layout_segments(lay)
    d = np.array([np.cos(direction), np.sin(direction)])
    shadow = ray_blocked(px, py, -d, segments, open_ends=open_ends)
    arms = set().union(*[w for _, w in found])
    for i in arms:
        arm = lay.arms[i]
        p = np.asarray(arm.line, float)
        keep = np.ones(len(p), bool)
        keep[0] = not arm.rooted_start
        keep[-1] = not arm.rooted_end
        for v in p[keep]:
            near = np.hypot(px - v[0], py - v[1]) < INVALID_NEAR_WAVELENGTHS * wavelength
            seen = ~segment_blocked(px, py, v[0], v[1], segments)
            mask |= near | (shadow & seen)
    return mask, [n for n, _ in found]
