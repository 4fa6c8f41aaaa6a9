"""File exports of a solved result: GeoJSON isolines, a NetCDF-CF grid, a CSV of points,
the terminal table, and :func:`write_all` which writes a whole run or nothing.

Everything is read from the result Dataset of :func:`harbor.solve`; nothing is
recomputed. Every file is written atomically (see :mod:`harbor.outputs._atomic`).
"""

from __future__ import annotations

import csv
import datetime as _dt
import io
import json
from pathlib import Path

import contourpy
import numpy as np
import pyproj

from harbor.cautions import result_cautions, result_short_caution
from harbor.outputs._atomic import atomic_path, staging_dir, unique_slugs, write_text_atomic
from harbor.outputs.read import (arm_mask, coordinate_digits, point_rows, sea_info, sea_name,
                                 verdict, warning_lines)

DEFAULT_LEVELS = tuple(float(v) for v in np.round(np.arange(0.1, 1.0001, 0.1), 10))
#: Columns of points.csv: the contract columns of ``harbor points`` first
#: (sea,point,x,y,kd,height,period_ratio), then the verdict columns; ``valid`` is false
#: where the value is outside its method's measured validity (``point_valid``).
CSV_COLUMNS = ("sea", "point", "x", "y", "kd", "height", "period_ratio", "limit", "ok", "valid")


def _work_crs(result) -> pyproj.CRS:
    wkt = result.attrs.get("crs_wkt")
    return pyproj.CRS.from_user_input(wkt if wkt else result.attrs["crs"])


def _lonlat_converter(result):
    """Work frame (m) -> WGS 84 (lon, lat), built from the result's CRS."""
    tr = pyproj.Transformer.from_crs(_work_crs(result), "EPSG:4326", always_xy=True)
    return lambda x, y: tr.transform(np.asarray(x, float), np.asarray(y, float))


def _fmt(v, digits):
    """A number for CSV: fixed decimals, empty for NaN/None."""
    if v is None:
        return ""
    v = float(v)
    return "" if not np.isfinite(v) else f"{v:.{digits}f}"


# --------------------------------------------------------------------------- GeoJSON

def isolines(result, sea, levels=DEFAULT_LEVELS, quantity="kd"):
    """Contour lines of a result variable in the work frame.

    Parameters
    ----------
    result : xarray.Dataset
        Solved result.
    sea : str, int or Sea
        Sea state.
    levels : sequence of float
        Contour levels (K' is dimensionless; height in m).
    quantity : {"kd", "height"}
        Variable to contour.

    Grid cells crossed by an arm of the result's layout are left out (see
    :func:`harbor.outputs.read.arm_mask`), so no spurious line runs along an arm.

    Returns
    -------
    dict
        level -> list of (n, 2) arrays of work-frame coordinates (m); a level the field
        never crosses maps to an empty list.

    Notes
    -----
    Marching squares on the node values (contourpy); NaN nodes (land) are treated as
    missing, so no line crosses land.
    """
    name = sea_name(result, sea)
    z = np.asarray(result[quantity].sel(sea=name).transpose("y", "x").values, float)
    x = np.asarray(result["x"].values, float)
    y = np.asarray(result["y"].values, float)
    z = np.where(arm_mask(result), np.nan, z)
    gen = contourpy.contour_generator(x, y, z,
                                      line_type=contourpy.LineType.Separate)
    return {float(lv): [np.asarray(a, float) for a in gen.lines(float(lv)) if len(a) >= 2]
            for lv in levels}


def write_geojson_isolines(result, sea, path, levels=DEFAULT_LEVELS):
    """Write K' isolines of one sea state as an RFC 7946 GeoJSON FeatureCollection.

    Parameters
    ----------
    result : xarray.Dataset
        Solved result.
    sea : str, int or Sea
        Sea state.
    path : str or os.PathLike
        Output file (``.geojson``); written atomically.
    levels : sequence of float
        K' levels, default 0.1, 0.2, ..., 1.0.

    Returns
    -------
    pathlib.Path

    Notes
    -----
    One Feature per level that the field crosses: a LineString when the level is a
    single line, else a MultiLineString. Coordinates are WGS 84 longitude, latitude
    (degrees, 7 decimals, about 1 cm), as RFC 7946 requires; no ``crs`` member. Each
    feature's properties carry ``level``, ``quantity`` ("kd"), ``units`` ("1"),
    ``sea``, ``sea_kind``, ``method`` and ``caution``. A top-level foreign member
    ``harbor`` carries provenance, the levels requested and found, the validity warnings
    and the full cautions.

    References
    ----------
    .. [1] Butler, H., Daly, M., Doyle, A., Gillies, S., Hagen, S. and Schaub, T. (2016).
       The GeoJSON Format. IETF RFC 7946.
    """
    name = sea_name(result, sea)
    info = sea_info(result, name)
    to_ll = _lonlat_converter(result)
    lines = isolines(result, name, levels, "kd")
    features, found = [], []
    lon_all, lat_all = [], []
    for level, parts in lines.items():
        if not parts:
            continue
        found.append(level)
        coords = []
        for xy in parts:
            lon, lat = to_ll(xy[:, 0], xy[:, 1])
            lon, lat = np.round(np.asarray(lon), 7), np.round(np.asarray(lat), 7)
            lon_all.append(lon)
            lat_all.append(lat)
            coords.append(np.column_stack([lon, lat]).tolist())
        geom = ({"type": "LineString", "coordinates": coords[0]} if len(coords) == 1
                else {"type": "MultiLineString", "coordinates": coords})
        features.append({
            "type": "Feature",
            "geometry": geom,
            "properties": {"level": level, "quantity": "kd", "units": "1",
                           "label": f"K' = {level:g}", "sea": name, "sea_kind": info["kind"],
                           "method": info["method"], "caution": result_short_caution(result)},
        })
    doc = {"type": "FeatureCollection"}
    if lon_all:
        lo, la = np.concatenate(lon_all), np.concatenate(lat_all)
        doc["bbox"] = [float(lo.min()), float(la.min()), float(lo.max()), float(la.max())]
    doc["features"] = features
    doc["harbor"] = {
        "version": str(result.attrs.get("harbor_version", "")),
        "title": str(result.attrs.get("title", "")),
        "scenario": str(result.attrs.get("scenario", "")),
        "created": str(result.attrs.get("created", "")),
        "quantity": "kd",
        "description": "diffraction coefficient K' = local wave height / incident wave height",
        "sea": {"name": name, "kind": info["kind"], "height_m": info["height"],
                "period_s": info["period"], "from_deg_true": info["from"],
                **({"s_max": info["spreading"]} if info["random"] else {})},
        "method": info["method"],
        "work_crs": str(result.attrs.get("crs", "")),
        "levels_requested": [float(v) for v in levels],
        "levels_found": found,
        "warnings": warning_lines(result, sea=name),
        "cautions": list(result_cautions(result)),
    }
    text = json.dumps(doc, ensure_ascii=False, allow_nan=False, separators=(",", ":"))
    return write_text_atomic(path, text + "\n")


# --------------------------------------------------------------------------- NetCDF

def _attr(v):
    """An attribute value netCDF can store (str, number or numeric array)."""
    if v is None:
        return ""
    if isinstance(v, (bool, np.bool_)):
        return int(v)
    if isinstance(v, (int, float, str, np.integer, np.floating)):
        return v
    return str(v)


def netcdf_dataset(result):
    """The CF-1.8 dataset that :func:`write_netcdf` writes (without writing it).

    Parameters
    ----------
    result : xarray.Dataset

    Returns
    -------
    xarray.Dataset
    """
    import harbor

    ds = result.copy()
    if "point" in ds.dims and ds.sizes["point"] == 0:
        ds = ds.drop_dims("point")
    crs = _work_crs(result)
    version = str(result.attrs.get("harbor_version", getattr(harbor, "__version__", "")))

    ds["x"].attrs = {"standard_name": "projection_x_coordinate",
                     "long_name": "easting (work frame)", "units": "m", "axis": "X"}
    ds["y"].attrs = {"standard_name": "projection_y_coordinate",
                     "long_name": "northing (work frame)", "units": "m", "axis": "Y"}
    ds["sea"].attrs = {"long_name": "sea state name"}

    if "crs" not in ds or "lon" not in ds.coords:
        # a result from an older version: the same grid mapping and lon/lat as solve()
        from harbor.solver.assemble import with_crs

        ds = with_crs(ds, crs, _lonlat_converter(result))
    for v in ("arm_rooted_start", "arm_rooted_end", "valid", "point_valid"):
        if v in ds:
            ds[v] = ds[v].astype("int8")  # netCDF has no boolean type
            ds[v].attrs["flag_values"] = np.array([0, 1], dtype="int8")
            ds[v].attrs["flag_meanings"] = "false true"

    var_attrs = {
        "kd": {"long_name": "diffraction coefficient K' (local / incident wave height; "
                            "effective value for random seas)", "units": "1"},
        "height": {"long_name": "wave height (H for regular seas, significant height H1/3 "
                                "for random seas)", "units": "m"},
        "period_ratio": {"long_name": "ratio of mean period Tm02 at the point to the "
                                      "incident Tm02 (random seas; missing for regular seas)",
                         "units": "1"},
        "point_x": {"long_name": "point easting", "units": "m"},
        "point_y": {"long_name": "point northing", "units": "m"},
        "point_limit": {"long_name": "allowable wave height at the point (missing when none)",
                        "units": "m"},
        "point_kd": {"long_name": "diffraction coefficient K' at the point", "units": "1"},
        "point_height": {"long_name": "wave height at the point (H or H1/3)", "units": "m"},
        "point_period_ratio": {"long_name": "Tm02 ratio at the point (random seas)",
                               "units": "1"},
        "sea_kind": {"long_name": "sea state kind (regular or random)"},
        "sea_height": {"long_name": "incident wave height (H or H1/3)", "units": "m"},
        "sea_period": {"long_name": "incident wave period (T or T1/3)", "units": "s"},
        "sea_from": {"long_name": "direction the waves come from, clockwise from true north",
                     "units": "degree"},
        "sea_spreading": {"long_name": "Mitsuyasu spreading parameter s_max (random seas)",
                          "units": "1"},
        "sea_method": {"long_name": "diffraction method used"},
        "sea_wavelength": {"long_name": "wavelength at the (significant) period and the "
                                        "site depth", "units": "m"},
    }
    for v, a in var_attrs.items():
        if v in ds:
            ds[v].attrs = dict(a)
    for v in ("kd", "height", "period_ratio"):
        if v in ds:
            ds[v].attrs["grid_mapping"] = "crs"
    point_dim = "point" in ds.dims
    if point_dim:
        ds["point"].attrs = {"long_name": "point of interest name"}

    created = str(result.attrs.get("created", ""))
    now = _dt.datetime.now(_dt.timezone.utc).replace(microsecond=0).isoformat()
    attrs = {k: _attr(v) for k, v in result.attrs.items()}
    attrs.update({
        "Conventions": "CF-1.8",
        "title": str(result.attrs.get("title", "")) or "harbor result",
        "institution": f"prepared with harbor {version}",
        "source": f"harbor {version}: linear wave diffraction screening of a harbour layout",
        "history": (f"{created} computed by harbor {version} from "
                    f"{result.attrs.get('scenario', '') or 'a scenario built in code'}; "
                    f"{now} written by harbor.outputs.export.write_netcdf"),
        "date_created": created,
        "scenario": str(result.attrs.get("scenario", "")),
        "method": str(result.attrs.get("method", "")),
        "warnings": str(result.attrs.get("warnings", "") or ""),
        "cautions": "\n".join(result_cautions(result)),
        "comment": result_short_caution(result),
        "references": "Penney, W. G. and Price, A. T. (1952). The diffraction theory of sea "
                      "waves and the shelter afforded by breakwaters. Phil. Trans. R. Soc. "
                      "Lond. A 244, 236-253. Goda, Y. (2010). Random Seas and Design of "
                      "Maritime Structures, 3rd ed. World Scientific.",
    })
    ds.attrs = attrs
    return ds


def write_netcdf(result, path):
    """Write the result grid as a CF-1.8 NetCDF-4 file.

    Parameters
    ----------
    result : xarray.Dataset
        Solved result.
    path : str or os.PathLike
        Output file (``.nc``); written atomically.

    Returns
    -------
    pathlib.Path

    Notes
    -----
    ``x``, ``y`` carry ``standard_name`` projection_x/y_coordinate and units m; the
    grid mapping variable ``crs`` is built by pyproj (``CRS.to_cf``: ``crs_wkt``,
    ``grid_mapping_name`` and the projection parameters), and ``kd``, ``height`` and
    ``period_ratio`` point to it; 2-D ``lon``/``lat`` (WGS 84) are auxiliary
    coordinates. Missing values (land) are NaN, the default fill value. Global
    attributes hold provenance (source, history, date_created, scenario, method), the
    validity warnings and the cautions.

    References
    ----------
    .. [1] Eaton, B., Gregory, J., Drach, B., Taylor, K., Hankin, S. et al. (2020).
       NetCDF Climate and Forecast (CF) Metadata Conventions, version 1.8, sections 4
       (coordinates), 5.6 (grid mappings) and 2.6 (attributes).
    """
    ds = netcdf_dataset(result)
    encoding = {v: {"zlib": True, "complevel": 4}
                for v in ("kd", "height", "period_ratio") if v in ds}
    with atomic_path(path) as tmp:
        ds.to_netcdf(tmp, engine="netcdf4", format="NETCDF4", encoding=encoding)
    return Path(path)


# --------------------------------------------------------------------------- points

def point_records(result):
    """The points of a result, one record per sea state and point: the one source of
    ``points.csv``, ``harbor points`` (CSV, JSON) and the terminal table.

    Parameters
    ----------
    result : xarray.Dataset

    Returns
    -------
    list of dict
        ``sea``, ``point``, ``x``, ``y`` (scenario CRS: easting or longitude first),
        ``kd``, ``height`` (m), ``period_ratio`` (None for regular seas), ``limit`` (m or
        None), ``ok`` (height <= limit; None without a limit), ``valid`` (False where
        the value is outside its method's measured validity), ``flags`` (codes of the
        warnings behind ``valid`` False), ``method``.
    """
    out = []
    for name in [str(s) for s in result["sea"].values]:
        method = sea_info(result, name)["method"]
        for r in point_rows(result, name):
            pr = r["period_ratio"]
            out.append(dict(sea=name, point=r["name"], x=r["x_crs"], y=r["y_crs"], kd=r["kd"],
                            height=r["height"],
                            period_ratio=None if not np.isfinite(pr) else pr,
                            limit=r["limit"], ok=r["ok"], valid=r["valid"], flags=r["flags"],
                            method=method))
    return out


def _bool(v):
    return "" if v is None else ("true" if v else "false")


def points_csv_text(result) -> str:
    """The CSV text written by :func:`write_points_csv`."""
    buf = io.StringIO()
    w = csv.writer(buf, lineterminator="\n")
    w.writerow(CSV_COLUMNS)
    digits = coordinate_digits(result)
    for r in point_records(result):
        w.writerow([r["sea"], r["point"], _fmt(r["x"], digits), _fmt(r["y"], digits),
                    _fmt(r["kd"], 4), _fmt(r["height"], 3), _fmt(r["period_ratio"], 4),
                    _fmt(r["limit"], 3), _bool(r["ok"]), _bool(r["valid"])])
    return buf.getvalue()


def write_points_csv(result, path):
    """Write the points of interest, one row per sea state and point, as plain CSV.

    Parameters
    ----------
    result : xarray.Dataset
        Solved result.
    path : str or os.PathLike
        Output file; written atomically.

    Returns
    -------
    pathlib.Path

    Notes
    -----
    Columns: ``sea,point,x,y,kd,height,period_ratio,limit,ok,valid``. x, y in the
    scenario's CRS (metres, 2 decimals; longitude and latitude, 8 decimals, for a
    geographic CRS however it is spelt); height in m (H or H1/3);
    ``period_ratio`` empty for regular seas; ``limit`` empty when none is given;
    ``ok`` is ``true`` when height <= limit, ``false`` when above, empty without a
    limit; ``valid`` is ``false`` where the value is outside its method's measured
    validity (then ``ok`` cannot be trusted: see the warnings). No comment lines, so any CSV reader opens it; the cautions travel in the
    other outputs.

    References
    ----------
    .. [1] Shafranovich, Y. (2005). Common Format and MIME Type for Comma-Separated
       Values (CSV) Files. IETF RFC 4180.
    """
    return write_text_atomic(path, points_csv_text(result), newline="")


def point_table(result) -> str:
    """The terminal table: each point's height per sea state, its limit, pass/fail,
    then the cautions.

    Parameters
    ----------
    result : xarray.Dataset
        Solved result.

    Returns
    -------
    str
        Plain text (ASCII apart from names), ending with a newline.
    """
    seas = [str(s) for s in result["sea"].values]
    infos = [sea_info(result, s) for s in seas]
    out = []
    title = str(result.attrs.get("title", ""))
    if title:
        out.append(title)
    for i, inf in enumerate(infos):
        hs, ts = ("H1/3", "T1/3") if inf["random"] else ("H", "T")
        out.append(f"  - {inf['name']}: {inf['kind']}, {hs} {inf['height']:.2f} m, "
                   f"{ts} {inf['period']:.1f} s, from {inf['from']:.0f} deg true"
                   + (f", s_max {inf['spreading']:.0f}" if inf["random"] else "")
                   + f" - {inf['method']}")
    rows = {s: point_rows(result, s) for s in seas}
    names = [r["name"] for r in rows[seas[0]]] if seas else []
    if not names:
        out.append("")
        out.append("No points of interest in this scenario.")
    else:
        pw = max(5, *(len(n) for n in names))
        widths = [max(9, min(18, len(s))) for s in seas]
        head = f"{'point':<{pw}}  {'limit':>6}"
        for s, w in zip(seas, widths):
            head += f"  {s[:w]:>{w}} {'':5}"
        out.append("")
        out.append("Wave height at each point (m): H for regular seas, H1/3 for random seas")
        out.append(head.rstrip())
        out.append("-" * len(head))
        for j, n in enumerate(names):
            lim = rows[seas[0]][j]["limit"]
            line = f"{n:<{pw}}  {(f'{lim:.2f}' if lim is not None else '-'):>6}"
            for s, w in zip(seas, widths):
                r = rows[s][j]
                h = "n/a" if not np.isfinite(r["height"]) else f"{r['height']:.2f}"
                line += f"  {h:>{w}} {verdict(r):<5}"
            out.append(line.rstrip())
        n_over = sum(1 for s in seas for r in rows[s] if r["ok"] is False)
        n_flag = sum(1 for s in seas for r in rows[s] if r["ok"] is not None and not r["valid"])
        out.append("")
        out.append(f"{n_over} point/sea-state pair(s) over the limit." if n_over
                   else "All points with a limit meet it in every sea state.")
        if n_flag:
            out.append(f"'?': {n_flag} verdict(s) from a method outside its measured validity "
                       "at that point (see the warnings): do not rely on them.")
    out.extend(warnings_text(result))
    out.append("")
    out.append("Cautions:")
    out.extend(f"  - {c}" for c in result_cautions(result))
    return "\n".join(out) + "\n"


# --------------------------------------------------------------------------- whole run

def warnings_text(result) -> list[str]:
    """The validity warnings and notes of a result as terminal lines, grouped: those
    about every sea state first, then each sea state's own.

    Parameters
    ----------
    result : xarray.Dataset

    Returns
    -------
    list of str
        Empty when there is nothing to say.
    """
    from harbor.solver.assemble import notices

    items = list(dict.fromkeys(notices(result)))
    if not items:
        return []
    out = ["", "Validity warnings and notes:"]
    general = [n for n in items if n.sea is None]
    out.extend(f"  - {n.text}" for n in general)
    for s in [str(v) for v in result["sea"].values]:
        own = [n for n in items if n.sea == s]
        if own:
            out.append(f"  sea state '{s}':")
            out.extend(f"    - {n.text}" for n in own)
    return out


def write_all(result, out_dir, seas=None, show="kd"):
    """Write every output of a run, all of them or none.

    Parameters
    ----------
    result : xarray.Dataset
        Solved result (it carries everything: field, layout, points, warnings, CRS).
    out_dir : str or os.PathLike
        Output directory (created if missing).
    seas : sequence of str, optional
        Sea states to map (default: all in the result).
    show : {"kd", "height"}
        What the maps and sheets colour.

    Returns
    -------
    list of pathlib.Path
        The files written: per sea state ``map-<sea>.png``, ``sheet-<sea>.pdf``,
        ``isolines-<sea>.geojson`` (``<sea>`` the slugged name), then ``grid.nc``,
        ``points.csv`` and ``report.pdf`` (the combined report for the client), then
        the GIS files of :func:`harbor.outputs.gis.write_gis` (``kd-<sea>.tif``,
        ``height-<sea>.tif``, ``harbor.gpkg``).

    Notes
    -----
    Files are staged in a temporary directory beside ``out_dir`` and moved into place
    only when all of them have been written; if anything fails, nothing is left behind
    and existing files in ``out_dir`` are untouched.
    """
    from harbor.outputs import sheet as _sheet
    from harbor.outputs.maps import sheltering_map
    from harbor.outputs.report import pdf_report

    names = [sea_name(result, s) for s in (seas if seas is not None else
                                           [str(v) for v in result["sea"].values])]
    slugs = unique_slugs(names)
    drawn = {}

    def sheet(p, name, i):
        # each sheet is drawn once: the same pages go into its own file and the report
        return _sheet.pdf_sheet(result, name, p, i + 1, len(names), show=show, keep=drawn)

    with staging_dir(out_dir) as (stage, staged):
        for i, (name, sl) in enumerate(zip(names, slugs)):
            for fname, writer in (
                    (f"map-{sl}.png", lambda p: sheltering_map(result, name, p, show=show)),
                    (f"sheet-{sl}.pdf", lambda p: sheet(p, name, i)),
                    (f"isolines-{sl}.geojson",
                     lambda p: write_geojson_isolines(result, name, p))):
                writer(stage / fname)
                staged.append(fname)
        write_netcdf(result, stage / "grid.nc")
        staged.append("grid.nc")
        write_points_csv(result, stage / "points.csv")
        staged.append("points.csv")
        pdf_report(result, stage / "report.pdf", seas=names, show=show, sheets=drawn)
        staged.append("report.pdf")
        from harbor.outputs.gis import write_gis
        staged += write_gis(result, stage, seas=names)
    out = Path(out_dir).resolve()
    return [out / n for n in staged]
