"""Outputs of a solved result: sheltering maps (PNG), PDF sheets, GeoJSON isolines,
a NetCDF-CF grid, a CSV of points, the terminal table, and non-dimensional diagrams.

Outputs read the result of :func:`harbor.solve` and never recompute physics. Every file
is written atomically, and :func:`write_all` writes a whole run or nothing.
"""

from harbor.outputs.diagram import plot_diagram
from harbor.outputs.export import (point_table, write_all, write_geojson_isolines,
                                   write_netcdf, write_points_csv)
from harbor.outputs.maps import sheltering_map
from harbor.outputs.sheet import pdf_sheet

__all__ = ["pdf_sheet", "plot_diagram", "point_table", "sheltering_map", "write_all",
           "write_geojson_isolines", "write_netcdf", "write_points_csv"]
