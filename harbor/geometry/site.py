"""The site: coordinate reference systems, the work frame and true-to-grid directions.

Geometry only: coordinates and bearings, never waves. The scenario gives coordinates in
its own CRS (``[site] crs``) and directions in degrees from *true* north. The solver works
in a *work frame*: plane coordinates in metres,

- the scenario CRS itself when it is projected in metres;
- the same projection with its axes re-expressed in metres when it is projected in another
  linear unit (feet, US survey feet, ...), so that nothing is silently wrong by a factor
  of 0.3048;
- a local transverse Mercator projection centred at the site when the scenario is in
  EPSG:4326 (longitude, latitude in that order, as GeoJSON).

Coordinates are always given easting (or longitude) first, whatever the axis order in
the CRS's official definition.
"""

from __future__ import annotations

import math

import numpy as np
import pyproj
from pyproj.exceptions import CRSError

from harbor.errors import InputError

_LONLAT = pyproj.CRS("EPSG:4326")
_METRE_NAMES = {"metre", "meter", "m"}

#: Largest angular distortion (degrees) of a non-conformal CRS accepted at the site; a
#: wave direction is seldom known better than a few degrees, but a conformal CRS
#: (UTM, national grids) is always preferable.
MAX_ANGULAR_DISTORTION_DEG = 1.0

#: A scenario CRS whose point scale factor at the site differs from 1 by more than this
#: gets a note saying that lengths were corrected to ground distances. Projections made
#: for mapping (UTM inside its zone, national grids) stay within 0.001.
SCALE_NOTE_ABOVE = 0.002


def parse_crs(code: str) -> pyproj.CRS:
    """Return the horizontal :class:`pyproj.CRS` for a scenario's ``crs`` value.

    Parameters
    ----------
    code : str
        A CRS as understood by pyproj, normally ``"EPSG:nnnn"``.

    Returns
    -------
    pyproj.CRS
        The CRS; for a compound CRS, its horizontal part.

    Raises
    ------
    InputError
        When the code is not a string, is unknown to PROJ, or names a CRS that cannot
        carry a plane layout (geocentric, vertical, geographic other than EPSG:4326).

    Notes
    -----
    EPSG:4326 and OGC:CRS84 are accepted as geographic CRSs (both read as longitude,
    latitude). Other geographic CRSs (e.g. EPSG:4258, ETRS89) are refused rather than
    treated as WGS 84, because the datum shift (up to a few hundred metres for older
    datums) would be silently wrong.

    References
    ----------
    PROJ contributors (2024). PROJ coordinate transformation software library.
    Open Source Geospatial Foundation. https://proj.org
    """
    if not isinstance(code, str) or not code.strip():
        raise InputError("the CRS must be a string such as \"EPSG:32630\"")
    try:
        crs = pyproj.CRS.from_user_input(code.strip())
    except CRSError:
        raise InputError(f"unknown CRS code {code!r} (expected e.g. \"EPSG:32630\" or "
                         "\"EPSG:4326\")") from None
    if crs.is_compound:
        crs = crs.sub_crs_list[0]
    if crs.is_geographic:
        if not _is_wgs84_lonlat(crs):
            raise InputError(f"geographic CRS {code!r} is not supported: give "
                             "coordinates in EPSG:4326 (lon, lat) or in a projected CRS")
        return crs
    if not crs.is_projected:
        raise InputError(f"CRS {code!r} is neither projected nor EPSG:4326 "
                         f"(it is {crs.type_name!r})")
    for ax in crs.axis_info:
        if ax.unit_conversion_factor is None or not math.isfinite(
                ax.unit_conversion_factor) or ax.unit_conversion_factor <= 0:
            raise InputError(f"CRS {code!r} has axis unit {ax.unit_name!r}, which is not "
                             "a linear unit")
    return crs


def _is_wgs84_lonlat(crs: pyproj.CRS) -> bool:
    if crs.to_epsg() == 4326:
        return True
    auth = crs.to_authority()
    return auth is not None and auth[0] == "OGC" and auth[1] == "CRS84"


def _metre_version(crs: pyproj.CRS) -> pyproj.CRS:
    """The same projected CRS with both axes in metres (false origin unchanged)."""
    units = {ax.unit_name.lower() for ax in crs.axis_info}
    if units <= _METRE_NAMES and all(
            abs(ax.unit_conversion_factor - 1.0) < 1e-12 for ax in crs.axis_info):
        return crs
    d = crs.to_json_dict()
    try:
        for ax in d["coordinate_system"]["axis"]:
            ax["unit"] = "metre"
        d["name"] = f"{crs.name} (axes in metres)"
        d.pop("id", None)
        d.pop("ids", None)
        out = pyproj.CRS.from_json_dict(d)
    except (KeyError, TypeError, CRSError):
        raise InputError(f"cannot convert CRS {crs.to_string()!r} from "
                         f"{crs.axis_info[0].unit_name!r} to metres; use a projected CRS "
                         "in metres") from None
    if not out.is_projected:
        raise InputError(f"cannot convert CRS {crs.to_string()!r} to metres; use a "
                         "projected CRS in metres")
    return out


def lonlat_problem(lon: float, lat: float) -> str | None:
    """Say what is wrong with a longitude/latitude pair, or return None if it is valid.

    Parameters
    ----------
    lon, lat : float
        Longitude and latitude, degrees.

    Returns
    -------
    str or None
        A plain-words problem (mentioning a probable swap of the pair), or None.
    """
    if not (math.isfinite(lon) and math.isfinite(lat)):
        return "longitude and latitude must be finite numbers"
    if abs(lat) > 90.0:
        hint = ("; the pair looks swapped: write [lon, lat], longitude first as in "
                "GeoJSON" if abs(lon) <= 90.0 and abs(lat) <= 180.0 else "")
        return f"latitude {lat:g} is outside [-90, 90]{hint}"
    if abs(lon) > 180.0:
        return f"longitude {lon:g} is outside [-180, 180]"
    return None


def lonlat_anchor(lon, lat) -> tuple[float, float]:
    """Mean position of lon/lat vertices that may straddle the antimeridian.

    Parameters
    ----------
    lon, lat : array_like
        Degrees.

    Returns
    -------
    (float, float)
        Longitude in [-180, 180) and latitude, degrees.

    Notes
    -----
    Longitudes are unwrapped relative to the first vertex (each one replaced by the
    equivalent within 180 deg of it) before averaging, so that vertices at 179.99 and
    -179.99 average to 180, not to 0. A harbour never spans half the globe.
    """
    lon = np.asarray(lon, float).ravel()
    lat = np.asarray(lat, float).ravel()
    rel = np.mod(lon - lon[0] + 180.0, 360.0) - 180.0
    m = float(np.mod(lon[0] + rel.mean() + 180.0, 360.0) - 180.0)
    return m, float(lat.mean())


class Site:
    """The site of a scenario: its CRS, work frame, depth and true-north convergence.

    Parameters
    ----------
    crs : str
        The scenario CRS, e.g. ``"EPSG:32630"``; ``"EPSG:4326"`` means (lon, lat).
    anchor : tuple of float
        A representative point of the site in scenario-CRS coordinates (easting or
        longitude first), e.g. the centroid of the arm vertices. For EPSG:4326 the local
        work projection is centred here; the meridian convergence is evaluated here.
    depth : float
        Water depth, m (> 0).
    g : float, optional
        Gravitational acceleration, m/s², default 9.81.

    Attributes
    ----------
    crs : pyproj.CRS
        The scenario CRS.
    crs_code : str
        The CRS string as given.
    work_crs : pyproj.CRS
        The projected CRS (metres) of the work frame.
    depth, g : float
    anchor : tuple of float
        The anchor in scenario-CRS coordinates.
    anchor_work : tuple of float
        The anchor in the work frame, m.
    anchor_lonlat : tuple of float
        The anchor as (lon, lat) in WGS 84, degrees.
    convergence_deg : float
        Meridian convergence of the work frame at the anchor, degrees, such that
        grid bearing = true bearing - convergence_deg (positive when grid north lies
        east of true north).
    scale_factor : float
        Point scale factor of the work frame at the anchor (work-frame length over
        ground length on the ellipsoid), e.g. 0.9996-1.001 in a UTM zone, 1/cos(lat) in
        Web Mercator; 1 for EPSG:4326 (the local work frame is true to scale there).
    ground_crs : pyproj.CRS
        The local conformal frame in which the waves are computed: a transverse
        Mercator projection centred on the anchor, scale 1 there, on the scenario CRS's
        own geodetic datum (the work frame itself for EPSG:4326).
    angular_distortion_deg : float
        Maximum angular distortion ω of the work projection at the anchor, degrees,
        from the singular values a ≥ b of its Jacobian on the ellipsoid,
        sin(ω/2) = (a - b)/(a + b) (Snyder 1987, ch. 4): about 0 for a conformal
        projection (UTM, national grids); for others (e.g. Web Mercator, EPSG:3857,
        a few hundredths of a degree) directions other than true north are converted
        only to within this angle.

    Raises
    ------
    InputError
        Unknown or unsupported CRS, non-positive depth or g, anchor out of range, or a
        non-conformal CRS that distorts angles at the site by more than
        ``MAX_ANGULAR_DISTORTION_DEG``.

    Notes
    -----
    The convergence γ is taken from the partial derivatives of the projection at the
    anchor given by PROJ (``pyproj.Proj.get_factors``): true north, the direction of
    increasing latitude, has grid components (∂x/∂φ, ∂y/∂φ), so its grid bearing is
    atan2(∂x/∂φ, ∂y/∂φ) = -γ. For a transverse Mercator projection this is close to
    γ ≈ Δλ sin φ (Δλ the longitude from the central meridian). A single γ at the anchor
    is used for the whole site; over a harbour (a few km) its change is far below the
    uncertainty of any wave direction. For a non-conformal projection the rotation is
    exact only along the meridian; national grids and UTM are conformal.

    References
    ----------
    Lengths: the work frame keeps the user's coordinates, but a projected CRS is true to
    scale only on its standard lines. The waves are therefore computed in
    :attr:`ground_crs`, a transverse Mercator projection centred on the site with scale 1
    there: over a harbour (a few km) its scale differs from 1 by less than 1e-7, so
    distances in it are ground distances. Every point (grid node, arm vertex, berth) is
    carried there by PROJ's transformation linearised at the site
    (:meth:`to_ground`), whatever the scenario CRS's scale
    (Web Mercator 1.41 at 45 N, a UTM zone far from its central meridian). Its grid
    north is true north at the anchor, so directions need no convergence there.

    Snyder, J. P. (1987). Map Projections — A Working Manual. U.S. Geological Survey
    Professional Paper 1395, pp. 60-64 (transverse Mercator, convergence).

    PROJ contributors (2024). PROJ coordinate transformation software library.
    Open Source Geospatial Foundation. https://proj.org
    """

    def __init__(self, crs: str, anchor: tuple[float, float], depth: float,
                 g: float = 9.81):
        for name, v in (("depth", depth), ("g", g)):
            if isinstance(v, bool) or not isinstance(v, (int, float, np.floating,
                                                          np.integer)):
                raise InputError(f"{name} must be a number, got {v!r}")
            if not math.isfinite(v) or v <= 0:
                raise InputError(f"{name} must be positive, got {v!r}")
        self.crs_code = crs
        self.crs = parse_crs(crs)
        self.depth = float(depth)
        self.g = float(g)
        ax, ay = (float(anchor[0]), float(anchor[1]))
        self.anchor = (ax, ay)
        self.is_lonlat = bool(self.crs.is_geographic)

        if self.is_lonlat:
            problem = lonlat_problem(ax, ay)
            if problem:
                raise InputError(problem)
            if abs(ay) > 84.0:
                # A transverse Mercator centred on the site stays accurate near the
                # poles too, but the 'lon, lat' convention breaks down there.
                raise InputError(f"latitude {ay:g} is too close to a pole; use a "
                                 "projected polar CRS (e.g. EPSG:3413 or EPSG:3031)")
            self.work_crs = pyproj.CRS.from_proj4(
                f"+proj=tmerc +lat_0={ay!r} +lon_0={ax!r} +k=1 +x_0=0 +y_0=0 "
                "+datum=WGS84 +units=m +no_defs +type=crs")
        else:
            self.work_crs = _metre_version(self.crs)

        self._to_work = pyproj.Transformer.from_crs(self.crs, self.work_crs,
                                                    always_xy=True)
        self._from_work = pyproj.Transformer.from_crs(self.work_crs, self.crs,
                                                      always_xy=True)
        self._work_to_ll = pyproj.Transformer.from_crs(self.work_crs, _LONLAT,
                                                       always_xy=True)
        self._work_to_geodetic = pyproj.Transformer.from_crs(
            self.work_crs, self.work_crs.geodetic_crs, always_xy=True)

        wx, wy = self.to_work(ax, ay)
        if not (np.isfinite(wx) and np.isfinite(wy)):
            raise InputError(f"the site ({ax:g}, {ay:g}) is outside the domain of CRS "
                             f"{crs!r}")
        self.anchor_work = (float(wx), float(wy))
        lon, lat = self._work_to_ll.transform(wx, wy)
        if not (np.isfinite(lon) and np.isfinite(lat)):
            raise InputError(f"the site ({ax:g}, {ay:g}) is outside the domain of CRS "
                             f"{crs!r}")
        self.anchor_lonlat = (float(lon), float(lat))
        self.convergence_deg = self._convergence(wx, wy)
        if self.is_lonlat:
            self.ground_crs = self.work_crs
            self.scale_factor = 1.0
            self._to_ground = None
        else:
            glon, glat = self._work_to_geodetic.transform(wx, wy)
            from pyproj.crs import ProjectedCRS
            from pyproj.crs.coordinate_operation import TransverseMercatorConversion

            self.ground_crs = ProjectedCRS(
                conversion=TransverseMercatorConversion(
                    latitude_natural_origin=float(glat),
                    longitude_natural_origin=float(glon), scale_factor_natural_origin=1.0),
                geodetic_crs=self.work_crs.geodetic_crs, name="harbor local frame")
            self._to_ground = pyproj.Transformer.from_crs(self.work_crs, self.ground_crs,
                                                          always_xy=True)
            self.scale_factor = self._jacobian_scale
        if not self.angular_distortion_deg <= MAX_ANGULAR_DISTORTION_DEG:
            raise InputError(
                f"CRS {crs!r} distorts angles by {self.angular_distortion_deg:.2g} "
                f"degrees at the site (more than {MAX_ANGULAR_DISTORTION_DEG:g}), so wave "
                "directions would be wrong; use a conformal CRS such as the local UTM "
                "zone")

    def _convergence(self, wx: float, wy: float) -> float:
        glon, glat = self._work_to_geodetic.transform(wx, wy)
        f = pyproj.Proj(self.work_crs).get_factors(glon, glat)
        gamma = -math.degrees(math.atan2(f.dx_dphi, f.dy_dphi))
        self.angular_distortion_deg = self._angular_distortion(glon, glat)
        if not math.isfinite(gamma):
            raise InputError("the meridian convergence is undefined at the site "
                             f"({self.anchor[0]:g}, {self.anchor[1]:g}) in CRS "
                             f"{self.crs_code!r}")
        return gamma

    def _angular_distortion(self, lon: float, lat: float) -> float:
        # PROJ's own factors treat some projections (Web Mercator) on the sphere and
        # report no distortion; a finite-difference Jacobian through the full
        # transformation on the ellipsoid does not miss it.
        ell = self.work_crs.ellipsoid
        a, inv_f = ell.semi_major_metre, ell.inverse_flattening
        e2 = 0.0 if not inv_f else (2.0 - 1.0 / inv_f) / inv_f
        phi = math.radians(lat)
        w = 1.0 - e2 * math.sin(phi) ** 2
        n_rad = a / math.sqrt(w)                 # prime vertical radius of curvature
        m_rad = a * (1.0 - e2) / w ** 1.5        # meridional radius of curvature
        d = 1e-6                                 # degrees: ~0.1 m on the ground
        fwd = pyproj.Transformer.from_crs(self.work_crs.geodetic_crs, self.work_crs,
                                          always_xy=True)
        x, y = fwd.transform(np.array([lon, lon + d, lon]), np.array([lat, lat, lat + d]))
        de = n_rad * math.cos(phi) * math.radians(d)
        dn = m_rad * math.radians(d)
        jac = np.array([[(x[1] - x[0]) / de, (x[2] - x[0]) / dn],
                        [(y[1] - y[0]) / de, (y[2] - y[0]) / dn]])
        s1, s2 = np.linalg.svd(jac, compute_uv=False)
        self._jacobian_scale = float(math.sqrt(s1 * s2))
        if not (np.isfinite(s1) and np.isfinite(s2)) or s1 + s2 == 0:
            return float("nan")
        return float(math.degrees(2.0 * math.asin((s1 - s2) / (s1 + s2))))

    def __repr__(self) -> str:
        return (f"Site(crs={self.crs_code!r}, anchor={self.anchor}, depth={self.depth}, "
                f"g={self.g}, convergence_deg={self.convergence_deg:.4f})")

    # -- coordinates -------------------------------------------------------------------

    def to_work(self, x, y):
        """Scenario-CRS coordinates -> work frame.

        Parameters
        ----------
        x, y : float or array_like
            Easting/northing (scenario units) or longitude/latitude (degrees).

        Returns
        -------
        xw, yw : float or numpy.ndarray
            Work-frame coordinates, m (same shape as the input).
        """
        return self._to_work.transform(np.asarray(x, float), np.asarray(y, float))

    def from_work(self, xw, yw):
        """Work frame (m) -> scenario-CRS coordinates (the inverse of :meth:`to_work`).

        Parameters
        ----------
        xw, yw : float or array_like
            Work-frame coordinates, m.

        Returns
        -------
        x, y : float or numpy.ndarray
            Scenario-CRS coordinates (easting or longitude first).
        """
        return self._from_work.transform(np.asarray(xw, float), np.asarray(yw, float))

    def work_to_lonlat(self, xw, yw):
        """Work frame (m) -> WGS 84 longitude, latitude (degrees), e.g. for GeoJSON.

        Parameters
        ----------
        xw, yw : float or array_like
            Work-frame coordinates, m.

        Returns
        -------
        lon, lat : float or numpy.ndarray
            Degrees.
        """
        return self._work_to_ll.transform(np.asarray(xw, float), np.asarray(yw, float))

    def to_ground(self, xw, yw):
        """Work frame -> the local ground frame :attr:`ground_crs` (m, true to scale).

        Parameters
        ----------
        xw, yw : float or array_like
            Work-frame coordinates, m.

        Returns
        -------
        xg, yg : numpy.ndarray
            Ground-frame coordinates, m (the identity for EPSG:4326 scenarios).

        Notes
        -----
        PROJ's transformation from the work frame to :attr:`ground_crs`, linearised at
        the anchor (its Jacobian by central differences): straight arms drawn in the
        scenario CRS stay straight and collinear heads collinear, so every geometric
        decision (classic entrance, basin side) is that of the layout as drawn, while
        lengths and angles are ground lengths and angles at the site. The neglected
        second-order term is the change of the CRS's scale across the site: relative
        2.3e-4 per km for Web Mercator at 56 N (tan(lat)/R), about 1e-4 per km for a
        UTM zone 25 deg from its central meridian, far less within a zone.
        """
        xw, yw = np.asarray(xw, float), np.asarray(yw, float)
        if self._to_ground is None:
            return xw.copy(), yw.copy()
        if getattr(self, "_ground_jac", None) is None:
            # PROJ's transformation linearised at the anchor (central differences, 10 m)
            ax, ay = self.anchor_work
            h = 10.0
            x, y = self._to_ground.transform(np.array([ax, ax + h, ax - h, ax, ax]),
                                             np.array([ay, ay, ay, ay + h, ay - h]))
            self._ground_jac = np.array([[(x[1] - x[2]) / (2 * h), (x[3] - x[4]) / (2 * h)],
                                         [(y[1] - y[2]) / (2 * h), (y[3] - y[4]) / (2 * h)]])
            self._ground_origin = (float(x[0]), float(y[0]))
        j = self._ground_jac
        dx, dy = xw - self.anchor_work[0], yw - self.anchor_work[1]
        return (self._ground_origin[0] + j[0, 0] * dx + j[0, 1] * dy,
                self._ground_origin[1] + j[1, 0] * dx + j[1, 1] * dy)

    def from_ground(self, xg, yg):
        """Ground frame (m) -> work frame (m): the exact inverse of :meth:`to_ground`.

        Parameters
        ----------
        xg, yg : float or array_like
            Ground-frame coordinates, m.

        Returns
        -------
        xw, yw : numpy.ndarray
            Work-frame coordinates, m.
        """
        xg, yg = np.asarray(xg, float), np.asarray(yg, float)
        if self._to_ground is None:
            return xg.copy(), yg.copy()
        self.to_ground(*self.anchor_work)  # sets the linearisation
        inv = np.linalg.inv(self._ground_jac)
        dx, dy = xg - self._ground_origin[0], yg - self._ground_origin[1]
        return (self.anchor_work[0] + inv[0, 0] * dx + inv[0, 1] * dy,
                self.anchor_work[1] + inv[1, 0] * dx + inv[1, 1] * dy)

    def ground_site(self):
        """The site seen from its ground frame: a :class:`Site` in :attr:`ground_crs`.

        Returns
        -------
        Site
            Same depth and g; its work frame is the ground frame, so its
            :meth:`travel_angle` gives directions there (convergence 0 at the anchor).
        """
        if self.is_lonlat:
            return self
        if getattr(self, "_ground_site", None) is None:
            gx, gy = self.to_ground(*self.anchor_work)
            self._ground_site = Site(self.ground_crs.to_wkt(), (float(gx), float(gy)),
                                     self.depth, self.g)
        return self._ground_site

    def scale_note(self) -> str | None:
        """A sentence for the user when the CRS's scale at the site is far from 1.

        Returns
        -------
        str or None
            None when ``|scale_factor - 1| <= SCALE_NOTE_ABOVE``.
        """
        k = self.scale_factor
        if abs(k - 1.0) <= SCALE_NOTE_ABOVE:
            return None
        return (f"CRS {self.crs_code} has a scale factor of {k:.4f} at the site: its "
                f"coordinates are {100 * abs(k - 1):.1f} % {'longer' if k > 1 else 'shorter'}"
                " than ground distances there; the waves were computed with ground "
                "distances (grid spacing in ground metres, every point projected to a "
                "local frame true to scale), and the map's scale bar shows ground metres")

    # -- directions --------------------------------------------------------------------

    def grid_bearing(self, true_bearing_deg):
        """Convert a true bearing to a grid bearing of the work frame.

        Parameters
        ----------
        true_bearing_deg : float or array_like
            Bearing, degrees clockwise from true north.

        Returns
        -------
        float or numpy.ndarray
            Bearing, degrees clockwise from grid north (+y of the work frame), in
            [0, 360).

        Notes
        -----
        grid bearing = true bearing - γ, γ = :attr:`convergence_deg`.

        References
        ----------
        Snyder, J. P. (1987). Map Projections — A Working Manual. U.S. Geological
        Survey Professional Paper 1395.
        """
        b = np.mod(np.asarray(true_bearing_deg, float) - self.convergence_deg, 360.0)
        # np.mod can return 360.0 for tiny negative inputs
        b = np.where(b >= 360.0, 0.0, b)
        return float(b) if b.ndim == 0 else b

    def travel_angle(self, from_true_deg):
        """Direction of wave travel in the work frame, from a nautical 'from' direction.

        Parameters
        ----------
        from_true_deg : float or array_like
            Direction the waves come from, degrees clockwise from true north.

        Returns
        -------
        float or numpy.ndarray
            Direction the waves travel towards, radians counter-clockwise from +x of
            the work frame, in [0, 2π).

        Notes
        -----
        With b the grid bearing the waves come from, they travel towards b + 180°, and
        a bearing β (clockwise from +y) is the mathematical angle π/2 - β. Hence
        θ = π/2 - (b + 180°) in radians, taken modulo 2π.
        """
        b = np.radians(np.asarray(self.grid_bearing(from_true_deg), float) + 180.0)
        th = np.mod(0.5 * np.pi - b, 2.0 * np.pi)
        th = np.where(th >= 2.0 * np.pi, 0.0, th)
        return float(th) if th.ndim == 0 else th


def format_xy(x, y, lonlat=False) -> str:
    """A position in a scenario's CRS as messages show it.

    Parameters
    ----------
    x, y : float
        Easting and northing (m or CRS units), or longitude and latitude (degrees).
    lonlat : bool
        True for a geographic CRS (six significant digits, about 0.1 m).

    Returns
    -------
    str
        ``"(x, y)"``: two decimals for projected coordinates, a short scientific form
        for absurd ones (so a mistyped 1e308 does not print as 309 digits).
    """
    if lonlat:
        return f"({float(x):.6g}, {float(y):.6g})"
    return "(" + ", ".join(f"{v:.2f}" if abs(v) < 1e9 else f"{v:.3g}"
                           for v in (float(x), float(y))) + ")"
