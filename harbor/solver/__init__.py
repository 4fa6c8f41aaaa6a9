"""Field assembly over a layout and random-wave integration."""

from harbor.solver.assemble import check, solve

__all__ = ["check", "solve"]
