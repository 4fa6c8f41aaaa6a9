"""Linear wave theory, spectra and directional spreading (pure array functions)."""

from harbor.waves.dispersion import G_STANDARD, wavelength, wavenumber
from harbor.waves.spectra import (
    BM_PEAK_RATIO,
    DEFAULT_N_DIR,
    DEFAULT_N_FREQ,
    Components,
    bretschneider_mitsuyasu,
    jonswap,
    jonswap_peak_period,
    mitsuyasu_s,
    mitsuyasu_spreading,
    random_components,
    spreading_cdf,
)

__all__ = ["BM_PEAK_RATIO", "Components", "DEFAULT_N_DIR", "DEFAULT_N_FREQ", "G_STANDARD",
           "bretschneider_mitsuyasu", "jonswap", "jonswap_peak_period", "mitsuyasu_s",
           "mitsuyasu_spreading", "random_components", "spreading_cdf", "wavelength",
           "wavenumber"]
