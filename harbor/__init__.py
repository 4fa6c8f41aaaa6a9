"""harbor: wave diffraction screening for harbour layouts.

Preliminary results only; final design belongs to licensed coastal engineers under
local codes.

The public functions are loaded on first use (module ``__getattr__``, PEP 562), so that
``import harbor`` and ``harbor --version`` do not pay for numpy, scipy, numba, xarray
and pandas.
"""

from __future__ import annotations

import importlib

__version__ = "0.1.0"

#: public name -> module that defines it
_LAZY = {
    "gap": "harbor.solver.kernels",
    "semi_infinite": "harbor.solver.kernels",
    "wavelength": "harbor.waves",
    "wavenumber": "harbor.waves",
    "load_scenario": "harbor.study.scenario",
    "check": "harbor.solver.assemble",
    "solve": "harbor.solver.assemble",
    "notices": "harbor.solver.assemble",
    "points_table": "harbor.solver.assemble",
}

__all__ = ["__version__", *sorted(_LAZY)]


_SUBPACKAGES = ("cautions", "errors", "geometry", "outputs", "solver", "study", "waves")


def __getattr__(name):
    if name in _SUBPACKAGES:  # `import harbor; harbor.outputs.write_all(...)`
        return importlib.import_module(f"harbor.{name}")
    module = _LAZY.get(name)
    if module is None:
        raise AttributeError(f"module 'harbor' has no attribute {name!r}")
    value = getattr(importlib.import_module(module), name)
    globals()[name] = value  # later look-ups skip this function
    return value


def __dir__():
    return sorted(set(globals()) | set(_LAZY))
