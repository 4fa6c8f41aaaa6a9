"""One invented harbour written in five CRSs: the same K' at the same ground points.

The harbour (two collinear arms, a 90 m entrance, three berths) is defined in ground
metres east/north of a site and written into each CRS with pyproj; pyproj.Geod (Karney
2013) gives the ground entrance width, and Penney & Price's gap solution
(:func:`harbor.gap`, checked elsewhere against the exact aperture solution) evaluated in
ground metres gives K'. The places are open water where no harbour stands: the sea west
of the Hebrides (56 N, 7.5 W) and the open Pacific on the antimeridian at 35 S.
"""

import numpy as np
import pyproj
import pytest

import harbor
from harbor.geometry.entrance import nearest_heads
from harbor.solver.assemble import ground_scenario
from harbor.study.scenario import scenario_from_dict

GEOD = pyproj.Geod(ellps="WGS84")
B = 90.0                                   # entrance width, ground metres
ARMS = {"west arm": [(-600.0, 0.0), (-B / 2, 0.0)], "east arm": [(600.0, 0.0), (B / 2, 0.0)]}
BERTHS = {"quay": (0.0, 150.0), "slip": (60.0, 250.0), "pontoon": (-80.0, 120.0)}
FROM = 200.0                               # deg true: travels towards 20 deg, 70 deg from east
PERIOD, DEPTH = 8.0, 10.0

CASES = [
    ("EPSG:32629", (-7.5, 56.0)),   # its own UTM zone (29N, CM 9 W)
    ("EPSG:32625", (-7.5, 56.0)),   # UTM 25N, 25.5 deg from its central meridian
    ("EPSG:3857", (-7.5, 56.0)),    # Web Mercator: scale 1.79 at 56 N
    ("EPSG:27700", (-7.5, 56.0)),   # British National Grid (OSGB36 datum)
    ("EPSG:4326", (180.0, -35.0)),  # lon/lat, the entrance on the antimeridian
]


def _to_crs(crs, site):
    """Ground metres east/north of the site -> CRS coordinates (via WGS 84 lon/lat)."""
    local = pyproj.CRS.from_proj4(f"+proj=tmerc +lat_0={site[1]} +lon_0={site[0]} +k=1 "
                                  "+x_0=0 +y_0=0 +datum=WGS84 +units=m +type=crs")
    to_ll = pyproj.Transformer.from_crs(local, "EPSG:4326", always_xy=True)
    to_c = pyproj.Transformer.from_crs("EPSG:4326", crs, always_xy=True)

    def f(pts):
        lon, lat = to_ll.transform(*np.array(pts, float).T)
        x, y = to_c.transform(lon, lat)
        return [[float(a), float(b)] for a, b in zip(np.atleast_1d(x), np.atleast_1d(y))], \
            (np.atleast_1d(lon), np.atleast_1d(lat))
    return f


def _scenario(crs, site):
    f = _to_crs(crs, site)
    data = {"title": "Port Ardnish (invented)", "site": {"crs": crs, "depth": DEPTH},
            "arm": [{"name": n, "line": f(v)[0], "rooted": "start"} for n, v in ARMS.items()],
            "sea": [{"name": "swell", "kind": "regular", "height": 1.0, "period": PERIOD,
                     "from": FROM}],
            "point": [{"name": n, "at": f([p])[0][0]} for n, p in BERTHS.items()]}
    heads = f([ARMS["west arm"][1], ARMS["east arm"][1]])[1]
    return scenario_from_dict(data), heads


@pytest.fixture(scope="module")
def solved():
    out = {}
    for crs, site in CASES:
        sc, heads = _scenario(crs, site)
        out[crs] = (sc, heads, harbor.solve(sc, grid=False))
    return out


def test_same_k_at_the_same_ground_points_in_every_crs(solved):
    L = float(harbor.wavelength(PERIOD, DEPTH))
    xy = np.array(list(BERTHS.values()))
    ref = np.abs(harbor.gap(xy[:, 0], xy[:, 1], L, 90.0 - (FROM - 180.0), B))
    for crs, (sc, _, ds) in solved.items():
        kd = ds.point_kd.sel(sea="swell").values
        assert np.max(np.abs(kd - ref)) < 0.005, crs


def test_same_entrance_width_in_every_crs(solved):
    for crs, (sc, heads, ds) in solved.items():
        (lon, lat) = heads
        _, _, d = GEOD.inv(lon[0], lat[0], lon[1], lat[1])
        assert d == pytest.approx(B, abs=0.01)
        ent = nearest_heads(ground_scenario(sc).layout)
        assert ent.width == pytest.approx(d, abs=0.05), crs


def test_scale_factor_reported_and_noted(solved):
    # Web Mercator's scale is 1/cos(lat) on the sphere (Snyder 1987, eq. 7-4); UTM's
    # about 0.9996 (1 + (dlon cos lat)^2 / 2) (Snyder 1987, eq. 8-11, first terms).
    k_wm = solved["EPSG:3857"][2].attrs["scale_factor"]
    assert k_wm == pytest.approx(1.0 / np.cos(np.radians(56.0)), rel=0.01)
    k_far = solved["EPSG:32625"][2].attrs["scale_factor"]
    q = np.radians(25.5) * np.cos(np.radians(56.0))
    assert k_far == pytest.approx(0.9996 * (1 + q**2 / 2), rel=2e-3)
    for crs, noted in [("EPSG:3857", True), ("EPSG:32625", True), ("EPSG:32629", False),
                       ("EPSG:27700", False), ("EPSG:4326", False)]:
        w = solved[crs][2].attrs["warnings"]
        assert ("scale factor" in w) == noted, crs


def test_lonlat_anchor_across_the_antimeridian(solved):
    sc = solved["EPSG:4326"][0]
    lon, lat = sc.site.anchor_lonlat
    assert abs(abs(lon) - 180.0) < 0.01 and lat == pytest.approx(-35.0, abs=0.01)


def test_sweep_and_check_widths_are_ground_metres_in_every_crs(solved, capsys):
    # moving a head by 20 ground metres widens a collinear entrance by 20 m in any CRS;
    # the reference is pyproj's Geod between the heads (as in the width test above)
    from harbor.cli import main
    from harbor.study.sweep import move_head

    for crs, (sc, heads, _) in solved.items():
        (lon, lat) = heads
        _, _, d = GEOD.inv(lon[0], lat[0], lon[1], lat[1])
        _, width = move_head(sc, "east arm", -20.0)
        assert width == pytest.approx(d + 20.0, abs=0.1), crs
