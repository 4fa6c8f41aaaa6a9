"""Frequency spectra, directional spreading and their discretisation into components.

Pure array functions (numpy/scipy only), SI units inside: frequency in Hz, period in s,
height in m, spectral density in m^2/Hz, angles in rad. The spectra are the forms Goda
recommends for design in terms of the significant wave height H1/3; the spreading is
Mitsuyasu's cos^2s form with Goda's rule for s(f).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from scipy import special

from harbor.errors import InputError

__all__ = [
    "BM_PEAK_RATIO",
    "DEFAULT_N_DIR",
    "DEFAULT_N_FREQ",
    "Components",
    "bretschneider_mitsuyasu",
    "jonswap",
    "jonswap_peak_period",
    "mitsuyasu_s",
    "mitsuyasu_spreading",
    "random_components",
    "spreading_cdf",
]

#: Peak period over significant period of the Bretschneider-Mitsuyasu spectrum, Tp/T1/3
#: (Goda 1988), so that fp = 1 / (1.05 T1/3).
BM_PEAK_RATIO = 1.05

#: Default number of frequencies (quadrature nodes) of :func:`random_components`.
DEFAULT_N_FREQ = 12
#: Default number of directions (quadrature nodes) per frequency.
DEFAULT_N_DIR = 36

_BM_A = 0.257  # Goda's coefficient of H1/3^2 T1/3^-4 f^-5
_BM_B = 1.03  # Goda's coefficient of (T1/3 f)^-4
_JS_B = 1.25  # (5/4) (Tp f)^-4: the Pierson-Moskowitz shape in terms of the peak period
_SPECTRA = ("bretschneider-mitsuyasu", "jonswap")


def _frequency(f) -> np.ndarray:
    f = np.asarray(f, dtype=float)
    if np.any(~np.isfinite(f)) or np.any(f < 0):
        raise ValueError(f"frequency must be finite and >= 0 Hz, got {f!r}")
    return f


def _positive(name, value) -> np.ndarray:
    v = np.asarray(value, dtype=float)
    if np.any(~np.isfinite(v)) or np.any(v <= 0):
        raise ValueError(f"{name} must be finite and positive, got {value!r}")
    return v


def _power_law_shape(f, a, b):
    """a f^-5 exp(-b f^-4), exactly 0 at f = 0 (where the exponential wins)."""
    out = np.zeros(np.broadcast(f, a, b).shape)
    f, a, b = np.broadcast_arrays(f, a, b)
    pos = f > 0
    fp = f[pos]
    # exp(-b/f^4) underflows to 0 long before f^-5 overflows; evaluating in logs keeps
    # tiny frequencies from producing inf * 0.
    with np.errstate(over="ignore", divide="ignore"):
        out[pos] = a[pos] * np.exp(-5.0 * np.log(fp) - b[pos] / fp**4)
    return out


def _scalar_or_array(x):
    return float(x) if np.ndim(x) == 0 else x


def bretschneider_mitsuyasu(f, h13, t13):
    r"""Bretschneider-Mitsuyasu frequency spectrum in Goda's form.

    Parameters
    ----------
    f : float or array_like
        Frequency (Hz), >= 0.
    h13 : float or array_like
        Significant wave height H1/3 (m), > 0.
    t13 : float or array_like
        Significant wave period T1/3 (s), > 0.

    Returns
    -------
    S : float or numpy.ndarray
        Spectral density (m^2/Hz); 0 at f = 0.

    Notes
    -----
    .. math::

        S(f) = 0.257\, H_{1/3}^2\, T_{1/3}^{-4}\, f^{-5}
               \exp\left[-1.03\, (T_{1/3} f)^{-4}\right]

    The peak lies at :math:`f_p = (4 \cdot 1.03 / 5)^{1/4} / T_{1/3} \approx
    1 / (1.05\, T_{1/3})`. The zeroth moment is exactly
    :math:`m_0 = 0.257 / (4 \cdot 1.03)\, H_{1/3}^2 = 0.0624\, H_{1/3}^2`, i.e.
    :math:`H_{1/3} \approx 4.004 \sqrt{m_0}` (1/16 = 0.0625 would be exact).

    References
    ----------
    .. [1] Goda, Y. (1988). Statistical variability of sea state parameters as a function
       of wave spectrum. *Coastal Engineering in Japan*, 31(1), 39-52.
    .. [2] Goda, Y. (2010). *Random Seas and Design of Maritime Structures* (3rd ed.).
       World Scientific, Advanced Series on Ocean Engineering 33, section 2.3.
    .. [3] Mitsuyasu, H. (1970). On the growth of spectrum of wind-generated waves (2):
       spectral shape of wind waves at finite fetch. *Proc. 17th Japanese Conference on
       Coastal Engineering*, 1-7 (in Japanese).
    """
    f = _frequency(f)
    h = _positive("h13", h13)
    t = _positive("t13", t13)
    return _scalar_or_array(_power_law_shape(f, _BM_A * h**2 / t**4, _BM_B / t**4))


# Gauss-Legendre nodes on 0.3 <= Tp f <= 2.0, split at the peak (where sigma changes):
# outside that range the peak enhancement gamma^r - 1 is below 1e-16 of the spectrum.
_JS_X = []
_JS_W = []
for _lo, _hi in ((0.3, 1.0), (1.0, 2.0)):
    _x, _w = np.polynomial.legendre.leggauss(200)
    _JS_X.append(0.5 * (_hi - _lo) * (_x + 1.0) + _lo)
    _JS_W.append(0.5 * (_hi - _lo) * _w)
_JS_X = np.concatenate(_JS_X)
_JS_W = np.concatenate(_JS_W)


def _jonswap_beta(gamma):
    """beta_J such that the JONSWAP spectrum carries m0 = H1/3^2 / 16 exactly.

    With x = Tp f, m0 = beta_J H1/3^2 [1/5 + E(gamma)]: 1/5 is the closed-form integral of
    x^-5 exp(-1.25 x^-4) and E the integral of the same shape times (gamma^r - 1),
    smooth and confined to 0.3 < x < 2 (Gauss-Legendre, 2 x 200 nodes: 1e-14).
    """
    g = np.asarray(gamma, dtype=float)
    shape = np.exp(-5.0 * np.log(_JS_X) - _JS_B / _JS_X**4)
    excess = shape * (_jonswap_gamma_factor(_JS_X, g[..., None]) - 1.0)
    return 1.0 / (16.0 * (0.2 + np.sum(excess * _JS_W, axis=-1)))


def _jonswap_gamma_factor(x, gamma):
    """gamma^r with r = exp(-(x - 1)^2 / (2 sigma^2)), x = Tp f."""
    sigma = np.where(x <= 1.0, 0.07, 0.09)
    return np.exp(np.log(gamma) * np.exp(-((x - 1.0) ** 2) / (2.0 * sigma**2)))


def jonswap(f, h13, tp, gamma=3.3):
    r"""JONSWAP frequency spectrum in Goda's approximation (H1/3, Tp, gamma).

    Parameters
    ----------
    f : float or array_like
        Frequency (Hz), >= 0.
    h13 : float or array_like
        Significant wave height H1/3 (m), > 0.
    tp : float or array_like
        Spectral peak period Tp (s), > 0.
    gamma : float, optional
        Peak enhancement factor (-), > 0; default 3.3 (mean JONSWAP value). The fit of
        beta_J is stated for 1 <= gamma <= 7.

    Returns
    -------
    S : float or numpy.ndarray
        Spectral density (m^2/Hz); 0 at f = 0.

    Notes
    -----
    .. math::

        S(f) = \beta_J H_{1/3}^2 T_p^{-4} f^{-5} \exp\left[-1.25 (T_p f)^{-4}\right]
               \gamma^{\exp\left[-(T_p f - 1)^2 / (2\sigma^2)\right]},

    with :math:`\sigma = 0.07` for :math:`f \le f_p`, 0.09 above, and
    :math:`\beta_J` chosen so that the spectrum carries exactly
    :math:`m_0 = H_{1/3}^2/16`, the zeroth moment that defines H1/3 = 4 sqrt(m0):

    .. math::

        \beta_J = \frac{1}{16\,[1/5 + E(\gamma)]}, \qquad
        E(\gamma) = \int_0^\infty x^{-5} e^{-1.25 x^{-4}}
                    \left(\gamma^{\exp[-(x-1)^2/(2\sigma^2)]} - 1\right) dx

    (1/5 is the integral of the Pierson-Moskowitz shape in x = Tp f; E is evaluated by
    Gauss-Legendre quadrature). Goda's fit
    :math:`0.0624/(0.230 + 0.0336\gamma - 0.185/(1.9 + \gamma))` agrees with it within
    0.3 % for :math:`1 \le \gamma \le 7`; his further factor
    :math:`(1.094 - 0.01915 \ln\gamma)`, which makes H1/3 of simulated records equal to
    the given height (about :math:`3.8\sqrt{m_0}`), is not applied: the random-sea
    method uses the spectral definition, like the Bretschneider-Mitsuyasu spectrum
    (:math:`m_0 = 0.0624 H_{1/3}^2`). With :math:`\gamma = 1` the shape is that of the
    Bretschneider-Mitsuyasu (Pierson-Moskowitz) spectrum written with the peak period.

    References
    ----------
    .. [1] Goda, Y. (1988). Statistical variability of sea state parameters as a function
       of wave spectrum. *Coastal Engineering in Japan*, 31(1), 39-52.
    .. [2] Hasselmann, K., Barnett, T. P., Bouws, E., Carlson, H., Cartwright, D. E.,
       Enke, K., Ewing, J. A., Gienapp, H., Hasselmann, D. E., Kruseman, P., Meerburg,
       A., Müller, P., Olbers, D. J., Richter, K., Sell, W., & Walden, H. (1973).
       Measurements of wind-wave growth and swell decay during the Joint North Sea Wave
       Project (JONSWAP). *Ergänzungsheft zur Deutschen Hydrographischen Zeitschrift*,
       Reihe A (8), Nr. 12.
    .. [3] Goda, Y. (2010). *Random Seas and Design of Maritime Structures* (3rd ed.).
       World Scientific, section 2.3.
    """
    f = _frequency(f)
    h = _positive("h13", h13)
    tp = _positive("tp", tp)
    gamma = _positive("gamma", gamma)
    base = _power_law_shape(f, _jonswap_beta(gamma) * h**2 / tp**4, _JS_B / tp**4)
    return _scalar_or_array(base * _jonswap_gamma_factor(f * tp, gamma))


def jonswap_peak_period(t13, gamma=3.3):
    r"""Peak period of a JONSWAP spectrum from the significant period (Goda 1988).

    Parameters
    ----------
    t13 : float or array_like
        Significant wave period T1/3 (s), > 0.
    gamma : float or array_like, optional
        Peak enhancement factor (-), default 3.3.

    Returns
    -------
    tp : float or numpy.ndarray
        Peak period Tp (s).

    Notes
    -----
    .. math:: T_p \approx T_{1/3} / \left[1 - 0.132 (\gamma + 0.2)^{-0.559}\right]

    an empirical fit to numerical simulations of wave records, for
    :math:`1 \le \gamma \le 7`.

    References
    ----------
    .. [1] Goda, Y. (1988). Statistical variability of sea state parameters as a function
       of wave spectrum. *Coastal Engineering in Japan*, 31(1), 39-52.
    .. [2] Goda, Y. (2010). *Random Seas and Design of Maritime Structures* (3rd ed.).
       World Scientific, section 2.3.
    """
    t = _positive("t13", t13)
    g = _positive("gamma", gamma)
    return _scalar_or_array(t / (1.0 - 0.132 * (g + 0.2) ** -0.559))


def mitsuyasu_s(f, fp, s_max):
    r"""Spreading parameter s(f) of the Mitsuyasu function, by Goda's rule.

    Parameters
    ----------
    f : float or array_like
        Frequency (Hz), > 0.
    fp : float or array_like
        Peak frequency (Hz), > 0; :math:`1/(1.05\,T_{1/3})` for the
        Bretschneider-Mitsuyasu spectrum.
    s_max : float or array_like
        Spreading parameter at the peak (-), > 0: 10 wind waves, 25 swell with short
        decay distance, 75 swell with long decay distance (Goda & Suzuki 1975).

    Returns
    -------
    s : float or numpy.ndarray
        Spreading parameter (-).

    Notes
    -----
    .. math::

        s = s_{max} (f/f_p)^{5} \quad (f \le f_p), \qquad
        s = s_{max} (f/f_p)^{-2.5} \quad (f > f_p)

    References
    ----------
    .. [1] Mitsuyasu, H., Tasai, F., Suhara, T., Mizuno, S., Ohkusu, M., Honda, T., &
       Rikiishi, K. (1975). Observations of the directional spectrum of ocean waves using
       a cloverleaf buoy. *Journal of Physical Oceanography*, 5(4), 750-760.
    .. [2] Goda, Y., & Suzuki, Y. (1975). Computation of refraction and diffraction of
       sea waves with Mitsuyasu's directional spectrum. *Technical Note of the Port and
       Harbour Research Institute*, No. 230 (in Japanese).
    .. [3] Goda, Y. (2010). *Random Seas and Design of Maritime Structures* (3rd ed.).
       World Scientific, section 2.3.
    """
    f = _positive("f", f)
    fp = _positive("fp", fp)
    s_max = _positive("s_max", s_max)
    ratio = f / fp
    return _scalar_or_array(s_max * np.where(ratio <= 1.0, ratio**5, ratio**-2.5))


def _wrap(theta):
    """Angle(s) wrapped into (-pi, pi]."""
    t = np.asarray(theta, dtype=float)
    w = np.mod(t + np.pi, 2.0 * np.pi) - np.pi
    return np.where(w == -np.pi, np.pi, w)


def _log_g0(s):
    # Legendre's duplication formula turns G0 into Gamma(s+1) / (2 sqrt(pi) Gamma(s+1/2));
    # the Pochhammer symbol gives that ratio without the cancellation of differences of
    # log-gamma values (which loses 1e-10 relative at s = 2.5e5).
    return np.log(special.poch(s + 0.5, 0.5)) - np.log(2.0 * np.sqrt(np.pi))


def mitsuyasu_spreading(theta, s):
    r"""Mitsuyasu directional spreading function, normalised over the full circle.

    Parameters
    ----------
    theta : float or array_like
        Direction relative to the principal direction (rad); wrapped into (-pi, pi].
    s : float or array_like
        Spreading parameter (-), > 0 (see :func:`mitsuyasu_s`). Broadcast against
        ``theta``.

    Returns
    -------
    G : float or numpy.ndarray
        Directional spreading density (1/rad), with
        :math:`\int_{-\pi}^{\pi} G\, d\theta = 1`.

    Notes
    -----
    .. math::

        G(\theta) = G_0 \cos^{2s}(\theta/2), \qquad
        G_0 = \frac{2^{2s-1}\, \Gamma(s+1)^2}{\pi\, \Gamma(2s+1)}

    evaluated as :math:`\exp[\ln G_0 + 2s \ln\cos(\theta/2)]`, with
    :math:`G_0 = \Gamma(s+1) / (2\sqrt{\pi}\,\Gamma(s+1/2))` (Legendre's duplication
    formula) computed as a Pochhammer symbol, so that s up to 1e4 and far beyond
    (long-crested seas) neither overflows nor loses precision. For large s,
    :math:`G_0 \approx \sqrt{s/(4\pi)}`.

    References
    ----------
    .. [1] Mitsuyasu, H., Tasai, F., Suhara, T., Mizuno, S., Ohkusu, M., Honda, T., &
       Rikiishi, K. (1975). Observations of the directional spectrum of ocean waves using
       a cloverleaf buoy. *Journal of Physical Oceanography*, 5(4), 750-760.
    .. [2] Goda, Y. (2010). *Random Seas and Design of Maritime Structures* (3rd ed.).
       World Scientific, section 2.3.
    """
    th = _wrap(theta)
    s = _positive("s", s)
    with np.errstate(divide="ignore"):
        log_cos = np.log(np.cos(th / 2.0))
    # s * log(0) at theta = pi would give -inf (fine) but 0 * -inf must not appear.
    log_g = _log_g0(s) + 2.0 * s * np.where(np.isfinite(log_cos), log_cos, -np.inf)
    return _scalar_or_array(np.exp(log_g))


def spreading_cdf(theta, s):
    r"""Fraction of the Mitsuyasu spreading energy between -pi and ``theta``.

    Parameters
    ----------
    theta : float or array_like
        Direction relative to the principal direction (rad), in [-pi, pi].
    s : float or array_like
        Spreading parameter (-), > 0. Broadcast against ``theta``.

    Returns
    -------
    C : float or numpy.ndarray
        :math:`\int_{-\pi}^{\theta} G\, d\theta'` (-), from 0 at -pi to 1 at pi.

    Notes
    -----
    With :math:`t = \sin^2(\theta/2)` the integral of :math:`\cos^{2s}(\theta/2)` from 0
    to :math:`\theta` becomes a Beta integral, so that

    .. math::

        C(\theta) = \tfrac12 + \tfrac12\, \mathrm{sign}(\theta)\,
                    I_{\sin^2(\theta/2)}\left(\tfrac12, s + \tfrac12\right)

    with :math:`I_x(a, b)` the regularised incomplete Beta function; exact, and its
    inverse (:func:`scipy.special.betaincinv`) gives equal-energy direction bands.

    References
    ----------
    .. [1] Abramowitz, M., & Stegun, I. A. (1964). *Handbook of Mathematical Functions*.
       National Bureau of Standards, eq. 6.2.1 and 26.5.1.
    .. [2] Goda, Y. (2010). *Random Seas and Design of Maritime Structures* (3rd ed.).
       World Scientific, section 2.3.
    """
    th = np.asarray(theta, dtype=float)
    if np.any(~np.isfinite(th)) or np.any(np.abs(th) > np.pi):
        raise ValueError(f"theta must lie in [-pi, pi], got {theta!r}")
    s = _positive("s", s)
    half = 0.5 * special.betainc(0.5, s + 0.5, np.sin(th / 2.0) ** 2)
    return _scalar_or_array(0.5 + np.sign(th) * half)


def _spreading_quantile(q, s):
    """Inverse of :func:`spreading_cdf`: the angle below which a fraction q lies."""
    q = np.asarray(q, dtype=float)
    x = special.betaincinv(0.5, s + 0.5, np.abs(2.0 * q - 1.0))
    return np.sign(q - 0.5) * 2.0 * np.arcsin(np.sqrt(np.clip(x, 0.0, 1.0)))


@dataclass(frozen=True)
class Components:
    """A directional random sea discretised into regular components.

    All arrays are 1-D and of equal length (one entry per component).

    Attributes
    ----------
    frequency : numpy.ndarray
        Representative frequency of each component (Hz).
    period : numpy.ndarray
        ``1 / frequency`` (s).
    angle : numpy.ndarray
        Offset of the component's direction of travel from the principal direction of
        travel (rad), counter-clockwise positive, in (-pi, pi].
    weight : numpy.ndarray
        Fraction of m0 carried by the component (-); the weights sum to 1.
    m0 : float
        Zeroth moment of the model spectrum as integrated (m^2).
    m0_target : float
        H1/3^2 / 16 (m^2), the zeroth moment implied by H1/3 = 4 sqrt(m0).
    tm02 : float
        Mean period sqrt(m0/m2) of the continuous spectrum (s).
    """

    frequency: np.ndarray
    period: np.ndarray
    angle: np.ndarray
    weight: np.ndarray
    m0: float
    m0_target: float
    tm02: float

    def __len__(self) -> int:
        return int(self.frequency.size)


def _cumulative_trapezoid(y, x):
    return np.concatenate([[0.0], np.cumsum(0.5 * (y[1:] + y[:-1]) * np.diff(x))])


def _cumulative_moments(edges, a, b, gamma, tp):
    """Energy (m0) and m2 of S = a f^-5 exp(-b f^-4) Phi(f) below each edge frequency.

    The power-law/exponential part has closed forms; the JONSWAP enhancement Phi - 1
    vanishes (below 1e-16) outside 0.3 < Tp f < 2.0 and is integrated there on a fine
    grid.
    """
    edges = np.asarray(edges, dtype=float)
    u = np.full(edges.shape, np.inf)
    pos = edges > 0
    with np.errstate(over="ignore"):
        u[pos] = b / edges[pos] ** 4
    m0 = a / (4.0 * b) * np.exp(-u)
    m2 = a / (4.0 * np.sqrt(b)) * np.sqrt(np.pi) * special.gammaincc(0.5, u)
    if gamma != 1.0:
        x = np.unique(np.concatenate([np.linspace(0.3, 2.0, 40001), [1.0]]))
        f = x / tp
        excess = _power_law_shape(f, a, b) * (_jonswap_gamma_factor(x, gamma) - 1.0)
        c0 = _cumulative_trapezoid(excess, f)
        c2 = _cumulative_trapezoid(excess * f**2, f)
        fe = np.where(np.isfinite(edges), edges, f[-1])
        m0 = m0 + np.interp(fe, f, c0)
        m2 = m2 + np.interp(fe, f, c2)
    return m0, m2


def _equal_energy_edges(n, a, b, gamma, tp):
    """Frequencies (Hz) that split the spectrum's energy into n equal parts (n+1 edges)."""
    q = np.arange(1, n) / n
    if gamma == 1.0:
        inner = (b / -np.log(q)) ** 0.25  # closed form: cumulative = exp(-b f^-4)
    else:
        total = _cumulative_moments(np.array([np.inf]), a, b, gamma, tp)[0][0]
        grid = np.geomspace(0.2, 20.0, 20001) / tp
        cum = _cumulative_moments(grid, a, b, gamma, tp)[0] / total
        inner = np.interp(q, cum, grid)
        for _ in range(3):  # Newton polish: dC/df = S/m0
            c = _cumulative_moments(inner, a, b, gamma, tp)[0] / total
            dens = _power_law_shape(inner, a, b) * _jonswap_gamma_factor(inner * tp, gamma)
            inner = inner - (c - q) * total / dens
    return np.concatenate([[0.0], inner, [np.inf]])


def _gauss_gegenbauer(n, lam):
    """Gauss nodes and weights (normalised to sum 1) for the weight (1 - x^2)^lam on
    [-1, 1], lam > -1, by the Golub-Welsch eigenvalue method: stable for any lam (the
    polynomial root finders lose the nodes for lam above a few thousand)."""
    from scipy.linalg import eigh_tridiagonal

    if n == 1:
        return np.zeros(1), np.ones(1)
    k = np.arange(1, n, dtype=float)
    # recurrence of the monic Jacobi polynomials with alpha = beta = lam
    beta = k * (k + 2.0 * lam) / ((2.0 * k + 2.0 * lam + 1.0) * (2.0 * k + 2.0 * lam - 1.0))
    beta[0] = 1.0 / (2.0 * lam + 3.0)
    x, v = eigh_tridiagonal(np.zeros(n), np.sqrt(beta))
    w = v[0] ** 2
    return x, w / w.sum()


def _energy_quantile_above(tail, a, b, gamma, tp):
    """Frequencies (Hz) above which a fraction ``tail`` (0 < tail < 1) of m0 lies."""
    tail = np.asarray(tail, dtype=float)
    if gamma == 1.0:
        # closed form: the energy below f is exp(-b f^-4)
        return (b / -np.log1p(-tail)) ** 0.25
    total = _cumulative_moments(np.array([np.inf]), a, b, gamma, tp)[0][0]
    grid = np.geomspace(0.2, 200.0, 40001) / tp
    above = 1.0 - _cumulative_moments(grid, a, b, gamma, tp)[0] / total
    f = np.exp(np.interp(np.log(tail), np.log(np.maximum(above[::-1], 1e-300)),
                         np.log(grid[::-1])))
    for _ in range(4):  # Newton polish on the energy above f: d(above)/df = -S/m0
        c = 1.0 - _cumulative_moments(f, a, b, gamma, tp)[0] / total
        dens = _power_law_shape(f, a, b) * _jonswap_gamma_factor(f * tp, gamma) / total
        f = f + (c - tail) / dens
    return f


def random_components(h13, t13, s_max=10.0, spectrum="bretschneider-mitsuyasu",
                      peak_period=None, gamma=3.3, n_freq=DEFAULT_N_FREQ,
                      n_dir=DEFAULT_N_DIR) -> Components:
    r"""Discretise a directional random sea into regular components (Goda's method).

    Parameters
    ----------
    h13 : float
        Significant wave height H1/3 (m), > 0.
    t13 : float
        Significant wave period T1/3 (s), > 0. For JONSWAP it sets the peak period
        through :func:`jonswap_peak_period` unless ``peak_period`` is given.
    s_max : float, optional
        Mitsuyasu spreading parameter at the peak (-), > 0; default 10 (wind waves).
        Very large values (1e4) mean long-crested (unidirectional) waves.
    spectrum : {"bretschneider-mitsuyasu", "jonswap"}, optional
        Frequency spectrum; default Bretschneider-Mitsuyasu (Goda's form).
    peak_period : float, optional
        JONSWAP peak period Tp (s). Not allowed with Bretschneider-Mitsuyasu, whose
        peak is fixed at Tp = 1.05 T1/3.
    gamma : float, optional
        JONSWAP peak enhancement factor (-), default 3.3; ignored for
        Bretschneider-Mitsuyasu.
    n_freq : int, optional
        Number of frequencies (Gauss-Legendre nodes), default :data:`DEFAULT_N_FREQ` (12).
    n_dir : int, optional
        Number of directions per frequency (Gauss-Jacobi nodes), default
        :data:`DEFAULT_N_DIR` (36).

    Returns
    -------
    Components
        ``n_freq * n_dir`` components (frequency-major order); see :class:`Components`.

    Raises
    ------
    harbor.errors.InputError
        If a value is out of range or the spectrum is unknown; the message names the
        scenario key (``height``, ``period``, ``spreading``, ``spectrum``,
        ``peak_period``, ``gamma``).

    Notes
    -----
    The directional spectrum is :math:`S(f) G(\theta | f)` with
    :math:`G = G_0 \cos^{2s}(\theta/2)` and :math:`s = s(f)` by Goda's rule
    (:func:`mitsuyasu_s`), :math:`f_p = 1/(1.05\,T_{1/3})` for
    Bretschneider-Mitsuyasu and :math:`1/T_p` for JONSWAP.

    *Frequency.* Gauss-Legendre quadrature in u, with the fraction of m0 above the
    frequency equal to :math:`u^2` (cumulative energy :math:`P = 1 - u^2`), u in (0, 1):
    node :math:`f_i` solves :math:`1 - P(f_i) = u_i^2` and carries the energy fraction
    :math:`2 u_i w_i`. For Bretschneider-Mitsuyasu :math:`P = \exp(-1.03 (T_{1/3} f)^{-4})`,
    so :math:`f_i = (1.03 / -\ln(1 - u_i^2))^{1/4} / T_{1/3}` exactly; for JONSWAP the
    Pierson-Moskowitz part is integrated in closed form and the peak enhancement on a
    fine grid, then the nodes are polished by Newton steps. The substitution takes up
    the :math:`f^{-5}` tail: :math:`f^2\,dP` behaves as :math:`(1-P)^{-1/2} dP`, which
    is singular in P but smooth in u, so :math:`m_2` (and :math:`T_{m02}`, and the
    :math:`f^2`-weighted energy behind a structure) converges spectrally instead of as
    :math:`n^{-1/2}` with equal-energy bands and mid-band frequencies. 12 nodes give
    :math:`m_2` within 1.4e-4.

    *Direction.* For each frequency, with :math:`s = s(f_i)`, Gauss-Jacobi quadrature in
    :math:`x = \sin(\theta/2)`: :math:`G(\theta)\,d\theta \propto
    (1 - x^2)^{s - 1/2} dx` is the Jacobi weight with :math:`\alpha = \beta = s - 1/2`,
    so the ``n_dir`` nodes are exact for the spreading's moments up to degree
    :math:`2 n_{dir} - 1` in x, follow the width of G for any s (s = 1e4: all within a few
    degrees; small s at low frequencies: the whole circle) and are symmetric about the
    principal direction. Weights are normalised per frequency; components carrying less
    than 1e-9 of m0 are dropped and the weights renormalised to sum to exactly 1.

    *Accuracy.* Each component stands for its cell of the spectrum: the solvers average
    the interference of its waves over the cell
    (:func:`harbor.solver.random.spectral_cells`,
    :func:`harbor.solver.layout.general_components`). With the default 12 x 36
    components, behind a semi-infinite breakwater (T1/3 = 8 s, h = 10 m, principal
    directions 60 and 90 deg, s_max = 10 and 75, points 2 and 5 peak wavelengths from
    the tip on the shadow line, deep in the shadow and in the lit zone), :math:`K_{eff}`
    is within 0.0027 of a converged integration (Gauss-Legendre in f and theta to 1e-4,
    Sommerfeld's solution from scipy's Fresnel integrals: tests/test_random_converged.py)
    and the period ratio within 0.005; with every component taken as a regular sea the
    same points were off by 0.0063 and 0.022, and the former equal-energy bands with
    mid-band frequencies by 0.009 and 0.32. Over a wider set (0.5-8 peak wavelengths,
    principal directions 60-120 deg, s_max 10-75) K_eff stays within 0.0046 and the
    period ratio within 0.012 beyond 1.5 peak wavelengths from the tip, 0.016 closer in
    deep in the shadow. In front of a reflecting face the standing waves average out to
    about 0.01 in K_eff within two peak wavelengths of the face and 0.04 at five (0.04
    and 0.11 as regular seas).

    References
    ----------
    .. [1] Goda, Y., Takayama, T., & Suzuki, Y. (1978). Diffraction diagrams for
       directional random waves. *Proc. 16th International Conference on Coastal
       Engineering*, ASCE, 628-650.
    .. [2] Goda, Y. (2010). *Random Seas and Design of Maritime Structures* (3rd ed.).
       World Scientific, sections 2.3 and 3.2.
    .. [3] Mitsuyasu, H., Tasai, F., Suhara, T., Mizuno, S., Ohkusu, M., Honda, T., &
       Rikiishi, K. (1975). Observations of the directional spectrum of ocean waves using
       a cloverleaf buoy. *Journal of Physical Oceanography*, 5(4), 750-760.
    """
    def _num(key, value, what):
        try:
            v = float(value)
        except (TypeError, ValueError):
            raise InputError(f"{what} must be a number, got {value!r}", key=key) from None
        if not np.isfinite(v) or v <= 0:
            raise InputError(f"{what} must be positive, got {value!r}", key=key)
        return v

    h13 = _num("height", h13, "significant wave height H1/3 (m)")
    t13 = _num("period", t13, "significant wave period T1/3 (s)")
    s_max = _num("spreading", s_max, "spreading parameter s_max")
    name = str(spectrum).strip().lower().replace("_", "-")
    if name not in _SPECTRA:
        raise InputError(f"unknown spectrum {spectrum!r}; use one of {', '.join(_SPECTRA)}",
                         key="spectrum")
    for key, n in (("n_freq", n_freq), ("n_dir", n_dir)):
        if isinstance(n, bool) or int(n) != n or n < 1:
            raise InputError(f"number of bands must be a positive integer, got {n!r}",
                             key=key)
    n_freq, n_dir = int(n_freq), int(n_dir)

    if name == "bretschneider-mitsuyasu":
        if peak_period is not None:
            raise InputError("peak_period applies to spectrum 'jonswap' only; the "
                             "Bretschneider-Mitsuyasu peak is at 1.05 T1/3",
                             key="peak_period")
        g = 1.0
        tp = BM_PEAK_RATIO * t13
        a, b = _BM_A * h13**2 / t13**4, _BM_B / t13**4
    else:
        g = _num("gamma", gamma, "peak enhancement factor gamma")
        tp = (jonswap_peak_period(t13, g) if peak_period is None
              else _num("peak_period", peak_period, "peak period Tp (s)"))
        a, b = _jonswap_beta(g) * h13**2 / tp**4, _JS_B / tp**4
    fp = 1.0 / tp

    # Frequencies: Gauss-Legendre in u, with the energy above the frequency 1 - P = u^2.
    u, wu = np.polynomial.legendre.leggauss(n_freq)
    u, wu = 0.5 * (u[::-1] + 1.0), 0.5 * wu[::-1]          # u ascending: f descending
    f_rep = _energy_quantile_above(u**2, a, b, g, tp)[::-1]
    band_w = (2.0 * u * wu)[::-1]
    m0, m2 = (float(v[0]) for v in _cumulative_moments(np.array([np.inf]), a, b, g, tp))

    # Directions: Gauss-Jacobi in x = sin(theta/2), weight (1 - x^2)^(s - 1/2), which is
    # G(theta) d(theta) up to a constant: exact for polynomials in x of degree 2 n_dir - 1.
    s = mitsuyasu_s(f_rep, fp, s_max)
    angle = np.empty((n_freq, n_dir))
    dir_weight = np.empty((n_freq, n_dir))
    for i, si in enumerate(np.atleast_1d(s)):
        x, wx = _gauss_gegenbauer(n_dir, si - 0.5)
        angle[i] = 2.0 * np.arcsin(np.clip(x, -1.0, 1.0))
        dir_weight[i] = wx / wx.sum()

    weight = band_w[:, None] * dir_weight
    freq = np.broadcast_to(f_rep[:, None], weight.shape).ravel()
    weight = weight.ravel()
    angle = angle.ravel()
    keep = weight >= 1e-9 * weight.sum()
    weight = weight[keep] / weight[keep].sum()
    freq, angle = freq[keep], angle[keep]
    return Components(frequency=freq, period=1.0 / freq, angle=angle, weight=weight,
                      m0=float(m0), m0_target=h13**2 / 16.0, tm02=float(np.sqrt(m0 / m2)))
