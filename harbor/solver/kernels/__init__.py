"""Exact and classical solutions in their local frames (pure array functions)."""

from harbor.solver.kernels.gap import AUTO_EXACT_BELOW, auto_method, gap, gap_exact, gap_superposition
from harbor.solver.kernels.sommerfeld import semi_infinite, sommerfeld_terms

__all__ = ["AUTO_EXACT_BELOW", "auto_method", "gap", "gap_exact", "gap_superposition",
           "semi_infinite", "sommerfeld_terms"]
