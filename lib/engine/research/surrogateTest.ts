import { assertInteger, assertPositive, assertSeries } from "../assert";
import { measured, notDefined, type Measured } from "../result";
import { SURROGATE_CAVEAT } from "./caveats";
import { iaaftSurrogates, IAAFT_DEFAULTS } from "./iaaft";

export const SURROGATE_TEST_DEFAULTS = {
  /** Number of IAAFT surrogates: 19 gives the one-sided 95 % rank test (p ≤ 1/20 when the data rank first). */
  surrogates: 19,
  seed: 1,
  /** Lag of the time-reversal asymmetry statistic (samples). */
  lag: 1,
  /** Significance level; needs 1/(surrogates + 1) ≤ alpha. */
  alpha: 0.05,
  maxIterations: IAAFT_DEFAULTS.maxIterations,
  /** Longest segment tested: 2048 beats (about half an hour) keeps 19 surrogates within the engine's time budget;
   *  the answer concerns that segment, which the result names. */
  maxLength: 2048,
} as const;

export type SurrogateTestOptions = {
  surrogates?: number;
  seed?: number;
  lag?: number;
  alpha?: number;
  maxIterations?: number;
  maxLength?: number;
};

/** Shortest power-of-two segment the test accepts (common practice: spectra of fewer points are too coarse). */
const MIN_LENGTH = 512;

export interface SurrogateTestValue {
  /** "yes" when the data's statistic exceeds every surrogate's often enough to reject the null at alpha. */
  structureBeyondLinear: "yes" | "no";
  /** One-sided rank test: p ≤ (k + 1)/(S + 1), k = surrogates whose statistic is at least the data's. */
  pValueBound: number;
  atLeastAsExtreme: number;
  surrogates: number;
  statistic: string;
  dataStatistic: number;
  surrogateStatistics: number[];
  /** The power-of-two segment tested (fili's FFT is radix 2), chosen to match its ends best. */
  segmentStart: number;
  segmentLength: number;
  /** Mean relative spectral mismatch of the surrogates (see iaaftSurrogates) and how many hit maxIterations. */
  meanSpectralError: number;
  unconverged: number;
  caveat: string;
}

/**
 * Surrogate-data test for structure beyond linear correlations (Theiler et al., Physica D 1992;58:77) with IAAFT
 * surrogates (Schreiber & Schmitz, PRL 1996;77:635).
 *
 * Null hypothesis: x is a static monotone transform of a stationary linear Gaussian process. Discriminating
 * statistic: the time-reversal asymmetry Q(ℓ) = ⟨(x_{t+ℓ} − x_t)³⟩ / ⟨(x_{t+ℓ} − x_t)²⟩^{3/2}; its magnitude |Q| is
 * compared, because every process of the null is time-reversible (Q ≈ 0) while nonlinear dynamics (and heart rate,
 * whose decelerations and accelerations differ) need not be. Rank test, one-sided: k = number of surrogates with
 * |Q_s| ≥ |Q_data|; p ≤ (k + 1)/(S + 1); "yes" when that bound is ≤ alpha (S = 19, alpha = 0.05: the data must rank
 * first).
 *
 * fili's FFT is radix 2, so the test runs on the power-of-two segment of greatest length whose ends match best
 * (Schreiber & Schmitz, Physica D 2000;142:346: minimise the jump (x_s − x_e)² plus the slip of the first
 * differences, avoiding a spurious high-frequency edge). Null with a reason for fewer than 512 points or a constant
 * series. Research only.
 */
export function surrogateTest(x: Float64Array, options: SurrogateTestOptions = {}): Measured<SurrogateTestValue> {
  assertSeries(x, "x");
  const o = { ...SURROGATE_TEST_DEFAULTS, ...options };
  assertInteger(o.surrogates, "surrogates", 1);
  assertInteger(o.seed, "seed", 0, 0xffffffff);
  assertInteger(o.lag, "lag", 1);
  assertPositive(o.alpha, "alpha");
  if (1 / (o.surrogates + 1) > o.alpha) {
    throw new RangeError(`${o.surrogates} surrogates cannot reach alpha = ${o.alpha}: need at least ${Math.ceil(1 / o.alpha - 1)}`);
  }
  const statistic = `time-reversal asymmetry |Q| at lag ${o.lag}`;
  const params = { ...o, statistic: "time-reversal asymmetry", surrogateMethod: "IAAFT" };
  const method = "surrogate-test-iaaft";
  assertInteger(o.maxLength, "maxLength", MIN_LENGTH);
  let len = 1;
  while (len * 2 <= Math.min(x.length, o.maxLength)) len *= 2;
  if (len < MIN_LENGTH) {
    return { ...notDefined(method, params, `fewer than ${MIN_LENGTH} points`), research: true };
  }
  const start = bestEndMatch(x, len);
  const seg = x.slice(start, start + len);
  let lo = Infinity;
  let hi = -Infinity;
  for (let i = 0; i < len; i++) {
    lo = Math.min(lo, seg[i]!);
    hi = Math.max(hi, seg[i]!);
  }
  if (!(hi > lo)) return { ...notDefined(method, params, "zero variance: the series is constant"), research: true };
  const q0 = Math.abs(asymmetry(seg, o.lag));
  const surr = iaaftSurrogates(seg, o.surrogates, o.seed, o.maxIterations);
  const stats = surr.surrogates.map((s) => Math.abs(asymmetry(s, o.lag)));
  const k = stats.filter((q) => q >= q0).length;
  const p = (k + 1) / (o.surrogates + 1);
  return {
    ...measured(method, params, {
      structureBeyondLinear: p <= o.alpha ? "yes" : "no",
      pValueBound: p,
      atLeastAsExtreme: k,
      surrogates: o.surrogates,
      statistic,
      dataStatistic: q0,
      surrogateStatistics: stats,
      segmentStart: start,
      segmentLength: len,
      meanSpectralError: surr.spectralError.reduce((a, b) => a + b, 0) / o.surrogates,
      unconverged: surr.iterations.filter((it) => it >= o.maxIterations).length,
      caveat: SURROGATE_CAVEAT,
    }),
    research: true,
  };
}

/** Q(ℓ) = ⟨d³⟩/⟨d²⟩^{3/2}, d = x_{t+ℓ} − x_t; 0 when every difference is 0. */
function asymmetry(x: Float64Array, lag: number): number {
  let s2 = 0;
  let s3 = 0;
  const n = x.length - lag;
  for (let t = 0; t < n; t++) {
    const d = x[t + lag]! - x[t]!;
    s2 += d * d;
    s3 += d * d * d;
  }
  return s2 > 0 ? s3 / n / Math.pow(s2 / n, 1.5) : 0;
}

/** Start of the length-`len` segment minimising the end mismatch (x_s − x_e)² + ((x_{s+1} − x_s) − (x_e − x_{e−1}))². */
function bestEndMatch(x: Float64Array, len: number): number {
  let best = Infinity;
  let bestStart = 0;
  for (let s = 0; s + len <= x.length; s++) {
    const e = s + len - 1;
    const jump = x[s]! - x[e]!;
    const slip = x[s + 1]! - x[s]! - (x[e]! - x[e - 1]!);
    const c = jump * jump + slip * slip;
    if (c < best) {
      best = c;
      bestStart = s;
    }
  }
  return bestStart;
}
