"""The full-field engine: Berkhoff's mild-slope equation by finite elements.

- :mod:`.mesh`     quality triangle meshes of the water (Triangle), holes and slits
- :mod:`.engine`   assembly, absorbing layer, partially reflecting walls, factorisation
- :mod:`.harbour`  a harbour layout + bathymetry -> domain, background wave, answers

The Python API for callers is :class:`HarbourModel` and :func:`full_field`
(docs/full-field.md).
"""

from harbor.solver.fullfield.engine import robin_alpha, robin_reflection
from harbor.solver.fullfield.harbour import (FieldEstimate, FieldNotice, FieldResult,
                                             HarbourModel,
                                             RandomFieldResult, full_field)

__all__ = ["HarbourModel", "full_field", "FieldEstimate", "FieldNotice", "FieldResult",
           "RandomFieldResult", "robin_alpha", "robin_reflection"]
