"""Outputs of a solved result: sheltering maps (PNG), PDF sheets and the combined
report, GeoJSON isolines, a NetCDF-CF grid, a CSV of points, the terminal table, and
non-dimensional diagrams; the charts and tables of sweeps and climate studies.

Outputs read only the result of :func:`harbor.solve` (or a study's result) and never
recompute physics. Every file is written atomically, and :func:`write_all` writes a
whole run or nothing. Names load on first use, so the exporters do not pull in a
plotting library.
"""

import importlib

_LAZY = {
    "plot_diagram": "harbor.outputs.diagram",
    "point_table": "harbor.outputs.export",
    "point_records": "harbor.outputs.export",
    "write_all": "harbor.outputs.export",
    "write_geojson_isolines": "harbor.outputs.export",
    "write_netcdf": "harbor.outputs.export",
    "write_points_csv": "harbor.outputs.export",
    "sheltering_map": "harbor.outputs.maps",
    "pdf_sheet": "harbor.outputs.sheet",
    "pdf_report": "harbor.outputs.report",
}

__all__ = sorted(_LAZY)


def __getattr__(name):
    module = _LAZY.get(name)
    if module is None:
        raise AttributeError(f"module 'harbor.outputs' has no attribute {name!r}")
    return getattr(importlib.import_module(module), name)


def __dir__():
    return sorted(set(globals()) | set(_LAZY))
