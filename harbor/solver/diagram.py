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


def diagram_field(case="semi-infinite", direction=90.0, width=None, extent=(-4.0, -2.0, 4.0, 8.0),
                  resolution=0.05, kind="regular", spreading=10.0, method="auto"):
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
    extent : tuple of float
        (xmin, ymin, xmax, ymax) in wavelengths.
    resolution : float
        Grid spacing in wavelengths.
    kind : {"regular", "random"}
        A regular sea, or a directional random sea (Bretschneider-Mitsuyasu spectrum in
        deep water, Mitsuyasu spreading ``spreading`` = s_max) whose lengths are scaled by
        the deep-water wavelength of T1/3.
    spreading : float
        s_max for random seas.
    method : str
        Gap method (see :func:`harbor.gap`).

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
    if case == "gap" and (width is None or not width > 0):
        raise ValueError("a gap diagram needs a positive width (B/L)")
    if resolution <= 0:
        raise ValueError("resolution must be positive")
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
