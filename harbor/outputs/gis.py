"""Files for GIS: Cloud-Optimised GeoTIFF rasters of K' and wave height per sea state,
and a GeoPackage of isolines, berth points, arms and land, in the scenario CRS.

Everything is read from the result Dataset of :func:`harbor.solve` (its ``x``, ``y``,
``crs_wkt``, ``scenario_crs``, the layout variables ``arm_wkt``, ``land_wkt`` and the
field and point variables); nothing is recomputed.

Which CRS the rasters use: the result grid is regular in the *work frame* (attribute
``crs_wkt``). When the scenario CRS maps that grid onto an axis-aligned regular grid
(the work frame is the scenario CRS for projected CRSs in metres, and the same
projection rescaled for CRSs in feet), the raster is written in the scenario CRS; for a
lon/lat scenario (EPSG:4326) it is written in the work frame's own projected CRS (a
local transverse Mercator centred at the site, carried in full in the file), because a
regular metre grid is not a regular lon/lat grid and resampling it would change the
values. Each file says which in its ``RASTER_CRS`` tag. The GeoPackage is always in the
scenario CRS.
"""

from __future__ import annotations

import math
from pathlib import Path

import numpy as np
import pyproj
import shapely

from harbor.cautions import result_cautions, result_short_caution
from harbor.geometry.visibility import distance_to_lines
from harbor.outputs._atomic import atomic_path, unique_slugs
from harbor.outputs.read import arm_mask, layout_shapes
from harbor.outputs.style import method_reason

#: Value of the raster cells without a value (land, cells an arm crosses).
NODATA = -9999.0
#: K' levels of the GeoPackage isolines (those of the GeoJSON isolines).
GPKG_LEVELS = tuple(float(v) for v in np.round(np.arange(0.1, 1.0001, 0.1), 10))
#: GeoPackage layer names.
GPKG_LAYERS = ("isolines", "points", "arms", "land")


def _sea_names(result, seas=None):
    names = [str(v) for v in result["sea"].values]
    if seas is None:
        return names
    return [str(s) for s in seas]


def _work_crs(result) -> pyproj.CRS:
    wkt = result.attrs.get("crs_wkt")
    return pyproj.CRS.from_user_input(wkt if wkt else result.attrs["crs"])


def _scenario_crs(result) -> pyproj.CRS:
    code = result.attrs.get("scenario_crs")
    return pyproj.CRS.from_user_input(code) if code else _work_crs(result)


def _to_scenario(result):
    """Work frame (m) -> scenario CRS, or None when they are the same CRS."""
    w, s = _work_crs(result), _scenario_crs(result)
    if w.equals(s, ignore_axis_order=True):
        return None
    tr = pyproj.Transformer.from_crs(w, s, always_xy=True)
    return lambda x, y: tr.transform(np.asarray(x, float), np.asarray(y, float))


def raster_frame(result):
    """CRS and affine transform of the rasters of a result.

    Parameters
    ----------
    result : xarray.Dataset
        Solved result with a grid (``x``, ``y`` ascending, uniform steps).

    Returns
    -------
    crs : str
        The raster CRS: the scenario CRS as written in the scenario when the grid is
        axis-aligned and regular in it, else the work frame's WKT.
    transform : tuple of 6 float
        GDAL order ``(a, b, c, d, e, f)`` of ``affine.Affine``: X = a col + b row + c,
        Y = d col + e row + f at the pixel's upper-left corner (b = d = 0).
    in_scenario_crs : bool

    Notes
    -----
    Pixel (row r, column c) is centred on grid node (x[c], y[n-1-r]) (north up).
    The grid is taken to be regular in the scenario CRS when x' = a x + c0 and
    y' = e y + f0 (a, e > 0) reproduce the scenario coordinates of the four corners
    and the centre of the grid within 1 mm.
    """
    x = np.asarray(result["x"].values, float)
    y = np.asarray(result["y"].values, float)
    hx = float(x[1] - x[0]) if x.size > 1 else 1.0
    hy = float(y[1] - y[0]) if y.size > 1 else hx
    x0, x1, y0, y1 = float(x[0]), float(x[-1]), float(y[0]), float(y[-1])
    work = (hx, 0.0, x0 - hx / 2, 0.0, -hy, y1 + hy / 2)
    sc = _scenario_crs(result)
    to_s = _to_scenario(result)
    code = str(result.attrs.get("scenario_crs", "") or "")
    if to_s is None:
        return (code or _work_crs(result).to_wkt()), work, True
    if sc.is_geographic:
        return _work_crs(result).to_wkt(), work, False
    px = np.array([x0, x1, x0, x1, (x0 + x1) / 2])
    py = np.array([y0, y0, y1, y1, (y0 + y1) / 2])
    sx, sy = (np.asarray(v, float) for v in to_s(px, py))
    a = (sx[1] - sx[0]) / (x1 - x0) if x1 > x0 else float("nan")
    e = (sy[2] - sy[0]) / (y1 - y0) if y1 > y0 else float("nan")
    c0, f0 = sx[0] - a * x0, sy[0] - e * y0
    unit = sc.axis_info[0].unit_conversion_factor if sc.axis_info else 1.0
    tol = 1e-3 / (unit or 1.0)
    if (math.isfinite(a) and math.isfinite(e) and a > 0 and e > 0
            and np.all(np.abs(a * px + c0 - sx) <= tol)
            and np.all(np.abs(e * py + f0 - sy) <= tol)):
        return (code, (a * hx, 0.0, a * (x0 - hx / 2) + c0, 0.0, -e * hy,
                       e * (y1 + hy / 2) + f0), True)
    return _work_crs(result).to_wkt(), work, False


def _near_arms(x, y, arms, dist):
    """(ny, nx) True at nodes within ``dist`` (m) of an arm, and the arms' geometry.

    Only the window of the grid around the arms' bounding box is tested, so the cost
    follows the arms' extent rather than the grid's size.
    """
    mask = np.zeros((y.size, x.size), bool)
    if not arms or x.size == 0 or y.size == 0:
        return mask, None
    geom = shapely.MultiLineString([np.asarray(a, float) for a in arms])
    shapely.prepare(geom)
    x0, y0, x1, y1 = geom.bounds
    ix = slice(int(np.searchsorted(x, x0 - dist)), int(np.searchsorted(x, x1 + dist,
                                                                        "right")))
    iy = slice(int(np.searchsorted(y, y0 - dist)), int(np.searchsorted(y, y1 + dist,
                                                                        "right")))
    X, Y = np.meshgrid(x[ix], y[iy])
    if X.size:
        mask[iy, ix] = distance_to_lines(X, Y, arms) <= dist
    return mask, geom


def _steps(x, y):
    hx = float(x[1] - x[0]) if x.size > 1 else 1.0
    hy = float(y[1] - y[0]) if y.size > 1 else hx
    return hx, hy


def _arms_cells(result) -> np.ndarray:
    """(ny, nx) True where an arm crosses the pixel square around a node."""
    x = np.asarray(result["x"].values, float)
    y = np.asarray(result["y"].values, float)
    hx, hy = _steps(x, y)
    arms = [xy for _, xy in layout_shapes(result)["arms"]]
    # only nodes within the half-diagonal can have their square crossed
    near, geom = _near_arms(x, y, arms, 0.5 * math.hypot(hx, hy) * 1.001)
    mask = np.zeros_like(near)
    if near.any():
        X, Y = np.meshgrid(x, y)
        xs, ys = X[near], Y[near]
        boxes = shapely.box(xs - hx / 2, ys - hy / 2, xs + hx / 2, ys + hy / 2)
        mask[near] = shapely.intersects(geom, boxes)
    return mask


def raster_values(result, sea, quantity="kd"):
    """The values a raster holds: (ny, nx) north-up float32 with :data:`NODATA`.

    Parameters
    ----------
    result : xarray.Dataset
    sea : str
        Sea state name.
    quantity : {"kd", "height"}

    Returns
    -------
    numpy.ndarray
        Row 0 is the northernmost grid row; NODATA where the result has no value
        (land) and in every cell that an arm crosses.
    """
    z = np.asarray(result[quantity].sel(sea=sea).transpose("y", "x").values, float)
    bad = ~np.isfinite(z) | _arms_cells(result)
    out = np.where(bad, NODATA, z).astype(np.float32)
    return out[::-1]


def write_geotiff(result, sea, path, quantity="kd"):
    """Write one sea state's K' or wave height as a Cloud-Optimised GeoTIFF.

    Parameters
    ----------
    result : xarray.Dataset
        Solved result (with a grid).
    sea : str
        Sea state name.
    path : str or os.PathLike
        Output file (``.tif``); written atomically.
    quantity : {"kd", "height"}
        K' (dimensionless) or wave height (m; H for regular seas, H1/3 for random).

    Returns
    -------
    pathlib.Path

    Notes
    -----
    One float32 band, DEFLATE with the floating-point predictor, 256-pixel tiles and
    nearest-neighbour overviews (overviews show computed node values, never averages),
    as the COG driver of GDAL lays out. Each pixel is centred on a grid node; nodata
    (:data:`NODATA`) on land and where an arm crosses the pixel. CRS and transform from
    :func:`raster_frame`. Tags: ``QUANTITY``, ``UNITS``, ``SEA``, ``SEA_KIND``,
    ``METHOD``, ``RASTER_CRS`` (scenario CRS or work frame), ``SCENARIO``, ``TITLE``,
    ``HARBOR_VERSION``, ``CAUTION``.

    References
    ----------
    .. [1] Open Geospatial Consortium (2019). OGC GeoTIFF Standard, version 1.1.
    .. [2] Open Geospatial Consortium (2023). OGC Cloud Optimized GeoTIFF Standard,
       version 1.0.
    """
    import rasterio
    from rasterio.crs import CRS
    from rasterio.transform import Affine

    crs_text, tr, in_sc = raster_frame(result)
    data = raster_values(result, sea, quantity)
    i = [str(v) for v in result["sea"].values].index(str(sea))
    kind = str(result["sea_kind"].values[i]) if "sea_kind" in result else ""
    units = "1" if quantity == "kd" else "m"
    desc = ("K' (diffraction coefficient: local / incident wave height)"
            if quantity == "kd" else
            f"wave height ({'H1/3' if kind == 'random' else 'H'}), m")
    try:
        crs = CRS.from_user_input(crs_text)
    except Exception:  # noqa: BLE001 - rasterio's CRSError; fall back to WKT from pyproj
        crs = CRS.from_wkt(pyproj.CRS.from_user_input(crs_text).to_wkt())
    ny, nx = data.shape
    with atomic_path(path) as tmp:
        with rasterio.open(tmp, "w", driver="COG", width=nx, height=ny, count=1,
                           dtype="float32", crs=crs, transform=Affine(*tr),
                           nodata=NODATA, compress="DEFLATE", predictor=3,
                           blocksize=256, overview_resampling="NEAREST") as dst:
            dst.write(data, 1)
            dst.set_band_description(1, desc)
            dst.update_tags(1, units=units)
            dst.update_tags(
                QUANTITY=quantity, UNITS=units, SEA=str(sea), SEA_KIND=kind,
                METHOD=str(result["sea_method"].values[i]) if "sea_method" in result
                else "",
                RASTER_CRS=("scenario CRS " + str(result.attrs.get("scenario_crs", "")))
                if in_sc else "work frame of the result (local projected CRS, metres): "
                              "the scenario CRS is lon/lat or not regular on this grid",
                SCENARIO=str(result.attrs.get("scenario", "")),
                TITLE=str(result.attrs.get("title", "")),
                HARBOR_VERSION=str(result.attrs.get("harbor_version", "")),
                CAUTION=result_short_caution(result))
    return Path(path)


# ----------------------------------------------------------------------------- GeoPackage

def _contour_parts(result, sea, level, arm_nodes):
    import contourpy

    x = np.asarray(result["x"].values, float)
    y = np.asarray(result["y"].values, float)
    z = np.asarray(result["kd"].sel(sea=sea).transpose("y", "x").values, float)
    z = np.where(arm_nodes, np.nan, z)
    gen = contourpy.contour_generator(x, y, z, line_type=contourpy.LineType.Separate)
    return [np.asarray(a, float) for a in gen.lines(float(level)) if len(a) >= 2]


def _xy_scenario(result, xy, to_s):
    xy = np.asarray(xy, float)
    if to_s is None:
        return xy
    sx, sy = to_s(xy[:, 0], xy[:, 1])
    return np.column_stack([np.asarray(sx, float), np.asarray(sy, float)])


def _write_layer(path, layer, geoms, fields, gtype, crs, metadata=None):
    from pyogrio import raw

    names = list(fields)
    values, masks = [], []
    for n in names:
        v = fields[n]
        if isinstance(v, tuple):  # (values, null mask)
            values.append(v[0])
            masks.append(v[1])
        else:
            values.append(v)
            masks.append(None)
    raw.write(str(path), shapely.to_wkb(np.asarray(geoms, dtype=object)), values, names,
              field_mask=masks, layer=layer, driver="GPKG", geometry_type=gtype, crs=crs,
              dataset_metadata=metadata, promote_to_multi=False)


def write_geopackage(result, path, seas=None, levels=GPKG_LEVELS):
    """Write isolines, points, arms and land of a result as one GeoPackage.

    Parameters
    ----------
    result : xarray.Dataset
        Solved result.
    path : str or os.PathLike
        Output file (``.gpkg``); written atomically.
    seas : sequence of str, optional
        Sea states (default all).
    levels : sequence of float
        K' levels of the isolines.

    Returns
    -------
    pathlib.Path

    Notes
    -----
    All layers in the scenario CRS (vertices converted from the work frame with pyproj):

    - ``isolines`` (MultiLineString; only when the result has a grid): ``sea``,
      ``level`` (K'), ``height_m`` (= level × incident height: each K' isoline is an
      isoline of H or H1/3 too), ``quantity`` ("kd"), ``method``;
    - ``points`` (Point; one feature per sea state and point): ``sea``, ``name``,
      ``kd``, ``height_m``, ``period_ratio`` (random seas), ``limit_m`` (null without a
      limit), ``ok`` (height <= limit; null without a limit), ``status``
      ("ok", "over" or ""), ``method`` and ``method_reason`` (why that method; ""
      when the result does not say);
    - ``arms`` (LineString): ``name``, ``rooted_start``, ``rooted_end``;
    - ``land`` (Polygon): ``name``.

    Contouring ignores nodes within h/√2 of an arm (h the grid spacing;
    :func:`harbor.outputs.read.arm_mask`, the rule of the maps) so that no line runs
    along an arm; land nodes carry no value. Provenance and cautions are
    dataset metadata.

    References
    ----------
    .. [1] Open Geospatial Consortium (2021). OGC GeoPackage Encoding Standard,
       version 1.3.1.
    """
    names = _sea_names(result, seas)
    to_s = _to_scenario(result)
    crs = str(result.attrs.get("scenario_crs", "") or _work_crs(result).to_wkt())
    shapes = layout_shapes(result)
    meta = {"TITLE": str(result.attrs.get("title", "")),
            "SCENARIO": str(result.attrs.get("scenario", "")),
            "HARBOR_VERSION": str(result.attrs.get("harbor_version", "")),
            "CREATED": str(result.attrs.get("created", "")),
            "CAUTIONS": " ".join(result_cautions(result))}
    all_seas = [str(v) for v in result["sea"].values]
    H = {s: float(result["sea_height"].values[all_seas.index(s)]) for s in names}
    method = {s: str(result["sea_method"].values[all_seas.index(s)])
              if "sea_method" in result else "" for s in names}
    written = False
    with atomic_path(path) as tmp:
        has_grid = result.sizes.get("x", 0) > 1 and result.sizes.get("y", 0) > 1
        if has_grid:
            # the maps' rule: no contouring across the cells an arm straddles
            arm_nodes = arm_mask(result)
            geoms, f_sea, f_lev, f_h, f_m = [], [], [], [], []
            for s in names:
                for lv in levels:
                    parts = _contour_parts(result, s, lv, arm_nodes)
                    if not parts:
                        continue
                    geoms.append(shapely.MultiLineString(
                        [_xy_scenario(result, p, to_s) for p in parts]))
                    f_sea.append(s)
                    f_lev.append(float(lv))
                    f_h.append(float(lv) * H[s])
                    f_m.append(method[s])
            if geoms:
                _write_layer(tmp, "isolines", geoms, {
                    "sea": np.array(f_sea, dtype=object),
                    "level": np.array(f_lev), "height_m": np.array(f_h),
                    "quantity": np.array(["kd"] * len(geoms), dtype=object),
                    "method": np.array(f_m, dtype=object)}, "MultiLineString", crs, meta)
                written = True
        if "point" in result.dims and result.sizes["point"] > 0:
            px = np.asarray(result["point_x"].values, float)
            py = np.asarray(result["point_y"].values, float)
            sxy = _xy_scenario(result, np.column_stack([px, py]), to_s)
            lim = np.asarray(result["point_limit"].values, float) \
                if "point_limit" in result else np.full(px.size, np.nan)
            geoms, rows = [], {k: [] for k in ("sea", "name", "kd", "height_m",
                                                "period_ratio", "limit_m", "ok", "status",
                                                "method", "method_reason")}
            for s in names:
                r = result.sel(sea=s)
                kd = np.asarray(r["point_kd"].values, float)
                h = np.asarray(r["point_height"].values, float)
                pr = np.asarray(r["point_period_ratio"].values, float) \
                    if "point_period_ratio" in r else np.full(px.size, np.nan)
                for j, pn in enumerate(result["point"].values):
                    geoms.append(shapely.Point(sxy[j]))
                    known = bool(np.isfinite(lim[j]) and np.isfinite(h[j]))
                    ok = bool(h[j] <= lim[j]) if known else False
                    rows["sea"].append(s)
                    rows["name"].append(str(pn))
                    rows["kd"].append(kd[j])
                    rows["height_m"].append(h[j])
                    rows["period_ratio"].append(pr[j])
                    rows["limit_m"].append(lim[j])
                    rows["ok"].append((ok, not known))
                    rows["status"].append(("ok" if ok else "over") if known else "")
                    rows["method"].append(method[s])
                    rows["method_reason"].append(method_reason(result, s))
            fields = {k: np.array(v, dtype=object) for k, v in rows.items()
                      if k in ("sea", "name", "status", "method", "method_reason")}
            for k in ("kd", "height_m", "period_ratio", "limit_m"):
                fields[k] = np.array(rows[k], float)
            fields["ok"] = (np.array([v for v, _ in rows["ok"]], bool),
                            np.array([m for _, m in rows["ok"]], bool))
            order = ["sea", "name", "kd", "height_m", "period_ratio", "limit_m", "ok",
                     "status", "method", "method_reason"]
            _write_layer(tmp, "points", geoms, {k: fields[k] for k in order}, "Point",
                         crs, None if written else meta)
            written = True
        if shapes["arms"]:
            n = len(shapes["arms"])
            geoms = [shapely.LineString(_xy_scenario(result, xy, to_s))
                     for _, xy in shapes["arms"]]
            rs = np.asarray(result["arm_rooted_start"].values, bool) \
                if "arm_rooted_start" in result else np.zeros(n, bool)
            re_ = np.asarray(result["arm_rooted_end"].values, bool) \
                if "arm_rooted_end" in result else np.zeros(n, bool)
            _write_layer(tmp, "arms", geoms, {
                "name": np.array([nm for nm, _ in shapes["arms"]], dtype=object),
                "rooted_start": rs, "rooted_end": re_},
                "LineString", crs, None if written else meta)
            written = True
        if shapes["lands"]:
            geoms = [shapely.Polygon(_xy_scenario(result, np.asarray(
                poly.exterior.coords, float), to_s)) for _, poly in shapes["lands"]]
            _write_layer(tmp, "land", geoms, {
                "name": np.array([nm for nm, _ in shapes["lands"]], dtype=object)},
                "Polygon", crs, None if written else meta)
            written = True
        if not written:
            raise ValueError("the result holds nothing to put in a GeoPackage")
    return Path(path)


# ----------------------------------------------------------------------------- all

def write_gis(result, out_dir, seas=None):
    """Write every GIS file of a run into ``out_dir``.

    Parameters
    ----------
    result : xarray.Dataset
        Solved result.
    out_dir : str or os.PathLike
        An existing directory (the staging directory of
        :func:`harbor.outputs.export.write_all`).
    seas : sequence of str, optional
        Sea states (default all in the result).

    Returns
    -------
    list of str
        File names written (relative to ``out_dir``): ``kd-<sea>.tif`` and
        ``height-<sea>.tif`` per sea state (when the result has a grid), then
        ``harbor.gpkg``.
    """
    out = Path(out_dir)
    names = _sea_names(result, seas)
    slugs = unique_slugs(names)
    written = []
    if result.sizes.get("x", 0) > 1 and result.sizes.get("y", 0) > 1:
        for name, sl in zip(names, slugs):
            for q in ("kd", "height"):
                fname = f"{q}-{sl}.tif"
                write_geotiff(result, name, out / fname, quantity=q)
                written.append(fname)
    write_geopackage(result, out / "harbor.gpkg", seas=names)
    written.append("harbor.gpkg")
    return written
