"""Scenario files (TOML) -> validated objects.

The data classes here are the contract between the scenario reader, the solver and the
outputs. ``load_scenario`` (below) reads and validates a file.
"""

from __future__ import annotations

import difflib
import math
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np

try:  # Python >= 3.11
    import tomllib as _toml
except ModuleNotFoundError:  # pragma: no cover - Python 3.10
    import tomli as _toml

from harbor.errors import InputError
from harbor.geometry import checks
from harbor.geometry.layout import Arm, Land, Layout, Point, join_ends
from harbor.geometry.site import (SCALE_NOTE_ABOVE, Site, lonlat_anchor, lonlat_problem,
                                  parse_crs)
from harbor.solver.resolution import coarse_grid_problem
from harbor.study._files import MAX_SCENARIO_BYTES, read_text
from harbor.study._limits import (MAX_ARM_VERTICES, MAX_COORDINATE, MAX_LAND_VERTICES,
                                  PEAK_RATIO, as_real, range_problem)


@dataclass(frozen=True)
class Sea:
    """One sea state.

    Parameters
    ----------
    name : str
        The sea state's name.
    kind : {"regular", "random"}
        Regular (monochromatic, long-crested) or directional random sea.
    height : float
        H (regular) or H1/3 (random), m.
    period : float
        T (regular) or T1/3 (random), s.
    from_deg : float
        Direction the waves come from, degrees clockwise from true north (nautical).
    spreading : float
        Mitsuyasu s_max (random seas only), default 10.
    spectrum : str
        ``"bretschneider-mitsuyasu"`` (default) or ``"jonswap"`` (random seas only).
    peak_period : float or None
        Spectral peak period Tp (s) for JONSWAP; default 1.05 T1/3.
    gamma : float
        JONSWAP peak enhancement factor, default 3.3.
    """

    name: str
    kind: str
    height: float
    period: float
    from_deg: float
    spreading: float = 10.0
    spectrum: str = "bretschneider-mitsuyasu"
    peak_period: float | None = None
    gamma: float = 3.3


@dataclass(frozen=True)
class GridSpec:
    """The computation grid: spacing and bounds ``(xmin, ymin, xmax, ymax)`` in the
    work frame (m); bounds are always filled in by the reader (a default is derived from
    the layout and points when the file gives none). ``ground_spacing`` is the
    ``[grid] spacing`` in ground metres; ``spacing`` the same step in work-frame units
    (ground spacing x the CRS's scale factor at the site when that differs from 1 by
    more than ``SCALE_NOTE_ABOVE``)."""

    spacing: float
    bounds: tuple
    ground_spacing: float | None = None


class UnknownSea(InputError, KeyError):
    """No sea state of that name (an :class:`InputError` that is also a KeyError)."""

    def __str__(self):  # KeyError would quote the message
        return InputError.__str__(self)


@dataclass(frozen=True)
class Scenario:
    """A validated scenario.

    Attributes
    ----------
    path : str
        The file it was read from ("" when built in code).
    title : str
    site : harbor.geometry.site.Site
    layout : harbor.geometry.layout.Layout
    seas : tuple of Sea
    points : tuple of harbor.geometry.layout.Point
    grid : GridSpec
    bathymetry : harbor.geometry.bathymetry.Bathymetry or None
        Depths over the site (work frame); None: the constant ``site.depth``.
    reflection : dict
        Reflection coefficient K_r (0 fully absorbing to 1 vertical wall) by arm or
        land name; a land name may map to a tuple with one K_r per edge of its stored
        outline (edge i joins vertex i and i + 1). Names not listed reflect fully.
        The form :class:`harbor.solver.fullfield.HarbourModel` takes.
    footprints : dict
        Arm name -> footprint width (m) of arms given one (others are thin).
    method : str
        One of :data:`METHODS` (default ``"auto"``).
    """

    path: str
    title: str
    site: object
    layout: Layout
    seas: tuple = field(default_factory=tuple)
    points: tuple = field(default_factory=tuple)
    grid: GridSpec | None = None
    bathymetry: object = None
    reflection: dict = field(default_factory=dict)
    footprints: dict = field(default_factory=dict)
    method: str = "auto"

    def sea(self, name: str, key: str = "sea") -> Sea:
        """Return the sea state called ``name``.

        Parameters
        ----------
        name : str
            The sea state's name as written in the scenario.
        key : str
            What to name in the message (``"--sea"`` from the command line).

        Returns
        -------
        Sea

        Raises
        ------
        harbor.errors.InputError
            No such sea state; the message suggests the nearest name (or lists them).
            It is also a :class:`KeyError`, as before.
        """
        for s in self.seas:
            if s.name == name:
                return s
        names = [s.name for s in self.seas]
        near = difflib.get_close_matches(str(name), names, n=1)
        hint = f" (did you mean '{near[0]}'?)" if near else f" (known: {', '.join(names)})"
        raise UnknownSea(f"no sea state named '{name}'{hint}", file=self.path or None,
                         key=key)


# ---------------------------------------------------------------------------------------
# Reading and validation
# ---------------------------------------------------------------------------------------

#: Largest grid (number of points) a scenario may ask for; a complex field of this size
#: and its work arrays take a few hundred MB.
MAX_GRID_POINTS = 4_000_000

_KEYS = {
    "top": ("title", "method", "site", "bathymetry", "arm", "land", "sea", "point", "grid",
            "alternative"),  # layout alternatives: read by harbor.study.alternatives
    "site": ("crs", "depth", "g"),
    "bathymetry": ("file", "crs", "variable", "positive", "still_water_level"),
    "arm": ("name", "line", "rooted", "reflection", "footprint"),
    "land": ("name", "outline", "reflection"),
    "sea": ("name", "kind", "height", "period", "from", "spreading", "spectrum",
            "peak_period", "gamma"),
    "point": ("name", "at", "limit"),
    "grid": ("spacing", "bounds"),
}
_KINDS = ("regular", "random")
_SPECTRA = ("bretschneider-mitsuyasu", "jonswap")
_ROOTED = ("start", "end", "both", "none")
#: Values of the top-level ``method`` key (and of ``--method``): ``auto`` chooses per sea
#: state (:func:`harbor.solver.agitation.choose_method`); ``screening`` the classical
#: methods' own choice; ``full-field`` the mild-slope finite-element engine; the others
#: name one screening method, or (``field``) the constant-depth finite-element check.
METHODS = ("auto", "screening", "full-field", "general", "superposition", "exact", "field")
#: Largest breakwater footprint width accepted (m).
MAX_FOOTPRINT = 500.0


class _Reader:
    """Validation helpers that remember the file name for every message."""

    def __init__(self, file: str):
        self.file = file or None

    def err(self, problem, where=None, key=None):
        return InputError(problem, file=self.file, where=where, key=key)

    def check_keys(self, table: dict, kind: str, where: str | None):
        allowed = _KEYS[kind]
        for k in table:
            if k not in allowed:
                near = difflib.get_close_matches(str(k), allowed, n=1, cutoff=0.5)
                hint = (f"; did you mean '{near[0]}'?" if near else
                        f"; valid keys: {', '.join(allowed)}")
                raise self.err(f"unknown key{hint}", where, str(k))

    def number(self, table, key, where, *, required=True, default=None,
               positive=False, lo=None, hi=None):
        if key not in table:
            if required:
                raise self.err("missing key", where, key)
            return default
        v = table[key]
        f = as_real(v)
        if f is None:
            raise self.err(f"must be a number, got {_show(v)}", where, key)
        if not math.isfinite(f):
            what = (f"is too large to be a number here (an integer of {len(str(abs(v)))} "
                    "digits)" if isinstance(v, int) else
                    f"must be a finite number, got {_show(v)}")
            raise self.err(what, where, key)
        v = f
        if positive and v <= 0:
            raise self.err(f"must be positive, got {v:g}", where, key)
        if lo is not None and hi is not None and not (lo <= v <= hi):
            raise self.err(f"must be between {lo:g} and {hi:g}, got {v:g}", where, key)
        problem = range_problem(key, v, positive)
        if problem:
            raise self.err(problem, where, key)
        return v

    def string(self, table, key, where, *, required=True, default=None, choices=None):
        if key not in table:
            if required:
                raise self.err("missing key", where, key)
            return default
        v = table[key]
        if not isinstance(v, str):
            raise self.err(f"must be a string, got {_show(v)}", where, key)
        if not v.strip():
            raise self.err("must not be empty", where, key)
        if choices is not None and v not in choices:
            near = difflib.get_close_matches(v, choices, n=1, cutoff=0.5)
            hint = f"; did you mean '{near[0]}'?" if near else ""
            raise self.err(f"unknown value {v!r}{hint} (expected one of "
                           f"{', '.join(repr(c) for c in choices)})", where, key)
        return v

    def xy(self, v, where, key, label=""):
        if (not isinstance(v, (list, tuple, np.ndarray)) or len(v) != 2
                or any(as_real(c) is None for c in v)):
            raise self.err(f"{label}must be a pair of numbers [x, y], got {_show(v)}",
                           where, key)
        x, y = as_real(v[0]), as_real(v[1])
        if not (math.isfinite(x) and math.isfinite(y)):
            raise self.err(f"{label}coordinates must be finite, got {_show(v)}", where,
                           key)
        if max(abs(x), abs(y)) > MAX_COORDINATE:
            raise self.err(f"{label}coordinate {_show(v)} is larger than "
                           f"{MAX_COORDINATE:g} in magnitude: no CRS reaches that far",
                           where, key)
        return x, y

    def polyline(self, table, key, where, min_len):
        if key not in table:
            raise self.err("missing key", where, key)
        v = table[key]
        if not isinstance(v, (list, tuple, np.ndarray)) or len(v) < min_len:
            raise self.err(f"must be a list of at least {min_len} [x, y] pairs, got "
                           f"{_show(v)}", where, key)
        most = MAX_LAND_VERTICES if key == "outline" else MAX_ARM_VERTICES
        if len(v) > most:
            raise self.err(f"has {len(v):,} vertices, more than the {most:,} allowed; "
                           "simplify the line (vertices a fraction of a grid spacing "
                           "apart add nothing)", where, key)
        return np.array([self.xy(p, where, key, f"vertex {i + 1}: ")
                         for i, p in enumerate(v)], float)

    def tables(self, data, kind):
        v = data.get(kind, [])
        if isinstance(v, dict):
            raise self.err(f"write [[{kind}]] (double brackets: an array of tables, "
                           f"one per {kind}), not [{kind}]", None, kind)
        if not isinstance(v, (list, tuple)) or not all(isinstance(t, dict) for t in v):
            raise self.err(f"must be an array of tables [[{kind}]]", None, kind)
        return list(v)


def _show(v) -> str:
    s = repr(v)
    return s if len(s) <= 60 else s[:57] + "..."


def _label(kind: str, table: dict, i: int) -> str:
    name = table.get("name")
    if isinstance(name, str) and name.strip():
        return f"[[{kind}]] '{name}'"
    return f"[[{kind}]] #{i + 1}"


def load_scenario(path) -> Scenario:
    """Read and validate a scenario file (TOML).

    Parameters
    ----------
    path : str or os.PathLike
        The scenario file.

    Returns
    -------
    Scenario
        Validated scenario; all coordinates in the site's work frame (m).

    Raises
    ------
    InputError
        For a missing or unreadable file, a TOML syntax error (with its line) or any
        problem found by :func:`scenario_from_dict`.

    Notes
    -----
    The keys are those of the design (§5): ``title``; ``[site]`` crs, depth, g;
    ``[[arm]]`` name, line, rooted; ``[[land]]`` name, outline; ``[[sea]]`` name, kind,
    height, period, from, spreading, spectrum, peak_period, gamma; ``[[point]]`` name,
    at, limit; ``[grid]`` spacing, bounds.

    References
    ----------
    Preston-Werner, T. et al. (2021). TOML v1.0.0. https://toml.io/en/v1.0.0
    """
    file = str(path)
    text = read_text(path, "scenario file", MAX_SCENARIO_BYTES)
    try:
        data = _toml.loads(text)
    except _toml.TOMLDecodeError as e:
        msg = str(e)
        if "(at end of document)" in msg:
            msg += (f"; something opened before line {text.count(chr(10)) + 1} is never "
                    "closed (a bracket or a quote)")
        raise InputError(f"TOML syntax error: {msg}", file=file) from None
    return scenario_from_dict(data, path=file)


def scenario_from_dict(data: dict, path: str = "") -> Scenario:
    """Validate a scenario given as a dictionary (the parsed TOML) and build it.

    Parameters
    ----------
    data : dict
        The scenario, with the keys of the TOML file (see :func:`load_scenario`).
        Coordinates are in the CRS of ``data["site"]["crs"]``, easting or longitude
        first.
    path : str, optional
        The file it came from, used in messages and kept in ``Scenario.path``.

    Returns
    -------
    Scenario
        ``layout`` arms, land, ``points`` and ``grid.bounds`` in the work frame (m).

    Raises
    ------
    InputError
        Naming the file, the table and the key, for: unknown keys (with the nearest
        valid key), missing keys, wrong types, non-positive depth, g, height, period,
        spacing or limit, directions outside [0, 360], unknown sea kinds, spectra or
        ``rooted`` values, arms with fewer than two distinct vertices, arms that cross
        themselves or each other, invalid land outlines, unknown or unsupported CRS,
        lon/lat out of range (a swapped pair is pointed out), duplicate names, points
        on land or on an arm, grids of more than ``MAX_GRID_POINTS`` points (with a
        spacing that fits), no sea states, no arms.

    Notes
    -----
    - An arm end inside or on a land polygon, or on another arm (a junction), is rooted
      and does not diffract; the tolerance is max(0.01 m, 1e-6 × layout size).
      ``rooted`` ("start", "end", "both", "none") overrides. An end within
      :data:`harbor.geometry.layout.JOIN_TOLERANCE` (0.25 m) of another arm or of land
      is first moved onto it (:func:`harbor.geometry.layout.join_ends`), and the join is
      reported by ``harbor check``, as is an end within 2 m that is not joined.
    - Default grid bounds: the box around arms and points padded on every side by
      max(20 % of its larger side, 50 m); land is left out so that a large shore
      polygon does not inflate the grid.
    - Without a ``[grid]`` table the spacing defaults to a tenth of the shortest
      wavelength of the sea states at the site depth, rounded down to 1, 2, 2.5 or
      5 × 10^n m (about ten points per wavelength: common practice), coarsened if
      needed to stay within ``MAX_GRID_POINTS``.
    - Arms may touch end-to-end or end-to-side; they must not cross or overlap.
    """
    r = _Reader(path)
    if not isinstance(data, dict):
        raise r.err("the scenario must be a table of keys")
    r.check_keys(data, "top", None)
    title = r.string(data, "title", None, required=False,
                     default=Path(path).stem if path else "untitled")
    method = r.string(data, "method", None, required=False, default="auto",
                      choices=METHODS)
    crs_code, depth, g, lonlat = _read_site(r, data)
    # tables that name a layout file (GIS layer, DXF drawing) become plain tables here
    from harbor.study.layout_files import expand_references
    data = expand_references(data, path, crs_code, _KEYS)
    raw_arms, raw_lands, seas, raw_points = _read_tables(r, data)
    spacing, raw_bounds = _read_grid_table(r, data, lonlat)
    _check_coordinates(r, crs_code, lonlat, raw_arms, raw_lands, raw_points, raw_bounds)

    verts = np.concatenate([a for _, _, a, _ in raw_arms])
    # lon/lat vertices may straddle the antimeridian: average them unwrapped
    anchor = lonlat_anchor(verts[:, 0], verts[:, 1]) if lonlat else verts.mean(axis=0)
    try:
        site = Site(crs_code, (float(anchor[0]), float(anchor[1])), depth, g)
    except InputError as e:
        raise r.err(e.problem, "[site]", "crs") from None
    work = _to_work(r, site, crs_code)
    layout, points, allxy = _build_layout(r, site, work, raw_arms, raw_lands, raw_points)
    grid = _grid_spec(r, work, raw_bounds, spacing, allxy, seas, depth, g,
                      scale=float(site.scale_factor))
    reflection, footprints = _read_walls(r, data.get("arm", []) or [], data.get("land", []) or [],
                                         raw_lands, layout, points, raw_points)
    bath = None
    if "bathymetry" in data:
        from harbor.study.bathymetry_file import read_bathymetry

        bath = read_bathymetry(r, data["bathymetry"], path, site, crs_code, layout, points)
    return Scenario(path=str(path) if path else "", title=title, site=site,
                    layout=layout, seas=tuple(seas), points=tuple(points), grid=grid,
                    bathymetry=bath, reflection=reflection, footprints=footprints,
                    method=method)


def _read_walls(r, arm_ts, land_ts, raw_lands, layout, points, raw_points):
    """``reflection`` of arms and land, ``footprint`` of arms.

    Returns
    -------
    reflection : dict
        As :attr:`Scenario.reflection`; a per-edge land list is mapped from the edges
        as written onto the stored outline's edges (nearest written edge).
    footprints : dict
    """
    refl, feet = {}, {}
    for i, (t, a) in enumerate(zip(arm_ts, layout.arms)):
        where = _label("arm", t, i)
        if "reflection" in t:
            refl[a.name] = r.number(t, "reflection", where, lo=0.0, hi=1.0)
        if "footprint" in t:
            w = r.number(t, "footprint", where, positive=True)
            if w > MAX_FOOTPRINT:
                raise r.err(f"must be at most {MAX_FOOTPRINT:g} m (the breakwater's width "
                            f"at the still-water level), got {w:g}", where, "footprint")
            feet[a.name] = w
    for i, (t, (where, name, raw), land) in enumerate(zip(land_ts, raw_lands, layout.lands)):
        if "reflection" not in t:
            continue
        v = t["reflection"]
        if isinstance(v, (list, tuple)):
            n_written = len(raw) - (1 if len(raw) > 3 and np.allclose(raw[0], raw[-1]) else 0)
            if len(v) != n_written:
                raise r.err(f"give one reflection coefficient per edge of the outline "
                            f"({n_written} edges: edge i runs from vertex i to vertex i + 1, "
                            f"the last back to the first), got {len(v)}", where,
                            "reflection")
            vals = [r.number({"reflection": x}, "reflection", where, lo=0.0, hi=1.0)
                    for x in v]
            refl[land.name] = _edges_onto_outline(vals, raw, land.outline, r, where)
        else:
            refl[land.name] = r.number(t, "reflection", where, lo=0.0, hi=1.0)
    if feet and points:
        import shapely

        for a in layout.arms:
            if a.name not in feet:
                continue
            foot = shapely.buffer(a.geometry, 0.5 * feet[a.name], cap_style="flat")
            for (pw, pn, _, _), p in zip(raw_points, points):
                if shapely.intersects_xy(foot, *p.at):
                    raise r.err(f"lies on the {feet[a.name]:g} m footprint of arm "
                                f"'{a.name}' (move the point into the water)", pw, "at")
    return refl, feet


def _edges_onto_outline(vals, raw, outline, r, where):
    """Per-edge K_r as written -> per edge of the stored (cleaned, work-frame) outline."""
    # written edges are in the scenario CRS and the stored outline in the work frame:
    # match them by order along the ring, which the reader keeps (duplicates dropped)
    ring = np.asarray(outline.exterior.coords)[:-1]
    n = len(ring)
    if n == len(vals):
        return tuple(float(v) for v in vals)
    # vertices were dropped as duplicates: an edge of zero length carried no K_r
    aw = np.asarray(raw, float)
    if len(aw) > 3 and np.allclose(aw[0], aw[-1]):
        aw = aw[:-1]
    d = np.hypot(*(np.roll(aw, -1, axis=0) - aw).T)
    kept = [v for v, dd in zip(vals, d) if dd > 0]
    if len(kept) != n:
        raise r.err(f"the outline has {n} distinct edges once repeated vertices are "
                    f"dropped; give one reflection coefficient per distinct edge", where,
                    "reflection")
    return tuple(float(v) for v in kept)


def _read_site(r, data):
    """``[site]``: (crs code, depth, g, whether the CRS is lon/lat)."""
    if "site" not in data:
        raise r.err("missing table [site] (with crs and depth)", None, "site")
    site_t = data["site"]
    if not isinstance(site_t, dict):
        raise r.err("must be a table [site]", None, "site")
    r.check_keys(site_t, "site", "[site]")
    crs_code = r.string(site_t, "crs", "[site]")
    depth = r.number(site_t, "depth", "[site]", positive=True)
    g = r.number(site_t, "g", "[site]", required=False, default=9.81, positive=True)
    try:
        crs = parse_crs(crs_code)
    except InputError as e:
        raise r.err(e.problem, "[site]", "crs") from None
    return crs_code, depth, g, bool(crs.is_geographic)


def _read_tables(r, data):
    """``[[arm]]``, ``[[land]]``, ``[[sea]]``, ``[[point]]`` as raw values (scenario CRS)."""
    arm_ts = r.tables(data, "arm")
    land_ts = r.tables(data, "land")
    sea_ts = r.tables(data, "sea")
    point_ts = r.tables(data, "point")
    if not arm_ts:
        raise r.err("the scenario has no [[arm]]; at least one breakwater arm is "
                    "needed", None, "arm")
    if not sea_ts:
        raise r.err("the scenario has no [[sea]]; at least one sea state is needed",
                    None, "sea")
    raw_arms = []
    for i, t in enumerate(arm_ts):
        where = _label("arm", t, i)
        r.check_keys(t, "arm", where)
        name = r.string(t, "name", where, required=False, default=f"arm {i + 1}")
        line = r.polyline(t, "line", where, 2)
        rooted = r.string(t, "rooted", where, required=False, choices=_ROOTED)
        raw_arms.append((where, name, line, rooted))
    _unique(r, [(w, n) for w, n, _, _ in raw_arms], "arm")

    raw_lands = []
    for i, t in enumerate(land_ts):
        where = _label("land", t, i)
        r.check_keys(t, "land", where)
        name = r.string(t, "name", where, required=False, default=f"land {i + 1}")
        outline = r.polyline(t, "outline", where, 3)
        raw_lands.append((where, name, outline))

    seas = [_read_sea(r, t, i) for i, t in enumerate(sea_ts)]
    _unique(r, [(_label("sea", t, i), s.name) for i, (t, s) in
                enumerate(zip(sea_ts, seas))], "sea")

    raw_points = []
    for i, t in enumerate(point_ts):
        where = _label("point", t, i)
        r.check_keys(t, "point", where)
        name = r.string(t, "name", where)
        if "at" not in t:
            raise r.err("missing key", where, "at")
        at = np.array([r.xy(t["at"], where, "at")], float)
        limit = r.number(t, "limit", where, required=False, positive=True)
        raw_points.append((where, name, at, limit))
    _unique(r, [(w, n) for w, n, _, _ in raw_points], "point")
    return raw_arms, raw_lands, seas, raw_points


def _read_grid_table(r, data, lonlat=False):
    """``[grid]``: (spacing or None, bounds [xmin, ymin, xmax, ymax] or None)."""
    grid_t = data.get("grid")
    if grid_t is None:
        return None, None
    if not isinstance(grid_t, dict):
        raise r.err("must be a table [grid]", None, "grid")
    r.check_keys(grid_t, "grid", "[grid]")
    spacing = r.number(grid_t, "spacing", "[grid]", positive=True)
    raw_bounds = None
    if "bounds" in grid_t:
        b = grid_t["bounds"]
        if (not isinstance(b, (list, tuple)) or len(b) != 4 or
                any(as_real(c) is None or not math.isfinite(as_real(c))
                    or abs(as_real(c)) > MAX_COORDINATE for c in b)):
            raise r.err(f"must be four numbers [xmin, ymin, xmax, ymax], got "
                        f"{_show(b)}", "[grid]", "bounds")
        raw_bounds = [float(c) for c in b]
        if lonlat and raw_bounds[0] > raw_bounds[2] and raw_bounds[1] < raw_bounds[3]:
            # a lon/lat box across the antimeridian (xmin east of it, xmax west)
            raw_bounds[2] += 360.0
        if not (raw_bounds[0] < raw_bounds[2] and raw_bounds[1] < raw_bounds[3]):
            raise r.err("must be [xmin, ymin, xmax, ymax] with xmin < xmax and "
                        f"ymin < ymax, got {_show(b)}", "[grid]", "bounds")
    return spacing, raw_bounds


def _check_coordinates(r, crs_code, lonlat, raw_arms, raw_lands, raw_points, raw_bounds):
    """Coordinates in range for the CRS (lon/lat), or not lon/lat under a projected CRS."""
    coord_sets = ([(w, "line", a) for w, _, a, _ in raw_arms]
                  + [(w, "outline", a) for w, _, a in raw_lands]
                  + [(w, "at", a) for w, _, a, _ in raw_points])
    if raw_bounds is not None:
        shown = list(raw_bounds)
        if lonlat and shown[2] > 180.0:
            shown[2] -= 360.0
        coord_sets.append(("[grid]", "bounds",
                           np.array([shown[:2], shown[2:]], float)))
    if lonlat:
        for where, key, arr in coord_sets:
            for j, (lon, lat) in enumerate(arr):
                problem = lonlat_problem(lon, lat)
                if problem:
                    pre = f"vertex {j + 1}: " if len(arr) > 1 and key != "bounds" else ""
                    raise r.err(pre + problem, where, key)
        return
    for where, _, a, _ in raw_arms:
        # Nobody builds a breakwater shorter than one metre (or foot): such an arm
        # is almost surely lon/lat written under a projected CRS.
        if (np.all(np.abs(a[:, 0]) <= 180) and np.all(np.abs(a[:, 1]) <= 90)
                and np.ptp(a, axis=0).max() < 1.0):
            raise r.err(f"the arm is shorter than one unit of {crs_code}; its "
                        "coordinates look like longitude/latitude: set crs = "
                        "\"EPSG:4326\" in [site] or give coordinates in the CRS",
                        where, "line")


def _to_work(r, site, crs_code):
    """A converter scenario CRS -> work frame that names the table on failure."""
    def work(where, key, arr):
        xw, yw = site.to_work(arr[:, 0], arr[:, 1])
        out = np.column_stack([np.atleast_1d(xw), np.atleast_1d(yw)])
        if not np.all(np.isfinite(out)):
            raise r.err(f"coordinates outside the domain of CRS {crs_code}", where, key)
        return out
    return work


def _build_layout(r, site, work, raw_arms, raw_lands, raw_points):
    """Arms, land and points in the work frame, checked by :mod:`harbor.geometry.checks`;
    each geometry error becomes an :class:`InputError` naming the table and key."""
    arms_w = [(w, n, work(w, "line", a), rt) for w, n, a, rt in raw_arms]
    pts_w = [(w, n, work(w, "at", a)[0], lim) for w, n, a, lim in raw_points]
    allxy = np.concatenate([a for _, _, a, _ in arms_w] +
                           [p[None, :] for _, _, p, _ in pts_w])
    stray = checks.stray_vertex([(w, "line", a) for w, _, a, _ in arms_w]
                                + [(w, "at", p[None, :]) for w, _, p, _ in pts_w])
    if stray:
        raise r.err(stray[2], stray[0], stray[1])
    tol = checks.tolerance(float(np.ptp(allxy, axis=0).max()))
    show_xy = _shower(site)

    lines = []
    for where, _, a, _ in arms_w:
        try:
            lines.append(checks.clean_arm_line(a, tol))
        except checks.GeometryError as e:
            raise r.err(e.text(show_xy), where, "line") from None
    try:
        checks.check_crossings(lines, tol)
    except checks.GeometryError as e:
        raise r.err(e.text(show_xy).replace("{other}", arms_w[e.other][0]),
                    arms_w[e.index][0], "line") from None

    lands = []
    for where, name, a in raw_lands:
        try:
            poly = checks.clean_land_outline(work(where, "outline", a), tol)
        except checks.GeometryError as e:
            raise r.err(e.text(show_xy), where, "outline") from None
        lands.append(Land(name=name, outline=poly))

    # ends that miss another arm or land by centimetres are joined to it (the rule and
    # its tolerance live in the geometry layer); `check` reports every join
    lines, joins = join_ends(lines, [n for _, n, _, _ in arms_w], lands)
    ends = checks.rooted_ends(lines, [ld.outline for ld in lands], tol,
                              [rt for _, _, _, rt in arms_w])
    # a joined end is a junction, whatever `rooted` says
    ends = [(rs or any(j.joined and j.arm == n and j.end == "start" for j in joins),
             re or any(j.joined and j.arm == n and j.end == "end" for j in joins))
            for (_, n, _, _), (rs, re) in zip(arms_w, ends)]
    arms = tuple(Arm(name=n, line=a, rooted_start=bool(rs), rooted_end=bool(re))
                 for (_, n, _, _), a, (rs, re) in zip(arms_w, lines, ends))
    layout = Layout(arms=arms, lands=tuple(lands), joins=tuple(joins))

    if pts_w:
        try:
            checks.check_points(layout, np.array([p for _, _, p, _ in pts_w]), tol)
        except checks.GeometryError as e:
            raise r.err(e.text(show_xy), pts_w[e.index][0], "at") from None
    points = [Point(name=n, at=(float(p[0]), float(p[1])), limit=lim)
              for _, n, p, lim in pts_w]
    return layout, points, allxy


def _shower(site):
    """Render a work-frame position in the scenario's CRS for messages."""
    def show_xy(p):
        x, y = site.from_work(p[0], p[1])
        from harbor.geometry.site import format_xy

        return format_xy(x, y, site.is_lonlat)
    return show_xy


def _grid_spec(r, work, raw_bounds, spacing, allxy, seas, depth, g, scale=1.0):
    """The grid: bounds (given, or around arms and points) and spacing (given, or a
    tenth of the shortest wavelength), within :data:`MAX_GRID_POINTS`; at least
    :data:`harbor.solver.resolution.MIN_POINTS_PER_WAVELENGTH` points per wavelength."""
    given = spacing is not None
    if raw_bounds is not None:
        xs, ys = np.meshgrid([raw_bounds[0], raw_bounds[2]], [raw_bounds[1], raw_bounds[3]])
        cw = work("[grid]", "bounds", np.column_stack([xs.ravel(), ys.ravel()]))
        bounds = (float(cw[:, 0].min()), float(cw[:, 1].min()),
                  float(cw[:, 0].max()), float(cw[:, 1].max()))
    else:
        xmin, ymin = allxy.min(axis=0)
        xmax, ymax = allxy.max(axis=0)
        pad = max(0.2 * max(xmax - xmin, ymax - ymin), 50.0)
        bounds = (float(xmin - pad), float(ymin - pad), float(xmax + pad),
                  float(ymax + pad))
    w, h = bounds[2] - bounds[0], bounds[3] - bounds[1]
    # [grid] spacing is in ground metres; the grid is regular in the work frame, whose
    # lengths are `scale` times ground lengths (Web Mercator 1.41 at 45 N). Within
    # SCALE_NOTE_ABOVE of 1 (UTM in its zone, national grids) the step is kept in CRS
    # units, so that node coordinates stay round: the nodes are computed at their true
    # ground positions either way, the step only sets how densely they sample the field.
    k = scale if abs(scale - 1.0) > SCALE_NOTE_ABOVE else 1.0
    w, h = w / k, h / k
    if spacing is None:
        from harbor.waves import wavelength
        lmin = float(np.min(wavelength(np.array([s.period for s in seas]), depth, g)))
        spacing = max(_nice_floor(lmin / 10.0), _fitting_spacing(w, h))
    else:
        if spacing > max(w, h):
            raise r.err(f"spacing {spacing:g} m is larger than the grid "
                        f"({w:.0f} m × {h:.0f} m)", "[grid]", "spacing")
        n = grid_size(bounds, spacing * k)
        if n > MAX_GRID_POINTS:
            fit = _fitting_spacing(w, h)
            raise r.err(f"spacing {spacing:g} m over {w:.0f} m × {h:.0f} m gives "
                        f"{n:,} grid points, more than {MAX_GRID_POINTS:,}; a spacing "
                        f"of {fit:g} m or more would fit (or narrow the bounds)",
                        "[grid]", "spacing")
    problem = coarse_grid_problem(spacing, [s.period for s in seas], depth, g,
                                  given=given)
    if problem:
        raise r.err(problem, "[grid]", "spacing")
    return GridSpec(spacing=float(spacing * k), bounds=bounds, ground_spacing=float(spacing))


def _unique(r: _Reader, items, kind):
    seen = {}
    for i, (where, name) in enumerate(items):
        if name in seen:
            raise r.err(f"duplicate {kind} name {name!r} (the [[{kind}]] tables "
                        f"#{seen[name] + 1} and #{i + 1} share it)", where, "name")
        seen[name] = i


def _read_sea(r: _Reader, t: dict, i: int) -> Sea:
    where = _label("sea", t, i)
    r.check_keys(t, "sea", where)
    name = r.string(t, "name", where)
    kind = r.string(t, "kind", where, choices=_KINDS)
    height = r.number(t, "height", where, positive=True)
    period = r.number(t, "period", where, positive=True)
    from_deg = r.number(t, "from", where, lo=0.0, hi=360.0)
    if kind == "regular":
        for k in ("spreading", "spectrum", "peak_period", "gamma"):
            if k in t:
                raise r.err("applies to random seas only (this sea has kind = "
                            "\"regular\")", where, k)
        return Sea(name=name, kind=kind, height=height, period=period,
                   from_deg=from_deg)
    spreading = r.number(t, "spreading", where, required=False, default=10.0,
                         positive=True)
    spectrum = r.string(t, "spectrum", where, required=False,
                        default="bretschneider-mitsuyasu", choices=_SPECTRA)
    if spectrum != "jonswap":
        for k in ("peak_period", "gamma"):
            if k in t:
                raise r.err("applies to spectrum = \"jonswap\" only", where, k)
    peak = r.number(t, "peak_period", where, required=False, positive=True)
    if peak is not None and not (PEAK_RATIO[0] <= peak / period <= PEAK_RATIO[1]):
        raise r.err(f"{peak:g} s is {peak / period:.3g} times the period T1/3 = "
                    f"{period:g} s; a JONSWAP peak period is {PEAK_RATIO[0]:g} to "
                    f"{PEAK_RATIO[1]:g} times T1/3 (about 1.05-1.13 for gamma 1-7)",
                    where, "peak_period")
    gamma = r.number(t, "gamma", where, required=False, default=3.3, positive=True)
    if gamma < 1.0:
        # gamma < 1 would make the peak lower than the Pierson-Moskowitz shape it
        # enhances; JONSWAP values are 1 to about 7 (common practice).
        raise r.err(f"must be at least 1 (JONSWAP peak enhancement), got {gamma:g}",
                    where, "gamma")
    return Sea(name=name, kind=kind, height=height, period=period, from_deg=from_deg,
               spreading=spreading, spectrum=spectrum, peak_period=peak, gamma=gamma)


def grid_size(bounds, spacing: float) -> int:
    """Number of grid points a grid over ``bounds`` at ``spacing`` may hold.

    Parameters
    ----------
    bounds : sequence of float
        ``(xmin, ymin, xmax, ymax)``, m (work frame).
    spacing : float
        Grid spacing, m.

    Returns
    -------
    int
        (⌈w/Δ⌉ + 1)(⌈h/Δ⌉ + 1) with w, h the sides and Δ the spacing: counted
        generously (both ends included, a partial step rounded up), so that any grid
        the solver builds over these bounds is no larger.
    """
    w, h = bounds[2] - bounds[0], bounds[3] - bounds[1]
    return (math.ceil(w / spacing) + 1) * (math.ceil(h / spacing) + 1)


def _nice_floor(v: float) -> float:
    from harbor.outputs.style import round_number

    return round_number(v, (1.0, 2.0, 2.5, 5.0), up=False)


def _fitting_spacing(w: float, h: float) -> float:
    """The smallest 'round' spacing (2 significant digits) whose grid fits."""
    s = math.sqrt(w * h / MAX_GRID_POINTS)
    e = 10.0 ** (math.floor(math.log10(s)) - 1)
    s = math.ceil(s / e) * e
    while grid_size((0.0, 0.0, w, h), s) > MAX_GRID_POINTS:
        s = round(s + e, 12)
    return s
