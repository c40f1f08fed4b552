// The index sets Corvane stores per window, gathered from the one-method files. Each set returns flat values
// (null where undefined), the reason for every null, and the parameters of every method that ran, so a caller can
// store them as they are.
import { approximateEntropy } from "./entropy/apen";
import { multiscaleEntropy } from "./entropy/mse";
import { sampleEntropy } from "./entropy/sampen";
import { dfa } from "./fractal/dfa";
import { mfdfa } from "./fractal/mfdfa";
import { lombScargle } from "./frequency/lomb-scargle";
import { poincare } from "./poincare/poincare";
import type { Measured, Params } from "./result";
import { heartRate, meanNN, nn50, pnn50, rmssd, sdnn, sdsd } from "./time-domain";

export const SHORT_TERM_KEYS = [
  "mean_nn", "hr", "sdnn", "rmssd", "sdsd", "nn50", "pnn50", "sd1", "sd2", "sd1_sd2", "sampen", "dfa_alpha1",
  "vlf", "lf", "hf", "lf_hf", "lf_nu", "hf_nu", "lf_peak_hz", "hf_peak_hz",
] as const;
export type ShortTermKey = (typeof SHORT_TERM_KEYS)[number];

/** Lomb–Scargle grid of a short window: 0.001 Hz steps, still 3.3 times finer than the 1/300 s resolution of a
 *  5-min window (band powers change by well under 1 %), at half the cost of the finer default grid. */
export const SHORT_WINDOW_LOMB_SCARGLE = { fMinHz: 0.001, fStepHz: 0.001 } as const;

export const LONG_TERM_KEYS = ["mse_ci", "mse_slope_short", "mse_slope_long", "dfa_alpha2", "mfdfa_width", "apen"] as const;

/** Scales summed into a long window's complexity index. An hour holds 2,000–5,000 beats, too few for 200 coarse
 *  points at τ = 20 below about 67 bpm (DOMAIN §2.9); τ = 1…10 is defined from 2,000 beats, as in DOMAIN §6.2. */
export const LONG_WINDOW_CI_SCALES = [1, 10] as const;
export type LongTermKey = (typeof LONG_TERM_KEYS)[number];

export interface IndexSet<K extends string> {
  values: Record<K, number | null>;
  reasons: Partial<Record<K, string>>;
  /** Method id → parameters used, for every method that ran. */
  methods: Record<string, Params>;
}

export interface LongTermSet extends IndexSet<LongTermKey> {
  /** SampEn per scale τ = 1…maxScale, null where undefined (plot and storage). */
  mse: (number | null)[];
}

/** Copies one measured value into a set; a null value brings its reason along. */
function put<K extends string, V>(set: IndexSet<K>, key: K, m: Measured<V>, pick: (v: V) => number | null): void {
  set.methods[m.method] = m.params;
  if (m.value === null) {
    set.values[key] = null;
    set.reasons[key] = m.reason ?? "undefined";
    return;
  }
  const v = pick(m.value);
  set.values[key] = v;
  if (v === null) set.reasons[key] ??= "undefined for this window";
}

function emptySet<K extends string>(keys: readonly K[]): IndexSet<K> {
  return { values: Object.fromEntries(keys.map((k) => [k, null])) as Record<K, number | null>, reasons: {}, methods: {} };
}

export interface ShortTermInput {
  /** Cleaned NN intervals (ms) with isolated beats interpolated, and the time (s) of the beat ending each. */
  nn: Float64Array;
  times: Float64Array;
  /** The same window cleaned with abnormal beats deleted instead (for Lomb–Scargle, DOMAIN §2.1). */
  nnDeleted: Float64Array;
  timesDeleted: Float64Array;
  /** SampEn embedding dimension and tolerance (fraction of the window's SD); default m = 2, r = 0.2. */
  entropy?: { m: number; r: number };
}

/**
 * The short-term indices of one window (usually 5 min): Task Force time domain, Poincaré, SampEn(2, 0.2·SD),
 * DFA α1 and the Lomb–Scargle spectrum on beat times with abnormal beats deleted.
 */
export function shortTermIndices(w: ShortTermInput): IndexSet<ShortTermKey> {
  const set = emptySet(SHORT_TERM_KEYS);
  const { nn } = w;
  put(set, "mean_nn", meanNN(nn), (v) => v);
  put(set, "hr", heartRate(nn), (v) => v);
  put(set, "sdnn", sdnn(nn), (v) => v);
  put(set, "rmssd", rmssd(nn), (v) => v);
  put(set, "sdsd", sdsd(nn), (v) => v);
  put(set, "nn50", nn50(nn), (v) => v);
  put(set, "pnn50", pnn50(nn), (v) => v);
  const p = poincare(nn);
  put(set, "sd1", p, (v) => v.sd1);
  put(set, "sd2", p, (v) => v.sd2);
  put(set, "sd1_sd2", p, (v) => v.sd1Sd2);
  if (p.value?.reasons.sd1Sd2) set.reasons.sd1_sd2 = p.value.reasons.sd1Sd2;
  put(set, "sampen", sampleEntropy(nn, w.entropy), (v) => v.sampen);
  put(set, "dfa_alpha1", dfa(nn), (v) => v.alpha);
  const ls = lombScargle(w.nnDeleted, w.timesDeleted, SHORT_WINDOW_LOMB_SCARGLE);
  const spectral = [
    ["vlf", "vlf"], ["lf", "lf"], ["hf", "hf"], ["lf_hf", "lfHf"], ["lf_nu", "lfNu"], ["hf_nu", "hfNu"],
    ["lf_peak_hz", "lfPeakHz"], ["hf_peak_hz", "hfPeakHz"],
  ] as const;
  for (const [key, field] of spectral) {
    put(set, key, ls, (v) => v[field]);
    const why = ls.value?.reasons[field];
    if (why) set.reasons[key] = why;
  }
  return set;
}

/** The long-window indices (usually 60 min): MSE τ = 1…20 with its complexity index over τ = 1…10 and slopes, DFA α2,
 *  MF-DFA width Δh and ApEn (whose small-N bias makes short windows meaningless, DOMAIN §2.5). */
export function longTermIndices(nn: Float64Array): LongTermSet {
  const set: LongTermSet = { ...emptySet(LONG_TERM_KEYS), mse: [] };
  const mse = multiscaleEntropy(nn);
  const [ciFrom, ciTo] = LONG_WINDOW_CI_SCALES;
  put(set, "mse_ci", mse, (v) => {
    const part = v.curve.filter((c) => c.scale >= ciFrom && c.scale <= ciTo);
    const missing = part.find((c) => c.sampen === null);
    if (missing || part.length < ciTo - ciFrom + 1) {
      set.reasons.mse_ci = `complexity index over τ = ${ciFrom}…${ciTo} needs every scale; τ = ${missing?.scale ?? part.length + 1}: ${missing?.reason ?? "not computed"}`;
      return null;
    }
    return part.reduce((s, c) => s + c.sampen!, 0);
  });
  set.methods["mse-ci"] = { scales: LONG_WINDOW_CI_SCALES };
  put(set, "mse_slope_short", mse, (v) => v.slopes.short.slope);
  if (mse.value?.slopes.short.reason) set.reasons.mse_slope_short = mse.value.slopes.short.reason;
  put(set, "mse_slope_long", mse, (v) => v.slopes.long.slope);
  if (mse.value?.slopes.long.reason) set.reasons.mse_slope_long = mse.value.slopes.long.reason;
  set.mse = mse.value ? mse.value.curve.map((c) => c.sampen) : [];
  put(set, "dfa_alpha2", dfa(nn, { exponent: "alpha2" }), (v) => v.alpha);
  put(set, "mfdfa_width", mfdfa(nn), (v) => v.width);
  put(set, "apen", approximateEntropy(nn), (v) => v.apen);
  return set;
}
