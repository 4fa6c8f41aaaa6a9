"""Measure the general-layout method against the full-field finite-element solution.

    python3 benchmarks/accuracy_table.py [--ppw 10] [--only KIND ...] [--angles DEG ...]
                                         [--json FILE]

For every layout of the table in docs/accuracy.md sect. 3 (detached breakwaters, entrances
between collinear, offset, overlapping and angled heads, dog-leg arms) and several
approach angles, solves the same regular-wave problem twice -- with
``harbor.solver.layout.general_field`` (geometric optics + the diffracted wave of every
lit head and bend) and with ``harbor.solver.field.solve_field`` (P2 finite elements and a
perfectly matched layer) -- and prints the largest and the median |K'_general - K'_FE|
over the lee, as a markdown table. Takes several minutes; it is not a test.

Frame of every layout: L = 1 m (the problem scales with the wavelength), the seaward line
of the structure on y = 0, waves from y < 0; the approach angle is the direction of wave
travel, counter-clockwise from +x (90 = normal to the structure, 60 / 30 from the -x side,
120 / 150 the mirror directions from the +x side). All arms are finite and lie inside the
solved domain with both ends free, so the finite-element solution has no arm running out
through the absorbing layer (docs/accuracy.md sect. 2, limitation).

The lee of a layout: points of the window -- a band from the features of interest (the
breakwater, the two heads of an entrance, the bend and head of a dog-leg) widened by
3 L on each side and swept 5 L behind y = 0 along the direction of wave travel -- that
are (a) not in front of a lit face (first-order reflection zone), (b) for entrances, in
the geometric shadow of the layout or seeing the sea only through the entrance, and
(c) more than 0.1 L (one mesh edge) from every arm. Points are on a 0.1 L lattice.
"""

from __future__ import annotations

import argparse
import datetime
import json
import os
import platform
import sys
import time

from unittest import mock

import numpy as np

from harbor.geometry.layout import Arm, Layout
from harbor.geometry.visibility import (diffracting_edges, distance_to_arms,
                                        layout_segments, ray_blocked, segment_blocked)
from harbor.solver.field import solve_field
import harbor.solver.layout as _layout_module
from harbor.solver.layout import METHOD_GENERAL, general_field, layout_field

L = 1.0
ARM = 6.0          # length of the finite arms that form entrances and dog-legs (L)
WINDOW_SIDE = 3.0  # lee window: margin each side of the features (L)
WINDOW_DEPTH = 5.0  # lee window: depth behind y = 0 (L)
SPACING = 0.1      # lee sample lattice (L)
CLEAR = 0.1        # points closer than this to an arm are left out (L)
NEAR = 1.0         # "near field": within this distance of a head or bend (L)
BEHIND = 1.0       # the "far lee" starts this far behind y = 0 (L)


def _line(*pts):
    return np.array(pts, float)


def detached(B):
    line = _line((-B / 2, 0.0), (B / 2, 0.0))
    return dict(arms=[Arm("breakwater", line)], feature=(-B / 2, B / 2), entrance=None)


def entrance_collinear(B):
    a = _line((-B / 2 - ARM, 0.0), (-B / 2, 0.0))
    b = _line((B / 2, 0.0), (B / 2 + ARM, 0.0))
    return dict(arms=[Arm("west", a), Arm("east", b)], feature=(-B / 2, B / 2),
                entrance=((-B / 2, 0.0), (B / 2, 0.0)))


def entrance_offset(B, s):
    """West arm on y = 0, east arm s further down-wave on y = s; B apart along x."""
    a = _line((-B / 2 - ARM, 0.0), (-B / 2, 0.0))
    b = _line((B / 2, s), (B / 2 + ARM, s))
    return dict(arms=[Arm("west", a), Arm("east", b)], feature=(-B / 2, B / 2),
                entrance=((-B / 2, 0.0), (B / 2, s)))


def entrance_overlap(g, o=1.0):
    """Outer arm on y = 0 to x = +o; inner arm on y = g from x = -o: heads overlap by 2o,
    the channel between them (width g) opens to the +x side."""
    a = _line((-ARM + o, 0.0), (o, 0.0))
    b = _line((-o, g), (ARM - o, g))
    return dict(arms=[Arm("outer", a), Arm("inner", b)], feature=(-o, o),
                entrance=((o, 0.0), (-o, g)))


def entrance_angled(B, theta_deg):
    """Arms converging on the entrance (heads seaward), each end segment turned
    theta / 2 back from the entrance line: theta between the two end segments."""
    t = np.radians(theta_deg / 2)
    a = _line((-B / 2 - ARM * np.cos(t), ARM * np.sin(t)), (-B / 2, 0.0))
    b = _line((B / 2, 0.0), (B / 2 + ARM * np.cos(t), ARM * np.sin(t)))
    return dict(arms=[Arm("west", a), Arm("east", b)], feature=(-B / 2, B / 2),
                entrance=((-B / 2, 0.0), (B / 2, 0.0)))


def dogleg(beta_deg, leg):
    """Trunk along y = 0 from x = -ARM to 0, then a head leg of length ``leg`` turned
    beta from +x (positive: turned back into the lee, negative: towards the sea)."""
    b = np.radians(beta_deg)
    head = (leg * np.cos(b), leg * np.sin(b))
    line = _line((-ARM, 0.0), (0.0, 0.0), head)
    return dict(arms=[Arm("arm", line)], feature=(min(0.0, head[0]), max(0.0, head[0])),
                entrance=None)


def cases(only=None):
    out = []

    def add(kind, label, spec, angles):
        if only and kind not in only:
            return
        for a in angles:
            out.append((kind, label, spec, a))

    for B in (1, 2, 4, 8):
        add("detached", f"detached, {B} L", detached(B), (90, 60, 30))
    for B in (1, 2, 4):
        add("collinear", f"collinear entrance, B = {B} L", entrance_collinear(B), (90, 60, 30))
    for B in (1, 2, 4):
        add("offset", f"offset heads (1 L), B = {B} L", entrance_offset(B, 1.0),
            (90, 60, 120, 30, 150))
    for g in (1, 2, 4):
        add("overlap", f"overlapping heads (2 L), channel {g} L", entrance_overlap(g),
            (90, 60, 120, 30, 150))
    for th in (30, 60):
        for B in (1, 2, 4):
            add("angled", f"angled {th} deg, B = {B} L", entrance_angled(B, th), (90, 60, 30))
    angles = (90, 60, 120, 30, 150)
    for beta, legs in ((5, (3,)), (15, (3,)), (30, (1, 3)), (60, (1, 3, 6)), (90, (1, 3)),
                       (-30, (3,)), (-60, (1, 3))):
        for leg in legs:
            add("dogleg", f"dog-leg {beta:+d} deg, head leg {leg} L", dogleg(beta, leg),
                angles)
    return out


def lee_points(spec, layout, alpha):
    """Sample points of the lee (see the module docstring) and whether each is in the
    geometric shadow of the layout (the up-wave ray meets an arm)."""
    d = np.array([np.cos(alpha), np.sin(alpha)])
    cot = d[0] / d[1]
    x0 = spec["feature"][0] - WINDOW_SIDE
    x1 = spec["feature"][1] + WINDOW_SIDE
    ys = np.arange(SPACING, WINDOW_DEPTH + 1e-9, SPACING)
    lo = min(x0, x0 + cot * WINDOW_DEPTH)
    hi = max(x1, x1 + cot * WINDOW_DEPTH)
    xs = np.arange(np.floor(lo / SPACING) * SPACING, hi + 1e-9, SPACING)
    X, Y = np.meshgrid(xs, ys)
    X, Y = X.ravel(), Y.ravel()
    s = X - cot * Y
    keep = (s >= x0 - 1e-9) & (s <= x1 + 1e-9)
    X, Y = X[keep], Y[keep]
    segs, owner, open_ends = layout_segments(layout)
    up = -d
    keep = ~reflection_zone(X, Y, d, segs, open_ends)
    if spec["entrance"] is not None:
        shadow = ray_blocked(X, Y, up, segs, open_ends=open_ends)
        keep &= shadow | through(X, Y, up, *spec["entrance"])
    keep &= distance_to_arms(X, Y, layout) > CLEAR * L
    X, Y = X[keep], Y[keep]
    return X, Y, ray_blocked(X, Y, up, segs, open_ends=open_ends)


def through(px, py, up, h1, h2):
    """True where the ray from P in direction ``up`` crosses the segment h1-h2."""
    h1, h2 = np.asarray(h1, float), np.asarray(h2, float)
    e = h2 - h1
    den = up[0] * e[1] - up[1] * e[0]
    if abs(den) < 1e-14:
        return np.zeros(px.shape, bool)
    wx, wy = h1[0] - px, h1[1] - py
    t = (wx * e[1] - wy * e[0]) / den
    s = (wx * up[1] - wy * up[0]) / den
    return (t > 0) & (s >= 0) & (s <= 1)


def reflection_zone(px, py, d, segs, open_ends):
    """True where a first-order reflection from a lit face reaches the point (the face
    lit where it reflects, the reflected ray unobstructed on its way to the point)."""
    out = np.zeros(px.shape, bool)
    up = -d
    for i, (a, b) in enumerate(segs):
        t = b - a
        n = np.array([-t[1], t[0]]) / np.hypot(*t)
        if n @ d > 0:
            n = -n
        dn = float(d @ n)
        if dn > -1e-12:
            continue
        dr = d - 2 * dn * n
        front = (px - a[0]) * n[0] + (py - a[1]) * n[1]
        cand = front > 0
        tt = front / (dr @ n)
        qx, qy = px - tt * dr[0], py - tt * dr[1]
        s = ((qx - a[0]) * t[0] + (qy - a[1]) * t[1]) / (t @ t)
        on = cand & (s >= 0) & (s <= 1)
        if np.any(on):
            skip = np.zeros(len(segs), bool)
            skip[i] = True
            lit = ~ray_blocked(qx[on], qy[on], up, segs, skip=skip, open_ends=open_ends)
            lit &= ~segment_blocked(px[on], py[on], qx[on], qy[on], segs, skip=skip)
            idx = np.nonzero(on)[0][lit]
            out[idx] = True
    return out


def general_heads_only(layout, X, Y, alpha):
    """The general method with the bends' half-plane terms left out (diagnostic only:
    the incident and reflected waves still stop sharply at the bends' shadow and
    reflection boundaries)."""
    edges = _layout_module.diffracting_edges

    def heads(lay):
        return [e for e in edges(lay) if len(e[1]) == 1]

    with mock.patch.object(_layout_module, "diffracting_edges", heads):
        return general_field(layout, X, Y, L, alpha)[0]


def measure(kind, label, spec, angle, ppw, save=None):
    layout = Layout(arms=tuple(spec["arms"]))
    alpha = np.radians(angle)
    X, Y, shadow = lee_points(spec, layout, alpha)
    pts = np.concatenate([np.asarray(a.line, float) for a in spec["arms"]])
    region = (min(X.min(), pts[:, 0].min()) - 0.5, min(pts[:, 1].min(), 0.0) - 1.0,
              max(X.max(), pts[:, 0].max()) + 0.5, max(Y.max(), pts[:, 1].max()) + 0.5)
    t0 = time.perf_counter()
    sol = solve_field([a.line for a in spec["arms"]], L, angle, region,
                      points_per_wavelength=ppw)
    t_fe = time.perf_counter() - t0
    u_fe = sol.at(X, Y)
    u_gen, _ = general_field(layout, X, Y, L, alpha)
    u_auto, info = layout_field(layout, X, Y, L, alpha)
    dk = np.abs(np.abs(u_gen) - np.abs(u_fe))
    dk_auto = np.abs(np.abs(u_auto) - np.abs(u_fe))
    edges = np.array([v for v, _ in diffracting_edges(layout)])
    dist = np.min(np.hypot(X[:, None] - edges[None, :, 0], Y[:, None] - edges[None, :, 1]),
                  axis=1)
    far = dist > NEAR * L
    i = int(np.argmax(dk))
    back = Y >= BEHIND * L
    d = np.array([np.cos(alpha), np.sin(alpha)])
    seg = np.concatenate([np.diff(np.asarray(a.line, float), axis=0) for a in spec["arms"]])
    seg /= np.hypot(seg[:, 0], seg[:, 1])[:, None]
    grazing = bool(np.any(np.abs(seg[:, 0] * d[1] - seg[:, 1] * d[0])
                          < np.sin(np.radians(1.0))))

    def stat(f, mask):
        return float(f(dk[mask])) if np.any(mask) else float("nan")

    row = dict(kind=kind, label=label, angle=angle, grazing=bool(grazing), n=int(X.size),
               max=float(dk.max()), median=float(np.median(dk)),
               share=float(np.mean(dk > 0.05)),
               max_far=float(dk[far].max()) if np.any(far) else float("nan"),
               n_shadow=int(shadow.sum()),
               shadow_max=float(dk[shadow].max()) if np.any(shadow) else float("nan"),
               shadow_median=stat(np.median, shadow),
               back_max=stat(np.max, back), back_median=stat(np.median, back),
               back_p95=stat(lambda v: np.percentile(v, 95), back),
               at=(float(X[i]), float(Y[i])), at_dist=float(dist[i]),
               kfe_at=float(np.abs(u_fe[i])), kgen_at=float(np.abs(u_gen[i])),
               auto_method=info.method, auto_max=float(dk_auto.max()),
               auto_median=float(np.median(dk_auto)),
               bendless=None,
               unknowns=sol.n_unknowns, seconds=t_fe,
               region=[float(v) for v in region])
    if any(len(a.line) > 2 for a in spec["arms"]):
        dk_h = np.abs(np.abs(general_heads_only(layout, X, Y, alpha)) - np.abs(u_fe))
        row["bendless"] = dict(max=float(dk_h.max()), median=float(np.median(dk_h)),
                               share=float(np.mean(dk_h > 0.05)))
    if save:
        np.savez_compressed(os.path.join(save, f"{kind}_{len(os.listdir(save)):03d}.npz"),
                            x=X, y=Y, u_fe=u_fe, u_gen=u_gen, u_auto=u_auto, shadow=shadow,
                            label=label, angle=angle)
    return row


def main(argv=None):
    p = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    p.add_argument("--ppw", type=float, default=10.0, help="FE edges per wavelength")
    p.add_argument("--only", nargs="*", help="kinds: detached collinear offset overlap "
                                             "angled dogleg")
    p.add_argument("--angles", nargs="*", type=float,
                   help="only these approach angles (deg), to run a part of the table")
    p.add_argument("--json", help="also write the rows to this JSON file")
    p.add_argument("--save", help="directory for the sampled fields (.npz per case)")
    args = p.parse_args(argv)
    rows = []
    started = time.perf_counter()
    print(f"# general method vs full-field FE, ppw = {args.ppw:g}, "
          f"{datetime.date.today().isoformat()}, {platform.python_version()}, "
          f"{os.cpu_count()} cores, load {os.getloadavg()[0]:.1f}", flush=True)
    print("| layout | dir (deg) | lee: max | median | > 0.05 | shadow: max | median | "
          f"lee >= {BEHIND:g} L behind: max | median | "
          "worst at (x, y), dist. to head/bend (L) | K' FE / general there |")
    print("|---|---:|---:|---:|---:|---:|---:|---:|---:|---|---|", flush=True)
    for kind, label, spec, angle in cases(args.only):
        if args.angles and float(angle) not in args.angles:
            continue
        r = measure(kind, label, spec, angle, args.ppw, args.save)
        rows.append(r)
        g = " (g)" if r["grazing"] else ""
        print(f"| {label} | {angle}{g} | {r['max']:.3f} | {r['median']:.3f} | "
              f"{100 * r['share']:.0f} % | {r['shadow_max']:.3f} | {r['shadow_median']:.3f} | "
              f"{r['back_max']:.3f} | {r['back_median']:.3f} | "
              f"({r['at'][0]:.1f}, {r['at'][1]:.1f}), {r['at_dist']:.1f} | "
              f"{r['kfe_at']:.2f} / {r['kgen_at']:.2f} |", flush=True)
    auto = [r for r in rows if r["auto_method"] != METHOD_GENERAL]
    if auto:
        print("\nWhere layout_field chooses the classic-entrance gap solution instead:")
        print("| layout | dir (deg) | method | max dK' | median dK' |")
        print("|---|---:|---|---:|---:|")
        for r in auto:
            print(f"| {r['label']} | {r['angle']} | {r['auto_method']} | "
                  f"{r['auto_max']:.3f} | {r['auto_median']:.3f} |")
    bent = [r for r in rows if r["bendless"]]
    if bent:
        print("\nDiagnostic: the same arms with the bends' half-plane terms left out of the "
              "general method (heads only):\n")
        print("| layout | dir (deg) | max dK' | median | > 0.05 | "
              "(as computed: median, > 0.05) |")
        print("|---|---:|---:|---:|---:|---|")
        for r in bent:
            b = r["bendless"]
            g = " (g)" if r["grazing"] else ""
            print(f"| {r['label']} | {r['angle']}{g} | {b['max']:.3f} | {b['median']:.3f} | "
                  f"{100 * b['share']:.0f} % | {r['median']:.3f}, {100 * r['share']:.0f} % |")
    print(f"\n{len(rows)} cases, {time.perf_counter() - started:.0f} s in all; FE solve "
          f"(mesh + assembly + LU) median {np.median([r['seconds'] for r in rows]):.1f} s "
          f"for a median {int(np.median([r['unknowns'] for r in rows])):d} unknowns; "
          f"slowest {max(r['seconds'] for r in rows):.1f} s for "
          f"{max(r['unknowns'] for r in rows):d} unknowns")
    if args.json:
        with open(args.json, "w") as f:
            json.dump(rows, f, indent=1)
    return rows


if __name__ == "__main__":
    sys.exit(0 if main() is not None else 1)
