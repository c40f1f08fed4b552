import { assertPositive, assertSeries } from "../assert";
import { measured, notDefined, type Measured } from "../result";
import { mean } from "../stats";
import { assertBeatTimes, coveredSpanS } from "../time-domain/beat-times";
import { BAND_PARAMS, bandIndices, MIN_WINDOW_S, type Spectrum } from "./bands";
import { lombScarglePower } from "./lomb-scargle-power";

export const LOMB_SCARGLE_DEFAULTS = {
  /** First frequency of the grid, Hz. */
  fMinHz: 0.001,
  /** Grid step, Hz (about 7× finer than the 1/300 s resolution of a 5-min window, for smooth band edges). */
  fStepHz: 0.0005,
} as const;

/**
 * Lomb–Scargle spectrum of the NN intervals at their own beat times — no resampling, so deleted beats simply leave
 * a gap (Moody 1993; Laguna, Moody & Mark, IEEE TBME 1998;45:698).
 *
 * - Series: y_k = NN_k − mean NN, sampled at t_k = `times[k]` (s; the beat closing NN_k).
 * - Grid: f_j = fMin + j·fStep up to the **mean Nyquist frequency** f_N = (N − 1) / (2·(t_N − t_1)), half the mean
 *   beat rate (Laguna 1998); nothing above it is computed.
 * - Periodogram: the classical Lomb–Scargle P(f) (see `lombScarglePower`; equal to scipy's
 *   `lombscargle(normalize=False)`), then **scaled so that ∫ PSD df over the grid (trapezoid rule) equals the
 *   variance of the window**, Σ y_k² / N: PSD(f) = P(f) · var / ∫P df, in ms²/Hz.
 * - Bands VLF 0.003–0.04, LF 0.04–0.15, HF 0.15–0.40 Hz by integrating the PSD (`bandIndices`), LF/HF, LFnu, HFnu and
 *   the peak frequency in LF and HF; each is null with a reason when the window is too short for it (Task Force:
 *   VLF 5 min, LF 2 min, HF 1 min) or the band lies above f_N (HF needs a mean heart rate ≥ 48 bpm).
 *
 * Undefined (null) as a whole for fewer than 3 beats, a window shorter than 1 min, or zero variance.
 */
export function lombScargle(
  nn: Float64Array,
  times: Float64Array,
  options: { fMinHz?: number; fStepHz?: number } = {},
): Measured<Spectrum> {
  assertSeries(nn, "nn");
  assertBeatTimes(nn, times);
  const fMinHz = options.fMinHz ?? LOMB_SCARGLE_DEFAULTS.fMinHz;
  const fStepHz = options.fStepHz ?? LOMB_SCARGLE_DEFAULTS.fStepHz;
  assertPositive(fMinHz, "fMinHz");
  assertPositive(fStepHz, "fStepHz");
  const params = { fMinHz, fStepHz, normalisation: "integral of PSD over the grid = variance (ddof 0)", ...BAND_PARAMS };
  const n = nn.length;
  if (n < 3) return notDefined("lomb-scargle", params, "fewer than 3 beats");
  const spanS = coveredSpanS(nn, times);
  const meanIntervalS = mean(nn) / 1000;
  if (spanS + meanIntervalS < MIN_WINDOW_S.hf) {
    return notDefined("lomb-scargle", params, "window shorter than 1 min: no band can be estimated (Task Force)");
  }
  const m = mean(nn);
  const y = new Float64Array(n);
  let variance = 0;
  for (let k = 0; k < n; k++) {
    y[k] = nn[k]! - m;
    variance += y[k]! * y[k]!;
  }
  variance /= n;
  if (variance === 0) return notDefined("lomb-scargle", params, "zero variance: all intervals are equal");
  const nyquistHz = (n - 1) / (2 * (times[n - 1]! - times[0]!));
  if (nyquistHz < fMinHz + fStepHz) {
    return notDefined("lomb-scargle", params, `mean Nyquist frequency ${nyquistHz.toFixed(4)} Hz is below the grid`);
  }
  // The small allowance keeps a grid point that equals f_N but is computed a rounding error above it.
  const count = Math.floor((nyquistHz - fMinHz) / fStepHz + 1e-9) + 1;
  const f = new Float64Array(count);
  for (let j = 0; j < count; j++) f[j] = fMinHz + j * fStepHz;
  const p = lombScarglePower(times, y, fMinHz, fStepHz, count);
  let integral = 0;
  for (let j = 1; j < count; j++) integral += (fStepHz * (p[j - 1]! + p[j]!)) / 2;
  if (!(integral > 0)) return notDefined("lomb-scargle", params, "no power on the frequency grid");
  const psd = new Float64Array(count);
  const scale = variance / integral;
  for (let j = 0; j < count; j++) psd[j] = p[j]! * scale;
  return measured("lomb-scargle", params, {
    frequencyHz: f,
    psd,
    nyquistHz,
    spanS,
    ...bandIndices(f, psd, spanS, meanIntervalS, nyquistHz),
  });
}
