r"""Directional random seas over a layout (Goda, Takayama & Suzuki 1978).

Each component of the discretised directional spectrum
(:func:`harbor.waves.spectra.random_components`) is solved as a regular sea from its own
direction over the whole layout; the effective diffraction coefficient and the period
ratio follow from the energy of the components.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from harbor.solver.kernels.gap import auto_method, gap_exact_energy, gap_superposition
from harbor.solver.layout import (
    METHOD_GAP_EXACT,
    METHOD_GAP_SUPERPOSITION,
    METHOD_GENERAL,
    active_layout,
    classic_entrance,
    entrance_blend,
    entrance_frames,
    gap_field,
    general_components,
    cached_head_visibility,
    general_field,
)
from harbor.solver.kernels._compiled import HAVE_NUMBA, blas_limited
from harbor.solver.kernels.gap import gap_exact_many
from harbor.geometry.entrance import basin_mask
from harbor.geometry.visibility import layout_segments
from harbor.waves.dispersion import wavelength as _wavelength

#: In ``method="auto"``, random seas use the exact gap solution for every component of a
#: classic entrance narrower than this many wavelengths (its cost, batched over the
#: directions of a frequency band, is below that of the per-direction superposition).
BATCH_EXACT_BELOW = 16.0

#: Use the fused, compiled components of the general method
#: (:func:`harbor.solver.layout.general_components`); False runs the former per-component
#: numpy path (:func:`_random_sea_field_reference`), kept for the benchmarks.
FUSED = HAVE_NUMBA

#: Points per block: bounds the memory of a random-sea solve (one block holds a complex
#: field per direction of one frequency band).
CHUNK = 65536


@dataclass
class RandomResult:
    """Effective K' and period ratio at the points, and what was used."""

    kd: np.ndarray
    period_ratio: np.ndarray
    methods: dict = field(default_factory=dict)      # method -> share of energy
    reaching: float = 0.0                             # share of energy from open water


#: Average each component's interference over its cell of the spectrum (see
#: :func:`harbor.solver.layout.general_components`); False treats every component as a
#: regular sea, as the per-component numpy path does.
CELL_AVERAGED = True


def _neighbour_widths(v):
    """Width of each value's cell between the midpoints to its sorted neighbours (the end
    cells as wide as their one neighbour gap); 0 for a single value."""
    v = np.asarray(v, float)
    out = np.zeros(v.size)
    if v.size < 2:
        return out
    order = np.argsort(v)
    s = v[order]
    gaps = np.diff(s)
    w = np.empty(s.size)
    w[1:-1] = 0.5 * (gaps[1:] + gaps[:-1])
    w[0] = gaps[0]
    w[-1] = gaps[-1]
    out[order] = w
    return out


def spectral_cells(frequency, angle, depth, g=9.81):
    """Each component's cell of the discretised spectrum: direction width (rad) within
    its frequency band and wavenumber width (rad/m) among the bands, each between the
    midpoints to the neighbouring nodes.

    Parameters
    ----------
    frequency, angle : numpy.ndarray
        The components' frequencies (Hz) and direction offsets (rad), as in
        :class:`harbor.waves.spectra.Components`.
    depth : float
        Water depth (m).
    g : float
        Gravity (m/s^2).

    Returns
    -------
    dalpha, dk : numpy.ndarray
        Per component.
    """
    frequency = np.asarray(frequency, float)
    angle = np.asarray(angle, float)
    bands = np.unique(frequency)
    kb = np.array([2 * np.pi / float(_wavelength(1.0 / f, depth, g)) for f in bands])
    dkb = _neighbour_widths(kb)
    dalpha = np.zeros(frequency.size)
    dk = np.zeros(frequency.size)
    for f, d in zip(bands, dkb):
        sel = frequency == f
        dalpha[sel] = _neighbour_widths(angle[sel])
        dk[sel] = d
    return dalpha, dk


def _progress_noop(done, total):
    return None


def _random_sea_field_reference(layout, px, py, components, depth, principal_alpha, g=9.81,
                                method="auto", progress=None):
    """The former per-component path of :func:`random_sea_field` (numpy, one
    :func:`harbor.solver.layout.general_field` call per component), for the benchmarks."""
    return _random_sea_field(layout, px, py, components, depth, principal_alpha, g, method,
                             progress, fused=False)


def random_sea_field(layout, px, py, components, depth, principal_alpha, g=9.81,
                     method="auto", progress=None):
    r"""Effective diffraction coefficient and period ratio of a directional random sea.

    Parameters
    ----------
    layout : harbor.geometry.layout.Layout
    px, py : numpy.ndarray
        Points (m, work frame), same shape.
    components : harbor.waves.spectra.Components
        The discretised directional spectrum.
    depth : float
        Water depth (m), for each component's wavelength.
    principal_alpha : float
        Principal direction of travel (rad, math angle, work frame).
    g : float
        Gravity (m/s^2).
    method : {"auto", "general", "superposition", "exact"}
        As :func:`harbor.solver.layout.layout_field`.
    progress : callable, optional
        Called as ``progress(done, total)`` after each frequency band.

    Returns
    -------
    RandomResult

    Notes
    -----
    .. math::

        K_{eff}^2 = \frac{\sum_{f,\theta} K'^2(f,\theta)\, S(f) G(\theta|f)\,\Delta f\Delta\theta}
                         {m_0},
        \qquad
        \frac{T_{m02}^{lee}}{T_{m02}^{inc}} =
        \sqrt{\frac{\sum w K'^2 \,/\, \sum w K'^2 f^2}{\sum w \,/\, \sum w f^2}}

    with w the components' energy fractions (:math:`T_{m02} = \sqrt{m_0/m_2}`). A component
    that cannot reach a point from open water contributes nothing there.

    With :data:`CELL_AVERAGED` (the default) each component of the general method stands
    for its cell of the spectrum (:func:`spectral_cells`): the cross terms of its waves
    are integrated over the cell by Filon's rule
    (:func:`harbor.solver.layout.general_components`), so standing waves that a fixed set
    of components only samples average out as in the continuous integral. The exact gap
    solution inside a classic entrance keeps its components as regular seas.

    References
    ----------
    .. [1] Goda, Y., Takayama, T., & Suzuki, Y. (1978). Diffraction diagrams for
       directional random waves. *Proc. 16th International Conference on Coastal
       Engineering*, ASCE, 628-650.
    .. [2] Goda, Y. (2010). *Random Seas and Design of Maritime Structures* (3rd ed.).
       World Scientific, sect. 3.2.
    .. [3] Filon, L. N. G. (1928). On a quadrature formula for trigonometric integrals.
       *Proc. R. Soc. Edinburgh*, 49, 38-47.
    """
    with blas_limited():
        return _random_sea_field(layout, px, py, components, depth, principal_alpha, g,
                                 method, progress, fused=FUSED)


def _random_sea_field(layout, px, py, components, depth, principal_alpha, g, method,
                      progress, fused):
    progress = progress or _progress_noop
    px, py = np.broadcast_arrays(np.asarray(px, float), np.asarray(py, float))
    shape = px.shape
    xf = px.ravel()
    yf = py.ravel()
    freq = np.asarray(components.frequency)
    weight = np.asarray(components.weight)
    angle = np.asarray(components.angle)
    e0 = np.zeros(xf.size)
    e2 = np.zeros(xf.size)
    layout, _ = active_layout(layout)      # arms wholly on land do nothing
    segments = layout_segments(layout)
    visible_all = cached_head_visibility(layout, xf, yf, segments)
    bands = np.unique(freq)
    if fused and CELL_AVERAGED:
        cell_a, cell_k = spectral_cells(freq, angle, depth, g)
    else:
        cell_a = cell_k = np.zeros(freq.size)
    vis_out = {}
    blend = {}
    methods: dict = {}
    reaching = 0.0
    for bi, f in enumerate(bands):
        sel = np.nonzero(freq == f)[0]
        L = float(_wavelength(1.0 / f, depth, g))
        k_alpha = principal_alpha + angle[sel]
        w = weight[sel]
        ent = classic_entrance(layout, L) if method != "general" else None
        batched = np.zeros(sel.size, bool)
        inside = None
        use_of = {}
        if ent is not None:
            inside = basin_mask(layout, ent, xf, yf, segments)
            bx, by = xf[inside], yf[inside]
            e = ent.axis
            n = np.array([-e[1], e[0]])
            side, local, ok = entrance_frames(ent, k_alpha)
            flip = side < 0
            # the exact gap solution is symmetric in y, so the side only sets the frame
            for use in ("exact", "superposition"):
                if method in ("exact", "superposition"):
                    pick = ok & (use == method)
                elif ent.width < BATCH_EXACT_BELOW * L:
                    # batched over directions the exact solution is both more accurate and
                    # cheaper than per-direction superpositions
                    pick = ok & (use == "exact")
                else:
                    pick = ok & np.array([auto_method(L, a, ent.width) == use for a in local])
                if not np.any(pick):
                    continue
                batched |= pick
                use_of.update({int(j): use for j in np.nonzero(pick)[0]})
                name = METHOD_GAP_EXACT if use == "exact" else METHOD_GAP_SUPERPOSITION
                methods[name] = methods.get(name, 0.0) + float(w[pick].sum())
                for sgn in (+1, -1):
                    grp = np.nonzero(pick & ((~flip) if sgn > 0 else flip))[0]
                    if grp.size == 0:
                        continue
                    ny = sgn * n
                    cx = bx - ent.center[0]
                    cy = by - ent.center[1]
                    xl = cx * e[0] + cy * e[1]
                    yl = cx * ny[0] + cy * ny[1]
                    if use == "exact":
                        # compiled and reduced to energy inside: no per-direction fields
                        be0 = gap_exact_energy(xl, yl, L, local[grp], ent.width, w[grp])
                    else:
                        be0 = np.zeros(bx.size)
                        for a, wa in zip(local[grp], w[grp]):
                            for s in range(0, bx.size, CHUNK):
                                u = gap_superposition(xl[s:s + CHUNK], yl[s:s + CHUNK], L, a,
                                                      ent.width)
                                be0[s:s + CHUNK] += wa * (u.real**2 + u.imag**2)
                    e0[inside] += be0
                    e2[inside] += f * f * be0
                reaching += float(w[pick].sum())
        if fused:
            reaching += _general_band(layout, xf, yf, L, f, k_alpha, w, batched, inside, ent,
                                      use_of, segments, visible_all, e0, e2, methods,
                                      (cell_a[sel], cell_k[sel]))
            progress(bi + 1, bands.size)
            continue
        # the batched components still need the general method outside the basin
        outside = ~inside if inside is not None else None
        for j in range(sel.size):
            if batched[j]:
                if outside is None or not np.any(outside):
                    continue
                key = id(outside)
                if key not in vis_out:
                    vis_out.clear()
                    vis_out[key] = [v[outside] for v in visible_all]
                u, _ = general_field(layout, xf[outside], yf[outside], L, k_alpha[j],
                                     segments=segments, visible=vis_out[key],
                                     higher_order=False)
                if (key, L) not in blend:
                    blend.clear()
                    blend[(key, L)] = entrance_blend(layout, ent, xf[outside], yf[outside],
                                                     L, segments)
                wb = blend[(key, L)]
                zone = wb > 0
                if np.any(zone):
                    # the same hand-over to the gap solution as a regular sea (no step on
                    # the entrance line)
                    got = gap_field(ent, xf[outside][zone], yf[outside][zone], L, k_alpha[j],
                                    method=use_of[j])
                    if got is not None:
                        u[zone] = wb[zone] * got[0] + (1.0 - wb[zone]) * u[zone]
                p = u.real**2 + u.imag**2
                e0[outside] += w[j] * p
                e2[outside] += w[j] * f * f * p
                continue
            u, n_lit = general_field(layout, xf, yf, L, k_alpha[j], segments=segments,
                                     visible=visible_all, higher_order=False)
            p = u.real**2 + u.imag**2
            e0 += w[j] * p
            e2 += w[j] * f * f * p
            methods[METHOD_GENERAL] = methods.get(METHOD_GENERAL, 0.0) + float(w[j])
            if n_lit or np.any(p > 0):
                reaching += float(w[j])
        progress(bi + 1, bands.size)
    inc_m2 = float(np.sum(weight * freq**2))
    inc_m0 = float(np.sum(weight))
    kd = np.sqrt(e0 / inc_m0)
    with np.errstate(divide="ignore", invalid="ignore"):
        ratio = np.sqrt((e0 / e2) / (inc_m0 / inc_m2))
    ratio = np.where(e0 > 1e-12 * inc_m0, ratio, np.nan)
    return RandomResult(kd=kd.reshape(shape), period_ratio=ratio.reshape(shape),
                        methods=methods, reaching=reaching)


def _general_band(layout, xf, yf, L, f, k_alpha, w, batched, inside, ent, use_of, segments,
                  visible_all, e0, e2, methods, cells):
    """The general method's share of one frequency band, fused: the components not
    solved by the gap kernels over all points, and those that are outside the basin
    (with the same hand-over to the gap solution near the entrance as a regular sea).
    ``cells`` are the components' cells (:func:`spectral_cells`). Adds to ``e0``, ``e2``
    and ``methods``; returns the energy that reaches the layout."""
    reaching = 0.0
    ff = f * f
    free = np.nonzero(~batched)[0]
    if free.size:
        a0, a2, lit, reach = general_components(
            layout, xf, yf, np.full(free.size, L), k_alpha[free], w[free],
            np.array([w[j] * f * f for j in free]), segments=segments, visible=visible_all,
            cells=(cells[0][free], cells[1][free]))
        e0 += a0
        e2 += a2
        for j, jl, jr in zip(free, lit, reach):
            methods[METHOD_GENERAL] = methods.get(METHOD_GENERAL, 0.0) + float(w[j])
            if jl or jr:
                reaching += float(w[j])
    bat = np.nonzero(batched)[0]
    if bat.size == 0 or inside is None:
        return reaching
    out_idx = np.nonzero(~inside)[0]
    if out_idx.size == 0:
        return reaching
    ox, oy = xf[out_idx], yf[out_idx]
    vis_o = [v[out_idx] for v in visible_all]
    wb = entrance_blend(layout, ent, ox, oy, L, segments)
    zone = wb > 0
    rest = np.nonzero(~zone)[0]
    wfs = np.array([w[j] * f * f for j in bat])
    if rest.size:
        a0, a2, _, _ = general_components(
            layout, ox[rest], oy[rest], np.full(bat.size, L), k_alpha[bat], w[bat], wfs,
            segments=segments, visible=[v[rest] for v in vis_o],
            cells=(cells[0][bat], cells[1][bat]))
        e0[out_idx[rest]] += a0
        e2[out_idx[rest]] += a2
    zi = np.nonzero(zone)[0]
    if zi.size:
        zx, zy = ox[zi], oy[zi]
        U, _, _ = general_components(layout, zx, zy, np.full(bat.size, L), k_alpha[bat],
                                     segments=segments, visible=[v[zi] for v in vis_o],
                                     field=True)
        G = _gap_fields(ent, zx, zy, L, k_alpha[bat], [use_of[int(j)] for j in bat])
        wz = wb[zi]
        for c, j in enumerate(bat):
            u = U[c]
            if G[c] is not None:
                u = wz * G[c] + (1.0 - wz) * u
            p = u.real**2 + u.imag**2
            e0[out_idx[zi]] += w[j] * p
            e2[out_idx[zi]] += w[j] * f * f * p
    return reaching


def _gap_fields(ent, px, py, L, alphas, uses):
    """:func:`harbor.solver.layout.gap_field` for several directions at the same points,
    the exact ones batched (one Hankel matrix for all of them per side of the frame)."""
    out = [None] * len(alphas)
    side, local, usable = entrance_frames(ent, np.asarray(alphas))
    e = ent.axis
    k = 2 * np.pi / L
    for sgn in (1.0, -1.0):
        grp = [c for c in range(len(alphas))
               if usable[c] and side[c] == sgn and uses[c] == "exact"]
        if not grp:
            continue
        n = sgn * np.array([-e[1], e[0]])
        dx = px - ent.center[0]
        dy = py - ent.center[1]
        x = dx * e[0] + dy * e[1]
        y = dx * n[0] + dy * n[1]
        U = gap_exact_many(x, y, L, local[grp], ent.width)
        for col, c in enumerate(grp):
            d = np.array([np.cos(alphas[c]), np.sin(alphas[c])])
            out[c] = np.exp(1j * k * np.dot(d, ent.center)) * U[:, col]
    for c in range(len(alphas)):
        if out[c] is None and usable[c]:
            got = gap_field(ent, px, py, L, float(alphas[c]), method=uses[c])
            out[c] = None if got is None else got[0]
    return out
