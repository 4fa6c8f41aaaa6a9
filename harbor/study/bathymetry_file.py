"""The ``[bathymetry]`` table of a scenario: a survey file read into the work frame.

A survey is soundings (a CSV of x, y, depth) or a raster (GeoTIFF or NetCDF), each in its
own CRS (default: the scenario's). Depths are below chart datum, positive down, unless
``positive = "up"`` says the file holds bed elevations; ``still_water_level`` (m above
chart datum) is added to every depth. The survey is evaluated exactly in its own CRS:
every query point of the work frame is carried there by PROJ, so a raster in another
projection is neither resampled nor distorted.

Mistakes are refused with one line naming the file and the key: a file that does not
cover the harbour (often a wrong ``crs``), holes or NaN inside the harbour, a CRS that
contradicts the file's own, depths of the wrong sign, a point on dry ground.
"""

from __future__ import annotations

import csv
import io
import os
from pathlib import Path

import numpy as np
import pyproj
import shapely

from harbor.errors import InputError
from harbor.geometry import bathymetry as _bath
from harbor.study._files import check_file, read_text

#: Largest soundings file read (bytes): about two million soundings.
MAX_SOUNDINGS_BYTES = 128 * 1024 * 1024
#: Largest raster read (cells).
MAX_RASTER_CELLS = 64_000_000
#: Column names accepted for the horizontal coordinates of soundings.
X_NAMES = ("x", "easting", "lon", "longitude")
Y_NAMES = ("y", "northing", "lat", "latitude")
_RASTER = (".tif", ".tiff", ".nc", ".nc4", ".cdf")


def read_bathymetry(r, table, scenario_path, site, crs_code, layout, points):
    """Read and check a scenario's ``[bathymetry]`` table.

    Parameters
    ----------
    r : harbor.study.scenario._Reader
        Names the scenario file in messages.
    table : dict
        ``file`` (CSV of soundings, GeoTIFF or NetCDF; relative to the scenario's
        folder), optional ``crs`` (the file's CRS; default the file's own, else the
        scenario's), ``variable`` (NetCDF), ``positive`` (``"down"`` depths, default, or
        ``"up"`` bed elevations), ``still_water_level`` (m above chart datum, default 0).
    scenario_path : str
    site : harbor.geometry.site.Site
    crs_code : str
        The scenario's CRS.
    layout : harbor.geometry.layout.Layout
        Work frame.
    points : sequence of harbor.geometry.layout.Point
        Work frame.

    Returns
    -------
    harbor.geometry.bathymetry.Bathymetry
        Evaluated in the work frame (m).

    Raises
    ------
    InputError
        Naming the scenario file, ``[bathymetry]`` and the key (or the survey file and
        its line).
    """
    where = "[bathymetry]"
    if not isinstance(table, dict):
        raise r.err("must be a table [bathymetry] (with file = ...)", None, "bathymetry")
    r.check_keys(table, "bathymetry", where)
    name = r.string(table, "file", where)
    positive = r.string(table, "positive", where, required=False, default="down",
                        choices=("down", "up"))
    swl = r.number(table, "still_water_level", where, required=False, default=0.0)
    if abs(swl) > 50:
        raise r.err(f"must be within 50 m of chart datum, got {swl:g}", where,
                    "still_water_level")
    given_crs = r.string(table, "crs", where, required=False)
    variable = r.string(table, "variable", where, required=False)
    base = Path(scenario_path).parent if scenario_path else Path(".")
    path = Path(name) if os.path.isabs(name) else base / name
    file = str(path)
    ext = path.suffix.lower()
    sign = -1.0 if positive == "up" else 1.0

    def bad(problem, key="file"):
        return r.err(f"{name}: {problem}", where, key)

    try:
        return _read(r, where, name, path, ext, sign, swl, given_crs, variable, site,
                     crs_code, layout, points, bad)
    except InputError as e:
        if e.file and e.file != (scenario_path or None) and not e.where:
            # a problem of the survey file itself: name the scenario, the key and the file
            raise r.err(f"{name}: {e.problem}", where, "file") from None
        raise


def _read(r, where, name, path, ext, sign, swl, given_crs, variable, site, crs_code,
          layout, points, bad):
    file = str(path)
    if ext in _RASTER:
        check_file(path, "bathymetry raster")
        if ext in (".tif", ".tiff"):
            xs, ys, vals, own = _read_geotiff(file, bad)
        else:
            xs, ys, vals, own = _read_netcdf(file, variable, bad)
        native = _native_crs(given_crs, own, crs_code, bad)
        vals = sign * vals
        holes = ~np.isfinite(vals)
        if holes.all():
            raise bad("the raster holds no valid depth (every cell is nodata or NaN)")
        survey = _bath.from_raster(xs, ys, vals)
        xs_s, ys_s = np.sort(xs), np.sort(ys)
        hx = 0.5 * abs(xs[1] - xs[0])
        hy = 0.5 * abs(ys[1] - ys[0])
        cover = shapely.box(xs_s[0] - hx, ys_s[0] - hy, xs_s[-1] + hx, ys_s[-1] + hy)
        from scipy.interpolate import RegularGridInterpolator

        hole_at = RegularGridInterpolator((ys_s, xs_s), _sorted(xs, ys, holes.astype(float)),
                                          method="nearest", bounds_error=False,
                                          fill_value=0.0)
    else:
        if variable is not None:
            raise r.err("'variable' applies to NetCDF rasters only", where, "variable")
        text = read_text(path, "soundings file (CSV)", MAX_SOUNDINGS_BYTES)
        sx, sy, sd = _read_soundings(text, file)
        native = _native_crs(given_crs, None, crs_code, bad)
        sd = sign * sd
        survey = _bath.from_soundings(sx, sy, sd)
        hull = shapely.convex_hull(shapely.multipoints(np.column_stack([sx, sy])))
        span = max(np.ptp(sx), np.ptp(sy), 1.0)
        cover = shapely.buffer(hull, 1e-6 * span)
        hole_at = None

    to_native = _work_to_native(site, crs_code, native)
    _check_cover(r, where, name, site, layout, points, to_native, cover, hole_at, survey,
                 swl, given_crs or native.to_string())

    def interp(xq, yq):
        xn, yn = to_native(xq, yq)
        return survey._interp(np.asarray(xn, float).ravel(), np.asarray(yn, float).ravel())

    bx0, by0, bx1, by1 = cover.bounds
    ex = np.array([bx0, bx1, bx1, bx0])
    ey = np.array([by0, by0, by1, by1])
    wx, wy = _native_to_work(site, crs_code, native)(ex, ey)
    extent = (float(np.min(wx)), float(np.min(wy)), float(np.max(wx)), float(np.max(wy)))
    return _bath.Bathymetry(still_water_level=float(swl), kind=survey.kind, extent=extent,
                            _interp=interp)


def _sorted(xs, ys, v):
    if xs[1] < xs[0]:
        v = v[:, ::-1]
    if ys[1] < ys[0]:
        v = v[::-1, :]
    return v


def _read_soundings(text, file):
    """x, y, depth columns of a soundings CSV; errors name the file and the line."""
    lines = [(i + 1, ln) for i, ln in enumerate(text.splitlines())
             if ln.strip() and not ln.lstrip().startswith("#")]
    if not lines:
        raise InputError("the soundings file is empty (expected a header x,y,depth and "
                         "one sounding per line)", file=file)
    head_no, head = lines[0]
    cols = [c.strip().lower() for c in next(csv.reader(io.StringIO(head)))]
    ix = next((cols.index(c) for c in X_NAMES if c in cols), None)
    iy = next((cols.index(c) for c in Y_NAMES if c in cols), None)
    idp = cols.index("depth") if "depth" in cols else None
    if ix is None or iy is None or idp is None:
        raise InputError(f"line {head_no}: the header must name the columns x, y and "
                         f"depth (x may be easting or lon, y northing or lat), got "
                         f"{head.strip()[:60]!r}", file=file)
    n = len(lines) - 1
    if n < 3:
        raise InputError(f"needs at least 3 soundings, has {n}", file=file)
    data = np.empty((n, 3))
    reader = csv.reader(io.StringIO("\n".join(ln for _, ln in lines[1:])))
    for k, row in enumerate(reader):
        no = lines[k + 1][0]
        try:
            vals = [float(row[i]) for i in (ix, iy, idp)]
        except (ValueError, IndexError):
            raise InputError(f"line {no}: x, y and depth must be numbers, got "
                             f"{','.join(row)[:60]!r}", file=file) from None
        if not all(np.isfinite(vals)):
            raise InputError(f"line {no}: x, y and depth must be finite numbers (a NaN "
                             f"or an empty depth is a hole in the survey), got "
                             f"{','.join(row)[:60]!r}", file=file)
        data[k] = vals
    return data[:, 0], data[:, 1], data[:, 2]


def _read_geotiff(file, bad):
    import rasterio

    try:
        with rasterio.open(file) as src:
            if src.width * src.height > MAX_RASTER_CELLS:
                raise bad(f"the raster has {src.width * src.height:,} cells, more than "
                          f"the {MAX_RASTER_CELLS:,} read; crop it to the harbour")
            vals = src.read(1).astype(float)
            if src.nodata is not None:
                vals[vals == src.nodata] = np.nan
            tr = src.transform
            own = src.crs.to_wkt() if src.crs else None
    except rasterio.errors.RasterioError as e:
        raise bad(f"cannot read the GeoTIFF ({str(e).splitlines()[0][:120]})") from None
    if abs(tr.b) > 0 or abs(tr.d) > 0:
        raise bad("rotated rasters are not supported; warp it north-up first")
    ny, nx = vals.shape
    if nx < 2 or ny < 2:
        raise bad(f"the raster must have at least 2 x 2 cells, has {nx} x {ny}")
    xs = tr.c + (np.arange(nx) + 0.5) * tr.a
    ys = tr.f + (np.arange(ny) + 0.5) * tr.e
    return xs, ys, vals, own


def _read_netcdf(file, variable, bad):
    import xarray as xr

    try:
        ds = xr.open_dataset(file)
    except (OSError, ValueError) as e:
        raise bad(f"cannot read the NetCDF file ({str(e).splitlines()[0][:120]})") from None
    with ds:
        if variable is None:
            two = [v for v in ds.data_vars if ds[v].ndim == 2]
            if len(two) != 1:
                raise bad(f"the file has {len(two)} 2-D variables; name the depth with "
                          f"variable = ...", "variable")
            variable = two[0]
        if variable not in ds.data_vars or ds[variable].ndim != 2:
            raise bad(f"no 2-D variable '{variable}' (2-D variables: "
                      f"{', '.join(v for v in ds.data_vars if ds[v].ndim == 2) or 'none'})",
                      "variable")
        da = ds[variable]
        ydim, xdim = da.dims
        xs = np.asarray(ds[xdim].values if xdim in ds.coords else np.arange(da.shape[1]),
                        float)
        ys = np.asarray(ds[ydim].values if ydim in ds.coords else np.arange(da.shape[0]),
                        float)
        if xdim not in ds.coords or ydim not in ds.coords:
            raise bad(f"variable '{variable}' has no coordinate values along "
                      f"{xdim}/{ydim}", "variable")
        vals = np.asarray(da.values, float)
        if str(da.attrs.get("positive", "down")).lower() == "up":
            vals = -vals
        own = None
        gm = da.attrs.get("grid_mapping")
        if gm and gm in ds.variables:
            a = ds[gm].attrs
            own = a.get("crs_wkt") or a.get("spatial_ref")
    if xs.size < 2 or ys.size < 2:
        raise bad("the raster must have at least 2 x 2 cells")
    if np.any(np.diff(xs) == 0) or np.any(np.diff(ys) == 0) or not (
            np.all(np.diff(xs) > 0) or np.all(np.diff(xs) < 0)) or not (
            np.all(np.diff(ys) > 0) or np.all(np.diff(ys) < 0)):
        raise bad("raster coordinates must be strictly increasing or decreasing")
    return xs, ys, vals, own


def _native_crs(given, own, scenario_crs, bad):
    """The survey's CRS: the file's own, the ``crs`` key, or the scenario's."""
    from harbor.geometry.site import parse_crs

    g = None
    if given is not None:
        try:
            g = parse_crs(given)
        except InputError as e:
            raise bad(e.problem, "crs") from None
    o = pyproj.CRS.from_user_input(own) if own else None
    if g is not None and o is not None and not g.equals(o, ignore_axis_order=True):
        raise bad(f"the file's own CRS is {o.to_string()} ({o.name}) but crs = "
                  f"{given!r}; remove the key or correct it", "crs")
    if o is not None:
        return o
    return g if g is not None else parse_crs(scenario_crs)


def _work_to_native(site, scenario_crs, native):
    from harbor.geometry.site import parse_crs

    sc = parse_crs(scenario_crs)
    same = native.equals(sc, ignore_axis_order=True)
    tr = None if same else pyproj.Transformer.from_crs(sc, native, always_xy=True)

    def go(xw, yw):
        x, y = site.from_work(np.asarray(xw, float), np.asarray(yw, float))
        if tr is not None:
            x, y = tr.transform(x, y)
        return np.asarray(x, float), np.asarray(y, float)
    return go


def _native_to_work(site, scenario_crs, native):
    from harbor.geometry.site import parse_crs

    sc = parse_crs(scenario_crs)
    same = native.equals(sc, ignore_axis_order=True)
    tr = None if same else pyproj.Transformer.from_crs(native, sc, always_xy=True)

    def go(x, y):
        if tr is not None:
            x, y = tr.transform(x, y)
        return site.to_work(np.asarray(x, float), np.asarray(y, float))
    return go


def harbour_sites(layout, points):
    """Where a survey must give a depth: the points, free heads and bends (work frame)."""
    out = [np.asarray(p.at, float)[None, :] for p in points]
    for a in layout.arms:
        line = np.asarray(a.line, float)
        out.append(line[1:-1])
        out.append(line[[i for i, rooted in ((0, a.rooted_start), (-1, a.rooted_end))
                         if not rooted]])
    out = [o for o in out if len(o)]
    return np.concatenate(out) if out else np.zeros((0, 2))


def _check_cover(r, where, name, site, layout, points, to_native, cover, hole_at, survey,
                 swl, crs_shown):
    from harbor.geometry.site import format_xy
    from harbor.geometry.visibility import inside_land

    def shown(xw, yw):
        x, y = site.from_work(xw, yw)
        return format_xy(float(x), float(y), site.is_lonlat)

    sites = harbour_sites(layout, points)
    labels = [f"point '{p.name}'" for p in points] + ["an arm's head or bend"] * (
        len(sites) - len(points))
    nx, ny = to_native(sites[:, 0], sites[:, 1])
    inside = shapely.intersects_xy(cover, nx, ny)
    if not inside.any():
        raise r.err(f"{name}: the survey does not overlap the harbour at all (its extent "
                    f"in {crs_shown} is {_box(cover)}); is its crs right?", where, "crs")
    if not inside.all():
        i = int(np.argmin(inside))
        raise r.err(f"{name}: the survey does not cover {labels[i]} at "
                    f"{shown(*sites[i])}; extend the survey over the whole harbour", where,
                    "file")
    # holes (raster nodata or NaN) over the harbour's water
    x0, y0 = sites.min(axis=0)
    x1, y1 = sites.max(axis=0)
    pad = 0.05 * max(x1 - x0, y1 - y0, 10.0)
    X, Y = np.meshgrid(np.linspace(x0 - pad, x1 + pad, 80), np.linspace(y0 - pad, y1 + pad, 80))
    wet = ~inside_land(X, Y, layout)
    qx, qy = to_native(X[wet], Y[wet])
    inside = shapely.intersects_xy(cover, qx, qy)
    if hole_at is not None:
        qs = np.column_stack([qy[inside], qx[inside]])
        h = hole_at(qs) > 0.5 if len(qs) else np.zeros(0, bool)
        hs = hole_at(np.column_stack([ny, nx])) > 0.5
        if hs.any():
            i = int(np.argmax(hs))
            raise r.err(f"{name}: the raster has no depth (nodata or NaN) at {labels[i]} "
                        f"({shown(*sites[i])}); fill the hole", where, "file")
        if h.mean() > 0.02 if h.size else False:
            k = np.flatnonzero(wet.ravel())[np.flatnonzero(inside)[np.argmax(h)]]
            raise r.err(f"{name}: {100 * h.mean():.0f} % of the harbour's water has no "
                        f"depth in the raster (nodata or NaN), e.g. at "
                        f"{shown(X.flat[k], Y.flat[k])}; fill the holes", where, "file")
    d = survey._interp(nx, ny) + swl
    if np.all(d <= 0):
        raise r.err(f"{name}: the water depth (depth + still-water level) is zero or "
                    f"negative at every point, head and bend of the harbour (e.g. "
                    f"{d[0]:.2f} m); depths are positive down below chart datum; if the "
                    f"file holds bed elevations, set positive = \"up\"", where, "positive")
    for i, p in enumerate(points):
        if d[i] <= 0:
            raise r.err(f"{name}: point '{p.name}' is on dry ground (water depth "
                        f"{d[i]:.2f} m at still-water level {swl:g} m above chart datum)",
                        where, "file")


def _box(poly):
    x0, y0, x1, y1 = poly.bounds
    return f"{x0:.6g}..{x1:.6g} x {y0:.6g}..{y1:.6g}"
