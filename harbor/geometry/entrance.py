"""Recognise the classic entrance: two arms whose free heads face each other on one line.

Pure geometry. The solver decides, with the wavelength, whether the exact gap solution
applies.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

#: End segments are "collinear" when each is within this angle of the line through the
#: two heads (degrees).
COLLINEAR_TOLERANCE_DEG = 2.0


@dataclass(frozen=True)
class Entrance:
    """A gap between two heads.

    Attributes
    ----------
    arms : tuple of int
        Indices of the two arms (first: the one at ``heads[0]``).
    heads : numpy.ndarray, shape (2, 2)
        Head positions (m).
    width : float
        Distance between the heads (m).
    center : numpy.ndarray, shape (2,)
        Midpoint of the heads (m).
    axis : numpy.ndarray, shape (2,)
        Unit vector from ``heads[0]`` to ``heads[1]``.
    basin_normal : numpy.ndarray, shape (2,)
        Unit normal to the axis pointing into the basin (towards the arms' bodies); the
        zero vector when the arms are straight and the side is undecided.
    collinear : bool
        True when both end segments lie along the axis within
        :data:`COLLINEAR_TOLERANCE_DEG`.
    end_lengths : tuple of float
        Lengths of the two end segments (m).
    rooted_far_ends : tuple of bool
        Whether each arm's other end is rooted (on land).
    misalignment_deg : float
        Largest angle between an end segment and the axis (degrees).
    passage : float
        The entrance width (m): the narrowest water passage between the two arms (see
        :func:`entrance_width`). Equal to ``width`` for heads that face each other; for
        overlapping heads it is the channel between the arms.
    """

    arms: tuple
    heads: np.ndarray
    width: float
    center: np.ndarray
    axis: np.ndarray
    basin_normal: np.ndarray
    collinear: bool
    end_lengths: tuple
    rooted_far_ends: tuple
    misalignment_deg: float
    passage: float = float("nan")


def _free_heads(arm):
    """(tip, inward unit vector, end-segment length, other end rooted) for each free head."""
    p = np.asarray(arm.line, float)
    out = []
    if not arm.rooted_start:
        d = p[1] - p[0]
        out.append((p[0], d / np.hypot(*d), float(np.hypot(*d)), arm.rooted_end))
    if not arm.rooted_end:
        d = p[-2] - p[-1]
        out.append((p[-1], d / np.hypot(*d), float(np.hypot(*d)), arm.rooted_start))
    return out


def nearest_heads(layout):
    """The closest pair of free heads on different arms, as an :class:`Entrance`, or None."""
    best = None
    arms = layout.arms
    for i in range(len(arms)):
        for j in range(i + 1, len(arms)):
            for hi in _free_heads(arms[i]):
                for hj in _free_heads(arms[j]):
                    d = float(np.hypot(*(hj[0] - hi[0])))
                    if d > 0 and (best is None or d < best[0]):
                        best = (d, i, j, hi, hj)
    if best is None:
        return None
    d, i, j, hi, hj = best
    axis = (hj[0] - hi[0]) / d
    # arm i's inward vector should point away from the gap (-axis), arm j's along +axis
    mis_i = np.degrees(np.arccos(np.clip(-np.dot(hi[1], axis), -1, 1)))
    mis_j = np.degrees(np.arccos(np.clip(np.dot(hj[1], axis), -1, 1)))
    mis = float(max(mis_i, mis_j))
    normal = np.array([-axis[1], axis[0]])
    body = np.concatenate([np.asarray(arms[i].line, float), np.asarray(arms[j].line, float)])
    side = float(np.mean((body - 0.5 * (hi[0] + hj[0])) @ normal))
    scale = max(d, 1.0)
    basin = normal * np.sign(side) if abs(side) > 1e-6 * scale else np.zeros(2)
    return Entrance(arms=(i, j), heads=np.array([hi[0], hj[0]]), width=d,
                    center=0.5 * (hi[0] + hj[0]), axis=axis, basin_normal=basin,
                    collinear=mis <= COLLINEAR_TOLERANCE_DEG,
                    end_lengths=(hi[2], hj[2]), rooted_far_ends=(hi[3], hj[3]),
                    misalignment_deg=mis,
                    passage=_passage(arms[i], arms[j]))


def _passage(arm_a, arm_b):
    import shapely

    return float(shapely.LineString(arm_a.line).distance(shapely.LineString(arm_b.line)))


def entrance_width(layout):
    """The entrance width of a layout: the narrowest water passage between the structures.

    Parameters
    ----------
    layout : harbor.geometry.layout.Layout

    Returns
    -------
    float or None
        Metres. With two or more free heads on different arms, the entrance is formed by
        the closest pair of them (:func:`nearest_heads`) and its width is the shortest
        distance between those two arms (the narrowest gap a ship passes through). With
        one free head only, the shortest distance from it to any other arm or land. None
        when there is no free head, or nothing else to measure to.

    Notes
    -----
    One definition for every command (``check``, ``sweep``, ``climate``). For heads that
    face each other it is the distance between the heads; for overlapping heads it is
    the channel between the arms, not the distance between the heads, so lengthening the
    outer arm never widens it: adding length to a structure can only shorten the
    shortest distance to it. Pure geometry (shapely distances).
    """
    import shapely

    ent = nearest_heads(layout)
    if ent is not None:
        return ent.passage
    heads = [(i, tip) for i, arm in enumerate(layout.arms) for tip, _ in arm.heads()]
    if len(heads) != 1:
        return None
    i, tip = heads[0]
    p = shapely.Point(tip)
    dists = [shapely.LineString(a.line).distance(p) for k, a in enumerate(layout.arms)
             if k != i]
    if layout.lands:
        dists.append(layout.land_union().distance(p))
    return float(min(dists)) if dists else None


def basin_mask(layout, entrance, px, py, segments=None):
    """True for points inside the basin behind a classic entrance.

    A point is in the basin when it lies on the basin side of the entrance line and the
    straight path from it to the middle of the entrance crosses no arm or land. When the
    basin side is undecided (straight arms, ``basin_normal`` zero) the lee side is taken
    as either side.

    Parameters
    ----------
    layout : harbor.geometry.layout.Layout
    entrance : Entrance
    px, py : numpy.ndarray
        Points (m).
    segments : tuple, optional
        Output of :func:`harbor.geometry.visibility.layout_segments`.

    Returns
    -------
    numpy.ndarray of bool
    """
    from harbor.geometry.visibility import layout_segments, segment_blocked

    if segments is None:
        segments = layout_segments(layout)
    px = np.asarray(px, float)
    py = np.asarray(py, float)
    c = entrance.center
    side = (px - c[0]) * entrance.basin_normal[0] + (py - c[1]) * entrance.basin_normal[1]
    if np.allclose(entrance.basin_normal, 0):
        behind = np.ones(px.shape, bool)
    else:
        behind = side > 0
    out = np.zeros(px.shape, bool)
    if np.any(behind):
        out[behind] = ~segment_blocked(px[behind], py[behind], c[0], c[1], segments[0])
    return out
