// Frequency-domain methods: Lomb–Scargle and spline + Welch spectra with band indices, and the spectral slope β.
export { lombScargle, LOMB_SCARGLE_DEFAULTS } from "./lomb-scargle";
export { welch, WELCH_DEFAULTS, type WelchSpectrum } from "./welch";
export { spectralSlope, SPECTRAL_SLOPE_DEFAULTS, type SpectralSlopeValue } from "./spectral-slope";
export { BANDS_HZ, MIN_WINDOW_S, type Spectrum, type SpectralIndices } from "./bands";
