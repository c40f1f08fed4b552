import { assertInteger, assertSeries } from "../assert";
import { measured, notDefined, type Measured } from "../result";
import { EMBEDDING_CAVEAT } from "./caveats";

export const MUTUAL_INFORMATION_DEFAULTS = {
  /** Largest lag examined (samples). */
  maxLag: 50,
  /** Equal-width histogram bins per axis (common practice: 16 for a few thousand points). */
  bins: 16,
} as const;

export type MutualInformationOptions = { maxLag?: number; bins?: number };

/** Fewer pairs than this many per histogram cell on average make the joint histogram too sparse (common practice). */
const MIN_PAIRS_PER_CELL = 4;

export interface MutualInformationValue {
  /** First local minimum of I(τ), in samples (beats); null when I(τ) has none up to maxLag (see delayReason). */
  delay: number | null;
  delayReason: string | null;
  /** I(τ) in nats for τ = 0 … maxLag, for plotting. */
  lags: number[];
  mutualInformation: number[];
  caveat: string;
}

/**
 * Time-delayed mutual information and the embedding delay at its first minimum (Fraser & Swinney, Phys Rev A
 * 1986;33:1134).
 *
 * I(τ) = Σ_ij p_ij(τ)·ln[p_ij(τ) / (p_i·p_j)] in nats, from a joint histogram of the pairs (x_t, x_{t+τ}),
 * t = 0 … N−τ−1, with `bins` equal-width bins over [min x, max x] on each axis; both marginals come from the same
 * pairs. Fraser & Swinney partition adaptively; the fixed histogram is the common simplification and moves the
 * minimum little. The delay is the smallest τ ≥ 1 with I(τ) ≤ I(τ−1) and I(τ) < I(τ+1).
 *
 * Null with a reason for a constant series or fewer than 4·bins² pairs at the largest lag. Research only.
 */
export function mutualInformationDelay(x: Float64Array, options: MutualInformationOptions = {}): Measured<MutualInformationValue> {
  assertSeries(x, "x");
  const maxLag = options.maxLag ?? MUTUAL_INFORMATION_DEFAULTS.maxLag;
  const bins = options.bins ?? MUTUAL_INFORMATION_DEFAULTS.bins;
  assertInteger(maxLag, "maxLag", 2);
  assertInteger(bins, "bins", 2, 1024);
  const params = { maxLag, bins, binning: "equal-width", units: "nats" };
  const method = "mutual-information-delay";
  const n = x.length;
  const needed = MIN_PAIRS_PER_CELL * bins * bins + maxLag;
  if (n < needed) {
    return { ...notDefined(method, params, `fewer than ${needed} points (need ${MIN_PAIRS_PER_CELL}·bins² pairs at lag ${maxLag})`), research: true };
  }
  let lo = Infinity;
  let hi = -Infinity;
  for (let i = 0; i < n; i++) {
    lo = Math.min(lo, x[i]!);
    hi = Math.max(hi, x[i]!);
  }
  if (!(hi > lo)) return { ...notDefined(method, params, "zero variance: the series is constant"), research: true };
  const bin = new Int32Array(n);
  const scale = bins / (hi - lo);
  for (let i = 0; i < n; i++) bin[i] = Math.min(bins - 1, Math.floor((x[i]! - lo) * scale));

  const joint = new Float64Array(bins * bins);
  const pa = new Float64Array(bins);
  const pb = new Float64Array(bins);
  const mi: number[] = [];
  const lags: number[] = [];
  for (let tau = 0; tau <= maxLag; tau++) {
    joint.fill(0);
    pa.fill(0);
    pb.fill(0);
    const pairs = n - tau;
    for (let t = 0; t < pairs; t++) {
      const a = bin[t]!;
      const b = bin[t + tau]!;
      joint[a * bins + b]! += 1;
      pa[a]! += 1;
      pb[b]! += 1;
    }
    // Σ (c_ij/P)·ln(c_ij·P / (c_i·c_j)).
    let s = 0;
    for (let a = 0; a < bins; a++) {
      for (let b = 0; b < bins; b++) {
        const c = joint[a * bins + b]!;
        if (c > 0) s += c * Math.log((c * pairs) / (pa[a]! * pb[b]!));
      }
    }
    lags.push(tau);
    mi.push(s / pairs);
  }
  let delay: number | null = null;
  for (let tau = 1; tau < maxLag; tau++) {
    if (mi[tau]! <= mi[tau - 1]! && mi[tau]! < mi[tau + 1]!) {
      delay = tau;
      break;
    }
  }
  return {
    ...measured(method, params, {
      delay,
      delayReason: delay === null ? `no first minimum of the mutual information up to lag ${maxLag}` : null,
      lags,
      mutualInformation: mi,
      caveat: EMBEDDING_CAVEAT,
    }),
    research: true,
  };
}
