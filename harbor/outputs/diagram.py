"""Non-dimensional design diagrams: K' isolines and wave crests around a semi-infinite
breakwater or through a gap, on axes x/L, y/L.

The diagram reads a solved non-dimensional Dataset; it computes no physics. Crest lines
are drawn from the phase the solver supplies.
"""

from __future__ import annotations

import math
from pathlib import Path

import matplotlib as mpl
import numpy as np
from matplotlib import colors as mcolors
from matplotlib import patheffects, transforms
from matplotlib.lines import Line2D
from matplotlib.patches import Circle, FancyArrowPatch

from harbor.cautions import CAUTION_SHORT
from harbor.errors import InputError
from harbor.outputs._atomic import atomic_path
from harbor.outputs.cartography import _drop_specks
from harbor.outputs.maps import (ARM_COLOUR, CMAP, INK, KD_FILL, KD_LINES, MUTED, A4_LANDSCAPE,
                                 _declutter_labels, fit_axes_rect, new_figure, wrap_to)

CREST_COLOUR = "#e8590c"


def crest_field(phase: np.ndarray, kd: np.ndarray | None = None, kd_min: float = 0.03):
    """A field whose zero level is the crest lines (phase = 0 mod 2 pi).

    Parameters
    ----------
    phase : numpy.ndarray
        Phase of the complex amplitude, radians (any branch).
    kd : numpy.ndarray, optional
        K'; crests are not drawn where K' < ``kd_min`` (there the phase is that of an
        almost-zero amplitude and its lines mean nothing).
    kd_min : float
        Threshold on K'.

    Returns
    -------
    numpy.ndarray
        sin(phase) where cos(phase) > 0, NaN elsewhere.

    Notes
    -----
    With the time factor exp(-i w t), the surface at t = 0 is Re(K' exp(i phase)), so
    crests are where phase = 0 mod 2 pi. Contouring sin(phase) = 0 finds phase = 0 and
    phase = pi (troughs); masking cos(phase) <= 0 keeps the crests only, and it also
    hides the branch cut of a wrapped phase (at +-pi, where cos = -1).
    """
    ph = np.asarray(phase, float)
    z = np.where(np.cos(ph) > 0.0, np.sin(ph), np.nan)
    if kd is not None:
        z = np.where(np.asarray(kd, float) >= kd_min, z, np.nan)
    return z


def _barriers(ds):
    """Barrier segments in x/L along y/L = 0, clipped to the diagram."""
    x0, x1 = float(ds["x_over_l"].min()), float(ds["x_over_l"].max())
    case = str(ds.attrs.get("case", "semi-infinite"))
    if case == "semi-infinite":
        # Local frame of the kernels: barrier on the x axis from the tip at the origin;
        # the side can be stated by the producer (default: the positive x axis).
        side = str(ds.attrs.get("barrier_side", "positive"))
        segs = [(0.0, x1)] if side == "positive" else [(x0, 0.0)]
        tips = [0.0]
    elif case == "gap":
        b = float(ds.attrs["width_over_l"])
        c = float(ds.attrs.get("gap_center_over_l", 0.0))
        segs = [(x0, c - b / 2), (c + b / 2, x1)]
        tips = [c - b / 2, c + b / 2]
    else:
        raise InputError(f"diagram case must be 'semi-infinite' or 'gap', not {case!r}",
                         key="case")
    return [(a, b) for a, b in segs if b > a], tips


def _direction_inset(fig, ax, direction_deg, at=(0.085, 0.13)):
    """An arrow showing the direction of wave travel, in a small disc (lower left)."""
    tr = fig.dpi_scale_trans + transforms.ScaledTranslation(at[0], at[1], ax.transAxes)
    a = math.radians(direction_deg)
    u = np.array([math.cos(a), math.sin(a)])
    r = 0.36
    disc = Circle((0, 0), r, transform=tr, facecolor="white", edgecolor=MUTED, lw=0.8,
                  alpha=0.93, zorder=20, clip_on=False)
    ax.add_artist(disc)
    arrow = FancyArrowPatch(tuple(-0.26 * u), tuple(0.26 * u), transform=tr,
                            arrowstyle="-|>,head_length=6,head_width=3.5", lw=2.0,
                            color=INK, zorder=21, clip_on=False)
    ax.add_artist(arrow)
    ax.plot([-0.3, 0.3], [-0.0, 0.0], transform=tr, color=MUTED, lw=0.6, ls=":",
            zorder=20.5, clip_on=False)
    ax.text(0.0, -r - 0.06, f"wave travel\n\u03b1 = {direction_deg:g}\u00b0 from +x",
            transform=tr, ha="center", va="top", fontsize=7, color=INK, zorder=21,
            clip_on=False, bbox=dict(boxstyle="round,pad=0.2", facecolor="white",
                                     edgecolor="none", alpha=0.85))
    return disc


#: Gaussian width (in wavelengths) of the display smoothing of a random sea's isolines.
RANDOM_SMOOTH_L = 0.15
#: Isoline pieces of a random sea smaller than this (wavelengths) are left out.
RANDOM_SPECK_L = 0.5


def _smooth_for_lines(field, x, y):
    """The field smoothed over :data:`RANDOM_SMOOTH_L` for drawing isolines only.

    A directional random sea is an energy sum over a finite set of directions and
    frequencies; between the quadrature's components the effective K' carries a ripple
    of a few hundredths that the 0.1-step isolines trace as jagged lines and specks. The
    true field of a continuous spectrum is smooth at that scale, so the isolines are
    drawn on a Gaussian-smoothed copy (NaN-aware: normalised by the smoothed mask). The
    colour fill and every exported value keep the computed field (cartographic
    generalisation, not a change of the result).
    """
    from scipy import ndimage

    h = float(min(np.min(np.diff(x)) if x.size > 1 else 1.0,
                  np.min(np.diff(y)) if y.size > 1 else 1.0))
    sigma = max(RANDOM_SMOOTH_L / h, 0.5)
    ok = np.isfinite(field)
    num = ndimage.gaussian_filter(np.where(ok, field, 0.0), sigma, mode="nearest")
    den = ndimage.gaussian_filter(ok.astype(float), sigma, mode="nearest")
    with np.errstate(invalid="ignore", divide="ignore"):
        out = num / den
    return np.where(ok, out, np.nan)


def plot_diagram(ds, path):
    """Draw a non-dimensional diffraction diagram to PNG or PDF (by the path's suffix).

    Parameters
    ----------
    ds : xarray.Dataset
        Coordinates ``x_over_l``, ``y_over_l`` (distances over the wavelength L);
        variables ``kd`` (y, x) and, for regular seas, ``phase`` (y, x, radians);
        attributes ``case`` ("semi-infinite" or "gap"), ``direction_deg`` (direction of
        travel, degrees counter-clockwise from +x, waves arriving from y < 0),
        ``width_over_l`` (gap only), ``sea_kind`` and ``method``. Optional
        ``barrier_side`` ("positive", default, or "negative": which half of the x axis
        the semi-infinite barrier occupies) and ``gap_center_over_l`` (default 0).
    path : str or os.PathLike
        ``.png`` or ``.pdf``; written atomically.

    Returns
    -------
    pathlib.Path

    Notes
    -----
    K' isolines at 0.1 steps (labelled) over a light fill; crest lines are the zero
    level of sin(phase) where cos(phase) > 0 (see :func:`crest_field`). For random
    seas there is no single phase and only K' (effective) is drawn.

    References
    ----------
    .. [1] Penney, W. G. and Price, A. T. (1952). The diffraction theory of sea waves
       and the shelter afforded by breakwaters. Philosophical Transactions of the Royal
       Society of London A 244, 236-253.
    .. [2] Sommerfeld, A. (1896). Mathematische Theorie der Diffraction. Mathematische
       Annalen 47, 317-374.
    """
    path = Path(path)
    fmt = path.suffix.lower().lstrip(".")
    if fmt not in ("png", "pdf"):
        raise InputError(f"diagram file must end in .png or .pdf, not {path.name!r}",
                         key="path")
    x = np.asarray(ds["x_over_l"].values, float)
    y = np.asarray(ds["y_over_l"].values, float)
    kd = np.asarray(ds["kd"].transpose("y_over_l", "x_over_l").values
                    if set(ds["kd"].dims) == {"y_over_l", "x_over_l"} else ds["kd"].values, float)
    random = str(ds.attrs.get("sea_kind", "regular")) == "random"
    direction = float(ds.attrs.get("direction_deg", 90.0))
    case = str(ds.attrs.get("case", "semi-infinite"))
    segs, tips = _barriers(ds)

    fig = new_figure(A4_LANDSCAPE)
    fw, fh = fig.get_size_inches()
    ax, _ = fit_axes_rect(fig, (0.85, 1.05, fw - 0.85 - 2.7, fh - 1.05 - 1.3),
                          (x.min(), x.max()), (y.min(), y.max()))

    finite = kd[np.isfinite(kd)]
    # The same fixed classes as the maps, so a colour means the same K' everywhere.
    fill = KD_FILL.copy()
    cmap = mpl.colormaps[CMAP]
    extend = "max" if finite.size and finite.max() > fill[-1] + 1e-9 else "neither"
    norm = mcolors.BoundaryNorm(fill, cmap.N, extend=extend)
    cf = ax.contourf(x, y, kd, levels=fill, cmap=cmap, norm=norm, extend=extend, alpha=0.55,
                     zorder=1)
    # Isolines in the lee only: in front of a reflecting barrier a regular sea makes a
    # standing pattern (K' from 0 to 2 every half wavelength) whose 0.1-step isolines
    # would bury the diagram; the colour fill still shows it.
    # 0.1 ... 0.9: the K' = 1 line of the lit zone only traces small ripples about the
    # undisturbed level (and, for a random sea, the noise of the directional quadrature).
    lines = KD_LINES.copy()
    # Nodes on the barrier itself carry the jump from the front to the lee; leaving
    # them out keeps isolines (and their labels) from running along the barrier.
    on_barrier = np.zeros(kd.shape, bool)
    row0 = np.isclose(y, 0.0, atol=1e-9 * max(1.0, float(np.ptp(y))))
    for a, b in segs:
        on_barrier |= row0[:, None] & ((x >= a) & (x <= b))[None, :]
    kd_lee = np.where((y[:, None] >= 0.0) & ~on_barrier, kd, np.nan)
    if random:
        kd_lee = _smooth_for_lines(kd_lee, x, y)
    cs = ax.contour(x, y, kd_lee, levels=lines, colors=INK, linewidths=0.75, zorder=3)
    if random:
        _drop_specks(cs, RANDOM_SPECK_L)
    labels = _declutter_labels(ax, cs, lambda v: f"{v:.1f}", 7.5)
    for t in labels:
        t.set_path_effects([patheffects.withStroke(linewidth=2.2, foreground="white")])
        t.set_zorder(4)

    handles = [Line2D([], [], color=INK, lw=0.75, label="K' isoline, 0.1 ... 0.9 (lee, y > 0)")]
    if not random and "phase" in ds:
        ph = np.asarray(ds["phase"].transpose("y_over_l", "x_over_l").values
                        if set(ds["phase"].dims) == {"y_over_l", "x_over_l"}
                        else ds["phase"].values, float)
        z = crest_field(ph, kd)
        if np.isfinite(z).any():
            ax.contour(x, y, z, levels=[0.0], colors=CREST_COLOUR, linewidths=1.0, zorder=2)
            handles.append(Line2D([], [], color=CREST_COLOUR, lw=1.0,
                                  label="wave crest (phase 0)"))

    casing = [patheffects.withStroke(linewidth=7.0, foreground="white")]
    for a, b in segs:
        ax.plot([a, b], [0, 0], color=ARM_COLOUR, lw=4.0, solid_capstyle="butt", zorder=6,
                path_effects=casing)
    ax.plot(tips, [0.0] * len(tips), ls="", marker="o", markersize=6.5,
            markerfacecolor=ARM_COLOUR, markeredgecolor="white", markeredgewidth=1.3, zorder=7)
    handles.append(Line2D([], [], color=ARM_COLOUR, lw=4.0, path_effects=casing,
                          label="rigid barrier"))
    ax.set_xlim(x.min(), x.max())
    ax.set_ylim(y.min(), y.max())
    ax.set_xlabel("x / L", fontsize=9.5)
    ax.set_ylabel("y / L", fontsize=9.5)
    ax.tick_params(labelsize=8)
    ax.grid(True, color="white", lw=0.5, alpha=0.6, zorder=0.5)
    _direction_inset(fig, ax, direction)

    pos = ax.get_position()
    cax = fig.add_axes((pos.x1 + 0.18 / fw, pos.y0, 0.16 / fw, pos.height))
    cb = fig.colorbar(cf, cax=cax, ticks=fill if len(fill) <= 16 else fill[::2])
    cb.set_label("K' (effective, random sea) [-]" if random else "K' diffraction coefficient [-]",
                 fontsize=8.5)
    cb.ax.tick_params(labelsize=7.5)
    fig.legend(handles=handles, loc="upper left",
               bbox_to_anchor=((pos.x1 * fw + 1.2) / fw, pos.y1), fontsize=7.5, frameon=False,
               title="Key", title_fontsize=8, alignment="left")

    if case == "gap":
        what = f"Breakwater gap, B/L = {float(ds.attrs['width_over_l']):g}"
    else:
        what = "Semi-infinite breakwater"
    kind = "directional random sea" if random else "regular sea"
    fig.text(0.85 / fw, 1 - 0.3 / fh, f"{what}: K' and wave crests" if not random
             else f"{what}: effective K'", fontsize=14, fontweight="bold", color=INK, va="top")
    sub = f"{kind}, waves travel at \u03b1 = {direction:g}\u00b0 from the +x axis, arriving from y < 0"
    if random and "spreading" in ds.attrs:
        sub += f", s_max = {float(ds.attrs['spreading']):g}"
    fig.text(0.85 / fw, 1 - 0.62 / fh, sub, fontsize=10, color=INK, va="top")
    method = (f"Method: {ds.attrs.get('method', '')}. Distances in wavelengths L (at the "
              + ("significant period" if random else "period") + " and depth of the sea state).")
    fig.text(0.85 / fw, 1 - 0.86 / fh, "\n".join(wrap_to(method, fw - 0.85 - 0.5, 8.5)[:2]),
             fontsize=8.5, color=MUTED, va="top", linespacing=1.2)
    fig.add_artist(Line2D([0.85 / fw, 1 - 0.5 / fw], [0.62 / fh, 0.62 / fh], color="#bbbbbb",
                          lw=0.6))
    version = ds.attrs.get("harbor_version", "")
    if not version:
        import harbor

        version = getattr(harbor, "__version__", "")
    fig.text(0.85 / fw, 0.36 / fh, CAUTION_SHORT, fontsize=7.5, color=INK, va="bottom")
    fig.text(0.85 / fw, 0.16 / fh, f"harbor {version}  \u00b7  non-dimensional diagram; scale "
             "it by the wavelength at the site before use", fontsize=6.5, color=MUTED,
             va="bottom")
    with atomic_path(path) as tmp:
        fig.savefig(tmp, format=fmt, dpi=170, facecolor="white")
    return path
