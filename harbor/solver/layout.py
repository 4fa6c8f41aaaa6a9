r"""The wave field of one regular (monochromatic, long-crested) sea over a whole layout.

Two methods (DESIGN.md sect. 4):

* the classic entrance -- two arms whose free heads face each other with collinear end
  segments, rooted on land or long compared with the wavelength -- uses
  :func:`harbor.solver.kernels.gap.gap` in the entrance's own frame, so that narrow
  entrances get the exact aperture solution;
* any other layout uses geometric optics of the whole layout (the incident wave where the
  up-wave ray meets no arm or land, first-order reflection from the seaward faces of the
  arms) plus, for every lit head, the diffracted wave of that head's own semi-infinite
  solution along its end segment, where the head is visible. For a collinear gap this
  reduces exactly to the Penney & Price superposition.

Coordinates are metres in the work frame; directions are math angles (rad, counter-
clockwise from +x) of the direction of wave travel.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from harbor.cautions import Notice
from harbor.geometry.entrance import basin_mask, nearest_heads
from harbor.geometry.layout import JOIN_TOLERANCE, Layout, wet_arms
from harbor.geometry.visibility import (diffracting_edges, layout_segments, ray_blocked,
                                        segment_blocked)
from harbor.solver.kernels.gap import AUTO_EXACT_BELOW, auto_method, gap
from harbor.solver.kernels.sommerfeld import sommerfeld_terms
from harbor.solver.kernels.wedge import wedge_diffracted

#: Arms whose far end is not rooted still count as "long" for the classic entrance when
#: their end segment is at least this many wavelengths long.
LONG_ARM_WAVELENGTHS = 3.0
#: Kept for compatibility: every bend now diffracts as a wedge (see :func:`general_field`);
#: before, only bends of at least this turn (degrees) had half-plane terms.
BEND_DIFFRACTION_DEG = 0.0
#: An arm whose width across the direction of travel is below this many wavelengths is
#: left out for that direction (seen edge-on, see :func:`edge_on_arms`).
EDGE_ON_WIDTH = 0.5
#: Waves closer than this to parallel with an arm's end segment (degrees) are grazing:
#: that head's local solution is evaluated a hair off parallel.
GRAZING_DEG = 0.01

METHOD_GAP_EXACT = ("exact aperture solution in the basin (classic entrance), "
                    "geometric optics + head diffraction outside")
METHOD_GAP_SUPERPOSITION = ("Penney & Price superposition in the basin (classic entrance), "
                            "geometric optics + head diffraction outside")
METHOD_GENERAL = "geometric optics + head diffraction (general layout)"


@dataclass
class FieldInfo:
    """What one regular solve did: the method used and the validity warnings."""

    method: str
    warnings: list = field(default_factory=list)
    lit_heads: int = 0


_WET = {}


def active_layout(layout):
    """The layout the methods solve: without the arms that lie wholly on land.

    Parameters
    ----------
    layout : harbor.geometry.layout.Layout

    Returns
    -------
    layout : harbor.geometry.layout.Layout
        ``layout`` itself when every arm has a part in the water.
    dry : list of str
        Names of the arms left out (:func:`harbor.geometry.layout.wet_arms`).
    """
    key = id(layout)
    hit = _WET.get(key)
    if hit is not None and hit[0] is layout:
        return hit[1], hit[2]
    wet, dry = wet_arms(layout)
    if len(_WET) > 16:
        _WET.clear()
    _WET[key] = (layout, wet, dry)
    return wet, dry


def classic_entrance(layout, wavelength):
    """The layout's classic entrance for this wavelength, or None.

    Parameters
    ----------
    layout : harbor.geometry.layout.Layout
    wavelength : float
        L (m).

    Returns
    -------
    harbor.geometry.entrance.Entrance or None
        Decided from the heads that form the entrance, not from the number of arms:
        the closest pair of free heads on different arms
        (:func:`harbor.geometry.entrance.nearest_heads`) of the arms that lie in the
        water (:func:`active_layout`), when each of the two arms has that one free head,
        the heads face each other with end segments collinear within 2 degrees, each arm
        is rooted at its far end or has an end segment of at least
        :data:`LONG_ARM_WAVELENGTHS` wavelengths, and every other arm in the water has
        no free head and no vertex inside the basin (a seawall elsewhere on the shore
        does not change the method). The arm indices of the result refer to
        :func:`active_layout`'s layout.
    """
    layout, _ = active_layout(layout)
    ent = nearest_heads(layout)
    if ent is None or not ent.collinear:
        return None
    for i in ent.arms:
        a = layout.arms[i]
        if (not a.rooted_start) + (not a.rooted_end) != 1:
            return None
    for rooted, length in zip(ent.rooted_far_ends, ent.end_lengths):
        if not rooted and length < LONG_ARM_WAVELENGTHS * wavelength:
            return None
    others = [a for i, a in enumerate(layout.arms) if i not in ent.arms]
    if others:
        if any(not (a.rooted_start and a.rooted_end) for a in others):
            return None
        pts = np.concatenate([np.asarray(a.line, float) for a in others]
                             + [0.5 * (np.asarray(a.line, float)[1:]
                                       + np.asarray(a.line, float)[:-1]) for a in others])
        if np.any(basin_mask(layout, ent, pts[:, 0], pts[:, 1])):
            return None
    return ent


def _local(px, py, origin, ex, ey):
    dx = px - origin[0]
    dy = py - origin[1]
    return dx * ex[0] + dy * ex[1], dx * ey[0] + dy * ey[1]


def entrance_frames(entrance, alphas):
    """The gap kernel's frame for each direction of travel through a classic entrance.

    Parameters
    ----------
    entrance : harbor.geometry.entrance.Entrance
    alphas : numpy.ndarray
        Directions of travel (rad, math angles in the work frame).

    Returns
    -------
    side : numpy.ndarray of float
        +1 or -1: the kernel's y axis is ``side`` times the left normal of the entrance
        axis, so that the waves arrive from the kernel's y < 0.
    local : numpy.ndarray
        Direction of travel in the kernel frame (degrees, 0-180).
    usable : numpy.ndarray of bool
        False for waves that travel out of the basin towards the sea, or within
        :data:`GRAZING_DEG` of the entrance line: the gap kernel does not apply to them.
    """
    e = entrance.axis
    n = np.array([-e[1], e[0]])
    d = np.stack([np.cos(alphas), np.sin(alphas)], axis=-1)
    across = d @ n
    side = np.where(across < 0, -1.0, 1.0)
    from_sea = side * float(np.dot(n, entrance.basin_normal)) >= 0
    local = np.degrees(np.arctan2(np.abs(across), d @ e))
    usable = from_sea & (local > GRAZING_DEG) & (local < 180 - GRAZING_DEG)
    return side, local, usable


def gap_field(entrance, px, py, wavelength, alpha, method="auto"):
    """Field of a classic entrance at world points, or None if the waves come from the basin.

    Parameters
    ----------
    entrance : harbor.geometry.entrance.Entrance
    px, py : numpy.ndarray
        Points (m, work frame).
    wavelength : float
        L (m).
    alpha : float
        Direction of travel (rad, math angle in the work frame).
    method : str
        Passed to :func:`harbor.solver.kernels.gap.gap`.

    Returns
    -------
    (numpy.ndarray of complex, str) or None
        The field (incident phase zero at the work-frame origin) and the gap method used.
    """
    side, local, usable = entrance_frames(entrance, np.array([alpha]))
    if not usable[0]:
        return None
    d = np.array([np.cos(alpha), np.sin(alpha)])
    e = entrance.axis
    n = side[0] * np.array([-e[1], e[0]])
    local_dir = float(local[0])
    x, y = _local(px, py, entrance.center, e, n)
    k = 2 * np.pi / wavelength
    phase0 = np.exp(1j * k * np.dot(d, entrance.center))
    if method == "auto":
        method = auto_method(wavelength, local_dir, entrance.width)
    return phase0 * gap(x, y, wavelength, local_dir, entrance.width, method=method), method


def entrance_blend(layout, entrance, px, py, wavelength, segments=None):
    r"""Weight of the classic entrance's gap solution on the sea side of the entrance.

    Parameters
    ----------
    layout : harbor.geometry.layout.Layout
    entrance : harbor.geometry.entrance.Entrance
        A classic entrance (:func:`classic_entrance`).
    px, py : numpy.ndarray
        Points (m, work frame) outside the basin.
    wavelength : float
        L (m).
    segments : tuple, optional
        Output of :func:`harbor.geometry.visibility.layout_segments`.

    Returns
    -------
    numpy.ndarray of float
        w in [0, 1]: the field there is ``w u_gap + (1 - w) u_general``.

    Notes
    -----
    The gap solution is continuous through the aperture (it solves both sides of the
    wall), the general method is not the same field, so a switch on the entrance line
    would leave a step (0.2-0.5 in K' on the demo). On the sea side, within
    :math:`\rho_1 = B/2 + \min(E, L)/4` of the entrance centre (E the shorter end
    segment) the gap solution is used, beyond :math:`\rho_2 = B/2 + \min(E, 2L)` the
    general method, and between them the smooth step
    :math:`w = s^2(3 - 2s)`, :math:`s = (\rho_2 - \rho)/(\rho_2 - \rho_1)`: the
    hand-over stays over the straight, collinear end segments where both describe the
    same wall, and the field is continuous everywhere. Points hidden from the entrance
    centre by an arm or land get w = 0.
    """
    from harbor.geometry.visibility import layout_segments, segment_blocked

    px = np.asarray(px, float)
    py = np.asarray(py, float)
    w = np.zeros(px.shape)
    if np.allclose(entrance.basin_normal, 0) or px.size == 0:
        return w
    c = entrance.center
    L = float(wavelength)
    half = 0.5 * entrance.width
    e = float(min(entrance.end_lengths))
    r1 = half + 0.25 * min(e, L)
    r2 = half + min(e, 2.0 * L)
    rho = np.hypot(px - c[0], py - c[1])
    side = (px - c[0]) * entrance.basin_normal[0] + (py - c[1]) * entrance.basin_normal[1]
    near = (rho < r2) & (side <= 0)
    if not np.any(near):
        return w
    if segments is None:
        segments = layout_segments(layout)
    idx = np.nonzero(near)[0]
    idx = idx[~segment_blocked(px[idx], py[idx], c[0], c[1], segments[0])]
    sgap = np.clip((r2 - rho[idx]) / (r2 - r1), 0.0, 1.0)
    w[idx] = sgap * sgap * (3.0 - 2.0 * sgap)
    return w


def edge_on_arms(layout, direction, wavelength):
    """Indices of the arms that the waves see (nearly) edge-on.

    Parameters
    ----------
    layout : harbor.geometry.layout.Layout
    direction : array_like, shape (2,)
        Unit vector of the direction of travel.
    wavelength : float
        L (m).

    Returns
    -------
    set of int
        Arms whose width projected across the direction of travel is below
        :data:`EDGE_ON_WIDTH` wavelengths.

    Notes
    -----
    A thin rigid arm seen edge-on scatters little, while the half-plane solution of its
    down-wave head assumes an arm reaching far up-wave and predicts a shadow and a
    doubled wave on either side of it: against the finite-element solution behind a
    detached breakwater of 2-4 L at 0.5-5 degrees the median error in K' was 0.24-0.30 with
    the half-plane terms and 0.004-0.04 with the arm left out (docs/accuracy.md).
    """
    n = np.array([-direction[1], direction[0]])
    out = set()
    for i, arm in enumerate(layout.arms):
        across = np.asarray(arm.line, float) @ n
        if across.max() - across.min() < EDGE_ON_WIDTH * wavelength:
            out.add(i)
    return out


def head_visibility(layout, px, py, segments=None):
    """For every diffracting edge (free heads and bends, as
    :func:`harbor.geometry.visibility.diffracting_edges`): where it is visible from.

    Parameters
    ----------
    layout : harbor.geometry.layout.Layout
    px, py : numpy.ndarray
        Points (m), 1-D.
    segments : tuple, optional
        Output of :func:`harbor.geometry.visibility.layout_segments`.

    Returns
    -------
    list of numpy.ndarray of bool
        Independent of the waves, so a random sea computes it once for all components.
    """
    if segments is None:
        segments = layout_segments(layout)
    return [~segment_blocked(px, py, v[0], v[1], segments[0])
            for v, _ in diffracting_edges(layout)]


_VISIBILITY: dict = {}


def cached_head_visibility(layout, px, py, segments=None):
    """:func:`head_visibility`, kept for the last four point sets and layouts.

    The sea states of one solve, and the frequency bands of a random sea whose
    components see an arm edge-on (solved without it), ask again for the same points and
    layout; visibility does not depend on the waves. The arrays returned are read-only.
    """
    import hashlib

    if segments is None:
        segments = layout_segments(layout)
    px = np.ascontiguousarray(px, float)
    py = np.ascontiguousarray(py, float)
    h = hashlib.sha1(px.tobytes() + b"|" + py.tobytes())
    h.update(np.ascontiguousarray(segments[0], float).tobytes())
    h.update(np.ascontiguousarray(segments[2], bool).tobytes())
    for tip, dirs in diffracting_edges(layout):
        h.update(np.asarray(tip, float).tobytes())
        for d in dirs:
            h.update(np.asarray(d, float).tobytes())
    key = h.hexdigest()
    hit = _VISIBILITY.get(key)
    if hit is None:
        hit = head_visibility(layout, px, py, segments)
        for v in hit:
            v.setflags(write=False)
        if len(_VISIBILITY) >= 4:
            _VISIBILITY.pop(next(iter(_VISIBILITY)))
        _VISIBILITY[key] = hit
    return hit


def bend_sector(dirs, up_angle):
    """The water sector of a bend that the waves strike.

    Parameters
    ----------
    dirs : tuple of numpy.ndarray
        Unit vectors from the bend along its two segments.
    up_angle : float
        Direction the waves come from (rad, math angle).

    Returns
    -------
    face0 : float
        Math angle (rad) of the face the sector starts from (counter-clockwise).
    water : float
        Angle of the sector (rad), pi plus or minus the bend's turn.
    phi0 : float
        Direction the waves come from, counter-clockwise from ``face0`` (rad), kept a
        hair inside the sector.
    """
    a0 = float(np.arctan2(dirs[0][1], dirs[0][0]))
    a1 = float(np.arctan2(dirs[1][1], dirs[1][0]))
    w = np.mod(a1 - a0, 2 * np.pi)
    p = np.mod(up_angle - a0, 2 * np.pi)
    if p <= w:
        face0, water, phi0 = a0, w, p
    else:
        face0, water, phi0 = a1, 2 * np.pi - w, np.mod(up_angle - a1, 2 * np.pi)
    tiny = np.radians(GRAZING_DEG)
    return face0, float(water), float(np.clip(phi0, tiny, water - tiny))


def general_field(layout, px, py, wavelength, alpha, segments=None, visible=None,
                  higher_order=True):
    r"""Geometric optics of the whole layout plus each lit head's diffracted wave.

    Parameters
    ----------
    layout : harbor.geometry.layout.Layout
    px, py : numpy.ndarray
        Points (m, work frame), same shape.
    wavelength : float
        L (m).
    alpha : float
        Direction of travel (rad, math angle in the work frame).
    segments : tuple, optional
        Output of :func:`harbor.geometry.visibility.layout_segments` (to reuse).
    visible : list of numpy.ndarray, optional
        Output of :func:`head_visibility` for the same (flattened) points (to reuse).
    higher_order : bool, optional
        Include the second-order terms (double diffraction between edges, edges
        diffracting the reflected waves, reflections of the edges' shadow waves) that
        make the field continuous where one structure cuts another's waves. A random sea
        leaves them out per component (default True): there the cut-offs of the many
        directions fall in different places and average out, at a fraction of the cost.

    Returns
    -------
    u : numpy.ndarray of complex
        Field normalised by the incident amplitude, incident phase zero at the origin.
    lit_heads : int
        Number of heads the incident wave reaches.

    Notes
    -----
    .. math::

        u = \chi_i\, e^{ik\,\mathbf d\cdot\mathbf x}
          + \sum_{\text{faces}} \chi_r\, e^{ik[\mathbf d\cdot\mathbf a
            + \mathbf d_r\cdot(\mathbf x - \mathbf a)]}
          + \sum_{\text{lit edges}} \chi_h\, e^{ik\,\mathbf d\cdot\mathbf h}\, D_h(\mathbf x)

    with :math:`\chi` the visibility indicators, :math:`\mathbf d_r` the mirror image of
    the travel direction in a face and :math:`D_h` the diffracted wave of the edge h. A
    free head diffracts as Sommerfeld's half-plane along its end segment
    (:func:`harbor.solver.kernels.sommerfeld.sommerfeld_terms`). Every bend, of any
    angle, diffracts as the wedge its two segments form on the side the waves strike
    (water angle :math:`\pi \pm \tau` for a turn :math:`\tau`;
    :func:`harbor.solver.kernels.wedge.wedge_diffracted`), so that the shadow boundary and
    both faces' reflection boundaries that start at the bend are smoothed and the total
    field is continuous across them. A diffracted wave reaches only water it can reach:
    points in line of sight of the edge (no arm or land in between) and, for a bend,
    inside the struck sector (never through the arm to its other side), so a closed basin
    receives nothing. Edges not reached by the incident wave do not diffract (no
    multiple diffraction), and reflected waves are not diffracted again.

    References
    ----------
    .. [1] Penney, W. G., & Price, A. T. (1952). The diffraction theory of sea waves and
       the shelter afforded by breakwaters. *Phil. Trans. R. Soc. Lond. A*, 244(882),
       236-253.
    .. [2] Keller, J. B. (1962). Geometrical theory of diffraction. *Journal of the
       Optical Society of America*, 52(2), 116-130.
    .. [3] Kouyoumjian, R. G., & Pathak, P. H. (1974). A uniform geometrical theory of
       diffraction for an edge in a perfectly conducting surface. *Proceedings of the
       IEEE*, 62(11), 1448-1461.
    """
    wet, _ = active_layout(layout)
    if wet is not layout:
        layout, segments, visible = wet, None, None
    d0 = np.array([np.cos(alpha), np.sin(alpha)])
    edge_on = edge_on_arms(layout, d0, wavelength)
    if edge_on:
        # arms seen (nearly) edge-on scatter little: leave them out for this direction
        layout = Layout(arms=tuple(a for i, a in enumerate(layout.arms) if i not in edge_on),
                        lands=layout.lands)
        segments = None
        visible = None
    if segments is None:
        segments = layout_segments(layout)
    segments, owner, open_ends = segments
    px, py = np.broadcast_arrays(np.asarray(px, float), np.asarray(py, float))
    shape = px.shape
    px = px.ravel()
    py = py.ravel()
    k = 2 * np.pi / wavelength
    d = np.array([np.cos(alpha), np.sin(alpha)])
    up = -d
    u = np.zeros(px.shape, complex)

    # incident wave
    lit = ~ray_blocked(px, py, up, segments, open_ends=open_ends)
    u[lit] = np.exp(1j * k * (px[lit] * d[0] + py[lit] * d[1]))

    # first-order reflection from the seaward face of every arm segment
    is_arm = np.array([o.startswith("arm:") for o in owner], bool)
    scale = max(float(np.max(np.abs(segments))) if len(segments) else 1.0, 1.0)

    def beam(face, X, Y):
        """Points of (X, Y) that the face's reflected wave reaches, and its phase there."""
        si, a, b, n, dr = face
        t = b - a
        length2 = float(np.dot(t, t))
        front = (X - a[0]) * n[0] + (Y - a[1]) * n[1]
        cand = np.nonzero(front > 0)[0]
        if cand.size == 0:
            return cand, np.zeros(0)
        back = front[cand] / np.dot(dr, n)
        qx = X[cand] - back * dr[0]
        qy = Y[cand] - back * dr[1]
        sa = ((qx - a[0]) * t[0] + (qy - a[1]) * t[1]) / length2
        on = (sa >= -1e-9) & (sa <= 1 + 1e-9)
        idx, qx, qy = cand[on], qx[on], qy[on]
        if idx.size == 0:
            return idx, np.zeros(0)
        skip = np.zeros(len(segments), bool)
        skip[si] = True
        ok = ~ray_blocked(qx, qy, up, segments, skip=skip, open_ends=open_ends)
        ok &= ~segment_blocked(X[idx], Y[idx], qx, qy, segments, skip=skip)
        idx = idx[ok]
        phase = np.dot(d, a) + (X[idx] - a[0]) * dr[0] + (Y[idx] - a[1]) * dr[1]
        return idx, phase

    faces = []
    for si in np.nonzero(is_arm)[0]:
        a, b = segments[si]
        t = b - a
        n = np.array([-t[1], t[0]]) / np.hypot(*t)
        if np.dot(n, d) > 0:
            n = -n                          # the face the waves strike
        dn = float(np.dot(d, n))
        if dn > -1e-12:
            continue
        face = (si, a, b, n, d - 2 * dn * n)
        faces.append(face)
        idx, phase = beam(face, px, py)
        u[idx] += np.exp(1j * k * phase)

    def edge_wave(tip, dirs, dv, X, Y, parts):
        """Diffracted wave of an edge for a plane wave travelling along dv (unit
        amplitude at the tip) at points X, Y in its line of sight; zero outside the
        struck sector of a bend."""
        if len(dirs) == 1:
            inward = dirs[0]
            ey = np.array([-inward[1], inward[0]])
            if np.dot(ey, dv) < 0:
                ey = -ey
            local = np.arctan2(np.dot(dv, ey), np.dot(dv, inward))
            local = np.clip(local, np.radians(GRAZING_DEG), np.pi - np.radians(GRAZING_DEG))
            xl, yl = _local(X, Y, tip, inward, ey)
            _, _, (d1, d2) = sommerfeld_terms(xl, yl, k, local, split=True)
            return d1 + d2 if parts == "all" else d1
        face0, water, phi0 = bend_sector(dirs, float(np.arctan2(-dv[1], -dv[0])))
        rx, ry = X - tip[0], Y - tip[1]
        phi = np.mod(np.arctan2(ry, rx) - face0, 2 * np.pi)
        inside = phi <= water + 1e-12
        out = np.zeros(X.shape, complex)
        out[inside] = wedge_diffracted(np.hypot(rx[inside], ry[inside]), phi[inside], phi0,
                                       water / np.pi, k, parts=parts)
        return out

    def sector_wave(tip, face0, water, phi0, sign, X, Y, s_src):
        """Shadow part of the wedge wave at ``tip`` (faces at ``face0`` and ``face0 +
        sign * water``) for a cylindrical wave from ``s_src`` away, arriving from
        ``phi0`` (unit amplitude at the tip)."""
        phi = np.mod(sign * (np.arctan2(Y - tip[1], X - tip[0]) - face0), 2 * np.pi)
        inside = phi <= water + 1e-12
        out = np.zeros(X.shape, complex)
        r = np.hypot(X[inside] - tip[0], Y[inside] - tip[1])
        out[inside] = wedge_diffracted(r, phi[inside], phi0, water / np.pi, k,
                                       parts="shadow", source=s_src)
        return out

    def double_terms(tip, dirs, src):
        """(probe point, face0, water, phi0, sign) for each way the cylindrical wave of
        the edge at ``src`` meets the edge at ``tip``: a wave that runs along a face
        into it meets it once per face side it runs on (a head: both; a bend: its
        convex side only)."""
        v = (src - tip) / np.hypot(*(src - tip))
        toward = float(np.arctan2(v[1], v[0]))
        tiny = np.radians(GRAZING_DEG)
        hair = 1e-6 * scale
        graze = [f for f in dirs if abs(f[0] * v[1] - f[1] * v[0]) < 1e-9 and np.dot(f, v) > 0]
        if not graze:
            if len(dirs) == 1:
                face0, water = float(np.arctan2(dirs[0][1], dirs[0][0])), 2 * np.pi
                phi0 = np.mod(toward - face0, 2 * np.pi)
            else:
                face0, water, phi0 = bend_sector(dirs, toward)
            return [(tip + hair * v, face0, water, float(np.clip(phi0, tiny, water - tiny)),
                     1.0)]
        f = graze[0]
        face0 = float(np.arctan2(f[1], f[0]))
        left = np.array([-f[1], f[0]])
        if len(dirs) == 1:
            return [(tip + hair * (left + 1e-3 * f), face0, 2 * np.pi, tiny, 1.0),
                    (tip + hair * (-left + 1e-3 * f), face0, 2 * np.pi, tiny, -1.0)]
        other = dirs[1] if f is dirs[0] else dirs[0]
        w = np.mod(float(np.arctan2(other[1], other[0])) - face0, 2 * np.pi)
        # the convex side: counter-clockwise from f when the other segment is more than
        # pi away counter-clockwise, else clockwise
        if w > np.pi + 1e-9:
            return [(tip + hair * (left + 1e-3 * f), face0, w, tiny, 1.0)]
        if w < np.pi - 1e-9:
            return [(tip + hair * (-left + 1e-3 * f), face0, 2 * np.pi - w, tiny, -1.0)]
        return []

    def on_face(tip, face):
        _, a, b, _, _ = face
        return min(np.hypot(*(tip - a)), np.hypot(*(tip - b))) <= 1e-9 * scale

    # diffraction by each lit head (Sommerfeld's half-plane along its end segment) and by
    # each lit bend (the wedge formed by its two segments), each only into the water it
    # can reach: in line of sight and, for a bend, inside the sector the waves strike
    n_lit = 0
    edges = diffracting_edges(layout)
    seen_of = {}

    def seen(ei):
        if ei not in seen_of:
            tip = edges[ei][0]
            seen_of[ei] = (visible[ei] if visible is not None
                           else ~segment_blocked(px, py, tip[0], tip[1], segments))
        return seen_of[ei]

    lit = []
    for ei, (tip, dirs) in enumerate(edges):
        if ray_blocked(np.array([tip[0]]), np.array([tip[1]]), up, segments,
                       open_ends=open_ends)[0]:
            continue
        if len(dirs) == 1:
            n_lit += 1
        lit.append(ei)
        idx = np.nonzero(seen(ei))[0]
        if idx.size:
            u[idx] += np.exp(1j * k * np.dot(d, tip)) * edge_wave(tip, dirs, d, px[idx],
                                                                   py[idx], "all")

    if not higher_order:
        return u.reshape(shape), n_lit

    # double diffraction: a lit edge's diffracted wave, cut off by another edge in its
    # line of sight, is diffracted there (shadow part; a head's wave running along its
    # own arm into a bend is the grazing case)
    ex_all = np.array([e[0] for e in edges]) if edges else np.zeros((0, 2))
    for hi in lit:
        tip_h, dirs_h = edges[hi]
        if ex_all.size == 0:
            break
        view = ~segment_blocked(ex_all[:, 0], ex_all[:, 1], tip_h[0], tip_h[1], segments)
        for oi in np.nonzero(view)[0]:
            if oi == hi:
                continue
            tip_o, dirs_o = edges[oi]
            if np.hypot(*(tip_o - tip_h)) <= 1e-9 * scale:
                continue
            s_src = float(np.hypot(*(tip_o - tip_h)))
            idx = np.nonzero(seen(oi))[0]
            if idx.size == 0:
                continue
            for probe, face0, water, phi0, sign in double_terms(tip_o, dirs_o, tip_h):
                # the primary wave of edge h where it meets edge o, a hair off the arm on
                # the side it runs along
                amp = np.exp(1j * k * np.dot(d, tip_h)) * edge_wave(
                    tip_h, dirs_h, d, probe[None, 0], probe[None, 1], "all")[0]
                if abs(amp) < 1e-9:
                    continue
                u[idx] += amp * sector_wave(tip_o, face0, water, phi0, sign, px[idx],
                                            py[idx], s_src)

    # second-order terms that keep the field continuous where an edge cuts a reflected
    # wave: (a) an edge in a face's reflected beam diffracts that wave (shadow part);
    # (b) a lit edge's shadow, which cuts the incident wave on its way to a face, is
    # mirrored in the face (the face's image of the edge's shadow-smoothing wave)
    for face in faces:
        si, a, b, n, dr = face
        for ei, (tip, dirs) in enumerate(edges):
            if on_face(tip, face):
                continue
            hit, ph = beam(face, tip[None, 0].copy(), tip[None, 1].copy())
            if hit.size == 0:
                continue
            idx = np.nonzero(seen(ei))[0]
            if idx.size:
                u[idx] += np.exp(1j * k * ph[0]) * edge_wave(tip, dirs, dr, px[idx],
                                                             py[idx], "shadow")
        front = (px - a[0]) * n[0] + (py - a[1]) * n[1]
        cand = np.nonzero(front > 0)[0]
        if cand.size == 0:
            continue
        t = b - a
        length2 = float(np.dot(t, t))
        skip = np.zeros(len(segments), bool)
        skip[si] = True
        for ei in lit:
            tip, dirs = edges[ei]
            fh = float(np.dot(tip - a, n))
            if fh <= 1e-9 * scale or on_face(tip, face):
                continue
            mx = px[cand] - 2 * front[cand] * n[0]
            my = py[cand] - 2 * front[cand] * n[1]
            w = fh / (fh + front[cand])
            qx = tip[0] + w * (mx - tip[0])
            qy = tip[1] + w * (my - tip[1])
            sa = ((qx - a[0]) * t[0] + (qy - a[1]) * t[1]) / length2
            on = (sa >= -1e-9) & (sa <= 1 + 1e-9)
            if not np.any(on):
                continue
            idx, mx, my, qx, qy = cand[on], mx[on], my[on], qx[on], qy[on]
            ok = ~segment_blocked(qx, qy, tip[0], tip[1], segments, skip=skip)
            ok &= ~segment_blocked(px[idx], py[idx], qx, qy, segments, skip=skip)
            if not np.any(ok):
                continue
            u[idx[ok]] += np.exp(1j * k * np.dot(d, tip)) * edge_wave(
                tip, dirs, d, mx[ok], my[ok], "shadow")
    return u.reshape(shape), n_lit


#: Threads for :func:`general_components` (its compiled loop releases the GIL and splits
#: the points between them); None: one per core, at most 2 (the work per call is a few
#: seconds at most: more threads only add start-up cost). 1 runs in the caller's thread.
KERNEL_THREADS = None


def _kernel_threads(work):
    import os

    if work < 200_000:
        return 1
    if KERNEL_THREADS is not None:
        return max(1, int(KERNEL_THREADS))
    return max(1, min(2, os.cpu_count() or 1))


def general_components(layout, px, py, wavelengths, alphas, weights=None, fweights=None,
                       segments=None, visible=None, field=False, cells=None):
    r"""Many components of the general method at once (first order), fused and compiled.

    Parameters
    ----------
    layout : harbor.geometry.layout.Layout
    px, py : numpy.ndarray
        Points (m, work frame), 1-D.
    wavelengths, alphas : numpy.ndarray
        L (m) and direction of travel (rad, math angle, work frame) of each component.
    weights, fweights : numpy.ndarray, optional
        Energy weights w and w f^2 of each component (energy mode).
    segments : tuple, optional
        Output of :func:`harbor.geometry.visibility.layout_segments` (to reuse).
    visible : list of numpy.ndarray, optional
        Output of :func:`head_visibility` for the same points (to reuse).
    field : bool
        Return the fields instead of the energy.
    cells : tuple of numpy.ndarray, optional
        ``(dalpha, dk)``: each component's cell of the spectrum, its width in direction
        (rad) and in wavenumber (rad/m), energy mode only. The interference of the
        component's waves is then averaged over the cell (see Notes); without it each
        component is a regular sea.

    Returns
    -------
    e0, e2 : numpy.ndarray
        :math:`\sum_c w_c |u_c|^2` and :math:`\sum_c (w f^2)_c |u_c|^2` per point
        (energy mode), or the fields, shape (components, points), when ``field``.
    lit_heads : numpy.ndarray of int
        Heads the incident wave reaches, per component.
    reaches : numpy.ndarray of bool
        Per component, whether its field is non-zero anywhere (energy mode).

    Notes
    -----
    The same field as :func:`general_field` with ``higher_order=False`` (to rounding;
    the compiled loops of :mod:`harbor.solver.kernels.general`): geometric optics of the
    whole layout, first-order reflection from the struck faces, and each lit edge's
    diffracted wave where it is visible. What depends only on the direction (struck
    faces, reflected directions, lit edges, the local frames and sectors of the edges)
    is prepared once per component, what depends only on the point once per point.

    With ``cells``, a component stands for its cell of the directional spectrum, and the
    cross terms of its waves are integrated over the cell as Filon's rule integrates an
    oscillating factor [3]_: the waves' amplitudes are taken as constant across the cell
    and their phases ``k s_m(alpha)`` (``s_m`` the path length of wave m) as linear in
    direction and wavenumber, so the cross term of waves m and n is multiplied by

    .. math::

        \operatorname{sinc}\!\left(\tfrac{k\,\Delta\alpha}{2}
            \,\partial_\alpha (s_m - s_n)\right)
        \operatorname{sinc}\!\left(\tfrac{\Delta k}{2}\,(s_m - s_n)\right).

    Near a structure (path difference small against the cell's coherence length) the
    factor is 1 and the component is the regular sea; far in front of a reflecting face
    the incident-reflected standing wave of a broad cell, which a fixed set of regular
    components can only sample, averages out as the integral over the spectrum does.

    References
    ----------
    .. [1] Penney, W. G., & Price, A. T. (1952). The diffraction theory of sea waves and
       the shelter afforded by breakwaters. *Phil. Trans. R. Soc. Lond. A*, 244(882),
       236-253.
    .. [2] Kouyoumjian, R. G., & Pathak, P. H. (1974). A uniform geometrical theory of
       diffraction for an edge in a perfectly conducting surface. *Proceedings of the
       IEEE*, 62(11), 1448-1461.
    .. [3] Filon, L. N. G. (1928). On a quadrature formula for trigonometric integrals.
       *Proc. R. Soc. Edinburgh*, 49, 38-47.
    """
    from harbor.solver.kernels import general as _gk

    wet, _ = active_layout(layout)
    if wet is not layout:
        layout, segments, visible = wet, None, None
    px = np.ascontiguousarray(px, float).ravel()
    py = np.ascontiguousarray(py, float).ravel()
    Ls = np.atleast_1d(np.asarray(wavelengths, float))
    als = np.atleast_1d(np.asarray(alphas, float))
    nc, n = als.size, px.size
    w = np.zeros(nc) if weights is None else np.asarray(weights, float)
    wf2 = np.zeros(nc) if fweights is None else np.asarray(fweights, float)
    if cells is None or field:
        cda = np.zeros(nc)
        cdk = np.zeros(nc)
    else:
        cda = np.broadcast_to(np.asarray(cells[0], float), (nc,))
        cdk = np.broadcast_to(np.asarray(cells[1], float), (nc,))
    e0 = np.zeros(n)
    e2 = np.zeros(n)
    out_field = np.zeros((nc, n) if field else (1, 1), complex)
    anyp = np.zeros(nc, bool)
    lit_heads = np.zeros(nc, int)
    groups: dict = {}
    for c in range(nc):
        d0 = np.array([np.cos(als[c]), np.sin(als[c])])
        groups.setdefault(frozenset(edge_on_arms(layout, d0, Ls[c])), []).append(c)
    for key, members in groups.items():
        cs = np.array(members)
        if key:
            lay = Layout(arms=tuple(a for i, a in enumerate(layout.arms) if i not in key),
                         lands=layout.lands)
            segs = layout_segments(lay)
            vis = cached_head_visibility(lay, px, py, segs)
        else:
            lay = layout
            segs = segments if segments is not None else layout_segments(layout)
            vis = visible if visible is not None else head_visibility(layout, px, py, segs)
        seg, owner, open_ends = segs
        m = len(seg)
        seg4 = np.ascontiguousarray(np.asarray(seg, float).reshape(m, 4))
        open0 = np.ascontiguousarray(open_ends[:, 0]) if m else np.zeros(0, bool)
        open1 = np.ascontiguousarray(open_ends[:, 1]) if m else np.zeros(0, bool)
        ray_scale = float(np.max(np.abs(seg))) if m else 1.0
        ray_scale = ray_scale or 1.0
        k = 2 * np.pi / Ls[cs]
        dxy = np.stack([np.cos(als[cs]), np.sin(als[cs])], axis=1)
        dxy_a = np.stack([-dxy[:, 1], dxy[:, 0]], axis=1)    # d(direction)/d(alpha)
        ncs = cs.size
        # faces: the seaward side of each arm segment for each direction
        face_seg = np.array([i for i, o in enumerate(owner) if o.startswith("arm:")], np.int64)
        nf = face_seg.size
        face_on = np.zeros((ncs, nf), bool)
        fn = np.zeros((ncs, nf, 2))
        fr = np.zeros((ncs, nf, 2))
        frn = np.ones((ncs, nf))
        fph = np.zeros((ncs, nf))
        fpa = np.zeros((ncs, nf))
        fra = np.zeros((ncs, nf, 2))
        for f, si in enumerate(face_seg):
            a, b = seg[si]
            t = b - a
            nrm = np.array([-t[1], t[0]]) / np.hypot(*t)
            nn = np.where((dxy @ nrm)[:, None] > 0, -nrm, nrm)
            dn = np.sum(dxy * nn, axis=1)
            face_on[:, f] = ~(dn > -1e-12)
            dr = dxy - 2 * dn[:, None] * nn
            fn[:, f] = nn
            fr[:, f] = dr
            frn[:, f] = np.sum(dr * nn, axis=1)
            fph[:, f] = dxy @ a
            # the image's direction turns the other way as the direction of travel turns
            fpa[:, f] = dxy_a @ a
            fra[:, f] = dxy_a - 2 * np.sum(dxy_a * nn, axis=1)[:, None] * nn
        # edges: lit or not, their local frames (heads) and struck sectors (bends)
        edges = diffracting_edges(lay)
        ne = len(edges)
        tips = np.array([e[0] for e in edges], float).reshape(ne, 2)
        kind = np.array([len(e[1]) for e in edges], np.int64)
        inw = np.array([e[1][0] for e in edges], float).reshape(ne, 2)
        tx = np.repeat(tips[None, :, 0], ncs, 0).ravel()
        ty = np.repeat(tips[None, :, 1], ncs, 0).ravel()
        ux = np.repeat(-dxy[:, 0:1], ne, 1).ravel()
        uy = np.repeat(-dxy[:, 1:2], ne, 1).ravel()
        elit = (~_gk.rays_blocked(tx, ty, ux, uy, seg4, open0, open1, ray_scale)
                if ne and m else np.ones(ncs * ne, bool)).reshape(ncs, ne)
        eph = np.exp(1j * k[:, None] * (dxy @ tips.T)) if ne else np.zeros((ncs, 0), complex)
        eysgn = np.ones((ncs, ne))
        c0 = np.zeros((ncs, ne))
        s0 = np.zeros((ncs, ne))
        bface0 = np.zeros((ncs, ne))
        bwater = np.zeros((ncs, ne))
        bphi0 = np.zeros((ncs, ne))
        bn = np.ones((ncs, ne))
        # a bend's two sides: (face0, water) as harbor.solver.layout.bend_sector picks them
        bcfg = np.zeros((ncs, ne), np.int64)
        cfg_face0 = np.zeros((ne, 2))
        cfg_n = np.ones((ne, 2))
        q2c = np.ones((ncs, ne))
        q2s = np.zeros((ncs, ne))
        qnc = np.ones((ncs, ne))
        qns = np.zeros((ncs, ne))
        tiny = np.radians(GRAZING_DEG)
        for e, (tip, dirs) in enumerate(edges):
            if len(dirs) == 1:
                inward = dirs[0]
                ey = np.array([-inward[1], inward[0]])
                flip = dxy @ ey < 0
                eysgn[:, e] = np.where(flip, -1.0, 1.0)
                eyc = np.where(flip[:, None], -ey, ey)
                local = np.arctan2(np.sum(dxy * eyc, axis=1), dxy @ inward)
                local = np.clip(local, tiny, np.pi - tiny)
                theta0 = np.pi - local
                c0[:, e] = np.cos(0.5 * theta0)
                s0[:, e] = np.sin(0.5 * theta0)
            else:
                a0 = float(np.arctan2(dirs[0][1], dirs[0][0]))
                a1 = float(np.arctan2(dirs[1][1], dirs[1][0]))
                wa = np.mod(a1 - a0, 2 * np.pi)
                cfg_face0[e] = (a0, a1)
                cfg_n[e] = (float(wa) / np.pi, float(2 * np.pi - wa) / np.pi)
                for j in range(ncs):
                    dv = dxy[j]
                    face0, water, phi0 = bend_sector(dirs, float(np.arctan2(-dv[1], -dv[0])))
                    bface0[j, e], bwater[j, e], bphi0[j, e] = face0, water, phi0
                    bn[j, e] = water / np.pi
                    bcfg[j, e] = 0 if face0 == a0 else 1
                    cfg_n[e, bcfg[j, e]] = bn[j, e]
                q2c[:, e] = np.cos(0.5 * bphi0[:, e])
                q2s[:, e] = np.sin(0.5 * bphi0[:, e])
                qnc[:, e] = np.cos(0.5 * bphi0[:, e] / bn[:, e])
                qns[:, e] = np.sin(0.5 * bphi0[:, e] / bn[:, e])
        cfg_cpn = np.cos(0.5 * np.pi / cfg_n)
        cfg_spn = np.sin(0.5 * np.pi / cfg_n)
        big = np.arange(-4, 5)
        cfg_tabc = np.ascontiguousarray(np.cos(np.pi * cfg_n[..., None] * big))
        cfg_tabs = np.ascontiguousarray(np.sin(np.pi * cfg_n[..., None] * big))
        lit_heads[cs] = np.sum(elit & (kind == 1)[None, :], axis=1)
        vis_arr = (np.ascontiguousarray(np.array(vis, bool).reshape(ne, n)) if ne
                   else np.zeros((0, n), bool))
        args_pre = (seg4, open0, open1, face_seg, ray_scale,
                    np.ascontiguousarray(tips[:, 0]), np.ascontiguousarray(tips[:, 1]), kind,
                    np.ascontiguousarray(inw[:, 0]), np.ascontiguousarray(inw[:, 1]))
        args_post = (
            np.ascontiguousarray(k), np.ascontiguousarray(dxy[:, 0]),
            np.ascontiguousarray(dxy[:, 1]), np.ascontiguousarray(w[cs]),
            np.ascontiguousarray(wf2[cs]),
            face_on, np.ascontiguousarray(fn[..., 0]), np.ascontiguousarray(fn[..., 1]),
            np.ascontiguousarray(fr[..., 0]), np.ascontiguousarray(fr[..., 1]), frn, fph,
            np.ascontiguousarray(elit), np.ascontiguousarray(eph.real),
            np.ascontiguousarray(eph.imag), eysgn, c0, s0, bface0, bwater, bphi0, bn,
            bcfg, cfg_face0, cfg_n, cfg_cpn, cfg_spn, cfg_tabc, cfg_tabs, q2c, q2s, qnc, qns,
            np.ascontiguousarray(0.5 * k * cda[cs]), np.ascontiguousarray(0.5 * cdk[cs]),
            fpa, np.ascontiguousarray(fra[..., 0]), np.ascontiguousarray(fra[..., 1]),
            np.ascontiguousarray(dxy @ tips.T).reshape(ncs, ne),
            np.ascontiguousarray(dxy_a @ tips.T).reshape(ncs, ne),
            1 if field else 0)

        def run(lo, hi):
            sub_any = np.zeros(ncs, bool)
            sub_field = np.zeros((ncs, hi - lo) if field else (1, 1), complex)
            _gk.general_components(px[lo:hi], py[lo:hi], *args_pre,
                                   np.ascontiguousarray(vis_arr[:, lo:hi]), *args_post,
                                   e0[lo:hi], e2[lo:hi], sub_any, sub_field)
            return lo, hi, sub_any, sub_field

        threads = _kernel_threads(n * ncs)
        # several ranges per thread, taken as threads come free: the work per point varies
        # (open sea, shadow, land) and one range per thread leaves one of them idle
        pieces = 1 if threads == 1 else min(8 * threads, max(threads, n // 2048))
        cuts = np.linspace(0, n, pieces + 1).astype(int)
        spans = [(int(a), int(b)) for a, b in zip(cuts[:-1], cuts[1:]) if b > a]
        if len(spans) > 1:
            # the compiled loop releases the GIL: the point ranges run side by side
            from concurrent.futures import ThreadPoolExecutor

            with ThreadPoolExecutor(threads) as pool:
                parts = list(pool.map(lambda ab: run(*ab), spans))
        else:
            parts = [run(*ab) for ab in spans]
        sub_any = np.zeros(ncs, bool)
        for lo, hi, a_, f_ in parts:
            sub_any |= a_
            if field:
                out_field[cs, lo:hi] = f_
        anyp[cs] = sub_any
    if field:
        return out_field, lit_heads, anyp
    return e0, e2, lit_heads, anyp


def layout_field(layout, px, py, wavelength, alpha, method="auto"):
    """Field of one regular sea over a layout, choosing the method.

    Parameters
    ----------
    layout : harbor.geometry.layout.Layout
    px, py : numpy.ndarray
        Points (m, work frame).
    wavelength : float
        L (m).
    alpha : float
        Direction of travel (rad, math angle, work frame).
    method : {"auto", "general", "superposition", "exact"}
        ``"auto"``: inside the basin of a classic entrance :func:`harbor.gap` (exact or
        superposition by :func:`harbor.solver.kernels.gap.auto_method`); everywhere else
        (outside the basin, other layouts) the general method. ``"general"`` forces the general method; ``"superposition"``/``"exact"``
        force that gap method where a classic entrance exists.

    Returns
    -------
    u : numpy.ndarray of complex
    info : FieldInfo
    """
    px, py = np.broadcast_arrays(np.asarray(px, float), np.asarray(py, float))
    layout, _ = active_layout(layout)
    if method != "general":
        ent = classic_entrance(layout, wavelength)
        if ent is not None:
            segments = layout_segments(layout)
            inside = basin_mask(layout, ent, px, py, segments)
            got = gap_field(ent, px[inside], py[inside], wavelength, alpha,
                            method="auto" if method == "auto" else method)
            if got is not None:
                u = np.empty(px.shape, complex)
                u[inside], used = got
                if np.any(~inside):
                    ox, oy = px[~inside], py[~inside]
                    uo, _ = general_field(layout, ox, oy, wavelength, alpha, segments=segments)
                    # a smooth hand-over to the gap solution near the entrance, seaward:
                    # no step on the entrance line
                    w = entrance_blend(layout, ent, ox, oy, wavelength, segments)
                    zone = w > 0
                    if np.any(zone):
                        ug, _ = gap_field(ent, ox[zone], oy[zone], wavelength, alpha,
                                          method=used)
                        uo[zone] = w[zone] * ug + (1.0 - w[zone]) * uo[zone]
                    u[~inside] = uo
                name = METHOD_GAP_EXACT if used == "exact" else METHOD_GAP_SUPERPOSITION
                return u, FieldInfo(method=name, lit_heads=2)
    u, n_lit = general_field(layout, px, py, wavelength, alpha)
    return u, FieldInfo(method=METHOD_GENERAL, lit_heads=n_lit)


def layout_warnings(layout, wavelength, point_xy=()):
    """Validity warnings that depend on the layout and the wavelength (not the direction).

    Parameters
    ----------
    layout : harbor.geometry.layout.Layout
    wavelength : float
        L (m).
    point_xy : sequence of (name, x, y)
        Named points to check against the heads.

    Returns
    -------
    list of harbor.cautions.Notice
    """
    out = []
    for j in getattr(layout, "joins", ()):
        what = "its start" if j.end == "start" else "its end"
        if j.joined:
            out.append(Notice(
                "ends-joined", f"arm '{j.arm}': {what} was {100 * j.distance:.0f} cm from "
                f"{j.target} and has been joined to it (ends within "
                f"{100 * JOIN_TOLERANCE:.0f} cm are joined)", level="note"))
        else:
            out.append(Notice(
                "near-miss", f"arm '{j.arm}': {what} is {j.distance:.2f} m from {j.target} "
                f"but not joined (ends are joined within {100 * JOIN_TOLERANCE:.0f} cm): "
                f"did you mean to join them? As drawn, the {j.distance:.2f} m opening is "
                f"solved as an entrance"))
    layout, dry = active_layout(layout)
    for name in dry:
        out.append(Notice(
            "arm-on-land", f"arm '{name}' lies wholly on land (buried in it or along its "
            f"edge): it does nothing to the waves and is left out", level="note"))
    ent = nearest_heads(layout)
    if ent is not None and classic_entrance(layout, wavelength) is None:
        ratio = ent.width / wavelength
        if ratio < AUTO_EXACT_BELOW:
            names = (layout.arms[ent.arms[0]].name, layout.arms[ent.arms[1]].name)
            why = (f"end segments {ent.misalignment_deg:.0f} deg from collinear"
                   if not ent.collinear else "the arms are not rooted or long enough")
            out.append(Notice(
                "entrance-not-classic", f"entrance between '{names[0]}' and '{names[1]}' is {ent.width:.0f} m wide "
                f"({ratio:.2f} L) but not a classic entrance ({why}): the general method "
                f"ignores the interaction of the two heads, K' in the lee may be off by "
                f"0.05 or more"))
    for name, x, y in point_xy:
        for arm in layout.arms:
            for tip, _ in arm.heads():
                dist = float(np.hypot(x - tip[0], y - tip[1]))
                if dist < 0.5 * wavelength:
                    out.append(Notice("near-head", f"point '{name}' is {dist:.0f} m from the head of '{arm.name}', "
                               f"within half a wavelength ({0.5 * wavelength:.0f} m): "
                               f"near-field values are sensitive to the head's real shape",
                                      point=name))
    return out
