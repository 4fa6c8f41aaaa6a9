r"""Compiled (numba) kernels of the general method and of Sommerfeld's solution, fused.

Pure array functions: every argument is an array or a number that the callers
(:mod:`harbor.solver.layout`, :mod:`harbor.solver.kernels.sommerfeld`) prepare from the
layout and the waves. The loops run point by point with the components innermost, so
what depends on the point only (its position relative to every edge and obstacle) is
computed once for all components, and each component's field is summed in registers and
reduced to energy at once: no complex temporaries over the grid.

The arithmetic is that of the numpy functions they replace
(:func:`harbor.solver.layout.general_field` with ``higher_order=False``,
:func:`harbor.solver.kernels.sommerfeld.semi_infinite`,
:func:`harbor.solver.kernels.wedge.wedge_diffracted`), with the same tolerances; the
only differences are rounding, the table of the diffraction amplitude (error < 1e-12,
the same table as the numpy path) and the table of exp(i x) (error < 1e-12). The tests
compare both with scipy's Fresnel integrals and mpmath.
"""

from __future__ import annotations

import numpy as np

from harbor.solver.kernels._compiled import HAVE_NUMBA, _CIS_N, _CIS_TAB
from harbor.solver.kernels.fresnel import _DER as _A_DER
from harbor.solver.kernels.fresnel import _N_TABLE as _A_N
from harbor.solver.kernels.fresnel import _VAL as _A_VAL

_EPS = 1e-9
_TWO_PI = 2.0 * np.pi

if HAVE_NUMBA:
    import numba

    from harbor.solver.kernels._compiled import _cis

    _jit = dict(cache=True, nogil=True, error_model="numpy")

    @numba.njit(cache=True, inline="always", error_model="numpy")
    def _amp(t, val, der, ntab):
        """(Re, Im) of the diffraction amplitude A(t) by the table of fresnel.py."""
        u = 1.0 / (1.0 + t)
        pos = u * ntab
        i = min(int(pos), ntab - 1)
        s = pos - i
        s2 = s * s
        s3 = s2 * s
        h = 1.0 / ntab
        h00 = 2 * s3 - 3 * s2 + 1
        h01 = -2 * s3 + 3 * s2
        h10 = (s3 - 2 * s2 + s) * h
        h11 = (s3 - s2) * h
        a = val[i]
        b = val[i + 1]
        c = der[i]
        d = der[i + 1]
        re = h00 * a.real + h01 * b.real + h10 * c.real + h11 * d.real
        im = h00 * a.imag + h01 * b.imag + h10 * c.imag + h11 * d.imag
        return re, im

    @numba.njit(cache=True, inline="always", error_model="numpy")
    def _half_roots(xl, yl):
        """sqrt(r + x) and sqrt(r - x), signed as cos and sin of theta/2 (theta = arg(x - i y)):
        sqrt(2kr) cos(theta/2) = sqrt(k) sqrt(r + x), without cancellation."""
        r = np.sqrt(xl * xl + yl * yl)
        if xl >= 0.0:
            rp = r + xl
            rm = yl * yl / rp if rp > 0.0 else 0.0
        else:
            rm = r - xl
            rp = yl * yl / rm
        a = np.sqrt(rp)
        if yl > 0.0:
            a = -a
        return a, np.sqrt(rm), r

    @numba.njit(cache=True, inline="always", error_model="numpy")
    def _within(s, open0, open1):
        """Whether the ray meets the segment at its parameter s (an open end excluded)."""
        lo = (s > _EPS) if open0 else (s >= -_EPS)
        hi = (s < 1 - _EPS) if open1 else (s <= 1 + _EPS)
        return lo and hi

    @numba.njit(cache=True, inline="always", error_model="numpy")
    def _ray_hit(px, py, vx, vy, seg, open0, open1, skip, scale):
        """harbor.geometry.visibility.ray_blocked for one point (segment ``skip`` left out)."""
        for i in range(seg.shape[0]):
            if i == skip:
                continue
            ax = seg[i, 0]
            ay = seg[i, 1]
            ex = seg[i, 2] - ax
            ey = seg[i, 3] - ay
            den = vx * ey - vy * ex
            if abs(den) < 1e-14 * np.hypot(ex, ey):
                continue
            wx = ax - px
            wy = ay - py
            t = (wx * ey - wy * ex) / den
            if not t > _EPS * scale:
                continue
            s = (wx * vy - wy * vx) / den
            if _within(s, open0[i], open1[i]):
                return True
        return False

    @numba.njit(cache=True, inline="always", error_model="numpy")
    def _ray_hit_pre(px, py, vx, vy, sx, sy, sex, sey, den, par, open0, open1, skip, scale):
        """_ray_hit with the segments' edges and the direction's reciprocal denominators
        (``den`` holds 1 / denominator) precomputed."""
        for i in range(sx.size):
            if i == skip or par[i]:
                continue
            wx = sx[i] - px
            wy = sy[i] - py
            t = (wx * sey[i] - wy * sex[i]) * den[i]
            if not t > _EPS * scale:
                continue
            s = (wx * vy - wy * vx) * den[i]
            if _within(s, open0[i], open1[i]):
                return True
        return False

    @numba.njit(cache=True, inline="always", error_model="numpy")
    def _ray_hit_cw(px, py, vx, vy, sx, sy, cw, den, par, open0, open1, scale):
        """_ray_hit_pre with the point's cross products with the segments (``cw``, which
        do not depend on the direction) precomputed: the incident wave's test."""
        for i in range(sx.size):
            if par[i]:
                continue
            t = cw[i] * den[i]
            if not t > _EPS * scale:
                continue
            wx = sx[i] - px
            wy = sy[i] - py
            s = (wx * vy - wy * vx) * den[i]
            if _within(s, open0[i], open1[i]):
                return True
        return False

    @numba.njit(cache=True, inline="always", error_model="numpy")
    def _path_hit(px, py, qx, qy, sx, sy, sex, sey, slen, skip):
        """harbor.geometry.visibility.segment_blocked for one path P-Q."""
        dx = qx - px
        dy = qy - py
        dl2 = dx * dx + dy * dy
        for i in range(sx.size):
            if i == skip:
                continue
            ex = sex[i]
            ey = sey[i]
            den = dx * ey - dy * ex
            # |den| > 1e-14 |segment| |path|, squared: no square root per test
            if not den * den > 1e-28 * slen[i] * slen[i] * dl2:
                continue
            inv = 1.0 / den
            wx = sx[i] - px
            wy = sy[i] - py
            t = (wx * ey - wy * ex) * inv
            if not (t > _EPS and t < 1 - _EPS):
                continue
            s = (wx * dy - wy * dx) * inv
            if s >= -_EPS and s <= 1 + _EPS:
                return True
        return False

    @numba.njit(**_jit)
    def rays_blocked(px, py, vx, vy, seg, open0, open1, scale):
        """ray_blocked for points px, py and one direction per point (vx, vy)."""
        out = np.zeros(px.size, np.bool_)
        for p in range(px.size):
            out[p] = _ray_hit(px[p], py[p], vx[p], vy[p], seg, open0, open1, -1, scale)
        return out

    @numba.njit(cache=True, inline="always", error_model="numpy")
    def _wedge(r, phi, phi0, n, k, val, der, ntab):
        """(Re, Im) of wedge_diffracted(..., parts="all") at one point."""
        root = np.sqrt(2.0 * k * r)
        inv_2pin = 1.0 / (2.0 * np.pi * n)
        inv_2n = 0.5 / n
        tr = 0.0
        ti = 0.0
        for bi in range(2):
            beta = phi - phi0 if bi == 0 else phi + phi0
            for si in range(2):
                sign = 1.0 if si == 0 else -1.0
                big_n = np.floor((beta + sign * np.pi) * inv_2pin + 0.5)
                eps = np.pi + sign * beta - sign * 2.0 * np.pi * n * big_n
                a = eps * inv_2n
                if abs(eps) > 0.1:
                    # away from the boundary: the tabulated sine and cosine (error < 1e-12)
                    # keep the ratio's relative error below 1e-11
                    ce, sne = _cis(0.5 * eps, _CIS_TAB)
                    se = abs(sne)
                    ca, sa = _cis(a, _CIS_TAB)
                    ratio = ca * se / sa
                else:
                    se = abs(np.sin(0.5 * eps))
                    if abs(a) < 1e-9:
                        ratio = n if eps >= 0 else -n
                    else:
                        # cot(a) |sin(eps/2)|, one call instead of cos and sin
                        ratio = se / np.tan(a)
                ar, ai = _amp(root * se, val, der, ntab)
                tr += ratio * ar
                ti += ratio * ai
        c, s = _cis(k * r, _CIS_TAB)
        # -exp(ikr) * total / n
        f = -2.0 * inv_2n
        return (c * tr - s * ti) * f, (c * ti + s * tr) * f

    @numba.njit(cache=True, inline="always", error_model="numpy")
    def _wedge_pre(root, ckr, skr, phi, ph2c, ph2s, phnc, phns, phi0, q2c, q2s, qnc, qns, n,
                   cpn, spn, tabc, tabs, val, der, ntab):
        """_wedge with the angles' sines and cosines taken from the point's (phi) and the
        direction's (phi0) precomputed ones by the addition formulas: no trigonometric
        call away from the boundaries (|eps| > 0.1), the direct formula near them.
        ``root`` = sqrt(2 k r) and (ckr, skr) = (cos kr, sin kr), shared by the
        components of one wavenumber."""
        inv_2pin = 1.0 / (2.0 * np.pi * n)
        inv_2n = 0.5 / n
        tr = 0.0
        ti = 0.0
        for bi in range(2):
            if bi == 0:
                beta = phi - phi0
                cb2 = ph2c * q2c + ph2s * q2s
                sb2 = ph2s * q2c - ph2c * q2s
                cbn = phnc * qnc + phns * qns
                sbn = phns * qnc - phnc * qns
            else:
                beta = phi + phi0
                cb2 = ph2c * q2c - ph2s * q2s
                sb2 = ph2s * q2c + ph2c * q2s
                cbn = phnc * qnc - phns * qns
                sbn = phns * qnc + phnc * qns
            for si in range(2):
                sign = 1.0 if si == 0 else -1.0
                big_n = np.floor((beta + sign * np.pi) * inv_2pin + 0.5)
                eps = np.pi + sign * beta - sign * 2.0 * np.pi * n * big_n
                ni = int(big_n)
                if abs(eps) > 0.1 and ni >= -4 and ni <= 4:
                    # |sin(eps/2)| = |cos(beta/2 - pi n N)|; cot(eps/2n) = cot(pi/2n + s beta/2n)
                    se = abs(cb2 * tabc[ni + 4] + sb2 * tabs[ni + 4])
                    ct = cpn * cbn - spn * sign * sbn
                    st = spn * cbn + cpn * sign * sbn
                    ratio = ct * se / st
                else:
                    a = eps * inv_2n
                    se = abs(np.sin(0.5 * eps))
                    if abs(a) < 1e-9:
                        ratio = n if eps >= 0 else -n
                    else:
                        ratio = se / np.tan(a)
                ar, ai = _amp(root * se, val, der, ntab)
                tr += ratio * ar
                ti += ratio * ai
        f = -2.0 * inv_2n
        return (ckr * tr - skr * ti) * f, (ckr * ti + skr * tr) * f

    @numba.njit(cache=True, inline="always", error_model="numpy")
    def _cell_energy(ar, ai, ps, pa, nt, ha, hk):
        """|sum of waves|^2 with each cross term averaged over the component's cell:
        sum |a_m|^2 + 2 sum_(m<n) Re(a_m conj a_n) sinc(ha dpa) sinc(hk dps). The sinc
        kernel is positive definite (Bochner), so the result is never negative."""
        q = 0.0
        for m in range(nt):
            q += ar[m] * ar[m] + ai[m] * ai[m]
        for m in range(nt - 1):
            for j in range(m + 1, nt):
                cross = ar[m] * ar[j] + ai[m] * ai[j]
                if cross != 0.0:
                    # sinc(xa) sinc(xk) with one division
                    xa = ha * (pa[m] - pa[j])
                    xk = hk * (ps[m] - ps[j])
                    num = 1.0
                    den = 1.0
                    if abs(xa) < 1e-4:
                        num = 1.0 - xa * xa / 6.0
                    else:
                        num = _cis(xa, _CIS_TAB)[1]
                        den = xa
                    if abs(xk) < 1e-4:
                        num *= 1.0 - xk * xk / 6.0
                    else:
                        num *= _cis(xk, _CIS_TAB)[1]
                        den *= xk
                    q += 2.0 * cross * num / den
        return q

    @numba.njit(**_jit)
    def general_components(px, py, seg, open0, open1, face_seg, ray_scale,
                           tipx, tipy, kind, inx, iny, vis,
                           kk, dx, dy, w, wf2,
                           face_on, fnx, fny, frx, fry, frn, fph,
                           elit, eph_r, eph_i, eysgn, c0, s0, bface0, bwater, bphi0, bn,
                           bcfg, cfg_face0, cfg_n, cfg_cpn, cfg_spn, cfg_tabc, cfg_tabs,
                           q2c, q2s, qnc, qns, hda, hdk, fpa, frax, fray, ept, epa,
                           mode, e0, e2, anyp, field):
        """Fields of many components of the general method (first order) at many points.

        mode 0: ``e0 += w |u|^2``, ``e2 += wf2 |u|^2``, ``anyp[c] |= |u|^2 > 0``;
        mode 1: ``field[c, p] = u``.

        In mode 0 the interference of the component's waves (incident, reflected,
        diffracted) is averaged over its cell of the spectrum when ``hda`` or ``hdk`` is
        non-zero: the cross term of waves m and n is multiplied by
        ``sinc(hda[c] (pa_m - pa_n)) sinc(hdk[c] (ps_m - ps_n))``, ps being each wave's
        path length (m) and pa its derivative with the direction of travel (m/rad);
        ``hda = k dalpha / 2``, ``hdk = dk / 2``. ``fpa``, ``frax``/``fray``, ``ept`` and
        ``epa`` are those derivatives' ingredients per component (face and edge).
        """
        n = px.size
        nc = kk.size
        ne = tipx.size
        nf = face_seg.size
        m = seg.shape[0]
        sx = np.empty(m)
        sy = np.empty(m)
        sex = np.empty(m)
        sey = np.empty(m)
        slen = np.empty(m)
        for i in range(m):
            sx[i] = seg[i, 0]
            sy[i] = seg[i, 1]
            sex[i] = seg[i, 2] - seg[i, 0]
            sey[i] = seg[i, 3] - seg[i, 1]
            slen[i] = np.hypot(sex[i], sey[i])
        den = np.empty((nc, m))
        par = np.zeros((nc, m), np.bool_)
        for c in range(nc):
            for i in range(m):
                den[c, i] = (-dx[c]) * sey[i] - (-dy[c]) * sex[i]
                par[c, i] = abs(den[c, i]) < 1e-14 * slen[i]
                # multiplications in the innermost tests instead of divisions
                den[c, i] = 0.0 if par[c, i] else 1.0 / den[c, i]
        sqk = np.sqrt(kk)
        rr = np.empty(ne)
        bphi = np.empty((ne, 2))
        bph2c = np.empty((ne, 2))
        bph2s = np.empty((ne, 2))
        bphnc = np.empty((ne, 2))
        bphns = np.empty((ne, 2))
        xl0 = np.empty(ne)
        yl0 = np.empty(ne)
        chp = np.empty(ne)
        shp = np.empty(ne)
        ang = np.empty(ne)
        nt_max = 1 + nf + ne
        tar = np.empty(nt_max)
        tai = np.empty(nt_max)
        tps = np.empty(nt_max)
        tpa = np.empty(nt_max)
        ekc = np.empty(ne)
        eks = np.empty(ne)
        ert = np.empty(ne)
        cw = np.empty(m)
        for p in range(n):
            x = px[p]
            y = py[p]
            for i in range(m):
                cw[i] = (sx[i] - x) * sey[i] - (sy[i] - y) * sex[i]
            # what depends on the point only: its place relative to every edge
            for e in range(ne):
                rx = x - tipx[e]
                ry = y - tipy[e]
                if kind[e] == 1:
                    xl = rx * inx[e] + ry * iny[e]
                    yl = rx * (-iny[e]) + ry * inx[e]
                    xl0[e] = xl
                    yl0[e] = yl
                    hc, hs, r = _half_roots(xl, yl)
                    rr[e] = r
                    chp[e] = abs(hc)
                    shp[e] = hs
                else:
                    rr[e] = np.hypot(rx, ry)
                    ang[e] = np.arctan2(ry, rx)
                    for g in range(2):
                        ph = np.mod(ang[e] - cfg_face0[e, g], 2 * np.pi)
                        bphi[e, g] = ph
                        bph2c[e, g] = np.cos(0.5 * ph)
                        bph2s[e, g] = np.sin(0.5 * ph)
                        bphnc[e, g] = np.cos(0.5 * ph / cfg_n[e, g])
                        bphns[e, g] = np.sin(0.5 * ph / cfg_n[e, g])
            e0p = 0.0
            e2p = 0.0
            klast = -1.0
            for c in range(nc):
                k = kk[c]
                if k != klast:
                    # what depends on the point and the wavenumber only: shared by the
                    # components of one frequency band, which arrive one after another
                    klast = k
                    for e in range(ne):
                        ekc[e], eks[e] = _cis(k * rr[e], _CIS_TAB)
                        ert[e] = np.sqrt(2.0 * k * rr[e])
                vx = -dx[c]
                vy = -dy[c]
                ur = 0.0
                ui = 0.0
                damp = mode == 0 and (hda[c] != 0.0 or hdk[c] != 0.0)
                nt = 0
                # incident wave
                if not _ray_hit_cw(x, y, vx, vy, sx, sy, cw, den[c], par[c], open0, open1,
                                   ray_scale):
                    ps = x * dx[c] + y * dy[c]
                    cr, ci = _cis(k * ps, _CIS_TAB)
                    ur += cr
                    ui += ci
                    if damp:
                        tar[nt] = cr
                        tai[nt] = ci
                        tps[nt] = ps
                        tpa[nt] = y * dx[c] - x * dy[c]
                        nt += 1
                # first-order reflection from the faces the waves strike
                for f in range(nf):
                    if not face_on[c, f]:
                        continue
                    si = face_seg[f]
                    ax = seg[si, 0]
                    ay = seg[si, 1]
                    front = (x - ax) * fnx[c, f] + (y - ay) * fny[c, f]
                    if not front > 0:
                        continue
                    back = front / frn[c, f]
                    qx = x - back * frx[c, f]
                    qy = y - back * fry[c, f]
                    tx = seg[si, 2] - ax
                    ty = seg[si, 3] - ay
                    sa = ((qx - ax) * tx + (qy - ay) * ty) / (tx * tx + ty * ty)
                    if not (sa >= -1e-9 and sa <= 1 + 1e-9):
                        continue
                    if _ray_hit_pre(qx, qy, vx, vy, sx, sy, sex, sey, den[c], par[c], open0,
                                    open1, si, ray_scale):
                        continue
                    if _path_hit(x, y, qx, qy, sx, sy, sex, sey, slen, si):
                        continue
                    phase = fph[c, f] + (x - ax) * frx[c, f] + (y - ay) * fry[c, f]
                    cr, ci = _cis(k * phase, _CIS_TAB)
                    ur += cr
                    ui += ci
                    if damp:
                        tar[nt] = cr
                        tai[nt] = ci
                        tps[nt] = phase
                        tpa[nt] = fpa[c, f] + (x - ax) * frax[c, f] + (y - ay) * fray[c, f]
                        nt += 1
                # diffraction by each lit edge, where it is visible
                for e in range(ne):
                    if not elit[c, e] or not vis[e, p]:
                        continue
                    if kind[e] == 1:
                        ch = chp[e]
                        if eysgn[c, e] * yl0[e] > 0.0:
                            ch = -ch
                        sk = sqk[c]
                        ch *= sk
                        sh = shp[e] * sk
                        s1 = ch * c0[c, e] + sh * s0[c, e]
                        s2 = ch * c0[c, e] - sh * s0[c, e]
                        a1r, a1i = _amp(abs(s1), _A_VAL, _A_DER, _A_N)
                        a2r, a2i = _amp(abs(s2), _A_VAL, _A_DER, _A_N)
                        g1 = -1.0 if s1 >= -1e-9 else 1.0
                        g2 = -1.0 if s2 >= -1e-9 else 1.0
                        tr = g1 * a1r + g2 * a2r
                        ti = g1 * a1i + g2 * a2i
                        cr = ekc[e]
                        ci = eks[e]
                        wr = cr * tr - ci * ti
                        wi = cr * ti + ci * tr
                    else:
                        g = bcfg[c, e]
                        phi = bphi[e, g]
                        if not phi <= bwater[c, e] + 1e-12:
                            continue
                        wr, wi = _wedge_pre(ert[e], ekc[e], eks[e], phi, bph2c[e, g],
                                            bph2s[e, g],
                                            bphnc[e, g], bphns[e, g], bphi0[c, e], q2c[c, e],
                                            q2s[c, e], qnc[c, e], qns[c, e], bn[c, e],
                                            cfg_cpn[e, g], cfg_spn[e, g], cfg_tabc[e, g],
                                            cfg_tabs[e, g], _A_VAL, _A_DER, _A_N)
                    pr = eph_r[c, e]
                    pi_ = eph_i[c, e]
                    ur += pr * wr - pi_ * wi
                    ui += pr * wi + pi_ * wr
                    if damp:
                        tar[nt] = pr * wr - pi_ * wi
                        tai[nt] = pr * wi + pi_ * wr
                        tps[nt] = rr[e] + ept[c, e]
                        tpa[nt] = epa[c, e]
                        nt += 1
                if mode == 1:
                    field[c, p] = complex(ur, ui)
                else:
                    if damp and nt > 1:
                        q = _cell_energy(tar, tai, tps, tpa, nt, hda[c], hdk[c])
                    else:
                        q = ur * ur + ui * ui
                    e0p += w[c] * q
                    e2p += wf2[c] * q
                    if q > 0:
                        anyp[c] = True
            if mode == 0:
                e0[p] += e0p
                e2[p] += e2p

    @numba.njit(**_jit)
    def _semi_infinite_kernel(x, y, k, ca, sa, c0, s0, out):
        """Sommerfeld's full solution (incident, reflected, diffracted) point by point."""
        sk = np.sqrt(k)
        for p in range(x.size):
            xl = x[p]
            yl = y[p]
            hc, hs, r = _half_roots(xl, yl)
            hc *= sk
            hs *= sk
            s1 = hc * c0 + hs * s0
            s2 = hc * c0 - hs * s0
            a1r, a1i = _amp(abs(s1), _A_VAL, _A_DER, _A_N)
            a2r, a2i = _amp(abs(s2), _A_VAL, _A_DER, _A_N)
            g1 = -1.0 if s1 >= -1e-9 else 1.0
            g2 = -1.0 if s2 >= -1e-9 else 1.0
            tr = g1 * a1r + g2 * a2r
            ti = g1 * a1i + g2 * a2i
            cr, ci = _cis(k * r, _CIS_TAB)
            ur = cr * tr - ci * ti
            ui = cr * ti + ci * tr
            if s1 >= -1e-9:
                c, s = _cis(k * (xl * ca + yl * sa), _CIS_TAB)
                ur += c
                ui += s
            if s2 >= -1e-9:
                c, s = _cis(k * (xl * ca - yl * sa), _CIS_TAB)
                ur += c
                ui += s
            out[p] = complex(ur, ui)


def semi_infinite_fused(x, y, k, alpha):
    r"""Sommerfeld's solution at local points (flattened), compiled; see
    :func:`harbor.solver.kernels.sommerfeld.semi_infinite` for the formula.

    Parameters
    ----------
    x, y : numpy.ndarray
        Local coordinates (m), 1-D, same size.
    k : float
        Wavenumber (rad/m).
    alpha : float
        Direction of travel (rad), 0 < alpha < pi.

    Returns
    -------
    numpy.ndarray of complex
        Field normalised by the incident amplitude.

    Notes
    -----
    With :math:`\theta = \arg(x - iy)`, :math:`\theta_0 = \pi - \alpha`,
    :math:`\sqrt{2kr}\cos\tfrac{\theta \mp \theta_0}{2} = \sqrt{k}\,(\pm_y\sqrt{r + x}
    \cos\tfrac{\theta_0}{2} \pm \sqrt{r - x}\sin\tfrac{\theta_0}{2})` (the sign of
    the first root negative for y > 0), so no arctangent is needed;
    :math:`u = \chi_1 e^{ik(x\cos\alpha + y\sin\alpha)} + \chi_2 e^{ik(x\cos\alpha -
    y\sin\alpha)} - \sum_j \operatorname{sgn}(s_j) e^{ikr} A(|s_j|)`.

    References
    ----------
    .. [1] Sommerfeld, A. (1896). Mathematische Theorie der Diffraction.
       *Mathematische Annalen*, 47, 317-374.
    .. [2] Penney, W. G., & Price, A. T. (1952). The diffraction theory of sea waves and
       the shelter afforded by breakwaters. *Philosophical Transactions of the Royal
       Society of London A*, 244(882), 236-253.
    """
    theta0 = np.pi - alpha
    out = np.empty(x.size, complex)
    _semi_infinite_kernel(np.ascontiguousarray(x, float), np.ascontiguousarray(y, float),
                          float(k), float(np.cos(alpha)), float(np.sin(alpha)),
                          float(np.cos(0.5 * theta0)), float(np.sin(0.5 * theta0)), out)
    return out
