"""How fine a map grid must be for the wavelength: the rule, in one place.

The screening methods give K' exactly at every grid point, but a map drawn from grid
values resolves the pattern of crests, standing waves and isolines only with several
points per wavelength; with fewer than two it cannot even show that there are crests.
"""

from __future__ import annotations

import numpy as np

from harbor.cautions import Notice
from harbor.waves.dispersion import G_STANDARD, wavelength

#: Below this many grid points per wavelength a map is flagged: isolines, maxima and the
#: standing waves in front of the arms are misplaced or missing (about ten points per
#: wavelength is the usual choice: common practice).
WARN_POINTS_PER_WAVELENGTH = 8.0
#: Below this many grid points per wavelength the grid is refused: under two samples per
#: wavelength (the sampling theorem's limit) the map shows a pattern that is not there.
MIN_POINTS_PER_WAVELENGTH = 2.0


def points_per_wavelength(spacing: float, wavelength_m: float) -> float:
    """Grid points per wavelength, L / spacing.

    Parameters
    ----------
    spacing : float
        Grid spacing (m).
    wavelength_m : float
        Wavelength L (m).

    Returns
    -------
    float
    """
    return float(wavelength_m) / float(spacing)


def coarse_grid_problem(spacing: float, periods, depth: float, g: float = G_STANDARD,
                        given: bool = True) -> str | None:
    """Why a grid is too coarse for the shortest wave, or None when it is fine enough.

    Parameters
    ----------
    spacing : float
        Grid spacing (m).
    periods : sequence of float
        Periods (s) of the sea states (T, or T1/3 for random seas).
    depth : float
        Water depth (m).
    g : float
        Gravity (m/s^2).
    given : bool
        Whether the spacing was written by the user (else it was derived: the message
        then says how to make it finer).

    Returns
    -------
    str or None
        A problem for an :class:`harbor.errors.InputError` when the shortest wavelength
        holds fewer than :data:`MIN_POINTS_PER_WAVELENGTH` grid points.

    Notes
    -----
    L from the linear dispersion relation :math:`\\omega^2 = g k \\tanh(kh)`; the
    number of points per wavelength is :math:`L / \\Delta`.
    """
    L = float(np.min(wavelength(np.asarray(periods, float), depth, g)))
    n = points_per_wavelength(spacing, L)
    if n >= MIN_POINTS_PER_WAVELENGTH:
        return None
    how = ("a spacing of at most " f"{L / WARN_POINTS_PER_WAVELENGTH:.3g} m" if given else
           "a [grid] table with narrower bounds (the default spacing was coarsened to "
           "keep the grid within its size limit)")
    return (f"spacing {spacing:g} m gives {n:.2g} grid points per wavelength (L = "
            f"{L:.3g} m for the shortest sea state), fewer than "
            f"{MIN_POINTS_PER_WAVELENGTH:g}: the map could not show the waves; use {how}")


def grid_notices(grid, wavelength_m: float, sea: str | None = None) -> list:
    """The coarse-grid warning of one sea state, if any.

    Parameters
    ----------
    grid : harbor.study.scenario.GridSpec or None
        The map grid (its ``spacing``, m).
    wavelength_m : float
        The sea state's wavelength (m).
    sea : str, optional
        Its name.

    Returns
    -------
    list of harbor.cautions.Notice
        One ``"coarse-grid"`` warning when the grid holds fewer than
        :data:`WARN_POINTS_PER_WAVELENGTH` points per wavelength, else empty.
    """
    if grid is None:
        return []
    n = points_per_wavelength(grid.spacing, wavelength_m)
    if n >= WARN_POINTS_PER_WAVELENGTH:
        return []
    label = f"sea '{sea}': " if sea else ""
    return [Notice("coarse-grid",
                   f"{label}grid spacing {grid.spacing:g} m gives only {n:.1f} points per "
                   f"wavelength (L = {wavelength_m:.3g} m; at least "
                   f"{WARN_POINTS_PER_WAVELENGTH:g} recommended): point values are exact "
                   "but the map's isolines and maxima are misplaced",
                   sea=sea)]
