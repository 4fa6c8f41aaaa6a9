"""harbor: wave diffraction screening for harbour layouts.

Preliminary results only; final design belongs to licensed coastal engineers under
local codes.
"""

__version__ = "0.1.0"

from harbor.solver.kernels import gap, semi_infinite  # noqa: E402
from harbor.waves import wavelength, wavenumber  # noqa: E402
from harbor.study.scenario import load_scenario  # noqa: E402
from harbor.solver.assemble import check, solve  # noqa: E402

__all__ = ["__version__", "check", "gap", "load_scenario", "semi_infinite", "solve",
           "wavelength", "wavenumber"]
