import { assertInteger, assertPositive, assertSeries } from "../assert";
import { measured, notDefined, type Measured } from "../result";
import { mean } from "../stats";
import { assertBeatTimes, coveredSpanS } from "../time-domain/beat-times";
import { BAND_PARAMS, bandIndices, MIN_WINDOW_S, type Spectrum } from "./bands";
import { fftOfSize } from "./fft";
import { resampleNaturalSpline } from "./resample";

export const WELCH_DEFAULTS = {
  /** Even resampling rate, Hz (common practice). */
  resampleHz: 4,
  /** Samples per Welch segment: 256 at 4 Hz = 64 s (common practice). A power of two (fili's FFT). */
  segmentLength: 256,
  /** Overlap between segments as a fraction of a segment. */
  overlap: 0.5,
} as const;

export interface WelchSpectrum extends Spectrum {
  /** Number of resampled points and of Welch segments averaged. */
  samples: number;
  segments: number;
}

/**
 * Spectrum by the resampling route (common practice; DOMAIN §2.3):
 * 1. a natural cubic spline through (t_k, NN_k), sampled at 4 Hz from t_1 to t_N (`resampleNaturalSpline`);
 * 2. the mean of the samples removed;
 * 3. Welch's average of modified periodograms (Welch, IEEE Trans Audio Electroacoust 1967;15:70): segments of 256
 *    samples overlapping by 50 %, each with its least-squares line removed and multiplied by the **periodic** Hann
 *    window w[n] = ½ − ½·cos(2πn/256) (as scipy.signal.welch uses; fili's "hanning" is the symmetric form, so the
 *    window is applied here), FFT by fili; PSD_k = |X_k|² / (fs·Σw²), doubled except at 0 and fs/2 (one-sided
 *    density, scipy's `scaling="density"`), averaged over segments by the mean. Units ms²/Hz.
 * Bands, ratios, normalised units and peaks as for Lomb–Scargle (`bandIndices`; HF also needs the mean Nyquist
 * frequency of the beats to reach 0.40 Hz — resampling cannot create the missing information, Laguna 1998).
 *
 * Undefined (null) for fewer than 3 beats, zero variance, or fewer resampled points than one segment (64 s).
 */
export function welch(
  nn: Float64Array,
  times: Float64Array,
  options: { resampleHz?: number; segmentLength?: number; overlap?: number } = {},
): Measured<WelchSpectrum> {
  assertSeries(nn, "nn");
  assertBeatTimes(nn, times);
  const resampleHz = options.resampleHz ?? WELCH_DEFAULTS.resampleHz;
  const segmentLength = options.segmentLength ?? WELCH_DEFAULTS.segmentLength;
  const overlap = options.overlap ?? WELCH_DEFAULTS.overlap;
  assertPositive(resampleHz, "resampleHz");
  assertInteger(segmentLength, "segmentLength", 4);
  if ((segmentLength & (segmentLength - 1)) !== 0) throw new RangeError("segmentLength must be a power of two");
  if (!(overlap >= 0 && overlap < 1)) throw new RangeError(`overlap must be in [0, 1), got ${overlap}`);
  const step = segmentLength - Math.floor(segmentLength * overlap);
  const params = {
    resampleHz,
    segmentLength,
    overlap,
    spline: "natural cubic",
    window: "hann (periodic)",
    detrend: "linear, per segment",
    scaling: "one-sided density",
    ...BAND_PARAMS,
  };
  const n = nn.length;
  if (n < 3) return notDefined("welch", params, "fewer than 3 beats");
  const m = mean(nn);
  let spread = 0;
  for (let k = 0; k < n; k++) spread += Math.abs(nn[k]! - m);
  if (spread === 0) return notDefined("welch", params, "zero variance: all intervals are equal");
  const resampled = resampleNaturalSpline(times, nn, resampleHz);
  const x = resampled.values;
  const total = x.length;
  if (total < segmentLength) {
    return notDefined(
      "welch",
      params,
      `fewer than ${segmentLength} resampled points (${segmentLength / resampleHz} s): too short for one Welch segment`,
    );
  }
  const xm = mean(x);
  for (let i = 0; i < total; i++) x[i] = x[i]! - xm;

  const window = new Float64Array(segmentLength);
  let windowPower = 0;
  for (let i = 0; i < segmentLength; i++) {
    window[i] = 0.5 - 0.5 * Math.cos((2 * Math.PI * i) / segmentLength);
    windowPower += window[i]! * window[i]!;
  }
  // Least-squares line on i = 0 … L−1 has slope Σ(i − ī)x_i / Σ(i − ī)².
  const centre = (segmentLength - 1) / 2;
  let sxx = 0;
  for (let i = 0; i < segmentLength; i++) sxx += (i - centre) * (i - centre);

  const bins = segmentLength / 2 + 1;
  const acc = new Float64Array(bins);
  const buffer = new Float64Array(segmentLength);
  const fft = fftOfSize(segmentLength);
  let segments = 0;
  for (let start = 0; start + segmentLength <= total; start += step) {
    let sum = 0;
    let sxy = 0;
    for (let i = 0; i < segmentLength; i++) {
      const v = x[start + i]!;
      sum += v;
      sxy += (i - centre) * v;
    }
    const level = sum / segmentLength;
    const slope = sxy / sxx;
    for (let i = 0; i < segmentLength; i++) buffer[i] = (x[start + i]! - level - slope * (i - centre)) * window[i]!;
    const spectrum = fft.forward(buffer, "none");
    for (let k = 0; k < bins; k++) acc[k] = acc[k]! + spectrum.re[k]! ** 2 + spectrum.im[k]! ** 2;
    segments++;
  }
  const f = new Float64Array(bins);
  const psd = new Float64Array(bins);
  const scale = 1 / (resampleHz * windowPower * segments);
  for (let k = 0; k < bins; k++) {
    f[k] = (k * resampleHz) / segmentLength;
    psd[k] = acc[k]! * scale * (k === 0 || k === bins - 1 ? 1 : 2);
  }
  const spanS = coveredSpanS(nn, times);
  const nyquistHz = (n - 1) / (2 * (times[n - 1]! - times[0]!));
  return measured("welch", params, {
    frequencyHz: f,
    psd,
    nyquistHz,
    spanS,
    samples: total,
    segments,
    ...bandIndices(f, psd, spanS, m / 1000, nyquistHz),
  });
}
