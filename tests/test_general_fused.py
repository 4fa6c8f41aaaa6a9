"""The compiled, fused kernels of the general method and of Sommerfeld's solution.

Checked against independent references (mpmath at 30 digits, scipy's Fresnel integrals)
where the layout has a closed-form solution, and against the numpy evaluation of the
same method on the demo's layout (bends, land, faces) to 1e-9 in K'.
"""

import numpy as np
import pytest
from scipy import special

import harbor
from harbor.geometry.layout import Arm, Layout
from harbor.solver.layout import general_components, general_field

L = 40.0


def _scipy_semi_infinite(x, y, L, direction):
    # Sommerfeld's closed form with scipy's Fresnel integrals (Abramowitz & Stegun 1964,
    # 7.3.1-2; Sommerfeld 1896), written out here independently of harbor's kernels.
    k = 2 * np.pi / L
    r = np.hypot(x, y)
    th = np.mod(np.arctan2(-y, x), 2 * np.pi)
    th0 = np.pi - np.radians(direction)
    tot = 0
    for psi in (th - th0, th + th0):
        s = np.sqrt(2 * k * r) * np.cos(psi / 2)
        S, C = special.fresnel(s * np.sqrt(2 / np.pi))
        F = np.sqrt(np.pi / 2) * ((0.5 + C) + 1j * (0.5 + S))
        tot = tot + np.exp(-1j * k * r * np.cos(psi)) * F
    return np.exp(-0.25j * np.pi) / np.sqrt(np.pi) * tot


def test_semi_infinite_against_scipy_fresnel_on_many_points():
    rng = np.random.default_rng(3)
    x = rng.uniform(-12 * L, 12 * L, 20000)
    y = rng.uniform(-12 * L, 12 * L, 20000)
    for direction in (5.0, 47.0, 90.0, 133.0, 175.0):
        u = harbor.semi_infinite(x, y, L, direction)
        assert np.max(np.abs(u - _scipy_semi_infinite(x, y, L, direction))) < 1e-9


def test_semi_infinite_on_the_axes_and_at_the_tip(mp_semi_infinite):
    # points where the half-angle formulas meet their special cases: beyond the tip on
    # the barrier's line (theta = pi), just above and below the barrier, near the tip
    pts = [(-3 * L, 0.0), (-1e-7, 0.0), (2 * L, 1e-9), (2 * L, -1e-9), (0.0, 0.3 * L),
           (0.0, -0.3 * L), (1e-6, 1e-6), (-5 * L, 1e-12)]
    x = np.array([p[0] for p in pts])
    y = np.array([p[1] for p in pts])
    for direction in (30.0, 90.0, 160.0):
        u = harbor.semi_infinite(x, y, L, direction)
        ref = np.array([mp_semi_infinite(a, b, L, direction) for a, b in pts])
        assert np.max(np.abs(u - ref)) < 1e-9


@pytest.mark.parametrize("line", [[(0.0, 0.0), (1e5, 0.0)],
                                  [(0.0, 0.0), (1.3 * L, 0.0), (1e5, 0.0)]],
                         ids=["straight", "collinear-vertex"])
def test_fused_single_arm_is_sommerfeld(line, mp_semi_infinite):
    # One long arm, rooted far away: the general method is Sommerfeld's solution
    # (Penney & Price 1952). A collinear vertex is a wedge of water angle pi, which
    # diffracts nothing (Kouyoumjian & Pathak 1974: the n = 1 coefficient vanishes).
    lay = Layout(arms=(Arm("a", np.array(line), rooted_end=True),))
    pts = [(-1.3 * L, 2.1 * L), (1.7 * L, 1.1 * L), (0.4 * L, -0.9 * L), (3.0 * L, 4.0 * L),
           (-2.0 * L, -1.5 * L), (0.6 * L, 0.2 * L), (2.0 * L, -0.5 * L)]
    x = np.array([p[0] for p in pts])
    y = np.array([p[1] for p in pts])
    dirs = np.array([35.0, 90.0, 140.0])
    U, lit, _ = general_components(lay, x, y, np.full(3, L), np.radians(dirs), field=True)
    for c, d in enumerate(dirs):
        ref = np.array([mp_semi_infinite(a, b, L, d) for a, b in pts])
        assert np.max(np.abs(U[c] - ref)) < 1e-9
        assert lit[c] == 1
    # energy mode: the weighted sum of |u|^2 and of f^2 |u|^2
    w = np.array([0.2, 0.5, 0.3])
    e0, e2, _, reach = general_components(lay, x, y, np.full(3, L), np.radians(dirs), w,
                                          2.0 * w)
    refs = np.array([[abs(mp_semi_infinite(a, b, L, d)) ** 2 for a, b in pts] for d in dirs])
    assert np.allclose(e0, w @ refs, rtol=0, atol=1e-9)
    assert np.allclose(e2, 2.0 * (w @ refs), rtol=0, atol=2e-9)
    assert np.all(reach)


def test_fused_matches_numpy_general_method_on_the_demo(demo_scenario):
    # bends (wedges), land edges, several faces, heads, edge-on arms: the fused kernel
    # against the numpy evaluation of the same first-order method, to 1e-9
    from harbor.solver.assemble import ground_scenario

    g = ground_scenario(demo_scenario)
    lay = g.layout
    xs = np.concatenate([np.asarray(a.line, float) for a in lay.arms])
    cx, cy = xs.mean(axis=0)
    rng = np.random.default_rng(7)
    x = cx + rng.uniform(-400, 400, 1500)
    y = cy + rng.uniform(-400, 400, 1500)
    from harbor.geometry.visibility import distance_to_arms, inside_land

    keep = ~inside_land(x, y, lay) & (distance_to_arms(x, y, lay) > 0.5)
    x, y = x[keep], y[keep]
    alphas = np.linspace(0.0, 2 * np.pi, 24, endpoint=False) + 0.013
    Ls = np.linspace(20.0, 160.0, 24)
    # directions along each arm's end segment: the edge-on rule and grazing heads
    for a in lay.arms:
        p = np.asarray(a.line, float)
        t = p[-1] - p[-2]
        alphas = np.append(alphas, [np.arctan2(t[1], t[0]), np.arctan2(-t[1], -t[0])])
        Ls = np.append(Ls, [60.0, 300.0])
    U, lit, _ = general_components(lay, x, y, Ls, alphas, field=True)
    for c in range(alphas.size):
        u, n_lit = general_field(lay, x, y, Ls[c], alphas[c], higher_order=False)
        assert np.max(np.abs(np.abs(U[c]) - np.abs(u))) < 1e-9
        assert lit[c] == n_lit


def test_fused_random_sea_matches_numpy_path_through_a_classic_entrance(monkeypatch):
    # Two collinear arms rooted in land (a classic entrance): the gap kernels inside the
    # basin, the fused general method outside and the hand-over on the sea side; and a
    # detached breakwater (general method everywhere). Both against the numpy path, with
    # the components taken as regular seas as that path takes them (no cell averaging).
    from harbor.geometry.layout import Land
    from harbor.solver import random as R
    from harbor.waves import random_components
    import shapely

    B = 1.5 * L
    arms = (Arm("w", np.array([[-600.0, 0.0], [-B / 2, 0.0]]), rooted_start=True),
            Arm("e", np.array([[600.0, 0.0], [B / 2, 0.0]]), rooted_start=True))
    land = Land("shore", shapely.Polygon([(-700, -5), (-590, -5), (-590, 400), (590, 400),
                                          (590, -5), (700, -5), (700, 500), (-700, 500)]))
    gx, gy = np.meshgrid(np.linspace(-200, 200, 15), np.linspace(-150, 250, 15))
    x, y = gx.ravel(), gy.ravel() + 0.37
    comps = random_components(1.0, 7.0, s_max=10, n_freq=5, n_dir=11)
    monkeypatch.setattr(R, "CELL_AVERAGED", False)
    for i, lay in enumerate((Layout(arms=arms, lands=(land,)),
                             Layout(arms=(Arm("d", np.array([[-150.0, 0.0], [150.0, 0.0]])),)))):
        new = R.random_sea_field(lay, x, y, comps, 12.0, np.radians(70))
        old = R._random_sea_field_reference(lay, x, y, comps, 12.0, np.radians(70))
        assert np.max(np.abs(new.kd - old.kd)) < 1e-9
        ok = np.isfinite(old.period_ratio)
        assert np.array_equal(ok, np.isfinite(new.period_ratio))
        assert np.max(np.abs(new.period_ratio[ok] - old.period_ratio[ok])) < 1e-9
        assert new.methods.keys() == old.methods.keys()
        assert any("aperture" in m for m in new.methods) == (i == 0)
