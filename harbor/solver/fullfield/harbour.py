r"""Full-field wave agitation of a harbour: the mild-slope equation over its bathymetry.

:class:`HarbourModel` takes a :class:`harbor.geometry.layout.Layout`, a
:class:`harbor.geometry.bathymetry.Bathymetry` (or one depth), reflection coefficients
per arm, land polygon or land edge, and the points (and grid) where the answer is
wanted; it chooses the domain, meshes it once per wave period, factorises the system
once per period and returns complex amplitudes at the points, for one direction
(:meth:`HarbourModel.regular`), many directions (:meth:`HarbourModel.directions`, one
back-substitution each) or a directional random sea (:meth:`HarbourModel.random`).

Domain (all chosen here, never by the user)::

    layer (absorbing, depth h0)  |  exterior ring (depth h0)  |  total-field box
                                 ^ interface: the background wave is given here

Inside the total-field box the unknown is the total surface elevation; outside it, the
scattered part (total minus a background wave that solves the exterior problem exactly:
the incident plane wave plus its reflection from the straight coast that the land makes
where it leaves the domain, and zero behind that coast).
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
import shapely

from harbor.cautions import Notice
from harbor.errors import InputError
from harbor.geometry.bathymetry import Bathymetry, constant
from harbor.solver.fullfield import mesh as _mesh
from harbor.solver.fullfield.engine import FrequencySolver, Layer, Space, robin_reflection
from harbor.waves.dispersion import wavenumber

__all__ = ["HarbourModel", "FieldNotice", "FieldResult", "RandomFieldResult",
           "FieldEstimate", "full_field"]

#: Right-hand sides solved together (memory: 3 complex vectors over the dofs each).
_RHS_CHUNK = 8

#: Calibration of :meth:`HarbourModel.estimate` (fitted to the measurements of
#: ``benchmarks/fullfield_estimate.py``, docs/full-field.md). Unknowns per element-size
#: squared of water (P2: about two unknowns per triangle, Triangle's triangles somewhat
#: smaller than the area bound).
_EST_UNKNOWNS_PER_S2 = 6.7
#: Extra unknowns of one graded corner, in units of the corner's unknowns per s^2: the
#: integral of (1/s^2 - 1/s0^2) over the graded disk of s = s0 clip(d / 4 s0, 0.1, 1).
_EST_CORNER = 32.0 * np.pi * np.log(10.0)
#: Factor non-zeros = c n log2(n) (nested dissection in 2-D, George 1973).
_EST_FILL = 4.8
#: Bytes per factor non-zero (complex value + SuperLU's row indices).
_EST_BYTES_PER_NNZ = 20.0
#: Peak resident memory = base + (SuperLU's working copy while it grows the factor)
#: x factor + bytes per unknown (mesh, basis, matrices, right-hand sides).
_EST_BASE_BYTES = 2.0e8
_EST_PEAK_PER_FACTOR = 2.0
_EST_BYTES_PER_UNKNOWN = 3000.0
#: Seconds per unknown of meshing and assembly, and factorisation seconds = c n^1.5.
_EST_SECONDS_PER_UNKNOWN = 4.5e-5
_EST_FACTOR_SECONDS = 6.0e-8
#: Seconds per factor non-zero of one back-substitution.
_EST_SOLVE_SECONDS_PER_NNZ = 9.0e-9

#: Bed slope above which the mild-slope equation is outside its validity (-), about 1:3
#: (Booij 1983 found the equation accurate up to slopes of about 1:3).
MAX_SLOPE = 1.0 / 3.0

#: Default minimum water depth (m): shallower points are dry.
MIN_DEPTH = 0.3

#: Default largest mesh of one frequency band of a random sea (unknowns): about 1 GB
#: of factor and half a minute of factorisation on a 2-core laptop
#: (docs/full-field.md, "Random seas").
DEFAULT_MAX_UNKNOWNS = 400_000


#: The engine's validity notes are the project's one notice type (a str with a code).
FieldNotice = Notice


@dataclass
class FieldResult:
    """One regular sea: complex amplitudes (normalised by the incident amplitude).

    Attributes
    ----------
    points : numpy.ndarray of complex, shape (n_points,)
        At the model's points; NaN on land or dry ground.
    grid : numpy.ndarray of complex, shape (ny, nx) or None
        On the model's grid; NaN on land or dry ground.
    period, direction : float
        Period (s) and direction of travel (degrees counter-clockwise from +x).
    info : dict
        Unknowns, triangles, seconds of each step.
    """

    points: np.ndarray
    grid: np.ndarray | None
    period: float
    direction: float
    info: dict = field(default_factory=dict)


@dataclass
class RandomFieldResult:
    """A directional random sea: K_eff and the T_m02 period ratio at points and grid."""

    kd_points: np.ndarray
    ratio_points: np.ndarray
    kd_grid: np.ndarray | None
    ratio_grid: np.ndarray | None
    reaching: float
    info: dict = field(default_factory=dict)


@dataclass
class FieldEstimate:
    """What solving some wave periods will cost, estimated without meshing or factorising.

    Attributes
    ----------
    periods : numpy.ndarray, shape (n,)
        The periods asked for (s).
    solve_periods : numpy.ndarray, shape (n,)
        The period each is solved at (s): itself, or the capped period where the mesh
        of the period itself would exceed ``max_unknowns``.
    unknowns : numpy.ndarray of int, shape (n,)
        Unknowns of each period's system.
    factor_bytes : numpy.ndarray, shape (n,)
        Memory of each factorisation (bytes), and ``peak_bytes`` the estimated peak
        resident memory of solving it (mesh, matrices, factor, answers).
    seconds : numpy.ndarray, shape (n,)
        Wall-clock seconds of mesh, assembly, factorisation and back-substitutions on
        an unloaded 2-core machine of 2026 (this one).
    capped : numpy.ndarray of bool, shape (n,)
        True where the period is solved at a longer (capped) period.
    total_unknowns, total_seconds : float
        Sums over the distinct solve periods (each is factorised once).
    max_factor_bytes, max_peak_bytes : float
        Largest single factorisation and largest peak: the memory a random sea needs,
        since its bands are factorised one at a time and freed.
    """

    periods: np.ndarray
    solve_periods: np.ndarray
    unknowns: np.ndarray
    factor_bytes: np.ndarray
    peak_bytes: np.ndarray
    seconds: np.ndarray
    capped: np.ndarray
    total_unknowns: int
    total_seconds: float
    max_factor_bytes: float
    max_peak_bytes: float


@dataclass
class _Coast:
    point: np.ndarray     # on the coast line (local frame, m)
    normal: np.ndarray    # unit normal towards the sea (or either side for a thin wall)
    kr: float
    land_backed: bool
    factor: float = 1.0


@dataclass
class _Domain:
    h0: float
    k0: float
    L0: float
    margin: float
    gam: tuple
    layer: Layer
    depth_used: object
    const: bool


@dataclass
class _Period:
    period: float
    L0: float
    solver: FrequencySolver
    inside: np.ndarray
    side: np.ndarray
    coast: _Coast | None
    P: object
    found: np.ndarray
    info: dict


def _kr_value(v, what):
    try:
        a = np.asarray(v, float)
    except (TypeError, ValueError):
        raise InputError(f"reflection coefficient of {what} must be a number in [0, 1]",
                         key="reflection") from None
    if not np.all(np.isfinite(a)) or np.any(a < 0) or np.any(a > 1):
        raise InputError(f"reflection coefficient of {what} must lie in [0, 1], got {v!r}",
                         key="reflection")
    return a


class HarbourModel:
    r"""The full-field model of one harbour: domain, meshes and factorisations.

    Parameters
    ----------
    layout : harbor.geometry.layout.Layout
        Arms and land in the work frame (m).
    bathymetry : Bathymetry or float, optional
        Water depth; a float is a constant charted depth. Default: ``depth``.
    points : array_like, shape (n, 2), optional
        Points where the answer is wanted (m, work frame).
    grid : tuple of array_like, optional
        ``(x, y)`` 1-D grid coordinates (m, work frame).
    reflection : dict, optional
        K_r in [0, 1] (1: vertical wall, 0: fully absorbing) by arm or land name; a land
        name may map to a sequence with one K_r per edge of its outline (edge i joins
        vertex i and i + 1). Keys ``"default"`` (everything not named, default 1) and
        ``"dry"`` (the edge of dry ground, default 0: a beach that absorbs).
    footprints : dict, optional
        Arm name -> footprint width (m): that arm is a hole of this width (flat ends)
        instead of a thin wall with two faces.
    exterior_depth : float, optional
        Depth of the exterior and the layer (m). Default: the constant depth, or the
        median depth on the edge of the total-field box.
    still_water_level : float, optional
        Added to a float ``bathymetry`` (m above chart datum).
    min_depth : float, optional
        Shallower water is dry ground (m).
    points_per_wavelength : float, optional
        Element edges per local wavelength (P2 elements): 10 gives K' to about 0.01
        over a dozen wavelengths (docs/full-field.md).
    margin_wavelengths, layer_wavelengths : float, optional
        Free water between the wanted area and the interface, and the layer's
        thickness, in exterior wavelengths.
    g : float, optional
        Gravity (m/s^2).
    attack : dict, optional
        Main angle of attack (degrees from the wall normal, in [0, 90)) by arm or land
        name, a land name may map to one angle per edge: the wall's admittance is
        multiplied by cos(angle) (Isaacson & Qu 1990), so that it reflects exactly its
        nominal K_r at that angle instead of at normal incidence
        (:func:`harbor.solver.fullfield.engine.robin_reflection`).

    Notes
    -----
    See :func:`harbor.solver.fullfield.engine.FrequencySolver.build` for the equation
    and the module docstring for the domain. The background wave for a coast that
    leaves the domain is
    :math:`b = e^{i k_0 \mathbf d\cdot\mathbf x} + R\, e^{i k_0 \mathbf d'\cdot\mathbf x
    + i\phi}` on the sea side of the coast line and 0 behind it, with
    :math:`\mathbf d' = \mathbf d - 2(\mathbf d\cdot\mathbf n)\mathbf n`, the phase
    :math:`\phi` that makes both waves meet on the line, and R the plane-wave
    reflection of the coast's partially reflecting condition
    (:func:`harbor.solver.fullfield.engine.robin_reflection`). It is exact when the
    coast is straight and the depth is h0 outside the total-field box.

    References
    ----------
    Berkhoff, J. C. W. (1972). Computation of combined refraction-diffraction. Proc.
    13th International Conference on Coastal Engineering, ASCE, 471-490.

    Booij, N. (1983). A note on the accuracy of the mild-slope equation. Coastal
    Engineering 7(3), 191-203.
    """

    def __init__(self, layout, bathymetry=None, points=None, grid=None, reflection=None,
                 footprints=None, exterior_depth=None, still_water_level=0.0,
                 min_depth=MIN_DEPTH, points_per_wavelength=10.0, margin_wavelengths=1.0,
                 layer_wavelengths=1.5, g=9.81, attack=None):
        if bathymetry is None:
            raise InputError("the full-field model needs a bathymetry or a depth",
                             key="depth")
        if not isinstance(bathymetry, Bathymetry):
            bathymetry = constant(bathymetry, still_water_level)
        self.layout = layout
        self.bathymetry = bathymetry
        self.g = float(g)
        self.ppw = float(points_per_wavelength)
        if not (np.isfinite(self.ppw) and self.ppw >= 4):
            raise InputError("points_per_wavelength must be at least 4",
                             key="points_per_wavelength")
        self.margin = float(margin_wavelengths)
        self.layer_wl = float(layer_wavelengths)
        self.min_depth = float(min_depth)
        pts = np.zeros((0, 2)) if points is None else np.asarray(points, float).reshape(-1, 2)
        if not np.all(np.isfinite(pts)):
            raise InputError("points must be finite coordinates in m", key="points")
        self.points = pts
        if grid is not None:
            gx, gy = (np.asarray(v, float).ravel() for v in grid)
            if gx.size == 0 or gy.size == 0:
                grid = None
            else:
                grid = (gx, gy)
        self.grid = grid
        reflection = dict(reflection or {})
        self._kr_default = float(_kr_value(reflection.pop("default", 1.0), "the default"))
        self._kr_dry = float(_kr_value(reflection.pop("dry", 0.0), "dry ground"))
        names = {a.name for a in layout.arms} | {land.name for land in layout.lands}
        for key in reflection:
            if key not in names:
                raise InputError(f"reflection names '{key}', which is neither an arm nor a "
                                 f"land polygon", key="reflection")
        self._kr = {k: _kr_value(v, f"'{k}'") for k, v in reflection.items()}
        self._attack = {}
        for k, v in dict(attack or {}).items():
            if k not in names:
                raise InputError(f"attack names '{k}', which is neither an arm nor a land "
                                 f"polygon", key="attack")
            try:
                a = np.asarray(v, float)
            except (TypeError, ValueError):
                a = np.array(np.nan)
            if not np.all(np.isfinite(a)) or np.any(a < 0) or np.any(a >= 90):
                raise InputError(f"angle of attack of '{k}' must lie in [0, 90) degrees "
                                 f"from the wall normal, got {v!r}", key="attack")
            self._attack[k] = a
        self._footprints = {}
        for k, v in dict(footprints or {}).items():
            if k not in {a.name for a in layout.arms}:
                raise InputError(f"footprint names '{k}', which is not an arm",
                                 key="footprints")
            w = float(v)
            if not (np.isfinite(w) and w > 0):
                raise InputError(f"footprint width of '{k}' must be positive (m)",
                                 key="footprints")
            self._footprints[k] = w
        # The wanted area and the local origin (projected coordinates of millions of
        # metres leave the mesh too few significant digits).
        parts = [self.points]
        if grid is not None:
            parts.append(np.array([[grid[0].min(), grid[1].min()],
                                   [grid[0].max(), grid[1].max()]]))
        for a in layout.arms:
            # free heads and bends; a rooted end may lie far off (on land, or an arm
            # that runs on out of the model along the coast)
            line = np.asarray(a.line, float)
            parts.append(line[1:-1])
            parts.append(line[[i for i, rooted in ((0, a.rooted_start),
                                                   (-1, a.rooted_end)) if not rooted]])
        allp = np.concatenate([p for p in parts if len(p)]) if any(len(p) for p in parts) \
            else None
        if allp is None:
            raise InputError("the full-field model needs points, a grid or arms",
                             key="points")
        self.region = (float(allp[:, 0].min()), float(allp[:, 1].min()),
                       float(allp[:, 0].max()), float(allp[:, 1].max()))
        self.origin = np.array([0.5 * (self.region[0] + self.region[2]),
                                0.5 * (self.region[1] + self.region[3])])
        if exterior_depth is not None:
            h0 = float(exterior_depth)
        elif bathymetry.is_constant:
            h0 = float(bathymetry.depth(0.0, 0.0))
        else:
            h0 = None
        self._h0_given = h0
        self._periods = {}
        self._domains = {}
        # estimates depend on the model and the period only: planning a climate asks for
        # the same periods (and the same capped-period bisection) once per task
        self._estimates = {}
        self.notices = []
        self._noted = set()

    # -- helpers -------------------------------------------------------------------
    def _note(self, code, text, point=None, level="warning"):
        if (code, text) not in self._noted:
            self._noted.add((code, text))
            self.notices.append(Notice(code, text, point=point, level=level))

    def _segments(self):
        """Reflecting segments in the local frame: (segs (n,2,2), kr, admittance factor)."""
        o = self.origin
        segs, krs, fac = [], [], []

        def factor(name, n):
            v = np.cos(np.radians(np.asarray(self._attack.get(name, 0.0), float))).ravel()
            if v.size == 1:
                return np.full(n, v[0])
            if v.size == n:
                return v
            raise InputError(f"'{name}' has {n} edges but {v.size} angles of attack",
                             key="attack")
        for a in self.layout.arms:
            line = np.asarray(a.line, float) - o
            kr = float(np.asarray(self._kr.get(a.name, self._kr_default)).ravel()[0])
            s = np.stack([line[:-1], line[1:]], axis=1)
            segs.append(s)
            krs.append(np.full(len(s), kr))
            fac.append(factor(a.name, 1)[0] * np.ones(len(s)))
            if a.name in self._footprints:
                fp = shapely.buffer(shapely.LineString(line), 0.5 * self._footprints[a.name],
                                    cap_style="flat", join_style="mitre")
                c = np.asarray(fp.exterior.coords)
                segs.append(np.stack([c[:-1], c[1:]], axis=1))
                krs.append(np.full(len(c) - 1, kr))
                fac.append(np.full(len(c) - 1, factor(a.name, 1)[0]))
        for land in self.layout.lands:
            c = np.asarray(land.outline.exterior.coords) - o
            s = np.stack([c[:-1], c[1:]], axis=1)
            v = np.asarray(self._kr.get(land.name, self._kr_default), float).ravel()
            if v.size == 1:
                kr = np.full(len(s), v[0])
            elif v.size == len(s):
                kr = v
            else:
                raise InputError(f"land '{land.name}' has {len(s)} edges but "
                                 f"{v.size} reflection coefficients", key="reflection")
            segs.append(s)
            krs.append(kr)
            f = factor(land.name, len(s))
            fac.append(f)
            for ring in land.outline.interiors:
                c = np.asarray(ring.coords) - o
                segs.append(np.stack([c[:-1], c[1:]], axis=1))
                krs.append(np.full(len(c) - 1, float(kr.mean())))
                fac.append(np.full(len(c) - 1, float(f.mean())))
        if segs:
            return np.concatenate(segs), np.concatenate(krs), np.concatenate(fac)
        return np.zeros((0, 2, 2)), np.zeros(0), np.zeros(0)

    def _depth_raw(self, xl, yl):
        o = self.origin
        return self.bathymetry.depth(np.asarray(xl) + o[0], np.asarray(yl) + o[1])

    # -- one period ----------------------------------------------------------------
    def _domain(self, period):
        """Exterior depth, wavelength, boxes and the depth used, for one period (cached)."""
        key = round(float(period), 9)
        dom = self._domains.get(key)
        if dom is not None:
            return dom
        g = self.g
        o = self.origin
        r = np.array(self.region) - np.concatenate([o, o])
        # exterior depth
        h0 = self._h0_given
        Lprobe = 2 * np.pi / wavenumber(period, max(h0 or 10.0, 1e-3), g)
        if h0 is None:
            m = self.margin * Lprobe
            gx0, gy0, gx1, gy1 = r[0] - m, r[1] - m, r[2] + m, r[3] + m
            s = np.linspace(0, 1, 200)
            ex = np.concatenate([gx0 + s * (gx1 - gx0), np.full(200, gx1),
                                 gx1 - s * (gx1 - gx0), np.full(200, gx0)])
            ey = np.concatenate([np.full(200, gy0), gy0 + s * (gy1 - gy0), np.full(200, gy1),
                                 gy1 - s * (gy1 - gy0)])
            land = self.layout.land_union()
            wet = ~shapely.intersects_xy(land, ex + o[0], ey + o[1]) if not land.is_empty \
                else np.ones(ex.size, bool)
            dd = self._depth_raw(ex[wet], ey[wet])
            dd = dd[dd > self.min_depth]
            if dd.size == 0:
                raise InputError("no water deeper than the minimum depth around the "
                                 "harbour: cannot set the exterior depth", key="depth")
            h0 = float(np.median(dd))
        if not h0 > self.min_depth:
            raise InputError(f"exterior depth {h0:g} m is not above the minimum depth",
                             key="depth")
        k0 = float(wavenumber(period, h0, g))
        L0 = 2 * np.pi / k0
        m = self.margin * L0
        ring = max(0.25 * L0, 3.0 * L0 / self.ppw)
        t = self.layer_wl * L0
        gam = (r[0] - m, r[1] - m, r[2] + m, r[3] + m)
        inner = (gam[0] - ring, gam[1] - ring, gam[2] + ring, gam[3] + ring)
        layer = Layer(inner=inner, thickness=t)

        # depth used: the bathymetry inside, blended to h0 over the margin
        const = self.bathymetry.is_constant and abs(
            float(self.bathymetry.depth(0.0, 0.0)) - h0) < 1e-12

        def blend(x, y):
            dx = np.maximum(np.maximum(r[0] - x, x - r[2]), 0.0)
            dy = np.maximum(np.maximum(r[1] - y, y - r[3]), 0.0)
            # the bathymetry as given over the wanted area and half the margin, then a
            # linear ramp to the exterior depth on the interface
            return np.clip(2.0 - 2.0 * np.maximum(dx, dy) / max(m, 1e-9), 0.0, 1.0)

        def depth_used(x, y):
            x = np.asarray(x, float)
            y = np.asarray(y, float)
            if const:
                return np.full(np.broadcast(x, y).shape, h0)
            raw = self._depth_raw(x, y)
            w = blend(x, y)
            return np.maximum(h0 + w * (raw - h0), self.min_depth)

        dom = _Domain(h0=h0, k0=k0, L0=L0, margin=m, gam=gam, layer=layer,
                      depth_used=depth_used, const=const)
        self._domains[key] = dom
        return dom

    def _setup(self, period):
        import time

        key = round(float(period), 9)
        if key in self._periods:
            return self._periods[key]
        t0 = time.perf_counter()
        g = self.g
        o = self.origin
        dom = self._domain(period)
        h0, k0, L0, m, gam = dom.h0, dom.k0, dom.L0, dom.margin, dom.gam
        layer, depth_used, const = dom.layer, dom.depth_used, dom.const
        outer = layer.outer
        outer_box = shapely.box(*outer)

        segs, krs, facs = self._segments()
        # land, footprints and dry ground
        land = shapely.Polygon()
        if self.layout.lands:
            land = shapely.union_all([shapely.transform(x.outline, lambda c: c - o)
                                      for x in self.layout.lands])
        holes = [land]
        for a in self.layout.arms:
            if a.name in self._footprints:
                line = np.asarray(a.line, float) - o
                holes.append(shapely.buffer(shapely.LineString(line),
                                            0.5 * self._footprints[a.name],
                                            cap_style="flat", join_style="mitre"))
        dry_segs = np.zeros((0, 2, 2))
        hmin_guess = L0 / self.ppw
        if not const:
            # dry ground: cells of a raster at the finest element size
            step = 0.5 * hmin_guess
            xs = np.arange(gam[0], gam[2] + step, step)
            ys = np.arange(gam[1], gam[3] + step, step)
            X, Y = np.meshgrid(xs, ys)
            raw = self._depth_raw(X, Y)
            dry = raw < self.min_depth
            if land is not None and not land.is_empty:
                dry &= ~shapely.intersects_xy(land, X, Y)
            if np.any(dry):
                iy, ix = np.nonzero(dry)
                # cell edges shared exactly, so that the union merges neighbouring cells
                xe = np.append(xs - step / 2, xs[-1] + step / 2)
                ye = np.append(ys - step / 2, ys[-1] + step / 2)
                cells = shapely.box(xe[ix], ye[iy], xe[ix + 1], ye[iy + 1])
                dpoly = shapely.union_all(cells)
                # round the staircase (no slivers, no corners touching at one node)
                dpoly = dpoly.buffer(0.5 * step, join_style="round").buffer(
                    -0.5 * step, join_style="round").simplify(0.2 * step)
                dpoly = shapely.make_valid(dpoly)
                holes.append(dpoly)
                self._note("field-dry", f"{dry.sum() * step * step:.0f} m2 of the model area "
                           f"is shallower than {self.min_depth:g} m and is treated as dry "
                           f"ground (edge K_r {self._kr_dry:g})")
                ds = []
                for ringc in _mesh._rings(dpoly):
                    ds.append(np.stack([ringc[:-1], ringc[1:]], axis=1))
                dry_segs = np.concatenate(ds)
            # slope check at the element scale
            sl = self.bathymetry.slope(X + o[0], Y + o[1], step)
            wet = ~dry
            if np.any(wet & (sl > MAX_SLOPE)):
                i = np.argmax(np.where(wet, sl, 0))
                self._note("field-slope", f"bed slope up to 1:{1 / sl.flat[i]:.1f} near "
                           f"({X.flat[i] + o[0]:.0f}, {Y.flat[i] + o[1]:.0f}): steeper "
                           f"than about 1:3, outside the mild-slope assumption")
            # exterior depth check on the interface
            e = np.concatenate([self._depth_raw(np.array(xs), np.full(xs.size, gam[1])),
                                self._depth_raw(np.array(xs), np.full(xs.size, gam[3])),
                                self._depth_raw(np.full(ys.size, gam[0]), np.array(ys)),
                                self._depth_raw(np.full(ys.size, gam[2]), np.array(ys))])
            e = e[e > self.min_depth]
            if e.size and np.max(np.abs(e - h0)) > 0.1 * h0:
                self._note("field-exterior-depth", f"depth on the edge of the model area "
                           f"ranges {e.min():.1f}-{e.max():.1f} m; the model blends it to "
                           f"{h0:.1f} m over the outer {m:.0f} m (the exterior is taken "
                           f"at constant depth)")
        solid = shapely.union_all([h for h in holes if not h.is_empty]) if holes else None
        water = outer_box if solid is None or solid.is_empty else outer_box.difference(solid)
        water = shapely.make_valid(water)
        comps = [p for p in shapely.get_parts(water) if p.area > 0]
        if not comps:
            raise InputError("no water in the model area", key="land")
        biggest = max(comps, key=lambda p: p.area)
        keep = [biggest]
        P = self.points - o
        for p in comps:
            if p is not biggest and len(P) and np.any(shapely.contains_xy(p, P[:, 0], P[:, 1])):
                keep.append(p)
        water = shapely.union_all(keep)
        # thin arms
        slits = []
        for a in self.layout.arms:
            if a.name in self._footprints:
                continue
            line = shapely.LineString(np.asarray(a.line, float) - o)
            piece = shapely.intersection(line, water)
            for pp in shapely.get_parts(shapely.line_merge(piece)
                                        if piece.geom_type == "MultiLineString" else piece):
                if pp.geom_type == "LineString" and pp.length > 0:
                    slits.append(np.asarray(pp.coords))
        # element size: local wavelength, graded towards heads and corners
        corners = self._corners(segs, L0)
        from scipy.spatial import cKDTree

        ctree = cKDTree(corners) if len(corners) else None
        ppw = self.ppw

        def size(p):
            h = depth_used(p[:, 0], p[:, 1])
            L = 2 * np.pi / np.asarray(wavenumber(period, np.maximum(h, 1e-3), g))
            s = L / ppw
            if ctree is not None:
                d = ctree.query(p)[0]
                s = s * np.clip(d / (4.0 * s), 0.1, 1.0)
            return s

        wm = _mesh.build(water, slits, size)
        allsegs = np.concatenate([segs, dry_segs]) if len(dry_segs) else segs
        allkr = np.concatenate([krs, np.full(len(dry_segs), self._kr_dry)]) \
            if len(dry_segs) else krs
        allfac = np.concatenate([facs, np.ones(len(dry_segs))]) if len(dry_segs) else facs
        kr_of = _nearest_kr(allsegs, allkr, self._kr_default)
        fac_of = _nearest_kr(allsegs, allfac, 1.0)
        space = Space(wm, layer, kr_of, fac_of)
        t1 = time.perf_counter()
        solver = FrequencySolver.build(space, period, depth_used, h0, g)
        # dof classes and sides of the coast
        dl = space.doflocs
        inside = ((dl[0] > gam[0]) & (dl[0] < gam[2]) & (dl[1] > gam[1]) & (dl[1] < gam[3]))
        coast = self._coast(water, slits, segs, krs, gam, outer, L0, o, kr_of, fac_of)
        side = np.ones(space.N)
        if coast is not None:
            mt = space.skmesh
            cen = mt.p[:, mt.t].mean(axis=1)
            se = np.sign((cen[0] - coast.point[0]) * coast.normal[0]
                         + (cen[1] - coast.point[1]) * coast.normal[1])
            side = np.zeros(space.N)
            for i in range(space.basis.element_dofs.shape[0]):
                side[space.basis.element_dofs[i]] = se
        # evaluation points
        ex = [P]
        if self.grid is not None:
            GX, GY = np.meshgrid(self.grid[0] - o[0], self.grid[1] - o[1])
            ex.append(np.column_stack([GX.ravel(), GY.ravel()]))
        E = np.concatenate(ex)
        Pm, found = space.probe(E[:, 0], E[:, 1])
        if E.size:
            dry_pts = found & (depth_used(E[:, 0], E[:, 1]) <= self.min_depth)
            found &= ~dry_pts
        t2 = time.perf_counter()
        info = {"unknowns": space.n_unknowns, "triangles": space.n_triangles,
                "mesh_s": t1 - t0, "assemble_s": solver.seconds["assemble"],
                "factor_s": solver.seconds["factor"], "fill": solver.fill,
                "exterior_depth": h0, "wavelength": L0, "setup_s": t2 - t0}
        setup = _Period(period=float(period), L0=L0, solver=solver, inside=inside,
                        side=side, coast=coast, P=Pm, found=found, info=info)
        self._periods[key] = setup
        return setup

    def _corners(self, segs, L0):
        """Heads, bends and re-entrant corners (local frame, m), where the mesh is graded."""
        out = []
        for a in self.layout.arms:
            out.append(np.asarray(a.line, float) - self.origin)
        for land in self.layout.lands:
            c = np.asarray(shapely.orient_polygons(land.outline).exterior.coords)[:-1] \
                if hasattr(shapely, "orient_polygons") else \
                np.asarray(shapely.geometry.polygon.orient(land.outline).exterior.coords)[:-1]
            c = c - self.origin
            prv = c - np.roll(c, 1, axis=0)
            nxt = np.roll(c, -1, axis=0) - c
            cross = prv[:, 0] * nxt[:, 1] - prv[:, 1] * nxt[:, 0]
            ang = np.arcsin(np.clip(cross / (np.hypot(*prv.T) * np.hypot(*nxt.T) + 1e-300),
                                    -1, 1))
            # a convex land corner (left turn on the counter-clockwise outline) is a
            # re-entrant corner of the water, where the field is singular
            out.append(c[ang > np.radians(15.0)])
        return np.concatenate(out) if out else np.zeros((0, 2))

    def _coast(self, water, slits, segs, krs, gam, outer, L0, o, kr_of, fac_of):
        """The straight coast where land or walls leave the total-field box, if any."""
        # the coast where it leaves the total-field box: within the exterior ring, not
        # the absorbing layer beyond it (where the far side of a land strip may lie)
        rw = max(0.25 * L0, 3.0 * L0 / self.ppw)
        inner = (gam[0] - rw, gam[1] - rw, gam[2] + rw, gam[3] + rw)
        ringzone = shapely.box(*inner).difference(shapely.box(*gam))
        bnd = shapely.boundary(water)
        pieces = [shapely.intersection(bnd, ringzone)]
        for s in slits:
            pieces.append(shapely.intersection(shapely.LineString(s), ringzone))
        ob = shapely.box(*outer).exterior
        gring = shapely.box(*gam).exterior
        segl = []
        for pc in pieces:
            for g in shapely.get_parts(pc):
                if g.geom_type not in ("LineString", "LinearRing"):
                    continue
                if shapely.distance(g, gring) > 1e-6 * L0:
                    continue  # an islet in the ring: it does not leave the box
                c = np.asarray(g.coords)
                for a, b in zip(c[:-1], c[1:]):
                    mid = 0.5 * (a + b)
                    if shapely.distance(shapely.Point(mid), ob) < 1e-6 * L0 or \
                            shapely.distance(shapely.Point(mid), shapely.box(*inner).exterior) \
                            < 1e-6 * L0:
                        continue  # the edge of the ring, not a coast
                    if np.hypot(*(b - a)) > 1e-9 * L0:
                        segl.append((a, b))
        if not segl:
            return None
        lens = np.array([np.hypot(*(b - a)) for a, b in segl])
        a, b = segl[int(np.argmax(lens))]
        tau = (b - a) / np.hypot(*(b - a))
        n = np.array([-tau[1], tau[0]])
        allp = np.array([p for ab in segl for p in ab])
        off = np.abs((allp - a) @ n)
        if off.max() > 0.05 * L0:
            self._note("field-coast", "land or arms cross the open boundary of the model "
                       "other than along one straight coast; the background wave assumes one "
                       "straight coast there, so spurious waves may appear near the edge of "
                       "the model area")
        mid = 0.5 * (a + b)
        eps = 0.02 * L0
        land_plus = not shapely.contains_xy(water, *(mid + eps * n))
        land_minus = not shapely.contains_xy(water, *(mid - eps * n))
        land_backed = land_plus != land_minus
        if land_plus and not land_minus:
            n = -n
        at = (mid - 1e-3 * L0 * n)[:, None]
        kr = float(kr_of(at, -n[:, None])[0])
        fac = float(fac_of(at, -n[:, None])[0])
        return _Coast(point=mid, normal=n, kr=kr, land_backed=land_backed, factor=fac)

    def _background(self, setup, alphas):
        """Background wave at the dofs for directions of travel ``alphas`` (rad)."""
        k0 = setup.solver.k0
        dl = setup.solver.space.doflocs
        o = self.origin
        alphas = np.atleast_1d(np.asarray(alphas, float))
        B = np.zeros((dl.shape[1], alphas.size), complex)
        reach = np.ones(alphas.size, bool)
        for j, al in enumerate(alphas):
            d = np.array([np.cos(al), np.sin(al)])
            ph0 = k0 * (d @ o)  # incident phase zero at the work-frame origin
            inc = np.exp(1j * (k0 * (d[0] * dl[0] + d[1] * dl[1]) + ph0))
            c = setup.coast
            if c is None:
                B[:, j] = inc
                continue
            nrm = c.normal.copy()
            sgn = 1.0
            if abs(d @ nrm) < 1e-9:
                B[:, j] = inc  # waves along the coast: no reflected wave
                continue
            if d @ nrm > 0:
                if c.land_backed:
                    reach[j] = False  # waves travelling from the land: none arrive
                    continue
                nrm, sgn = -nrm, -1.0
            cos_t = -(d @ nrm)
            R = robin_reflection(c.kr, np.arccos(np.clip(cos_t, 0.0, 1.0)),
                                 attack=np.arccos(np.clip(c.factor, 0.0, 1.0)))
            dr = d - 2.0 * (d @ nrm) * nrm
            phr = k0 * ((d - dr) @ c.point)
            refl = R * np.exp(1j * (k0 * (dr[0] * dl[0] + dr[1] * dl[1]) + phr + ph0))
            sea = (setup.side * sgn) > 0
            B[:, j] = np.where(sea, inc + refl, 0.0)
        return B, reach

    # -- cost ----------------------------------------------------------------------
    def _unknowns_estimate(self, period, samples=250):
        """Unknowns of the mesh of one period, from the domain and the local wavelength
        (cached per period)."""
        key = ("n", round(float(period), 9), int(samples))
        if key not in self._estimates:
            self._estimates[key] = self._unknowns_raster(period, samples)
        return self._estimates[key]

    def _unknowns_raster(self, period, samples):
        dom = self._domain(period)
        x0, y0, x1, y1 = dom.layer.outer
        nx = ny = int(samples)
        dx, dy = (x1 - x0) / nx, (y1 - y0) / ny
        xs = x0 + dx * (np.arange(nx) + 0.5)
        ys = y0 + dy * (np.arange(ny) + 0.5)
        X, Y = np.meshgrid(xs, ys)
        h = dom.depth_used(X, Y)
        wet = np.ones(X.shape, bool)
        o = self.origin
        land = self.layout.land_union()
        if not land.is_empty:
            wet &= ~shapely.contains_xy(land, X + o[0], Y + o[1])
        if not dom.const:
            wet &= self._depth_raw(X, Y) >= self.min_depth
        L = 2 * np.pi / np.asarray(wavenumber(period, np.maximum(h, 1e-3), self.g))
        s = L / self.ppw
        n = _EST_UNKNOWNS_PER_S2 * float(np.sum(wet / s ** 2)) * dx * dy
        corners = self._corners(None, dom.L0)
        if len(corners):
            # the extra unknowns of a graded disk do not depend on its size; a corner's graded disk is only partly water (a head: all; a land corner:
            # about three quarters); take it whole, the calibration absorbs the rest
            n += _EST_UNKNOWNS_PER_S2 * _EST_CORNER * corners.shape[0]
        return n

    def _capped_period(self, max_unknowns, longest):
        """The shortest period (s) whose mesh stays within ``max_unknowns`` (bisection,
        cached)."""
        key = ("cap", float(max_unknowns), round(float(longest), 9))
        if key not in self._estimates:
            self._estimates[key] = self._capped_period_search(max_unknowns, longest)
        return self._estimates[key]

    def _capped_period_search(self, max_unknowns, longest):
        lo, hi = 0.05 * longest, longest  # lo too short (too many unknowns), hi fits
        if self._unknowns_estimate(hi) > max_unknowns:
            return hi
        for _ in range(30):
            mid = np.sqrt(lo * hi)
            if self._unknowns_estimate(mid) > max_unknowns:
                lo = mid
            else:
                hi = mid
            if hi / lo < 1.002:
                break
        return hi

    def estimate(self, periods, n_directions=1, max_unknowns=None, merge_capped=True):
        r"""Unknowns, memory and seconds of solving some wave periods, without solving.

        Parameters
        ----------
        periods : float or array_like
            Wave periods T (s), e.g. the frequency bands of a random sea
            (``1 / numpy.unique(components.frequency)``).
        n_directions : int or array_like, optional
            Directions (back-substitutions) per period.
        max_unknowns : int, optional
            Cap of :meth:`random`: a period whose mesh would need more unknowns is
            solved at the shortest period that fits (reported in ``solve_periods``).
        merge_capped : bool, optional
            As in :meth:`random`: the capped periods share the back-substitutions of
            one of them (counted once).

        Returns
        -------
        FieldEstimate
            Per period and in total (each distinct solve period factorised once).

        Notes
        -----
        The mesh follows the local wavelength, element edge :math:`s = L(h)/n_{ppw}`,
        so the unknowns are :math:`n \approx c_u \int_{water} s^{-2}\,dA` plus a
        fixed number per graded corner, integrated on a 250 x 250 raster of the
        model's domain (the same domain, margins and layer as the solve). Nested
        dissection in two dimensions gives a factor of :math:`c_f\, n \log_2 n`
        non-zeros and :math:`O(n^{3/2})` work (George 1973); meshing and assembly are
        linear in n. The constants are fitted to measured solves on this machine
        (docs/full-field.md, ``benchmarks/fullfield_estimate.py``: unknowns within
        about 10 %, seconds within a factor of about 1.5 when the machine is not
        shared).

        References
        ----------
        George, A. (1973). Nested dissection of a regular finite element mesh. SIAM
        Journal on Numerical Analysis 10(2), 345-363.
        """
        T = np.atleast_1d(np.asarray(periods, float)).ravel()
        if T.size == 0 or not np.all(np.isfinite(T) & (T > 0)):
            raise InputError("periods must be positive (s)", key="period")
        ndir = np.broadcast_to(np.asarray(n_directions, float), T.shape)
        n = np.array([self._unknowns_estimate(t) for t in T])
        solve_T = T.copy()
        capped = np.zeros(T.size, bool)
        if max_unknowns is not None and np.any(n > max_unknowns):
            Tc = self._capped_period(float(max_unknowns), float(T.max()))
            capped = n > max_unknowns
            solve_T[capped] = np.maximum(Tc, T[capped])
            n[capped] = self._unknowns_estimate(Tc)
        fill = _EST_FILL * n * np.log2(np.maximum(n, 2.0))
        fbytes = _EST_BYTES_PER_NNZ * fill
        peak = (_EST_BASE_BYTES + _EST_PEAK_PER_FACTOR * fbytes
                + _EST_BYTES_PER_UNKNOWN * n)
        sec_setup = _EST_SECONDS_PER_UNKNOWN * n + _EST_FACTOR_SECONDS * n ** 1.5
        ndir = ndir.copy()
        if merge_capped and capped.sum() > 1:
            # the capped bands share one set of directions (those of one band)
            first_capped = np.flatnonzero(capped)[0]
            keep = ndir[capped].max()
            ndir[capped] = 0.0
            ndir[first_capped] = keep
        sec_solve = _EST_SOLVE_SECONDS_PER_NNZ * fill * ndir
        # one factorisation per distinct solve period
        _, first = np.unique(np.round(solve_T, 9), return_index=True)
        once = np.zeros(T.size, bool)
        once[first] = True
        seconds = np.where(once, sec_setup, 0.0) + sec_solve
        return FieldEstimate(periods=T, solve_periods=solve_T,
                             unknowns=np.round(n).astype(np.int64),
                             factor_bytes=fbytes, peak_bytes=peak, seconds=seconds,
                             capped=capped, total_unknowns=int(np.round(n[once].sum())),
                             total_seconds=float(seconds.sum()),
                             max_factor_bytes=float(fbytes.max()),
                             max_peak_bytes=float(peak.max()))

    # -- public --------------------------------------------------------------------
    def frequency(self, period):
        """Mesh and factorise for one period (s); cached. Returns the setup's info dict."""
        return dict(self._setup(float(period)).info)

    def directions(self, period, directions):
        r"""Complex amplitudes at the points and grid for many directions of one period.

        Parameters
        ----------
        period : float
            Wave period T (s).
        directions : array_like
            Directions of travel (degrees counter-clockwise from +x, work frame).

        Returns
        -------
        numpy.ndarray of complex, shape (n_points + nx * ny, n_directions)
            Normalised by the incident amplitude, incident phase zero at the work-frame
            origin, time factor exp(-i w t); NaN on land or dry ground; zero for a
            direction that travels from land.

        Notes
        -----
        One factorisation per period (cached), one back-substitution per direction.
        """
        return self._directions(period, directions)[0]

    def _directions(self, period, directions):
        s = self._setup(float(period))
        al = np.radians(np.atleast_1d(np.asarray(directions, float)))
        out = np.empty((s.P.shape[0], al.size), complex)
        reach = np.ones(al.size, bool)
        # a few right-hand sides at a time: each is a few vectors over every dof
        for j in range(0, al.size, _RHS_CHUNK):
            B, reach[j:j + _RHS_CHUNK] = self._background(s, al[j:j + _RHS_CHUNK])
            rhs = s.solver.total_field_sources(B, s.inside)
            del B
            out[:, j:j + _RHS_CHUNK] = np.asarray(s.P @ s.solver.solve(rhs))
        if not np.all(reach):
            self._note("field-from-land", "a wave direction travels from the land across "
                       "the coast; it brings no waves into the model", level="note")
        out[~s.found] = np.nan
        return out, reach

    def regular(self, period, direction):
        """One regular sea: period (s), direction of travel (degrees, work frame).

        Returns
        -------
        FieldResult
        """
        u = self.directions(period, [direction])[:, 0]
        n = len(self.points)
        gridv = None
        if self.grid is not None:
            gridv = u[n:].reshape(self.grid[1].size, self.grid[0].size)
        return FieldResult(points=u[:n], grid=gridv, period=float(period),
                           direction=float(direction),
                           info=dict(self._setup(float(period)).info))

    def random(self, components, principal_direction, progress=None,
               max_unknowns=DEFAULT_MAX_UNKNOWNS, merge_capped=True):
        r"""Directional random sea by Goda's method over full-field solutions.

        Parameters
        ----------
        components : harbor.waves.spectra.Components
            The discretised directional spectrum (frequency-major).
        principal_direction : float or sequence of float
            Principal direction of travel (degrees counter-clockwise from +x); a
            sequence gives one result per direction from the same factorisations.
        progress : callable, optional
            ``progress(done, total)`` after each factorisation.
        max_unknowns : int or None, optional
            Largest mesh (unknowns) of one frequency band; default
            :data:`DEFAULT_MAX_UNKNOWNS`. Bands whose mesh would be larger (the short
            waves of the spectrum's tail, whose wavelength the mesh must follow) are
            solved at the shortest period whose mesh fits, with a ``field-bands-capped``
            notice. ``None``: every band at its own period.
        merge_capped : bool, optional
            The capped bands share one period; solve only the directions of the capped
            band nearest to it and give every capped component the nearest of those
            (default), instead of one back-substitution per capped component.

        Returns
        -------
        RandomFieldResult or list of RandomFieldResult
            A list (one per principal direction) when ``principal_direction`` is a
            sequence.

        Notes
        -----
        .. math::

            K_{eff}^2 = \frac{\sum w K'^2}{\sum w}, \qquad
            \frac{T_{m02}^{lee}}{T_{m02}^{inc}} =
            \sqrt{\frac{\sum w K'^2 / \sum w K'^2 f^2}{\sum w / \sum w f^2}}

        as the screening methods (:func:`harbor.solver.random.random_sea_field`), with
        w the components' energy fractions. One factorisation per frequency band, one
        back-substitution per direction of every principal direction; each band's
        factorisation is freed when the band is done.

        A capped band keeps its own frequency f in the sums and its own directions; only
        its K' is that of the capped period T_c (the shortest that fits). Behind a
        structure shorter waves diffract less, so this over-states their K' there;
        measured on an exact gap solution (docs/full-field.md, "Random seas") the error
        in K_eff is below 0.01 for the caps used.

        References
        ----------
        Goda, Y., Takayama, T. and Suzuki, Y. (1978). Diffraction diagrams for
        directional random waves. Proc. 16th International Conference on Coastal
        Engineering, ASCE, 628-650.
        """
        many = np.ndim(principal_direction) > 0
        principals = np.atleast_1d(np.asarray(principal_direction, float)).ravel()
        if principals.size == 0 or not np.all(np.isfinite(principals)):
            raise InputError("principal directions must be finite numbers (degrees)",
                             key="from")
        freq = np.asarray(components.frequency, float)
        weight = np.asarray(components.weight, float)
        angle = np.asarray(components.angle, float)
        bands = np.unique(freq)
        periods = 1.0 / bands
        solve_T = periods.copy()
        capped = np.zeros(bands.size, bool)
        if max_unknowns is not None:
            est = self.estimate(periods, max_unknowns=max_unknowns)
            solve_T, capped = est.solve_periods, est.capped
        n_eval = len(self.points) + (self.grid[0].size * self.grid[1].size
                                     if self.grid is not None else 0)
        npr = principals.size
        e0 = np.zeros((npr, n_eval))
        e2 = np.zeros((npr, n_eval))
        reaching = np.zeros(npr)
        infos = []
        keys = np.round(solve_T, 9)
        groups = [np.flatnonzero(keys == k) for k in np.unique(keys)[::-1]]
        for gi, members in enumerate(groups):
            Ts = float(solve_T[members[0]])
            # every component of every member band, for every principal direction
            sels = [np.flatnonzero(freq == bands[b]) for b in members]
            comp = np.concatenate(sels)
            if merge_capped and len(members) > 1:
                # the capped bands share one period: solve only the directions of the
                # band nearest to it and interpolate |eta|^2 linearly in direction
                # between them for every other capped component (measured:
                # docs/full-field.md)
                ref = np.sort(angle[sels[int(np.argmin(periods[members]))]])
                a = np.clip(angle[comp], ref[0], ref[-1])
                i = np.clip(np.searchsorted(ref, a) - 1, 0, ref.size - 2)
                t = (a - ref[i]) / (ref[i + 1] - ref[i])
                col = np.concatenate([i, i + 1])
                lin = np.concatenate([1.0 - t, t])
                solved = ref
            else:
                col = np.arange(comp.size)
                lin = np.ones(comp.size)
                solved = angle[comp]
            dirs = (principals[:, None] + np.degrees(solved)[None, :]).ravel()
            u, reach = self._directions(Ts, dirs)
            p = (np.abs(u) ** 2).reshape(n_eval, npr, solved.size)
            w = weight[comp]
            f2 = freq[comp] ** 2
            # weights gathered onto the solved directions
            rep_ = col.size // comp.size
            ws = np.bincount(col, lin * np.tile(w, rep_), minlength=solved.size)
            ws2 = np.bincount(col, lin * np.tile(w * f2, rep_), minlength=solved.size)
            e0 += np.einsum("epc,c->pe", p, ws)
            e2 += np.einsum("epc,c->pe", p, ws2)
            reaching += (reach.reshape(npr, solved.size) * ws).sum(axis=1)
            info = dict(self._setup(Ts).info)
            info["bands"] = [float(periods[b]) for b in members]
            infos.append(info)
            # free the factorisation once the band is done: memory stays that of one band
            self._periods.pop(round(Ts, 9), None)
            if progress:
                progress(gi + 1, len(groups))
        if np.any(capped):
            wc = float(sum(weight[freq == bands[b]].sum() for b in np.flatnonzero(capped)))
            w2 = float(sum((weight * freq ** 2)[freq == bands[b]].sum()
                           for b in np.flatnonzero(capped)))
            tc = float(solve_T[capped].max())
            self._note("field-bands-capped",
                       f"{int(capped.sum())} of {bands.size} frequency bands (periods "
                       f"{periods[capped].min():.2f}-{periods[capped].max():.2f} s, "
                       f"{100 * wc / weight.sum():.1f} % of the energy, "
                       f"{100 * w2 / np.sum(weight * freq ** 2):.1f} % of the f^2-weighted "
                       f"energy) would need meshes over {int(max_unknowns)} unknowns; they "
                       f"take the response at {tc:.2f} s, the shortest period that fits, "
                       f"which over-states their K' behind structures",
                       level="note")
        inc0 = float(weight.sum())
        inc2 = float(np.sum(weight * freq ** 2))
        n = len(self.points)
        out = []
        for j in range(npr):
            kd = np.sqrt(e0[j] / inc0)
            with np.errstate(divide="ignore", invalid="ignore"):
                ratio = np.sqrt((e0[j] / e2[j]) / (inc0 / inc2))
            ratio = np.where(e0[j] > 1e-12 * inc0, ratio, np.nan)
            kg = rg = None
            if self.grid is not None:
                shp = (self.grid[1].size, self.grid[0].size)
                kg, rg = kd[n:].reshape(shp), ratio[n:].reshape(shp)
            out.append(RandomFieldResult(
                kd_points=kd[:n], ratio_points=ratio[:n], kd_grid=kg, ratio_grid=rg,
                reaching=float(reaching[j]),
                info={"bands": infos, "principal_direction": float(principals[j]),
                      "capped_periods": [float(t) for t in periods[capped]],
                      "solve_periods": [float(t) for t in solve_T]}))
        return out if many else out[0]


def _nearest_kr(segs, krs, default):
    """K_r of the nearest reflecting segment to each facet midpoint."""
    if len(segs) == 0:
        return lambda mid, nrm: np.full(mid.shape[1], default)
    lines = shapely.linestrings(segs)
    tree = shapely.STRtree(lines)

    def kr_of(mid, nrm):
        pts = shapely.points(mid[0], mid[1])
        idx = tree.query_nearest(pts, return_distance=False, all_matches=False)
        out = np.full(mid.shape[1], default, float)
        out[idx[0]] = krs[idx[1]]
        return out

    return kr_of


def full_field(layout, bathymetry, points, period, direction, reflection=None, **kwargs):
    """Complex amplitudes of one regular sea at points, over the real bathymetry.

    Parameters
    ----------
    layout : harbor.geometry.layout.Layout
    bathymetry : Bathymetry or float
        Bathymetry or one constant depth (m).
    points : array_like, shape (n, 2)
        Points (m, work frame).
    period : float
        Wave period T (s).
    direction : float
        Direction of travel (degrees counter-clockwise from +x, work frame).
    reflection : dict, optional
        K_r per arm / land / land edge (see :class:`HarbourModel`).
    **kwargs
        Passed to :class:`HarbourModel`.

    Returns
    -------
    numpy.ndarray of complex, shape (n,)
        Normalised surface elevation; NaN on land.

    Notes
    -----
    A shortcut for ``HarbourModel(...).regular(period, direction).points``; keep the
    model to reuse its factorisation for more directions.

    References
    ----------
    Berkhoff, J. C. W. (1972). Computation of combined refraction-diffraction. Proc.
    13th International Conference on Coastal Engineering, ASCE, 471-490.
    """
    model = HarbourModel(layout, bathymetry, points=points, reflection=reflection, **kwargs)
    return model.regular(period, direction).points
