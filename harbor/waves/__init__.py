"""Linear wave theory, spectra and directional spreading (pure array functions)."""

from harbor.waves.dispersion import G_STANDARD, wavelength, wavenumber

__all__ = ["G_STANDARD", "wavelength", "wavenumber"]
