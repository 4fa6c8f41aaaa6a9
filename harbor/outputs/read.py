"""Reading a solved result: sea states, points, layout, warnings, CRS.

Everything the outputs show comes through these readers from the result Dataset of
:func:`harbor.solve` (nothing from the scenario, nothing recomputed). No plotting
library is imported here, so the file exporters stay light.
"""

from __future__ import annotations

import hashlib
import math

import numpy as np
import shapely

from harbor.errors import InputError
from harbor.geometry.visibility import distance_to_lines
from harbor.outputs.style import sea_label


def sea_name(result, sea) -> str:
    """Return the name of sea state ``sea`` in ``result``.

    Parameters
    ----------
    result : xarray.Dataset
        A solved result.
    sea : str, int or object with ``.name``
        The sea state's name, its index, or a scenario ``Sea``.

    Returns
    -------
    str

    Raises
    ------
    harbor.errors.InputError
        If the result has no such sea state.
    """
    names = [str(s) for s in result["sea"].values]
    if isinstance(sea, (int, np.integer)) and not isinstance(sea, bool):
        if 0 <= sea < len(names):
            return names[sea]
    else:
        name = str(getattr(sea, "name", sea))
        if name in names:
            return name
    raise InputError(f"no sea state {sea!r} in the result (it has: {', '.join(names) or 'none'})",
                     key="sea")


def sea_info(result, name: str) -> dict:
    """Collect the per-sea attributes of ``name`` as plain Python values."""
    r = result.sel(sea=name)

    def get(var, default=float("nan")):
        if var not in r:
            return default
        v = r[var].values
        return v.item() if hasattr(v, "item") else v

    kind = str(get("sea_kind", "regular"))
    return {
        "name": name,
        "kind": kind,
        "random": kind == "random",
        "height": float(get("sea_height")),
        "period": float(get("sea_period")),
        "from": float(get("sea_from")),
        "spreading": float(get("sea_spreading")),
        "method": str(get("sea_method", result.attrs.get("method", ""))),
        "wavelength": float(get("sea_wavelength")),
    }


def crs_label(result) -> str:
    """A short name of the work CRS for axis labels (``EPSG:32630`` when it has a code)."""
    crs = str(result.attrs.get("crs", ""))
    if crs.upper().startswith("EPSG:"):
        return crs.upper()
    try:
        import pyproj

        c = pyproj.CRS.from_user_input(result.attrs.get("crs_wkt") or crs)
        code = c.to_epsg()
        if code:
            return f"EPSG:{code}"
        if "tmerc" in crs or "Transverse Mercator" in c.to_wkt():
            return "local transverse Mercator"
        return c.name
    except Exception:  # a label must never stop a map
        return crs[:40] or "site frame"


def layout_shapes(result) -> dict:
    """The layout carried by a result, as shapes for drawing.

    Parameters
    ----------
    result : xarray.Dataset
        A result of :func:`harbor.solve` (variables ``arm_wkt``, ``land_wkt``,
        ``head_x``, ``head_y``); a result without them has an empty layout.

    Returns
    -------
    dict
        ``arms``: list of (name, (n, 2) array of vertices, m); ``lands``: list of
        (name, shapely Polygon); ``heads``: (k, 2) array of the free heads (m).
    """
    arms, lands = [], []
    if "arm_wkt" in result:
        for name, wkt in zip(result["arm"].values, result["arm_wkt"].values):
            arms.append((str(name), np.asarray(shapely.from_wkt(str(wkt)).coords, float)))
    if "land_wkt" in result:
        for name, wkt in zip(result["land"].values, result["land_wkt"].values):
            lands.append((str(name), shapely.from_wkt(str(wkt))))
    if "head_x" in result:
        heads = np.column_stack([result["head_x"].values, result["head_y"].values]).astype(float)
    else:
        heads = np.zeros((0, 2))
    return {"arms": arms, "lands": lands, "heads": heads}


def cell_size(x, y) -> float:
    """Grid spacing of a result (m): the largest node step along x or y (0 for one node).

    Parameters
    ----------
    x, y : numpy.ndarray
        1-D node coordinates (m).

    Returns
    -------
    float
    """
    d = [float(np.max(np.abs(np.diff(np.asarray(v, float))))) for v in (x, y) if len(v) > 1]
    return max(d) if d else 0.0


def arm_mask(result) -> np.ndarray:
    """Grid nodes too close to an arm for contouring: True where a node is within
    0.71 grid spacings of any arm.

    Parameters
    ----------
    result : xarray.Dataset
        Supplies the grid (``x``, ``y``) and the arms (``arm_wkt``).

    Returns
    -------
    numpy.ndarray of bool, shape (len(y), len(x))

    Notes
    -----
    K' jumps across a thin arm, but contouring interpolates between the nodes on either
    side, which would draw every level as a spurious line along the arm. Every grid cell
    that an arm crosses has a corner within h / sqrt(2) of the arm (h the spacing), so
    masking those nodes masks exactly the cells that straddle it; isolines then stop
    about one cell short of the arm instead of running along it.

    Every output of a run asks for it (maps, sheets, isolines, GIS layers): it is
    computed once per grid and layout and the same read-only array is returned after.
    """
    x = np.asarray(result["x"].values, float)
    y = np.asarray(result["y"].values, float)
    wkt = tuple(str(v) for v in result["arm_wkt"].values) if "arm_wkt" in result else ()
    key = (hashlib.sha1(x.tobytes() + b"|" + y.tobytes()).hexdigest(), wkt)
    hit = _ARM_MASKS.get(key)
    if hit is not None:
        return hit
    arms = [xy for _, xy in layout_shapes(result)["arms"]]
    if not arms:
        mask = np.zeros((y.size, x.size), bool)
    else:
        X, Y = np.meshgrid(x, y)
        mask = distance_to_lines(X, Y, arms) <= cell_size(x, y) / math.sqrt(2.0) * 1.001
    mask.setflags(write=False)
    if len(_ARM_MASKS) >= 4:
        _ARM_MASKS.pop(next(iter(_ARM_MASKS)))
    _ARM_MASKS[key] = mask
    return mask


#: arm_mask's results by (grid, arms): a run's outputs share one
_ARM_MASKS: dict = {}


def is_lonlat(result) -> bool:
    """Whether the scenario of a result gave its coordinates as longitude, latitude.

    Read from ``scenario_crs_is_lonlat`` (set by :func:`harbor.solve` from the parsed
    CRS, so every spelling of a geographic CRS counts); older results fall back to
    parsing ``scenario_crs`` with pyproj.
    """
    flag = result.attrs.get("scenario_crs_is_lonlat")
    if flag is not None and flag != "":
        return bool(int(flag))
    code = str(result.attrs.get("scenario_crs", "") or "")
    if not code:
        return False
    import pyproj

    try:
        return bool(pyproj.CRS.from_user_input(code).is_geographic)
    except Exception:  # an unreadable label is not lon/lat
        return False


#: Decimals of x, y in the scenario's CRS: 8 for degrees (about 1 mm), 2 for metres.
def coordinate_digits(result) -> int:
    """Decimals for point coordinates in the scenario CRS: 8 in degrees, 2 in metres."""
    return 8 if is_lonlat(result) else 2


def point_rows(result, name):
    """Per-point values of sea state ``name``, as plain dicts.

    Parameters
    ----------
    result : xarray.Dataset
    name : str
        Sea state.

    Returns
    -------
    list of dict
        ``name``, ``x``, ``y`` (m, work frame), ``x_crs``, ``y_crs`` (scenario CRS),
        ``kd``, ``height``, ``period_ratio`` (NaN for regular seas), ``limit`` (m or
        None), ``ok`` (height <= limit; None without a limit or a value), ``valid``
        (``point_valid``: the value is inside its method's measured validity) and
        ``flags`` (codes of the warnings about this point or this whole sea state that
        make it not valid).
    """
    if "point" not in result.dims or result.sizes.get("point", 0) == 0:
        return []
    r = result.sel(sea=name)
    n = result.sizes["point"]

    def col(ds, var, default=np.nan):
        return (np.asarray(ds[var].values, float) if var in ds
                else np.full(n, default, float))

    lim, h, kd, pr = (col(result, "point_limit"), col(r, "point_height"), col(r, "point_kd"),
                      col(r, "point_period_ratio"))
    px, py = col(result, "point_x"), col(result, "point_y")
    cx = col(result, "point_x_crs") if "point_x_crs" in result else px
    cy = col(result, "point_y_crs") if "point_y_crs" in result else py
    valid = (np.asarray(r["point_valid"].values, bool) if "point_valid" in r
             else np.ones(n, bool))
    from harbor.solver.assemble import notices

    warns = notices(result, sea=name, level="warning")
    rows = []
    for i, pname in enumerate(result["point"].values):
        pname = str(pname)
        ok = bool(h[i] <= lim[i]) if np.isfinite(lim[i]) and np.isfinite(h[i]) else None
        flags = []
        if not valid[i]:
            flags = list(dict.fromkeys(w.code for w in warns if w.point in (None, pname)
                                       and w.code not in ("breaking",)))
        rows.append({"name": pname, "x": float(px[i]), "y": float(py[i]),
                     "x_crs": float(cx[i]), "y_crs": float(cy[i]), "kd": float(kd[i]),
                     "height": float(h[i]), "period_ratio": float(pr[i]),
                     "limit": float(lim[i]) if np.isfinite(lim[i]) else None, "ok": ok,
                     "valid": bool(valid[i]), "flags": flags})
    return rows


def verdict(row) -> str:
    """The pass/fail word of a point row: ``ok``, ``OVER`` or "" (no limit), with
    ``?`` appended when the value is outside its method's validity (``point_valid``)."""
    word = {True: "ok", False: "OVER", None: ""}[row["ok"]]
    if word and not row.get("valid", True):
        word += "?"
    return word


def title_lines(result, info) -> tuple[str, str, str]:
    """(title, sea-state line, method line) shared by the map and the sheet."""
    title = str(result.attrs.get("title") or "Harbour layout")
    method = f"Method: {info['method']}" if info["method"] else ""
    extra = []
    if np.isfinite(info["wavelength"]):
        extra.append(f"L = {info['wavelength']:.1f} m at the {'significant ' if info['random'] else ''}period")
    depth = result.attrs.get("depth")
    if depth not in (None, ""):
        try:
            extra.append(f"depth {float(depth):g} m")
        except (TypeError, ValueError):
            pass
    if extra:
        method += ("; " if method else "") + ", ".join(extra)
    return title, "Sea state " + sea_label(info), method


def warning_lines(result, sea=None) -> list[str]:
    """The validity warnings and notes of a result as sentences, each once.

    Parameters
    ----------
    result : xarray.Dataset
    sea : str, optional
        Only those about this sea state (or about every sea state).

    Returns
    -------
    list of str
        Warnings first, then notes.
    """
    from harbor.solver.assemble import notices

    items = notices(result, sea=sea)
    items = [n for n in items if n.level == "warning"] + [n for n in items if n.level != "warning"]
    return list(dict.fromkeys(n.text.strip() for n in items if n.text.strip()))
