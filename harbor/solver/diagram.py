"""Non-dimensional diffraction diagrams (x/L, y/L) for the design-manual cases.

The field of a semi-infinite breakwater or a gap in its local frame, for a regular or a
directional random sea, on a grid in wavelengths. Plotting lives in
:mod:`harbor.outputs.diagram`.
"""

from __future__ import annotations

import numpy as np
import xarray as xr

from harbor import __version__
from harbor.cautions import caution_text
from harbor.geometry.layout import Arm, Layout
from harbor.solver.kernels.gap import auto_method, gap
from harbor.solver.kernels.sommerfeld import check_direction, semi_infinite
from harbor.solver.random import random_sea_field
from harbor.waves.spectra import random_components

_FAR = 1e6  # arms this long (in wavelengths) act as semi-infinite

#: Widest gap of a diagram (B/L): design manuals stop near B/L = 5; beyond a few tens of
#: wavelengths each head acts alone (use the semi-infinite diagram for each).
MAX_DIAGRAM_WIDTH = 50.0
#: Largest side of a diagram's extent (wavelengths).
MAX_DIAGRAM_EXTENT = 200.0
#: Coarsest diagram step (wavelengths): four points per wavelength still show the crests.
MAX_DIAGRAM_RESOLUTION = 0.25
#: Largest diagram (grid points) for a regular sea and for a random sea, whose points each
#: cost a few hundred regular solutions: about a minute on one core either way.
MAX_DIAGRAM_POINTS = 4_000_000
MAX_DIAGRAM_POINTS_RANDOM = 250_000


def _diagram_error(problem, key):
    from harbor.errors import InputError

    return InputError(problem, key=key)


def diagram_grid(case="semi-infinite", width=None, extent=None, resolution=None,
                 kind="regular"):
    """The plotted area and step of a diagram (defaults filled in), validated.

    Parameters
    ----------
    case : {"semi-infinite", "gap"}
        Breakwater case.
    width : float, optional
        Gap width B/L (gap only): finite, positive, at most :data:`MAX_DIAGRAM_WIDTH`.
    extent : tuple of float, optional
        (xmin, ymin, xmax, ymax) in wavelengths; default (-4, -2, 4, 8) for the
        semi-infinite case and, for a gap, x from -(B/2 + 3) to B/2 + 3 (at least
        ±4) so that both heads and three wavelengths beyond each are shown.
    resolution : float, optional
        Step in wavelengths, positive and at most :data:`MAX_DIAGRAM_RESOLUTION`;
        default a 200th of the width, between 0.02 and 0.1 (0.05 at least for random
        seas, whose points are costly).
    kind : {"regular", "random"}
        The sea.

    Returns
    -------
    extent : tuple of float
    resolution : float

    Raises
    ------
    harbor.errors.InputError
        With ``key`` the argument's name: a missing, non-finite, non-positive or too
        wide ``width``; a non-finite or empty ``extent``, or one with a side over
        :data:`MAX_DIAGRAM_EXTENT`; a non-finite, non-positive or
        too coarse ``resolution``; a grid of more than :data:`MAX_DIAGRAM_POINTS`
        points (:data:`MAX_DIAGRAM_POINTS_RANDOM` for random seas).
    """
    import math

    if case == "gap":
        if width is None:
            raise _diagram_error("a gap diagram needs a width (gap width in wavelengths, "
                                 "B/L)", "width")
        if not math.isfinite(width) or not width > 0:
            raise _diagram_error(f"must be positive and finite, got {width:g}", "width")
        if width > MAX_DIAGRAM_WIDTH:
            raise _diagram_error(f"B/L = {width:g} is wider than {MAX_DIAGRAM_WIDTH:g}: each "
                                 "head of so wide a gap acts alone; use the semi-infinite "
                                 "diagram", "width")
    if extent is None:
        half = 4.0 if case != "gap" else max(4.0, width / 2 + 3)
        extent = (-half, -2.0, half, 8.0)
    extent = tuple(float(e) for e in extent)
    if len(extent) != 4 or not all(math.isfinite(e) for e in extent):
        raise _diagram_error("must be four finite numbers XMIN YMIN XMAX YMAX", "extent")
    if not (extent[0] < extent[2] and extent[1] < extent[3]):
        raise _diagram_error("must be XMIN YMIN XMAX YMAX with XMIN < XMAX and YMIN < YMAX",
                             "extent")
    side = max(extent[2] - extent[0], extent[3] - extent[1])
    if side > MAX_DIAGRAM_EXTENT:
        raise _diagram_error(f"spans {side:.4g} wavelengths, more than "
                             f"{MAX_DIAGRAM_EXTENT:g}: a diagram shows the near field of the "
                             "breakwater", "extent")
    if resolution is None:
        resolution = min(max((extent[2] - extent[0]) / 200.0, 0.02), 0.1)
        if kind == "random":
            resolution = max(resolution, 0.05)
    resolution = float(resolution)
    if not math.isfinite(resolution) or not resolution > 0:
        raise _diagram_error(f"must be positive and finite, got {resolution:g}", "resolution")
    if resolution > MAX_DIAGRAM_RESOLUTION:
        raise _diagram_error(f"{resolution:g} wavelengths is coarser than "
                             f"{MAX_DIAGRAM_RESOLUTION:g}: the diagram could not show the "
                             "crests", "resolution")
    # in floating point: an extent of 1e308 wavelengths must not overflow an integer
    nx = (extent[2] - extent[0]) / resolution + 1.0
    ny = (extent[3] - extent[1]) / resolution + 1.0
    most = MAX_DIAGRAM_POINTS_RANDOM if kind == "random" else MAX_DIAGRAM_POINTS
    if not nx * ny <= most:
        fit = math.sqrt((extent[2] - extent[0]) * (extent[3] - extent[1]) / most)
        how = (f"use a step of {fit:.2g} or more, or a smaller extent"
               if fit <= MAX_DIAGRAM_RESOLUTION else "use a smaller extent")
        raise _diagram_error(f"{resolution:g} wavelengths over the extent gives {nx:.3g} x "
                             f"{ny:.3g} points, more than {most:,}; {how}", "resolution")
    return extent, resolution


def diagram_field(case="semi-infinite", direction=90.0, width=None, extent=None,
                  resolution=None, kind="regular", spreading=10.0, method="auto"):
    """K' (and the phase, for regular seas) on a grid in wavelengths.

    Parameters
    ----------
    case : {"semi-infinite", "gap"}
        Breakwater tip at the origin with the barrier on {y = 0, x >= 0}, or a gap of
        width ``width`` wavelengths centred at the origin.
    direction : float
        Direction of wave travel (degrees CCW from +x, strictly in (0, 180)); for random
        seas the principal direction.
    width : float, optional
        Gap width B/L (gap only).
    extent : tuple of float, optional
        (xmin, ymin, xmax, ymax) in wavelengths; default from :func:`diagram_grid`
        (the whole gap and three wavelengths beyond each head).
    resolution : float, optional
        Grid spacing in wavelengths; default from :func:`diagram_grid`.
    kind : {"regular", "random"}
        A regular sea, or a directional random sea (Bretschneider-Mitsuyasu spectrum in
        deep water, Mitsuyasu spreading ``spreading`` = s_max) whose lengths are scaled by
        the deep-water wavelength of T1/3.
    spreading : float
        s_max for random seas.
    method : str
        Gap method (see :func:`harbor.gap`).

    Raises
    ------
    ValueError
        An unknown case or kind, a direction outside (0, 180);
        :class:`harbor.errors.InputError` (a ValueError) for a bad width, extent,
        resolution or spreading (see :func:`diagram_grid`).

    Returns
    -------
    xarray.Dataset
        coords ``x_over_l``, ``y_over_l``; vars ``kd`` (y, x) and ``phase`` (y, x, rad;
        NaN for random seas) and, for random seas, ``period_ratio``; attrs ``case``,
        ``direction_deg``, ``width_over_l``, ``sea_kind``, ``spreading``, ``method``,
        ``cautions``.
    """
    if case not in ("semi-infinite", "gap"):
        raise ValueError(f"case must be 'semi-infinite' or 'gap', got {case!r}")
    alpha = check_direction(direction)
    if kind not in ("regular", "random"):
        raise ValueError(f"kind must be 'regular' or 'random', got {kind!r}")
    if kind == "random" and not (np.isfinite(spreading) and spreading > 0):
        raise _diagram_error(f"must be positive and finite, got {spreading:g}", "spreading")
    extent, resolution = diagram_grid(case, width, extent, resolution, kind)
    x = np.arange(extent[0], extent[2] + resolution / 2, resolution)
    y = np.arange(extent[1], extent[3] + resolution / 2, resolution)
    X, Y = np.meshgrid(x, y)
    ratio = None
    if kind == "regular":
        if case == "semi-infinite":
            u = semi_infinite(X, Y, 1.0, direction)
            used = "Sommerfeld exact solution (Penney & Price 1952)"
        else:
            m = auto_method(1.0, direction, width) if method == "auto" else method
            u = gap(X, Y, 1.0, direction, width, method=m)
            used = ("exact aperture solution" if m == "exact"
                    else "Penney & Price superposition")
        kd = np.abs(u)
        phase = np.angle(u)
    elif kind == "random":
        # deep water: L(T1/3) = g T^2 / 2 pi = 1 when T1/3 = sqrt(2 pi / g)
        g = 9.81
        t13 = np.sqrt(2 * np.pi / g)
        comps = random_components(1.0, t13, s_max=spreading)
        if case == "semi-infinite":
            arms = (Arm("breakwater", np.array([[_FAR, 0.0], [0.0, 0.0]]), rooted_start=True),)
        else:
            arms = (Arm("left", np.array([[-_FAR, 0.0], [-width / 2, 0.0]]), rooted_start=True),
                    Arm("right", np.array([[_FAR, 0.0], [width / 2, 0.0]]), rooted_start=True))
        res = random_sea_field(Layout(arms=arms), X, Y, comps, depth=1e4, principal_alpha=alpha,
                               g=g, method=method)
        kd = res.kd
        ratio = res.period_ratio
        phase = np.full(kd.shape, np.nan)
        used = ("directional random sea (Goda et al. 1978), components by "
                + ", ".join(sorted(res.methods)))
    else:
        raise ValueError(f"kind must be 'regular' or 'random', got {kind!r}")
    ds = xr.Dataset(
        data_vars=dict(kd=(("y_over_l", "x_over_l"), kd, {"long_name": "diffraction coefficient K'",
                                                         "units": "1"}),
                       phase=(("y_over_l", "x_over_l"), phase, {"units": "rad"})),
        coords=dict(x_over_l=x, y_over_l=y),
        attrs=dict(case=case, direction_deg=float(direction),
                   width_over_l=float(width) if width else np.nan, sea_kind=kind,
                   spreading=float(spreading) if kind == "random" else np.nan, method=used,
                   cautions=caution_text(), harbor_version=__version__),
    )
    if ratio is not None:
        ds["period_ratio"] = (("y_over_l", "x_over_l"), ratio)
    return ds
