"""Bathymetry: water depth over the site, from a constant, soundings or a raster.

Geometry only: depths and coordinates, never waves. Depths are given below chart datum
(positive down, m); the still-water level (m above chart datum) is added to give the
water depth that the wave solvers use. Coordinates are the site's work frame (m).
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np

from harbor.errors import InputError

__all__ = ["Bathymetry", "constant", "from_soundings", "from_raster", "from_netcdf",
           "from_geotiff"]


@dataclass(frozen=True)
class Bathymetry:
    """Water depth as a function of position in the work frame.

    Build one with :func:`constant`, :func:`from_soundings`, :func:`from_raster` or
    :func:`from_netcdf`; evaluate with :meth:`depth`.

    Attributes
    ----------
    still_water_level : float
        Still-water level above chart datum (m); added to every charted depth.
    kind : str
        ``"constant"``, ``"soundings"`` or ``"raster"``.
    extent : tuple of float or None
        (xmin, ymin, xmax, ymax) of the data (m, work frame); None for a constant.
    """

    still_water_level: float = 0.0
    kind: str = "constant"
    extent: tuple | None = None
    _value: float = 0.0
    _interp: object = field(default=None, repr=False, compare=False)

    @property
    def is_constant(self) -> bool:
        """True when the depth is one value everywhere."""
        return self.kind == "constant"

    def charted(self, x, y):
        """Charted depth below chart datum (m) at points (x, y) (m), broadcast together.

        Outside the data the nearest data value is used (soundings) or the edge value
        (raster).
        """
        x, y = np.broadcast_arrays(np.asarray(x, float), np.asarray(y, float))
        if self.kind == "constant":
            return np.full(x.shape, self._value)
        return self._interp(x.ravel(), y.ravel()).reshape(x.shape)

    def depth(self, x, y):
        """Still-water depth h = charted depth + still-water level (m) at (x, y) (m).

        Parameters
        ----------
        x, y : array_like
            Work-frame coordinates (m), broadcast together.

        Returns
        -------
        numpy.ndarray
            Water depth (m); zero or negative where the bed is above the still water.
        """
        return self.charted(x, y) + self.still_water_level

    def slope(self, x, y, step):
        """Magnitude of the bed slope |grad h| (-) by central differences of ``step`` m."""
        x, y = np.broadcast_arrays(np.asarray(x, float), np.asarray(y, float))
        gx = (self.charted(x + step, y) - self.charted(x - step, y)) / (2 * step)
        gy = (self.charted(x, y + step) - self.charted(x, y - step)) / (2 * step)
        return np.hypot(gx, gy)


def _level(still_water_level):
    try:
        v = float(still_water_level)
    except (TypeError, ValueError):
        raise InputError("still-water level must be a number in m above chart datum",
                         key="still_water_level") from None
    if not np.isfinite(v):
        raise InputError("still-water level must be finite", key="still_water_level")
    return v


def constant(depth, still_water_level=0.0) -> Bathymetry:
    """One depth everywhere.

    Parameters
    ----------
    depth : float
        Charted depth below chart datum (m), > 0 once the still-water level is added.
    still_water_level : float, optional
        Still-water level above chart datum (m).

    Returns
    -------
    Bathymetry
    """
    try:
        d = float(depth)
    except (TypeError, ValueError):
        raise InputError("depth must be a number in m", key="depth") from None
    swl = _level(still_water_level)
    if not (np.isfinite(d) and d + swl > 0):
        raise InputError(f"depth must be positive, got {d!r} m + level {swl!r} m",
                         key="depth")
    return Bathymetry(still_water_level=swl, kind="constant", _value=d)


def from_soundings(x, y, depth, still_water_level=0.0, transform=None) -> Bathymetry:
    """Depths from scattered soundings, linearly interpolated on their triangulation.

    Parameters
    ----------
    x, y : array_like, shape (n,)
        Sounding positions (m, work frame), or in any CRS when ``transform`` is given.
    depth : array_like, shape (n,)
        Charted depth below chart datum at each sounding (m, positive down; negative
        values are drying heights).
    still_water_level : float, optional
        Still-water level above chart datum (m).
    transform : callable, optional
        ``transform(x, y) -> (xw, yw)`` to the work frame, e.g. a
        ``pyproj.Transformer(...).transform`` chained with
        :meth:`harbor.geometry.site.Site.to_work`.

    Returns
    -------
    Bathymetry

    Notes
    -----
    Piecewise-linear interpolation on the Delaunay triangulation of the soundings
    (scipy ``LinearNDInterpolator``); outside their convex hull the nearest sounding is
    used.
    """
    from scipy.interpolate import LinearNDInterpolator, NearestNDInterpolator

    try:
        x = np.asarray(x, float).ravel()
        y = np.asarray(y, float).ravel()
        d = np.asarray(depth, float).ravel()
    except (TypeError, ValueError):
        raise InputError("soundings must be numbers (x, y, depth)", key="soundings") from None
    if not (x.size == y.size == d.size) or x.size < 3:
        raise InputError("soundings need at least 3 points with x, y and depth each",
                         key="soundings")
    if not (np.all(np.isfinite(x)) and np.all(np.isfinite(y)) and np.all(np.isfinite(d))):
        raise InputError("soundings must be finite numbers", key="soundings")
    if transform is not None:
        x, y = (np.asarray(v, float) for v in transform(x, y))
    swl = _level(still_water_level)
    pts = np.column_stack([x, y])
    lin = LinearNDInterpolator(pts, d)
    near = NearestNDInterpolator(pts, d)

    def interp(xq, yq):
        v = lin(xq, yq)
        bad = ~np.isfinite(v)
        if np.any(bad):
            v[bad] = near(xq[bad], yq[bad])
        return v

    return Bathymetry(still_water_level=swl, kind="soundings",
                      extent=(float(x.min()), float(y.min()), float(x.max()), float(y.max())),
                      _interp=interp)


def from_raster(x, y, depth, still_water_level=0.0) -> Bathymetry:
    """Depths on a regular raster, bilinearly interpolated.

    Parameters
    ----------
    x : array_like, shape (nx,)
        Cell-centre x coordinates (m, work frame), strictly monotonic.
    y : array_like, shape (ny,)
        Cell-centre y coordinates (m, work frame), strictly monotonic.
    depth : array_like, shape (ny, nx)
        Charted depth below chart datum (m, positive down). NaN cells (no data) are
        filled with the nearest valid cell.
    still_water_level : float, optional
        Still-water level above chart datum (m).

    Returns
    -------
    Bathymetry

    Notes
    -----
    scipy ``RegularGridInterpolator`` (linear); outside the raster the edge values are
    held.
    """
    from scipy.interpolate import RegularGridInterpolator
    from scipy.ndimage import distance_transform_edt

    x = np.asarray(x, float)
    y = np.asarray(y, float)
    d = np.asarray(depth, float)
    if x.ndim != 1 or y.ndim != 1 or d.shape != (y.size, x.size) or x.size < 2 or y.size < 2:
        raise InputError(f"raster depth must have shape (ny, nx) = ({y.size}, {x.size}), "
                         f"got {d.shape}", key="bathymetry")
    if x[1] < x[0]:
        x, d = x[::-1], d[:, ::-1]
    if y[1] < y[0]:
        y, d = y[::-1], d[::-1, :]
    if np.any(np.diff(x) <= 0) or np.any(np.diff(y) <= 0):
        raise InputError("raster coordinates must be strictly monotonic", key="bathymetry")
    bad = ~np.isfinite(d)
    if bad.all():
        raise InputError("raster has no valid depth", key="bathymetry")
    if bad.any():
        idx = distance_transform_edt(bad, return_distances=False, return_indices=True)
        d = d[tuple(idx)]
    swl = _level(still_water_level)
    rgi = RegularGridInterpolator((y, x), d, bounds_error=False, fill_value=None)

    def interp(xq, yq):
        xq = np.clip(xq, x[0], x[-1])
        yq = np.clip(yq, y[0], y[-1])
        return rgi(np.column_stack([yq, xq]))

    return Bathymetry(still_water_level=swl, kind="raster",
                      extent=(float(x[0]), float(y[0]), float(x[-1]), float(y[-1])),
                      _interp=interp)


def from_netcdf(path, variable=None, x="x", y="y", positive="down",
                still_water_level=0.0) -> Bathymetry:
    """Depths from a NetCDF raster (read with xarray), in the work frame.

    Parameters
    ----------
    path : str or path-like
        NetCDF file holding a 2-D variable over coordinates ``x`` and ``y`` (m, work
        frame).
    variable : str, optional
        Name of the depth variable; by default the only 2-D data variable.
    x, y : str, optional
        Names of the coordinates.
    positive : {"down", "up"}, optional
        ``"down"``: values are depths below chart datum; ``"up"``: bed elevations above
        chart datum (NetCDF-CF ``positive`` attribute; read from the file when present).
    still_water_level : float, optional
        Still-water level above chart datum (m).

    Returns
    -------
    Bathymetry
    """
    import xarray as xr

    try:
        ds = xr.open_dataset(path)
    except (OSError, ValueError) as e:
        raise InputError(f"cannot read bathymetry: {e}", file=str(path)) from None
    with ds:
        if variable is None:
            two = [v for v in ds.data_vars if ds[v].ndim == 2]
            if len(two) != 1:
                raise InputError("name the depth variable: the file has "
                                 f"{len(two)} 2-D variables", file=str(path), key="variable")
            variable = two[0]
        if variable not in ds or x not in ds.coords or y not in ds.coords:
            raise InputError(f"bathymetry file needs variable '{variable}' over "
                             f"coordinates '{x}', '{y}'", file=str(path), key="variable")
        da = ds[variable].transpose(y, x)
        positive = str(da.attrs.get("positive", positive)).lower()
        vals = np.asarray(da.values, float)
        if positive == "up":
            vals = -vals
        return from_raster(ds[x].values, ds[y].values, vals, still_water_level)


def from_geotiff(path, band=1, positive="down", still_water_level=0.0,
                 transform=None) -> Bathymetry:
    """Depths from a GeoTIFF raster (read with rasterio).

    Parameters
    ----------
    path : str or path-like
        A north-up GeoTIFF (no rotation terms) of depths in m.
    band : int, optional
        Band to read (1-based).
    positive : {"down", "up"}, optional
        ``"down"``: depths below chart datum; ``"up"``: bed elevations above it.
    still_water_level : float, optional
        Still-water level above chart datum (m).
    transform : callable, optional
        ``transform(x, y) -> (xw, yw)`` from the raster's CRS to the work frame; the
        raster's cell centres are mapped through it (a conformal work frame keeps the
        raster near-regular, and the mapped axes are used).

    Returns
    -------
    Bathymetry

    Notes
    -----
    Cell centres x = c + (j + 1/2) a, y = f + (i + 1/2) e from the affine transform
    (a, b, c, d, e, f) with b = d = 0; nodata cells are filled from the nearest valid
    cell (see :func:`from_raster`).
    """
    try:
        import rasterio
    except ImportError:  # pragma: no cover - rasterio is a dependency
        raise InputError("reading GeoTIFF needs the rasterio package", file=str(path))
    try:
        with rasterio.open(path) as src:
            vals = src.read(band).astype(float)
            if src.nodata is not None:
                vals[vals == src.nodata] = np.nan
            tr = src.transform
    except (OSError, ValueError, IndexError) as e:
        raise InputError(f"cannot read bathymetry: {e}", file=str(path)) from None
    if abs(tr.b) > 0 or abs(tr.d) > 0:
        raise InputError("rotated GeoTIFF rasters are not supported", file=str(path))
    ny, nx = vals.shape
    x = tr.c + (np.arange(nx) + 0.5) * tr.a
    y = tr.f + (np.arange(ny) + 0.5) * tr.e
    if transform is not None:
        xw, _ = transform(x, np.full(nx, y.mean()))
        _, yw = transform(np.full(ny, x.mean()), y)
        x, y = np.asarray(xw, float), np.asarray(yw, float)
    if positive == "up":
        vals = -vals
    return from_raster(x, y, vals, still_water_level)
