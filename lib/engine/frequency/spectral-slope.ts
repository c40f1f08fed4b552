import { assertInteger, assertPositive, assertSeries } from "../assert";
import { measured, notDefined, type Measured } from "../result";
import { mean } from "../stats";
import { assertBeatTimes, coveredSpanS } from "../time-domain/beat-times";
import { lombScarglePower } from "./lomb-scargle-power";

export const SPECTRAL_SLOPE_DEFAULTS = {
  /** Fitted range, Hz (Bigger et al., Circulation 1996;93:2142: 10⁻⁴–10⁻² Hz). */
  fLowHz: 1e-4,
  fHighHz: 1e-2,
  /** Logarithmic bins per decade in which the periodogram is averaged before the fit (common practice). */
  binsPerDecade: 10,
  /** Shortest recording, s: 3 h, so that 10⁻⁴ Hz is at least one frequency step (1/T ≈ 0.9·10⁻⁴ Hz). */
  minRecordingS: 3 * 3600,
} as const;

/** Euler's γ / ln 10: E[log10 X] = log10 E[X] − this for an exponential variable X. */
const EULER_GAMMA_LOG10 = 0.5772156649015329 / Math.LN10;

/** Weighted least squares y = intercept + slope·x with weights w (and the weighted R²). */
function weightedLinearFit(
  x: ArrayLike<number>,
  y: ArrayLike<number>,
  w: ArrayLike<number>,
): { slope: number; intercept: number; r2: number } {
  let sw = 0, sx = 0, sy = 0;
  for (let i = 0; i < x.length; i++) {
    sw += w[i]!;
    sx += w[i]! * x[i]!;
    sy += w[i]! * y[i]!;
  }
  const mx = sx / sw, my = sy / sw;
  let sxx = 0, sxy = 0, syy = 0;
  for (let i = 0; i < x.length; i++) {
    const dx = x[i]! - mx, dy = y[i]! - my;
    sxx += w[i]! * dx * dx;
    sxy += w[i]! * dx * dy;
    syy += w[i]! * dy * dy;
  }
  const slope = sxy / sxx;
  return { slope, intercept: my - slope * mx, r2: syy === 0 ? 1 : (sxy * sxy) / (sxx * syy) };
}

export interface SpectralSlopeValue {
  /** Slope of log10 PSD against log10 f: about −1 for 1/f noise, healthy adults ≈ −1 (Bigger 1996, mem). */
  beta: number;
  intercept: number;
  /** Weighted coefficient of determination of the fit over the binned points. */
  r2: number;
  /** The binned points the line was fitted to, for the log-log plot, and how many periodogram values each holds. */
  log10FrequencyHz: Float64Array;
  log10Psd: Float64Array;
  binCounts: Uint32Array;
  /** The periodogram itself, ms²/Hz, at f_j = j/T inside the fitted range. */
  frequencyHz: Float64Array;
  psd: Float64Array;
}

/**
 * Spectral power-law slope β (Bigger et al. 1996; DOMAIN §2.6).
 *
 * 1. Lomb–Scargle periodogram of NN − mean NN at the beat times (see `lombScarglePower`) on the natural grid
 *    f_j = j/T (T = t_N − t_1, the independent frequencies) for fLow ≤ f_j ≤ fHigh, as a one-sided density
 *    PSD = 2·Δ̄·P with Δ̄ = T/(N − 1) the mean sampling interval (for even sampling, the ordinary periodogram).
 * 2. Logarithmic bins, `binsPerDecade` per decade from fLow: each non-empty bin gives the point
 *    (mean log10 f, mean log10 PSD + γ/ln 10). A periodogram value scatters about the spectrum as an exponential
 *    variable, whose logarithm is low on average by Euler's γ (in ln units); averaging logarithms keeps that bias the
 *    same in every bin, so it cannot tilt the line, and adding γ/ln 10 removes it. (Averaging the power first would
 *    leave the bias in the sparse low-frequency bins only and flatten the slope: about −0.74 instead of −1 on 3.5 h
 *    of 1/f noise in a 30-seed check with scipy.)
 * 3. Weighted least squares of those points, each weighted by the number of periodogram values in its bin (the
 *    inverse of its variance), so every periodogram value counts once as in a log-periodogram regression (Geweke &
 *    Porter-Hudak, J Time Ser Anal 1983;4:221) while the plot shows one point per bin. β is the slope.
 *
 * Undefined (null) for recordings shorter than 3 h, zero variance, or fewer than 3 non-empty bins.
 */
export function spectralSlope(
  nn: Float64Array,
  times: Float64Array,
  options: { fLowHz?: number; fHighHz?: number; binsPerDecade?: number; minRecordingS?: number } = {},
): Measured<SpectralSlopeValue> {
  assertSeries(nn, "nn");
  assertBeatTimes(nn, times);
  const fLowHz = options.fLowHz ?? SPECTRAL_SLOPE_DEFAULTS.fLowHz;
  const fHighHz = options.fHighHz ?? SPECTRAL_SLOPE_DEFAULTS.fHighHz;
  const binsPerDecade = options.binsPerDecade ?? SPECTRAL_SLOPE_DEFAULTS.binsPerDecade;
  const minRecordingS = options.minRecordingS ?? SPECTRAL_SLOPE_DEFAULTS.minRecordingS;
  assertPositive(fLowHz, "fLowHz");
  assertPositive(fHighHz, "fHighHz");
  if (!(fHighHz > fLowHz)) throw new RangeError("fHighHz must exceed fLowHz");
  assertInteger(binsPerDecade, "binsPerDecade", 1, 1000);
  const params = {
    fLowHz,
    fHighHz,
    binsPerDecade,
    minRecordingS,
    psdScaling: "2·mean interval·P (one-sided)",
    fit: "weighted least squares on log-binned mean log10 PSD (+ Euler γ / ln 10), weights = values per bin",
  };
  const n = nn.length;
  if (n < 3) return notDefined("spectral-slope", params, "fewer than 3 beats");
  if (coveredSpanS(nn, times) < minRecordingS) {
    return notDefined("spectral-slope", params, `recording shorter than ${minRecordingS / 3600} h`);
  }
  const m = mean(nn);
  const y = new Float64Array(n);
  let spread = 0;
  for (let k = 0; k < n; k++) {
    y[k] = nn[k]! - m;
    spread += Math.abs(y[k]!);
  }
  if (spread === 0) return notDefined("spectral-slope", params, "zero variance: all intervals are equal");
  const span = times[n - 1]! - times[0]!;
  const jLow = Math.max(1, Math.ceil(fLowHz * span - 1e-9));
  const jHigh = Math.floor(fHighHz * span + 1e-9);
  const count = jHigh - jLow + 1;
  if (count < 3) return notDefined("spectral-slope", params, "fewer than 3 frequencies in the fitted range");
  const p = lombScarglePower(times, y, jLow / span, 1 / span, count);
  const meanInterval = span / (n - 1);
  const f = new Float64Array(count);
  const psd = new Float64Array(count);
  const bins = Math.ceil(Math.log10(fHighHz / fLowHz) * binsPerDecade - 1e-9);
  const sumLogF = new Float64Array(bins);
  const sumLogPsd = new Float64Array(bins);
  const members = new Uint32Array(bins);
  const logLow = Math.log10(fLowHz);
  let zeros = 0;
  for (let j = 0; j < count; j++) {
    f[j] = (jLow + j) / span;
    psd[j] = 2 * meanInterval * p[j]!;
    // A value of exactly zero has no logarithm: it is left out (and named in the reason if too few remain).
    if (!(psd[j]! > 0)) {
      zeros++;
      continue;
    }
    const logF = Math.log10(f[j]!);
    const b = Math.min(bins - 1, Math.max(0, Math.floor((logF - logLow) * binsPerDecade)));
    sumLogF[b] = sumLogF[b]! + logF;
    sumLogPsd[b] = sumLogPsd[b]! + Math.log10(psd[j]!);
    members[b] = members[b]! + 1;
  }
  const xs: number[] = [];
  const ys: number[] = [];
  const ws: number[] = [];
  for (let b = 0; b < bins; b++) {
    const c = members[b]!;
    if (c === 0) continue;
    xs.push(sumLogF[b]! / c);
    ys.push(sumLogPsd[b]! / c + EULER_GAMMA_LOG10);
    ws.push(c);
  }
  if (xs.length < 3) {
    return notDefined("spectral-slope", params, `fewer than 3 frequency bins with power (${zeros} values are zero)`);
  }
  const log10FrequencyHz = Float64Array.from(xs);
  const log10Psd = Float64Array.from(ys);
  const binCounts = Uint32Array.from(ws);
  const fit = weightedLinearFit(log10FrequencyHz, log10Psd, binCounts);
  return measured("spectral-slope", params, {
    beta: fit.slope,
    intercept: fit.intercept,
    r2: fit.r2,
    log10FrequencyHz,
    log10Psd,
    binCounts,
    frequencyHz: f,
    psd,
  });
}
