"""Site, CRS and true-north conversion, checked against pyproj's own geodesy.

The reference in every check below is pyproj (PROJ transformations and
``pyproj.Geod`` geodesic azimuths / distances on the WGS 84 ellipsoid, Karney 2013),
not the code under test.
"""

import math

import numpy as np
import pyproj
import pytest

from harbor.errors import InputError
from harbor.geometry.site import Site, lonlat_problem, parse_crs

GEOD = pyproj.Geod(ellps="WGS84")

# (crs, lon, lat) of sites. Only positions: no harbour data is placed at them.
SITES = [
    ("EPSG:32630", -8.0, 57.0),    # UTM 30N, 5 deg west of the central meridian (-3)
    ("EPSG:32631", 8.0, 57.0),     # UTM 31N, 5 deg east of the central meridian (3)
    ("EPSG:32733", 18.5, -34.5),   # UTM 33S, southern hemisphere, east of CM 15
    ("EPSG:27700", -6.5, 58.5),    # British National Grid (transverse Mercator, CM -2)
    ("EPSG:2154", -1.5, 46.0),     # Lambert-93 (Lambert conformal conic, lon_0 = 3)
    ("EPSG:3857", 20.0, 60.0),     # Web Mercator: meridians are vertical
    ("EPSG:2229", -118.9, 34.0),   # California zone 5, US survey feet
]


def _site_at(crs, lon, lat):
    fwd = pyproj.Transformer.from_crs("EPSG:4326", crs, always_xy=True)
    x, y = fwd.transform(lon, lat)
    return Site(crs, (x, y), depth=8.0), (x, y)


def _geodesy(crs):
    """(to geographic, from geographic, Geod) on the CRS's own datum and ellipsoid.

    True north is that of the CRS's own datum: going through WGS 84 would add the
    small rotation of the datum shift (about 0.001 deg for OSGB36), which is not part
    of the meridian convergence.
    """
    c = pyproj.CRS(crs)
    geog = c.geodetic_crs
    inv = pyproj.Transformer.from_crs(c, geog, always_xy=True).transform
    fwd = pyproj.Transformer.from_crs(geog, c, always_xy=True).transform
    e = c.ellipsoid
    return inv, fwd, pyproj.Geod(a=e.semi_major_metre, rf=e.inverse_flattening)


def _true_azimuth_of_grid_north(crs, x, y):
    """True azimuth (deg) of the +y direction of the CRS at (x, y), by pyproj.Geod."""
    inv, _, geod = _geodesy(crs)
    lon1, lat1 = inv(x, y)
    lon2, lat2 = inv(x, y + 50.0)
    az, _, _ = geod.inv(lon1, lat1, lon2, lat2)
    return az


@pytest.mark.parametrize("crs,lon,lat", SITES)
def test_convergence_matches_geodesic_azimuth_of_grid_north(crs, lon, lat):
    # Grid north has grid bearing 0, so its true bearing is the convergence itself
    # (grid = true - convergence). 50 units along +y: curvature error << 1e-4 deg.
    site, (x, y) = _site_at(crs, lon, lat)
    expected = _true_azimuth_of_grid_north(crs, x, y)
    assert site.convergence_deg == pytest.approx(expected, abs=2e-4)
    assert site.grid_bearing(expected) == pytest.approx(0.0, abs=2e-4) or \
        site.grid_bearing(expected) == pytest.approx(360.0, abs=2e-4)


def test_convergence_57n_five_degrees_off_central_meridian():
    # From memory (transverse Mercator, e.g. Snyder 1987 p. 60): gamma ~ dlon sin(phi);
    # 5 deg off the CM at 57 N gives about 4.2 deg; west of the CM in the northern
    # hemisphere grid north lies west of true north (negative convergence).
    west, _ = _site_at("EPSG:32630", -8.0, 57.0)
    east, _ = _site_at("EPSG:32631", 8.0, 57.0)
    approx = 5.0 * math.sin(math.radians(57.0))
    assert west.convergence_deg == pytest.approx(-approx, abs=0.05)
    assert east.convergence_deg == pytest.approx(approx, abs=0.05)


@pytest.mark.parametrize("crs,lon,lat", SITES + [("EPSG:4326", -12.0, 57.0)])
@pytest.mark.parametrize("from_true", [0.0, 45.0, 135.0, 222.5, 300.0, 360.0])
def test_travel_angle_follows_the_geodesic(crs, lon, lat, from_true):
    # Waves from true bearing B travel along true azimuth B + 180. Step 200 m along
    # that geodesic with pyproj.Geod, project both ends with pyproj and compare the
    # direction of the step (counter-clockwise from +x) with travel_angle.
    if crs == "EPSG:4326":
        site = Site(crs, (lon, lat), depth=8.0)
        x0, y0 = lon, lat
    else:
        site, (x0, y0) = _site_at(crs, lon, lat)
    inv, fwd, geod = _geodesy(crs)
    if crs == "EPSG:4326":
        fwd = site.to_work  # the work frame is the only plane frame of a lon/lat site
    lon0, lat0 = inv(x0, y0)
    lon1, lat1, _ = geod.fwd(lon0, lat0, from_true + 180.0, 200.0)
    x0, y0 = fwd(lon0, lat0)
    x1, y1 = fwd(lon1, lat1)
    expected = math.atan2(y1 - y0, x1 - x0) % (2 * math.pi)
    got = site.travel_angle(from_true)
    diff = (got - expected + math.pi) % (2 * math.pi) - math.pi
    # Conformal projections keep angles: 0.01 deg. Web Mercator is not conformal on
    # the ellipsoid; PROJ reports its angular distortion, which bounds the error.
    tol = 0.01 + site.angular_distortion_deg
    assert abs(diff) < math.radians(tol)
    assert 0.0 <= got < 2 * math.pi


def test_travel_angle_and_grid_bearing_are_vectorised():
    site, _ = _site_at("EPSG:32630", -8.0, 57.0)
    b = np.array([[0.0, 90.0], [180.0, 270.0]])
    th = site.travel_angle(b)
    gb = site.grid_bearing(b)
    assert th.shape == gb.shape == (2, 2)
    assert np.all((gb >= 0) & (gb < 360))
    # Opposite 'from' directions travel in opposite directions (common practice).
    assert np.cos(th[0, 0] - th[1, 0]) == pytest.approx(-1.0)


def test_feet_crs_is_converted_to_metres():
    # US survey foot = 1200/3937 m exactly (US National Bureau of Standards 1959).
    site, (x, y) = _site_at("EPSG:2229", -118.9, 34.0)
    xw, yw = site.to_work(np.array([x, x + 1000.0]), np.array([y, y]))
    assert xw[1] - xw[0] == pytest.approx(1000.0 * 1200.0 / 3937.0, rel=1e-9)
    assert {a.unit_name for a in site.work_crs.axis_info} == {"metre"}
    # Round trip back to feet.
    xb, yb = site.from_work(xw, yw)
    assert xb[1] == pytest.approx(x + 1000.0, abs=1e-6)


def test_lonlat_site_work_frame_distances_match_geodesic():
    site = Site("EPSG:4326", (-12.0, 57.0), depth=10.0)
    lons = np.array([-12.0, -11.99, -12.004, -11.995])
    lats = np.array([57.0, 57.002, 56.997, 57.006])
    xw, yw = site.to_work(lons, lats)
    for i in range(4):
        for j in range(i + 1, 4):
            _, _, d = GEOD.inv(lons[i], lats[i], lons[j], lats[j])
            assert math.hypot(xw[j] - xw[i], yw[j] - yw[i]) == pytest.approx(d, rel=1e-3)
    # The work frame of a lon/lat site is centred on it: no convergence there.
    assert site.convergence_deg == pytest.approx(0.0, abs=1e-6)
    assert site.anchor_work == pytest.approx((0.0, 0.0), abs=1e-6)


def test_work_to_lonlat_matches_pyproj():
    site, (x, y) = _site_at("EPSG:32630", -8.0, 57.0)
    lon, lat = site.work_to_lonlat(x, y)
    assert (lon, lat) == pytest.approx((-8.0, 57.0), abs=1e-9)
    assert site.anchor_lonlat == pytest.approx((-8.0, 57.0), abs=1e-9)


@pytest.mark.parametrize("code,words", [
    ("EPSG:999999", "unknown CRS"),
    ("not a crs", "unknown CRS"),
    ("EPSG:4258", "geographic CRS"),       # ETRS89 lon/lat: refused, not taken as WGS 84
    ("EPSG:4978", "neither projected"),    # geocentric
])
def test_bad_crs_codes(code, words):
    with pytest.raises(InputError, match=words):
        parse_crs(code)
    with pytest.raises(InputError, match=words):
        Site(code, (0.0, 0.0), depth=5.0)


def test_swapped_lonlat_is_pointed_out():
    with pytest.raises(InputError, match="swapped"):
        Site("EPSG:4326", (57.0, 147.0), depth=5.0)
    assert "longitude" in lonlat_problem(200.0, 10.0)
    assert lonlat_problem(-12.0, 57.0) is None


@pytest.mark.parametrize("depth", [0.0, -3.0, float("nan")])
def test_bad_depth(depth):
    with pytest.raises(InputError, match="depth"):
        Site("EPSG:32630", (400000.0, 6300000.0), depth=depth)


def test_non_conformal_crs_far_from_its_centre_is_refused():
    # LAEA Europe (EPSG:3035) is equal-area, not conformal: far from its centre
    # (52 N, 10 E) angles are distorted by degrees, so directions would be wrong.
    fwd = pyproj.Transformer.from_crs("EPSG:4326", "EPSG:3035", always_xy=True)
    with pytest.raises(InputError, match="distorts angles"):
        Site("EPSG:3035", fwd.transform(-20.0, 40.0), depth=8.0)
    near = Site("EPSG:3035", fwd.transform(10.0, 52.0), depth=8.0)
    assert near.angular_distortion_deg < 0.01


@pytest.mark.parametrize("crs", ["EPSG:3857", "EPSG:32625", "EPSG:32629", "EPSG:27700"])
def test_ground_frame_distances_match_geodesic(crs):
    # Distances between points of a site carried to the ground frame against
    # pyproj.Geod on the CRS's own ellipsoid (Karney 2013), whatever the CRS's own scale
    # (Web Mercator 1.79 at 56 N). The frame is PROJ's transformation linearised at the
    # site: the change of the CRS's scale across the site is left out, 2.3e-4 per km for
    # Web Mercator at 56 N (d ln k / dy = tan(lat) / R, Snyder 1987 eq. 7-4): 3e-4 here.
    site, (x, y) = _site_at(crs, -7.5, 56.0)
    inv, _, geod = _geodesy(crs)
    k = site.scale_factor
    xs = x + k * np.array([0.0, 800.0, -300.0, 1500.0])
    ys = y + k * np.array([0.0, 200.0, 900.0, -700.0])
    gx, gy = site.to_ground(xs, ys)
    lon, lat = inv(xs, ys)
    for i in range(4):
        for j in range(i + 1, 4):
            _, _, d = geod.inv(lon[i], lat[i], lon[j], lat[j])
            assert math.hypot(gx[j] - gx[i], gy[j] - gy[i]) == pytest.approx(d, rel=3e-4)
    # the ground frame is true to scale and true-north-up at the site
    assert site.ground_site().convergence_deg == pytest.approx(0.0, abs=1e-6)
