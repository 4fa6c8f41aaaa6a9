"""Checks of harbor.geometry.bathymetry: interpolation of soundings and rasters."""

from __future__ import annotations

import numpy as np
import pytest

from harbor.errors import InputError
from harbor.geometry import bathymetry as bathy


def test_soundings_reproduce_a_plane_bed():
    # Piecewise-linear interpolation is exact for a plane (any triangulation; common
    # practice for checking interpolants), plus the still-water level.
    rng = np.random.default_rng(1)
    x, y = rng.uniform(0, 100, 50), rng.uniform(0, 100, 50)
    b = bathy.from_soundings(x, y, 2.0 + 0.05 * x - 0.02 * y, still_water_level=1.5)
    xq, yq = np.array([30.0, 60.0]), np.array([40.0, 55.0])
    inside = b.depth(xq, yq)
    assert inside == pytest.approx(3.5 + 0.05 * xq - 0.02 * yq, abs=1e-9)
    assert b.slope(50.0, 50.0, 1.0) == pytest.approx(np.hypot(0.05, 0.02), rel=1e-6)


def test_netcdf_and_geotiff_rasters_agree_with_their_values(tmp_path):
    import xarray as xr

    xs = np.linspace(0.0, 90.0, 10)
    ys = np.linspace(0.0, 45.0, 6)
    X, Y = np.meshgrid(xs, ys)
    d = 5.0 + 0.1 * X + 0.2 * Y  # bilinear interpolation is exact for this
    p = tmp_path / "d.nc"
    xr.Dataset({"depth": (("y", "x"), d)}, coords={"x": xs, "y": ys}).to_netcdf(p)
    b = bathy.from_netcdf(p)
    assert b.depth(42.0, 17.0) == pytest.approx(5.0 + 4.2 + 3.4, abs=1e-9)
    rasterio = pytest.importorskip("rasterio")
    from rasterio.transform import from_origin

    q = tmp_path / "d.tif"
    # north-up: row 0 is the northern edge; cell centres at xs, ys
    with rasterio.open(q, "w", driver="GTiff", height=ys.size, width=xs.size, count=1,
                       dtype="float64", transform=from_origin(-5.0, 49.5, 10.0, 9.0)) as f:
        f.write(d[::-1], 1)
    g = bathy.from_geotiff(q)
    assert g.depth(42.0, 17.0) == pytest.approx(5.0 + 4.2 + 3.4, abs=1e-9)


def test_bad_soundings_raise_input_error():
    with pytest.raises(InputError):
        bathy.from_soundings([0, 1], [0, 1], [1, 2])
    with pytest.raises(InputError):
        bathy.constant(-1.0)
