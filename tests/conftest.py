import mpmath as mp
import numpy as np
import pytest


@pytest.fixture(scope="session")
def mp_semi_infinite():
    """Sommerfeld's closed form evaluated with mpmath at 30 digits (independent reference).

    u = e^{-i pi/4}/sqrt(pi) [e^{-ikr cos(th - th0)} F(s1) + e^{-ikr cos(th + th0)} F(s2)],
    F(s) = int_{-inf}^{s} e^{i t^2} dt = sqrt(pi/2) [(1/2 + C(z)) + i (1/2 + S(z))],
    z = s sqrt(2/pi) (Abramowitz & Stegun 1964, 7.3.1-2; Sommerfeld 1896;
    Penney & Price 1952), th = arg(x - i y) in [0, 2 pi), th0 = pi - alpha.
    """

    def u(x, y, L, direction_deg):
        with mp.workdps(30):
            k = 2 * mp.pi / mp.mpf(L)
            x = mp.mpf(x)
            y = mp.mpf(y)
            r = mp.sqrt(x * x + y * y)
            th = mp.atan2(-y, x)
            if th < 0:
                th += 2 * mp.pi
            th0 = mp.pi - mp.radians(direction_deg)

            def F(s):
                z = s * mp.sqrt(2 / mp.pi)
                return mp.sqrt(mp.pi / 2) * ((mp.mpf(1) / 2 + mp.fresnelc(z)) + 1j * (mp.mpf(1) / 2 + mp.fresnels(z)))

            tot = 0
            for psi in (th - th0, th + th0):
                s = mp.sqrt(2 * k * r) * mp.cos(psi / 2)
                tot += mp.expj(-k * r * mp.cos(psi)) * F(s)
            return complex(mp.expj(-mp.pi / 4) / mp.sqrt(mp.pi) * tot)

    return u


def spread_points(L, n_r=(0.05, 0.6, 3.0, 17.0), n_theta=16):
    """Points spread over every zone: radii in wavelengths, polar angles all round."""
    pts = []
    for rr in n_r:
        for th in np.linspace(0.1, 2 * np.pi - 0.1, n_theta):
            pts.append((rr * L * np.cos(th), rr * L * np.sin(th)))
    return np.array(pts)


@pytest.fixture(scope="session")
def demo_scenario():
    """The bundled demo scenario (an invented harbour), loaded once, WITHOUT its survey
    and reflection coefficients: the screening methods' demo (with them, every sea state
    goes to the full-field method, which tests/test_agitation.py covers)."""
    import dataclasses
    from pathlib import Path

    import harbor

    sc = harbor.load_scenario(Path(__file__).resolve().parents[1] / "scenarios" / "demo.toml")
    return dataclasses.replace(sc, bathymetry=None, reflection={}, footprints={})


@pytest.fixture(scope="session")
def full_demo_scenario():
    """The bundled demo scenario as shipped (survey, reflection coefficients)."""
    from pathlib import Path

    import harbor

    return harbor.load_scenario(Path(__file__).resolve().parents[1] / "scenarios" / "demo.toml")
