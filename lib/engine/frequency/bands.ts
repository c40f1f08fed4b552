// Frequency bands, their minimum window lengths, and the band indices shared by the Lomb–Scargle and Welch routes.

/** Band edges, Hz (Task Force 1996): VLF 0.003–0.04, LF 0.04–0.15, HF 0.15–0.40. */
export const BANDS_HZ = {
  vlf: [0.003, 0.04],
  lf: [0.04, 0.15],
  hf: [0.15, 0.4],
} as const;

/** Shortest window for each band, s (Task Force 1996, mem): VLF 5 min, LF 2 min, HF 1 min. */
export const MIN_WINDOW_S = { vlf: 300, lf: 120, hf: 60 } as const;

export type Band = keyof typeof BANDS_HZ;

export interface SpectralIndices {
  /** Band powers, ms². */
  vlf: number | null;
  lf: number | null;
  hf: number | null;
  lfHf: number | null;
  /** LF/(LF+HF)·100 and HF/(LF+HF)·100 (the Task Force writes the denominator as total power − VLF). */
  lfNu: number | null;
  hfNu: number | null;
  /** Frequency of the largest PSD value on the grid inside the band, Hz (resolution = grid step). */
  lfPeakHz: number | null;
  hfPeakHz: number | null;
  /** Why a field above is null, keyed by its name. */
  reasons: Partial<Record<"vlf" | "lf" | "hf" | "lfHf" | "lfNu" | "hfNu" | "lfPeakHz" | "hfPeakHz", string>>;
}

export interface Spectrum extends SpectralIndices {
  /** The one-sided spectrum for plotting: frequencies, Hz, and PSD, ms²/Hz. */
  frequencyHz: Float64Array;
  psd: Float64Array;
  /** Mean Nyquist frequency of the beats, (N − 1) / (2·(t_N − t_1)), Hz (Laguna, Moody & Mark 1998). */
  nyquistHz: number;
  /** Time covered by the beats, s (from the beat opening the first interval to the last beat). */
  spanS: number;
}

/** The band parameters recorded with every spectral result. */
export const BAND_PARAMS = {
  bandsHz: [BANDS_HZ.vlf[0], BANDS_HZ.lf[0], BANDS_HZ.hf[0], BANDS_HZ.hf[1]],
  minWindowS: [MIN_WINDOW_S.vlf, MIN_WINDOW_S.lf, MIN_WINDOW_S.hf],
  bandPower: "integral of the linearly interpolated PSD between the band edges",
} as const;

/**
 * ∫_lo^hi of the piecewise-linear interpolant through (f_i, p_i) — the trapezoid rule, with partial end intervals,
 * so that adjacent bands add up exactly whatever the grid. Requires f increasing and f_0 ≤ lo < hi ≤ f_last.
 */
export function integrateLinear(f: Float64Array, p: Float64Array, lo: number, hi: number): number {
  let total = 0;
  for (let i = 0; i + 1 < f.length; i++) {
    const f0 = f[i]!;
    const f1 = f[i + 1]!;
    if (f1 <= lo) continue;
    if (f0 >= hi) break;
    const a = Math.max(lo, f0);
    const b = Math.min(hi, f1);
    const slope = (p[i + 1]! - p[i]!) / (f1 - f0);
    const pa = p[i]! + slope * (a - f0);
    const pb = p[i]! + slope * (b - f0);
    total += ((b - a) * (pa + pb)) / 2;
  }
  return total;
}

const NAMES: Record<Band, string> = { vlf: "VLF", lf: "LF", hf: "HF" };
/** Frequencies this close to a band edge count as on it (grid values such as 0.001 + 298 × 0.0005 round). */
const EDGE_SLACK_HZ = 1e-9;

/**
 * Band powers, LF/HF, normalised units and peaks from a one-sided PSD on increasing frequencies.
 *
 * A band is null, with its reason, when
 * - the window is shorter than the Task Force minimum for it (VLF 5 min, LF 2 min, HF 1 min). A window cut from a
 *   stream at beat boundaries falls short of its nominal length by up to one interval, so the span is compared with
 *   the minimum less one mean interval (common practice);
 * - the band reaches above the mean Nyquist frequency of the beats (Laguna, Moody & Mark 1998): the HF band needs a
 *   mean heart rate of at least 48 bpm;
 * - the spectrum does not cover the band.
 */
export function bandIndices(
  f: Float64Array,
  psd: Float64Array,
  spanS: number,
  meanIntervalS: number,
  nyquistHz: number,
): SpectralIndices {
  const reasons: SpectralIndices["reasons"] = {};
  const first = f[0]!;
  const last = f[f.length - 1]!;
  const power = (band: Band): number | null => {
    const [lo, hi] = BANDS_HZ[band];
    const min = MIN_WINDOW_S[band];
    if (spanS + meanIntervalS < min) {
      reasons[band] = `window of ${spanS.toFixed(0)} s is shorter than the ${min / 60} min the Task Force asks for ${NAMES[band]}`;
      return null;
    }
    if (hi > nyquistHz + EDGE_SLACK_HZ) {
      reasons[band] =
        `mean heart rate too low: the ${NAMES[band]} band reaches ${hi} Hz, above the mean Nyquist frequency ` +
        `of the beats (${nyquistHz.toFixed(3)} Hz)`;
      return null;
    }
    if (lo < first - EDGE_SLACK_HZ || hi > last + EDGE_SLACK_HZ) {
      reasons[band] = `the spectrum (${first}–${last} Hz) does not cover the ${NAMES[band]} band`;
      return null;
    }
    return integrateLinear(f, psd, Math.max(lo, first), Math.min(hi, last));
  };
  const peak = (band: Band, bandPower: number | null): number | null => {
    if (bandPower === null) return null;
    const [lo, hi] = BANDS_HZ[band];
    let best = -1;
    for (let i = 0; i < f.length; i++) {
      if (f[i]! < lo - EDGE_SLACK_HZ || f[i]! > hi + EDGE_SLACK_HZ) continue;
      if (best < 0 || psd[i]! > psd[best]!) best = i;
    }
    return best < 0 ? null : f[best]!;
  };
  const vlf = power("vlf");
  const lf = power("lf");
  const hf = power("hf");
  const lfPeakHz = peak("lf", lf);
  const hfPeakHz = peak("hf", hf);
  if (lf === null) reasons.lfPeakHz = reasons.lf;
  else if (lfPeakHz === null) reasons.lfPeakHz = "no spectral line inside the LF band";
  if (hf === null) reasons.hfPeakHz = reasons.hf;
  else if (hfPeakHz === null) reasons.hfPeakHz = "no spectral line inside the HF band";

  let lfHf: number | null = null;
  let lfNu: number | null = null;
  let hfNu: number | null = null;
  if (lf === null || hf === null) {
    const why = reasons.lf ?? reasons.hf!;
    reasons.lfHf = why;
    reasons.lfNu = why;
    reasons.hfNu = why;
  } else {
    if (hf > 0) lfHf = lf / hf;
    else reasons.lfHf = "no power in the HF band";
    if (lf + hf > 0) {
      lfNu = (100 * lf) / (lf + hf);
      hfNu = (100 * hf) / (lf + hf);
    } else {
      reasons.lfNu = "no power in the LF and HF bands";
      reasons.hfNu = reasons.lfNu;
    }
  }
  return { vlf, lf, hf, lfHf, lfNu, hfNu, lfPeakHz, hfPeakHz, reasons };
}
