"""Layouts from GIS and CAD files: arms, land and points read from a GeoPackage,
Shapefile or GeoJSON layer (GDAL through pyogrio) or from a DXF drawing (ezdxf).

Two uses, one reader:

- :func:`import_layout` (the ``harbor import`` command) writes a complete, commented
  scenario TOML from a drawing, with the sea state and the grid as marked placeholders;
- :func:`expand_references` is the scenario reader's hook for ``[[arm]]``, ``[[land]]``
  and ``[[point]]`` tables that name a ``file`` and a ``layer`` instead of listing
  vertices, so a revised drawing needs no re-import.

Geometry only: shapes, names and attributes, never waves. Every problem with a file is an
:class:`harbor.errors.InputError` naming the file, the layer and the problem.
"""

from __future__ import annotations

import difflib
import fnmatch
import json
import math
import warnings
from dataclasses import dataclass
from pathlib import Path

import numpy as np
import pyproj

from harbor.errors import InputError
from harbor.study._files import MAX_LAYOUT_FILE_BYTES, check_file

#: Default chord tolerance (m): the largest distance allowed between a DXF curve (arc,
#: bulge, circle, ellipse, spline) and the polyline that replaces it. 0.1 m is well
#: below the accuracy of a drawn breakwater centre line and of a screening grid.
DEFAULT_CHORD = 0.1

#: File suffixes read through GDAL (pyogrio) and through ezdxf.
GIS_SUFFIXES = (".gpkg", ".shp", ".geojson", ".json", ".zip")
DXF_SUFFIXES = (".dxf",)

#: The keys of a ``[[arm]]``/``[[land]]``/``[[point]]`` table that refers to a file.
REFERENCE_KEYS = ("file", "layer", "select", "name_field", "reflection_field",
                  "limit_field", "crs", "chord")

#: DXF $INSUNITS codes (AutoCAD DXF reference, HEADER section) and their length in m.
_INSUNITS = {1: ("inches", 0.0254), 2: ("feet", 0.3048), 4: ("millimetres", 0.001),
             5: ("centimetres", 0.01), 6: ("metres", 1.0), 7: ("kilometres", 1000.0),
             21: ("US survey feet", 1200.0 / 3937.0)}
#: DXF entities drawn as linework (arms, land) and as points.
_DXF_LINES = ("LINE", "LWPOLYLINE", "POLYLINE", "ARC", "CIRCLE", "ELLIPSE", "SPLINE")
_DXF_POINTS = ("POINT", "INSERT")
#: Annotation that may share a layer with the linework and carries no geometry of ours.
_DXF_IGNORED = ("TEXT", "MTEXT", "DIMENSION", "LEADER", "MLEADER", "MULTILEADER",
                "HATCH", "ATTDEF", "IMAGE", "WIPEOUT", "VIEWPORT")
#: Application name of the extended data (XDATA) that carries our attributes on DXF
#: linework: strings "key=value" (group code 1000).
XDATA_APP = "HARBOR"

_KINDS = ("arm", "land", "point")


@dataclass(frozen=True)
class LayoutFeature:
    """One arm, land polygon or point read from a file.

    Parameters
    ----------
    kind : {"arm", "land", "point"}
    name : str
    coords : numpy.ndarray, shape (n, 2)
        Vertices in the file's CRS (easting or longitude first); one row for a point.
        Land outlines are open rings (the closing vertex dropped).
    reflection : float or None
        Reflection coefficient (0 fully absorbing to 1 vertical wall), when the file
        carries one.
    limit : float or None
        Allowable wave height (m), points only.
    """

    kind: str
    name: str
    coords: np.ndarray
    reflection: float | None = None
    limit: float | None = None


@dataclass(frozen=True)
class LayoutRead:
    """What :func:`read_layout` found.

    Attributes
    ----------
    path : str
        The file read.
    crs : str
        CRS of every coordinate (``"EPSG:nnnn"`` when the CRS has an authority code).
    features : tuple of LayoutFeature
    chord : float
        Chord tolerance used for curves, m.
    selectors : dict
        kind -> (layer, select) as used.
    """

    path: str
    crs: str
    features: tuple
    chord: float
    selectors: dict

    def of(self, kind):
        """The features of one kind (``"arm"``, ``"land"`` or ``"point"``)."""
        return tuple(f for f in self.features if f.kind == kind)


# ----------------------------------------------------------------------------- helpers

def parse_selector(text):
    """Split a layer selector ``LAYER``, ``LAYER:FIELD=VALUE`` or ``FIELD=VALUE``.

    Parameters
    ----------
    text : str or None

    Returns
    -------
    (layer, select) : tuple of (str or None)
        ``select`` is ``"FIELD=VALUE"`` or None.
    """
    if text is None:
        return None, None
    text = str(text)
    if ":" in text:
        layer, sel = text.split(":", 1)
        return (layer or None), (sel or None)
    if "=" in text:
        return None, text
    return (text or None), None


def _split_select(select, err):
    if select is None:
        return None
    if "=" not in select:
        raise err(f"the selection {select!r} must read FIELD=VALUE")
    f, v = select.split("=", 1)
    f, v = f.strip(), v.strip().strip("'\"")
    if not f:
        raise err(f"the selection {select!r} has no field name")
    return f, v


def _field(props: dict, name):
    """A property by name, ignoring case (GIS and CAD tools disagree on case)."""
    if name is None:
        return None
    if name in props:
        return props[name]
    low = str(name).lower()
    for k, v in props.items():
        if str(k).lower() == low:
            return v
    return None


def _missing(v) -> bool:
    return v is None or (isinstance(v, float) and math.isnan(v)) or (
        isinstance(v, str) and not v.strip())


def _number(v, what, err, lo=None, hi=None, positive=False):
    if _missing(v):
        return None
    try:
        x = float(str(v).strip().replace(",", ".")) if isinstance(v, str) else float(v)
    except (TypeError, ValueError):
        raise err(f"{what} must be a number, got {v!r}") from None
    if not math.isfinite(x) or (positive and x <= 0) or (
            lo is not None and not lo <= x <= hi):
        rng = "positive" if positive else f"between {lo:g} and {hi:g}"
        raise err(f"{what} must be {rng}, got {x:g}")
    return x


def _crs_code(crs: pyproj.CRS) -> str:
    auth = crs.to_authority(min_confidence=90)
    if auth is not None:
        return f"{auth[0]}:{auth[1]}"
    return crs.to_wkt()


def _chord_in_crs_units(chord, crs: pyproj.CRS) -> float:
    """Chord tolerance (m) in the CRS's own coordinate unit."""
    if crs.is_geographic:
        # one degree of latitude is about 111.32 km; a degree of longitude is shorter,
        # so this is conservative in both directions
        return chord / 111_320.0
    f = crs.axis_info[0].unit_conversion_factor if crs.axis_info else 1.0
    return chord / (f or 1.0)


def _resolve_crs(file_crs, given, err):
    from harbor.geometry.site import parse_crs

    if file_crs is None and given is None:
        raise err("the file carries no CRS; give the CRS of its coordinates "
                  "(e.g. crs = \"EPSG:32630\", or --crs EPSG:32630)")
    try:
        g = parse_crs(given) if given is not None else None
    except InputError as e:
        raise err(f"crs: {e.problem}") from None
    if file_crs is None:
        return g
    try:
        f = pyproj.CRS.from_user_input(file_crs)
        if f.is_compound:
            f = f.sub_crs_list[0]
    except pyproj.exceptions.CRSError:
        raise err(f"the file's CRS cannot be read ({str(file_crs)[:60]!r})") from None
    if g is not None and not f.equals(g, ignore_axis_order=True):
        raise err(f"the file's CRS is {_crs_code(f)[:60]}, but {given} was given; "
                  "remove the given CRS or reproject the file")
    try:
        return parse_crs(_crs_code(f))
    except InputError as e:
        raise err(f"the file's CRS: {e.problem}") from None


# ----------------------------------------------------------------------------- GIS files

def _gis_layer(path, layer, err_file):
    import pyogrio

    try:
        layers = [str(n) for n in pyogrio.list_layers(path)[:, 0]]
    except Exception as e:  # pyogrio raises its own DataSourceError family
        raise err_file(f"cannot open as a GIS file ({_gdal_message(e)})") from None
    if not layers:
        raise err_file("the file holds no layer")
    if layer is None:
        if len(layers) > 1:
            raise err_file(f"the file has {len(layers)} layers ({', '.join(layers)}); "
                           "name the one to read")
        return layers[0]
    if layer not in layers:
        near = [n for n in layers if n.lower() == str(layer).lower()]
        if near:
            return near[0]
        raise err_file(f"no layer {layer!r} (layers: {', '.join(layers)})")
    return layer


def _gdal_message(e) -> str:
    return str(e).strip().splitlines()[0][:160] if str(e).strip() else type(e).__name__


def _read_gis(path, layer, err_file):
    """(layer name, crs or None, list of (label, shapely geometry, props))."""
    import shapely
    from pyogrio import raw

    layer = _gis_layer(path, layer, err_file)

    def err(problem):
        return err_file(problem, layer)

    try:
        with warnings.catch_warnings():
            # GDAL's own note on unclosed rings: we say it ourselves, per feature
            warnings.simplefilter("ignore", RuntimeWarning)
            meta, _, geoms, values = raw.read(path, layer=layer)
    except Exception as e:
        raise err(f"cannot read the layer ({_gdal_message(e)})") from None
    if geoms is None or len(geoms) == 0:
        raise err("the layer is empty (no features)")
    fields = [str(f) for f in meta.get("fields", [])]
    out = []
    for i, wkb in enumerate(geoms):
        label = f"feature {i + 1}"
        if wkb is None:
            raise err(f"{label} has no geometry")
        try:
            g = shapely.from_wkb(wkb)
        except shapely.errors.GEOSException as e:
            if "closed" in str(e):
                raise err(f"{label}: unclosed polygon (a ring's first and last vertex "
                          "differ); close the ring in the GIS") from None
            raise err(f"{label}: unreadable geometry ({e})") from None
        except Exception as e:  # curves (CircularString ...) that GEOS cannot hold
            raise err(f"{label}: unsupported geometry ({_gdal_message(e)}); convert "
                      "curves to lines in the GIS") from None
        props = {f: _plain(values[k][i]) for k, f in enumerate(fields)}
        out.append((label, g, props))
    return layer, meta.get("crs"), out


def _plain(v):
    if isinstance(v, (np.floating, float)):
        return float(v)
    if isinstance(v, (np.integer,)):
        return int(v)
    if isinstance(v, bytes):
        return v.decode("utf-8", "replace")
    return v


def _check_2d(coords3, label, err):
    """Refuse vertices with a non-zero Z (a 3-D drawing is not a plan)."""
    if coords3.shape[1] < 3:
        return
    z = coords3[:, 2]
    bad = np.flatnonzero(np.isfinite(z) & (np.abs(z) > 0.0))
    if bad.size:
        j = int(bad[0])
        raise err(f"{label}: 3-D coordinates (z = {z[j]:g} at vertex {j + 1}); "
                  "harbor reads plan (2-D) layouts: flatten the drawing (z = 0) first")


def _gis_parts(kind, label, g, err):
    """Split a shapely geometry into the vertex arrays of one kind."""
    import shapely

    if g.is_empty:
        raise err(f"{label} has an empty geometry")
    gtype = g.geom_type
    _check_2d(shapely.get_coordinates(g, include_z=True), label, err)
    parts = list(shapely.get_parts(g)) if gtype.startswith("Multi") or \
        gtype == "GeometryCollection" else [g]
    out = []
    for p in parts:
        t = p.geom_type
        if kind == "arm":
            if t != "LineString":
                raise err(f"{label} is a {t}; arms are lines (LineString)")
            out.append(np.asarray(p.coords, float)[:, :2])
        elif kind == "land":
            if t == "Polygon":
                if len(p.interiors):
                    raise err(f"{label}: the land polygon has a hole; give the water "
                              "inside it as separate land polygons around it")
                out.append(np.asarray(p.exterior.coords, float)[:-1, :2])
            elif t == "LineString":
                out.append(_closed_ring(np.asarray(p.coords, float)[:, :2], label, err))
            else:
                raise err(f"{label} is a {t}; land is a polygon or a closed line")
        else:
            if t != "Point":
                raise err(f"{label} is a {t}; points are Point features")
            out.append(np.asarray(p.coords, float)[:, :2])
    return out


def _closed_ring(xy, label, err, closed_flag=False):
    """An outline from a line: it must close (first vertex = last, or a closed flag)."""
    span = float(np.ptp(xy, axis=0).max()) if len(xy) else 0.0
    gap = float(np.hypot(*(xy[0] - xy[-1]))) if len(xy) else 0.0
    if gap <= max(1e-9 * span, 1e-9):
        return xy[:-1]
    if closed_flag:
        return xy
    raise err(f"{label}: open land outline (its ends are {gap:.3g} units apart); "
              "land must be a closed outline: close the polyline or draw a polygon")


# ----------------------------------------------------------------------------- DXF

def _read_dxf(path, err_file):
    """The ezdxf document of a DXF drawing (InputError when it cannot be read)."""
    import ezdxf

    try:
        doc = ezdxf.readfile(path)
    except IOError as e:
        raise err_file(f"cannot read the file ({e})") from None
    except ezdxf.DXFStructureError as e:
        raise err_file(f"not a valid DXF drawing ({e})") from None
    return doc


def _dxf_props(e):
    props = {"layer": e.dxf.layer}
    if e.has_xdata(XDATA_APP):
        for tag in e.get_xdata(XDATA_APP):
            if tag.code == 1000 and "=" in str(tag.value):
                k, v = str(tag.value).split("=", 1)
                props[k.strip()] = v.strip()
    if e.dxftype() == "INSERT":
        for a in e.attribs:
            props[a.dxf.tag] = a.dxf.text
    return props


def _dxf_items(doc, pattern, kind, chord_units, err, sel=None):
    """Flattened linework or points of the modelspace entities on matching layers
    (only those whose properties match ``sel`` = (field, value), when given)."""
    msp = doc.modelspace()
    pat = str(pattern).lower()
    ents = [e for e in msp if fnmatch.fnmatchcase(str(e.dxf.layer).lower(), pat)]
    if not ents:
        names = sorted({lay.dxf.name for lay in doc.layers})
        if not any(fnmatch.fnmatchcase(n.lower(), pat) for n in names):
            raise err(f"the drawing has no layer {pattern!r} (layers: "
                      f"{', '.join(names[:12])}{', ...' if len(names) > 12 else ''})")
        raise err("the layer is empty (no entities in modelspace)")
    wanted = _DXF_POINTS if kind == "point" else _DXF_LINES
    out = []
    counts = {}
    for e in ents:
        t = e.dxftype()
        counts[t] = counts.get(t, 0) + 1
        label = f"{t} #{counts[t]} (handle {e.dxf.handle})"
        if t in _DXF_IGNORED:
            continue
        if sel is not None and not _matches(_dxf_props(e), sel):
            continue
        if t not in wanted:
            want = "POINT or block references (INSERT)" if kind == "point" else \
                "lines, polylines, arcs, circles, ellipses or splines"
            raise err(f"{label} cannot be a {kind}; this layer should hold {want}")
        if kind == "point":
            v = e.dxf.insert if t == "INSERT" else e.dxf.location
            xyz = np.array([[v.x, v.y, v.z]], float)
            _check_2d(xyz, label, err)
            out.append((label, xyz[:, :2], False, _dxf_props(e)))
            continue
        try:
            verts = _flatten(e, chord_units)
        except Exception as ex:  # noqa: BLE001 - ezdxf has no common base here
            raise err(f"{label}: cannot read its geometry ({ex})") from None
        if len(verts) < 2:
            raise err(f"{label} has fewer than two vertices")
        _check_2d(verts, label, err)
        closed = bool(getattr(e, "closed", False) or getattr(e, "is_closed", False)
                      or t == "CIRCLE")
        out.append((label, verts[:, :2], closed, _dxf_props(e)))
    if not out:
        if sel is not None:
            raise err(f"no entity has {sel[0]} = {sel[1]!r} (empty selection for the "
                      f"{kind}s)")
        raise err("the layer holds no usable entity (only annotation)")
    return out


def _flatten(e, tol) -> np.ndarray:
    """WCS vertices (n, 3) of a DXF curve entity, chords within ``tol`` of the curve.

    Arcs and circles (also the bulge arcs of polylines) are flattened on the exact
    circle, ellipses on the exact ellipse and splines on the exact B-spline (ezdxf's
    entity methods), so every vertex lies on the curve and only the chords depart
    from it, by at most ``tol`` at their midpoints.
    """
    t = e.dxftype()
    if t == "LINE":
        pts = [e.dxf.start, e.dxf.end]
    elif t in ("ARC", "CIRCLE"):
        pts = list(e.flattening(tol))
    elif t in ("ELLIPSE", "SPLINE"):
        pts = list(e.flattening(tol))
    else:  # LWPOLYLINE, POLYLINE: straight and bulge segments, in drawing order
        start = (next(iter(e.vertices_in_wcs())) if t == "LWPOLYLINE"
                 else next(iter(e.points_in_wcs())))
        pts = [start]
        for sub in e.virtual_entities():
            piece = _flatten(sub, tol)
            end = np.array([pts[-1].x, pts[-1].y, pts[-1].z], float)
            # ARC entities always run counter-clockwise: turn clockwise bulges round
            if np.linalg.norm(piece[-1] - end) < np.linalg.norm(piece[0] - end):
                piece = piece[::-1]
            pts += [_V(*v) for v in piece[1:]]
    return np.array([(v.x, v.y, v.z) for v in pts], float)


class _V:
    """A minimal vertex with x, y, z (what ezdxf's Vec3 offers)."""

    __slots__ = ("x", "y", "z")

    def __init__(self, x, y, z):
        self.x, self.y, self.z = float(x), float(y), float(z)


def _dxf_units(doc, crs, err_file):
    """Refuse a drawing whose declared unit disagrees with the CRS's unit."""
    code = int(doc.header.get("$INSUNITS", 0) or 0)
    if code == 0 or crs.is_geographic or code not in _INSUNITS:
        return
    name, metres = _INSUNITS[code]
    f = crs.axis_info[0].unit_conversion_factor if crs.axis_info else 1.0
    if abs(metres - f) > 1e-6 * f:
        raise err_file(f"the drawing's units are {name} ($INSUNITS = {code}) but the "
                       f"CRS {_crs_code(crs)} is in {crs.axis_info[0].unit_name}; scale "
                       "the drawing to the CRS's unit first")


# ----------------------------------------------------------------------------- reading

def read_layout(path, arms=None, land=None, points=None, *, name_field="name",
                reflection_field=None, limit_field=None, crs=None, chord=DEFAULT_CHORD,
                where=None):
    """Read arms, land and points from a GIS layer or a DXF drawing.

    Parameters
    ----------
    path : str or os.PathLike
        A GeoPackage (``.gpkg``), Shapefile (``.shp``), GeoJSON (``.geojson``,
        ``.json``) or DXF (``.dxf``) file.
    arms, land, points : str or None
        Where each kind is: a selector ``LAYER``, ``LAYER:FIELD=VALUE`` or
        ``FIELD=VALUE`` (see :func:`parse_selector`), or None when the file holds none
        of that kind. For a GIS file, LAYER is a layer name (optional when the file
        has one layer) and FIELD an attribute. For DXF, LAYER is a drawing layer name
        (``*`` and ``?`` wildcards, case ignored) and FIELD one of ``layer``, an
        extended-data key (XDATA of application ``HARBOR``, strings ``key=value``) or
        a block attribute tag (points drawn as block references).
    name_field : str
        Attribute holding the names (DXF: extended data, block attribute or
        ``layer``); unnamed features are called "<kind> <n>".
    reflection_field : str, optional
        Attribute holding reflection coefficients (0 to 1) of arms and land.
    limit_field : str, optional
        Attribute holding the points' allowable wave height (m).
    crs : str, optional
        CRS of the coordinates when the file carries none (DXF, Shapefile without a
        ``.prj``); if the file has one, a different ``crs`` is refused.
    chord : float
        Chord tolerance, m: DXF arcs, bulges, circles, ellipses and splines become
        polylines whose chords lie within this distance of the curve.
    where : str, optional
        Text put before each message instead of the file name (used when a scenario
        refers to the file).

    Returns
    -------
    LayoutRead

    Raises
    ------
    InputError
        One line naming the file, the layer and the problem: file missing or
        unreadable, unknown layer, empty layer (or no feature matching the
        selection), unclosed polygon, open land outline, 3-D coordinates (non-zero
        Z), wrong geometry type, polygon with a hole, no CRS, a CRS conflict, DXF
        units that disagree with the CRS, bad attribute values, duplicate names.

    Notes
    -----
    Curves are replaced by polylines with ezdxf's adaptive flattening: segments are
    halved until the distance between the curve and the chord (the sagitta
    s = r (1 - cos(θ/2)) for an arc of radius r and segment angle θ) is at most
    ``chord``. Multi-part GIS geometries give one arm, outline or point per part.

    References
    ----------
    .. [1] Open Geospatial Consortium (2021). OGC GeoPackage Encoding Standard, 1.3.1.
    .. [2] Autodesk (2012). AutoCAD 2012 DXF Reference (HEADER $INSUNITS, LWPOLYLINE
       bulge, XDATA group code 1000).
    .. [3] Butler, H. et al. (2016). The GeoJSON Format. IETF RFC 7946.
    """
    p = Path(path)
    file = where or str(path)

    def err_file(problem, layer=None):
        return InputError(problem, file=file, where=f"layer '{layer}'" if layer else None)

    try:  # a FIFO, device, folder or link loop is named before GDAL or ezdxf opens it
        check_file(p, "layout file", MAX_LAYOUT_FILE_BYTES)
    except InputError as e:
        raise err_file(e.problem) from None
    if not isinstance(chord, (int, float)) or isinstance(chord, bool) or \
            not math.isfinite(chord) or chord <= 0:
        raise err_file(f"the chord tolerance must be a positive number of metres, "
                       f"got {chord!r}")
    suffix = p.suffix.lower()
    is_dxf = suffix in DXF_SUFFIXES
    sels = {"arm": parse_selector(arms), "land": parse_selector(land),
            "point": parse_selector(points)}
    if all(v == (None, None) for v in sels.values()) and arms is None and land is None \
            and points is None:
        raise err_file("say which layer holds the arms, the land and/or the points")
    fields = {"name": name_field, "reflection": reflection_field, "limit": limit_field}

    features = []
    if is_dxf:
        doc = _read_dxf(str(p), err_file)
        crs_obj = _resolve_crs(None, crs, err_file)
        _dxf_units(doc, crs_obj, err_file)
        cu = _chord_in_crs_units(float(chord), crs_obj)
        for kind, given in (("arm", arms), ("land", land), ("point", points)):
            if given is None:
                continue
            layer, select = sels[kind]
            if layer is None:
                raise err_file(f"name the DXF layer that holds the {kind}s")

            def err(problem, _l=layer):
                return err_file(problem, _l)

            sel = _split_select(select, err)
            items = _dxf_items(doc, layer, kind, cu, err, sel)
            features += _make_features(kind, select, items, fields, err, dxf=True)
    else:
        if suffix not in GIS_SUFFIXES:
            raise err_file(f"unknown layout file type {suffix or '(none)'!r}: give a "
                           "GeoPackage, Shapefile, GeoJSON or DXF file")
        crs_obj = None
        for kind, given in (("arm", arms), ("land", land), ("point", points)):
            if given is None:
                continue
            layer, select = sels[kind]
            lname, fcrs, items = _read_gis(str(p), layer, err_file)
            sels[kind] = (lname, select)
            c = _resolve_crs(fcrs, crs, lambda m, _l=lname: err_file(m, _l))
            if crs_obj is not None and not c.equals(crs_obj, ignore_axis_order=True):
                raise err_file(f"the layers' CRSs differ ({_crs_code(c)} and "
                               f"{_crs_code(crs_obj)}); reproject them to one CRS", lname)
            crs_obj = c

            def err(problem, _l=lname):
                return err_file(problem, _l)

            sel = _split_select(select, err)
            parts = [(label, xy, False, props) for label, g, props in items
                     if sel is None or _matches(props, sel)
                     for xy in _gis_parts(kind, label, g, err)]
            features += _make_features(kind, select, parts, fields, err, dxf=False)
    seen = {}
    for f in features:
        key = (f.kind, f.name)
        if key in seen:
            raise err_file(f"two {f.kind}s are both named {f.name!r}; names must be "
                           "unique (fix the name attribute)", seen[key])
        seen[key] = sels[f.kind][0]
    return LayoutRead(path=str(path), crs=_crs_code(crs_obj), features=tuple(features),
                      chord=float(chord), selectors=sels)


def _matches(props, sel) -> bool:
    v = _field(props, sel[0])
    if isinstance(v, float) and v.is_integer():
        v = int(v)
    return v is not None and str(v) == sel[1]


def _make_features(kind, select, items, fields, err, dxf):
    sel = _split_select(select, err)
    out = []
    n = 0
    for label, xy, closed, props in items:
        if sel is not None and not _matches(props, sel):
            continue
        n += 1
        name = _field(props, fields["name"])
        name = f"{kind} {n}" if _missing(name) else str(name).strip()
        refl = _number(_field(props, fields["reflection"]), f"{label}: reflection "
                       f"coefficient '{fields['reflection']}'", err, lo=0.0, hi=1.0) \
            if fields["reflection"] and kind != "point" else None
        lim = _number(_field(props, fields["limit"]), f"{label}: limit "
                      f"'{fields['limit']}'", err, positive=True) \
            if fields["limit"] and kind == "point" else None
        xy = np.asarray(xy, float)
        if kind == "land" and dxf:
            xy = _closed_ring(xy, label, err, closed_flag=closed)
        if not np.all(np.isfinite(xy)):
            raise err(f"{label} has non-finite coordinates")
        out.append(LayoutFeature(kind=kind, name=name, coords=xy, reflection=refl,
                                 limit=lim))
    if not out:
        if sel is not None:
            raise err(f"no feature has {sel[0]} = {sel[1]!r} (empty selection for the "
                      f"{kind}s)")
        raise err(f"the layer holds no {kind}")
    # the parts of one multi-part feature share its name: number them (two separate
    # features with one name are refused later, as duplicates)
    labels = [it[0] for it in items if sel is None or _matches(it[3], sel)]
    parts = {lb: labels.count(lb) for lb in labels}
    k = {}
    final = []
    for lb, f in zip(labels, out):
        if parts[lb] > 1:
            k[lb] = k.get(lb, 0) + 1
            f = LayoutFeature(f.kind, f"{f.name} ({k[lb]})", f.coords, f.reflection,
                              f.limit)
        final.append(f)
    return final


# ----------------------------------------------------------------------------- TOML

def _q(s) -> str:
    """A TOML basic string (JSON escapes are valid TOML escapes)."""
    return json.dumps(str(s), ensure_ascii=False)


def _fmt_xy(xy, lonlat):
    d = 9 if lonlat else 3  # 1e-9 degree ~ 0.1 mm; 1e-3 m = 1 mm
    return f"[{xy[0]:.{d}f}, {xy[1]:.{d}f}]"


def _fmt_line(coords, lonlat, indent="    "):
    items = [_fmt_xy(c, lonlat) for c in coords]
    if len(items) <= 2:
        return "[" + ", ".join(items) + "]"
    return "[\n" + ",\n".join(indent + it for it in items) + ",\n]"


def _scenario_keys():
    from harbor.study import scenario as _sc

    return getattr(_sc, "_KEYS", {})


#: Placeholder sea state written by ``harbor import`` (replace it with the site's).
PLACEHOLDER_SEA = {"name": "PLACEHOLDER sea - replace", "kind": "regular", "height": 1.0,
                   "period": 8.0, "from": 0.0}


def scenario_toml(layout: LayoutRead, *, depth=None, title=None, reference=None,
                  spacing=None):
    """The text of a complete, commented scenario for a layout read from a file.

    Parameters
    ----------
    layout : LayoutRead
        From :func:`read_layout`.
    depth : float, optional
        Water depth (m); without it a placeholder of 10 m is written and marked.
    title : str, optional
        Default: "<file stem> (imported layout)".
    reference : dict, optional
        When given, the arms, land and points are written as references to the file
        (keys of :data:`REFERENCE_KEYS`) instead of vertices: ``{"file": path as
        written, "fields": {"name_field": ..., ...}}``.
    spacing : float, optional
        Grid spacing (m) to write; default the scenario reader's own default for the
        placeholder sea.

    Returns
    -------
    str
        TOML text: ``[site]``, ``[[arm]]``, ``[[land]]``, ``[[point]]``, one placeholder
        ``[[sea]]`` and a placeholder ``[grid]``, with comments.
    """
    src = Path(layout.path).name
    lonlat = layout.crs.upper() in ("EPSG:4326", "OGC:CRS84")
    keys = _scenario_keys()
    has_refl = {k: "reflection" in keys.get(k, ()) for k in ("arm", "land")}
    out = [f"# Scenario imported from {src} by harbor import.",
           f"# Curves were replaced by polylines within {layout.chord:g} m (chord "
           "tolerance).",
           "# The layout comes from the file; the sea state and the grid below are",
           "# PLACEHOLDERS: replace them with the site's before using any result.",
           "# Results are preliminary; final design belongs to licensed coastal "
           "engineers under local codes.", "",
           f"title = {_q(title or Path(layout.path).stem + ' (imported layout)')}", "",
           "[site]"]
    crs_note = "lon, lat in degrees" if lonlat else "coordinates of every vertex below"
    if "\n" in layout.crs or len(layout.crs) > 40:
        out.append(f"crs = '''{layout.crs}'''")
    else:
        out.append(f"crs = {_q(layout.crs)}        # {crs_note}")
    if depth is None:
        out.append("depth = 10.0             # m  PLACEHOLDER: the site's water depth")
    else:
        out.append(f"depth = {float(depth):g}              # m")
    out.append("")

    labels = {"arm": "arms", "land": "land polygons", "point": "points"}
    for kind, table, key in (("arm", "arm", "line"), ("land", "land", "outline"),
                             ("point", "point", "at")):
        feats = layout.of(kind)
        layer, select = layout.selectors.get(kind, (None, None))
        if reference is not None:
            if not feats:
                continue
            out.append(f"# {len(feats)} {labels[kind]} read from the file at every run")
            out.append(f"[[{table}]]")
            out.append(f"file = {_q(reference['file'])}")
            if layer is not None:
                out.append(f"layer = {_q(layer)}")
            if select is not None:
                out.append(f"select = {_q(select)}")
            for fk, fv in reference.get("fields", {}).items():
                if fv is None or (fk == "limit_field" and kind != "point") or (
                        fk == "reflection_field" and kind == "point"):
                    continue
                out.append(f"{fk} = {_q(fv)}")
            if reference.get("crs"):
                out.append(f"crs = {_q(reference['crs'])}")
            if reference.get("chord") is not None and kind != "point":
                out.append(f"chord = {float(reference['chord']):g}              # m")
            out.append("")
            continue
        if feats:
            where = f"layer '{layer}'" if layer else "the file"
            sel = f", {select}" if select else ""
            out.append(f"# {labels[kind]} from {where}{sel}")
        for f in feats:
            out.append(f"[[{table}]]")
            out.append(f"name = {_q(f.name)}")
            if kind == "point":
                out.append(f"at = {_fmt_xy(f.coords[0], lonlat)}")
                if f.limit is not None:
                    out.append(f"limit = {f.limit:g}              # m, allowable height")
            else:
                out.append(f"{key} = {_fmt_line(f.coords, lonlat)}")
                if f.reflection is not None:
                    if has_refl[kind]:
                        out.append(f"reflection = {f.reflection:g}")
                    else:
                        out.append(f"# reflection = {f.reflection:g}   (from the file; "
                                   "this harbor version does not read it)")
            out.append("")

    sea = PLACEHOLDER_SEA
    out += ["# PLACEHOLDER sea state, so that the file passes `harbor check`: replace it",
            "# with the design sea states of the site (regular or random).",
            "[[sea]]",
            f"name = {_q(sea['name'])}",
            f"kind = {_q(sea['kind'])}",
            f"height = {sea['height']:g}             # m  PLACEHOLDER",
            f"period = {sea['period']:g}             # s  PLACEHOLDER",
            f"from = {sea['from']:g}               # degrees true  PLACEHOLDER", ""]
    out += ["# PLACEHOLDER grid: about ten points per wavelength of the placeholder sea.",
            "# Set the spacing for the real sea states; bounds are optional",
            "# (default: the box around the arms and points, padded 20 % or 50 m).",
            "[grid]"]
    out.append(f"spacing = {spacing:g}            # m  PLACEHOLDER" if spacing is not None
               else "spacing = 5.0            # m  PLACEHOLDER")
    out.append("# bounds = [xmin, ymin, xmax, ymax]")
    return "\n".join(out) + "\n"


def import_layout(path, out, arms=None, land=None, points=None, *, name_field="name",
                  reflection_field=None, limit_field=None, crs=None,
                  chord=DEFAULT_CHORD, depth=None, title=None, reference=False,
                  force=False):
    """Write a checked scenario TOML from a GIS layer or a DXF drawing.

    Parameters
    ----------
    path : str or os.PathLike
        The layout file (see :func:`read_layout`).
    out : str or os.PathLike
        The scenario file to write (``.toml``).
    arms, land, points, name_field, reflection_field, limit_field, crs, chord
        As in :func:`read_layout`.
    depth : float, optional
        Water depth, m (default: a marked 10 m placeholder).
    title : str, optional
    reference : bool
        Write ``file``/``layer`` references instead of the vertices, so that the
        scenario follows later revisions of the drawing.
    force : bool
        Overwrite ``out`` if it exists.

    Returns
    -------
    (pathlib.Path, harbor.study.scenario.Scenario)
        The file written and the scenario read back from it.

    Raises
    ------
    InputError
        Any problem of :func:`read_layout`; an existing ``out`` without ``force``;
        a layout that the scenario reader refuses (crossing arms, a point on land...),
        prefixed with the source file. Nothing is written then.

    Notes
    -----
    The text is validated with :func:`harbor.study.scenario.scenario_from_dict` before
    it is written (atomically), so that the file on disk always passes
    ``harbor check``.
    """
    from harbor.outputs._atomic import write_text_atomic
    from harbor.study.scenario import _toml, scenario_from_dict

    outp = Path(out)
    if outp.exists() and not force:
        raise InputError("exists already; choose another name or overwrite it "
                         "(--force)", file=str(out))
    if not outp.parent.is_dir() and str(outp.parent):
        raise InputError(f"folder '{outp.parent}' does not exist", file=str(out))
    if depth is not None and (not math.isfinite(float(depth)) or float(depth) <= 0):
        raise InputError(f"depth must be positive, got {depth:g}", key="--depth")
    lay = read_layout(path, arms, land, points, name_field=name_field,
                      reflection_field=reflection_field, limit_field=limit_field,
                      crs=crs, chord=chord)
    ref = None
    if reference:
        src = Path(path).resolve()
        try:
            rel = Path(_relpath(src, outp.resolve().parent))
        except ValueError:  # another drive (Windows)
            rel = src
        ref = {"file": rel.as_posix(),
               "fields": {"name_field": name_field, "reflection_field": reflection_field,
                          "limit_field": limit_field},
               "crs": crs, "chord": chord if Path(path).suffix.lower() == ".dxf" else None}
    text = scenario_toml(lay, depth=depth, title=title, reference=ref)
    # the reader's own default spacing for the placeholder sea (one rule, one place)
    try:
        data = _toml.loads(text)
        data.pop("grid")
        sc0 = scenario_from_dict(data, path=str(outp))
        text = scenario_toml(lay, depth=depth, title=title, reference=ref,
                             spacing=sc0.grid.spacing)
        sc = scenario_from_dict(_toml.loads(text), path=str(outp))
    except InputError as e:
        what = ": ".join(v for v in (e.where, e.problem) if v)
        raise InputError(f"the layout is not a valid scenario ({what})",
                         file=str(path)) from None
    write_text_atomic(outp, text)
    return outp, sc


def _relpath(target: Path, start: Path) -> str:
    import os

    return os.path.relpath(target, start)


# ----------------------------------------------------------------------------- references

def expand_references(data: dict, path: str, site_crs: str, keys: dict) -> dict:
    """Replace ``[[arm]]``, ``[[land]]`` and ``[[point]]`` tables that name a ``file``
    by one table per feature of that file, with vertices in the site CRS.

    Parameters
    ----------
    data : dict
        The parsed scenario.
    path : str
        The scenario file ("" when built in code): relative ``file`` values resolve
        from its folder (else from the working directory).
    site_crs : str
        ``[site] crs``: the CRS the vertices are converted to, and the file's CRS when
        the file has none and the table gives no ``crs``.
    keys : dict
        The scenario reader's allowed keys per table kind; other keys of a reference
        table (e.g. ``rooted``) are copied to every table it expands into.

    Returns
    -------
    dict
        ``data`` itself when no table refers to a file, else a shallow copy with the
        expanded tables.

    Raises
    ------
    InputError
        Naming the scenario file, the table and the key: a reference that also lists
        vertices or a name, a wrong type, and every problem of :func:`read_layout`
        (prefixed with the layout file).

    Notes
    -----
    Keys of a reference table: ``file`` (path), ``layer`` (GIS layer or DXF layer,
    wildcards allowed for DXF), ``select`` ("FIELD=VALUE"), ``name_field`` (default
    "name"), ``reflection_field``, ``limit_field`` (points), ``crs`` (the file's CRS
    when it carries none; default the site's) and ``chord`` (m, DXF curves; default
    :data:`DEFAULT_CHORD`). Coordinates are converted with pyproj (``always_xy``)
    when the file's CRS differs from the site's.
    """
    if not isinstance(data, dict):
        return data
    base = Path(path).resolve().parent if path else Path.cwd()
    changed = False
    new = dict(data)
    geom_key = {"arm": "line", "land": "outline", "point": "at"}
    for kind in _KINDS:
        tables = data.get(kind)
        if not isinstance(tables, list) or not any(
                isinstance(t, dict) and "file" in t for t in tables):
            continue
        changed = True
        out = []
        for i, t in enumerate(tables):
            if not isinstance(t, dict) or "file" not in t:
                out.append(t)
                continue
            where = f"[[{kind}]] #{i + 1}"

            def err(problem, key=None, _w=where):
                return InputError(problem, file=path or None, where=_w, key=key)

            for k in (geom_key[kind], "name"):
                if k in t:
                    raise err("a table that reads a file takes its names and vertices "
                              "from the file; remove it (or remove 'file')", k)
            allowed = [k for k in REFERENCE_KEYS + tuple(keys.get(kind, ()))
                       if k not in (geom_key[kind], "name")]
            for k in t:
                if k not in allowed:
                    near = difflib.get_close_matches(str(k), allowed, n=1, cutoff=0.5)
                    hint = (f"; did you mean '{near[0]}'?" if near else
                            f"; valid keys: {', '.join(allowed)}")
                    raise err(f"unknown key{hint}", str(k))
            for k in ("file", "layer", "select", "name_field", "reflection_field",
                      "limit_field", "crs"):
                if k in t and (not isinstance(t[k], str) or not t[k].strip()):
                    raise err("must be a non-empty string", k)
            if "limit_field" in t and kind != "point":
                raise err("applies to [[point]] tables only", "limit_field")
            chord = t.get("chord", DEFAULT_CHORD)
            if isinstance(chord, bool) or not isinstance(chord, (int, float)) or \
                    not math.isfinite(chord) or chord <= 0:
                raise err(f"must be a positive number of metres, got {chord!r}", "chord")
            f = Path(t["file"])
            fpath = f if f.is_absolute() else base / f
            sel = t.get("layer")
            if t.get("select"):
                sel = f"{sel or ''}:{t['select']}"
            try:
                lay = read_layout(fpath, **{{"arm": "arms", "land": "land",
                                             "point": "points"}[kind]: sel or ""},
                                  name_field=t.get("name_field", "name"),
                                  reflection_field=t.get("reflection_field"),
                                  limit_field=t.get("limit_field"),
                                  crs=t.get("crs") or (site_crs if _crs_free(fpath)
                                                       else None),
                                  chord=float(chord), where=t["file"])
            except InputError as e:
                raise err(e.line(), "file") from None
            to_site = _transformer(lay.crs, site_crs)
            extra = {k: v for k, v in t.items()
                     if k not in REFERENCE_KEYS and k in keys.get(kind, ())}
            for feat in lay.of(kind):
                xy = feat.coords
                if to_site is not None:
                    x, y = to_site.transform(xy[:, 0], xy[:, 1])
                    xy = np.column_stack([x, y])
                row = dict(extra)
                row["name"] = feat.name
                row[geom_key[kind]] = xy[0].tolist() if kind == "point" else xy.tolist()
                if feat.limit is not None and "limit" in keys.get(kind, ()):
                    row["limit"] = feat.limit
                if feat.reflection is not None and "reflection" in keys.get(kind, ()):
                    row["reflection"] = feat.reflection
                out.append(row)
        new[kind] = out
    return new if changed else data


def _crs_free(path: Path) -> bool:
    """Whether the file type can lack a CRS (then the site's is assumed)."""
    if path.suffix.lower() in DXF_SUFFIXES:
        return True
    if path.suffix.lower() == ".shp":
        return not path.with_suffix(".prj").exists()
    return False


def _transformer(src: str, dst: str):
    a = pyproj.CRS.from_user_input(src)
    b = pyproj.CRS.from_user_input(dst)
    if a.equals(b, ignore_axis_order=True):
        return None
    return pyproj.Transformer.from_crs(a, b, always_xy=True)
