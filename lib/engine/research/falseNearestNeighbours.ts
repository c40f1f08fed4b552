import { assertInteger, assertPositive, assertSeries } from "../assert";
import { measured, notDefined, type Measured } from "../result";
import { sd } from "../stats";
import { EMBEDDING_CAVEAT } from "./caveats";
import { delayVectorCount, nearestNeighbours } from "./embedding";

export const FALSE_NEAREST_NEIGHBOURS_DEFAULTS = {
  /** Embedding delay (samples); the caller usually passes the mutual-information delay. */
  tau: 1,
  /** Largest embedding dimension examined. */
  maxDim: 10,
  /** Criterion 1 threshold R_tol (Kennel et al. 1992 use 10–15 and note insensitivity in that range). */
  rTol: 15,
  /** Criterion 2 threshold A_tol (Kennel et al. 1992). */
  aTol: 2,
  /** The embedding dimension is the first m whose false-neighbour share is below this (common practice: 1 %). */
  threshold: 0.01,
  /** Neighbours closer in time than this many samples are excluded (0: only the point itself). */
  theiler: 0,
  /** Shares are estimated from at most this many query vectors, evenly spaced in time (neighbours are still
   *  searched among all vectors): the binomial standard error of a share is then ≤ 1.6 %. */
  maxQueries: 1000,
  /** Stop at the first m below the threshold, or once the share has risen for two successive m after its minimum
   *  (criterion 2 taking over: noise-like data that will not reach the threshold). */
  stopEarly: true,
} as const;

export type FalseNearestNeighboursOptions = {
  tau?: number;
  maxDim?: number;
  rTol?: number;
  aTol?: number;
  threshold?: number;
  theiler?: number;
  maxQueries?: number;
  stopEarly?: boolean;
};

/** Fewer delay vectors than this at the largest dimension make the neighbour statistics meaningless (common practice). */
const MIN_VECTORS = 200;

export interface FalseNearestNeighboursValue {
  /** Smallest m whose false-neighbour share is below the threshold; null when none is (see dimensionReason). */
  dimension: number | null;
  dimensionReason: string | null;
  /** m = 1, 2, … (up to maxDim, or where the scan stopped) and the share of nearest neighbours in dimension m that are false in m + 1. */
  dims: number[];
  falseFraction: number[];
  /** Vectors with a usable neighbour at each m (duplicates and Theiler-excluded ones are not counted). */
  counted: number[];
  caveat: string;
}

/**
 * Embedding dimension by false nearest neighbours (Kennel, Brown & Abarbanel, Phys Rev A 1992;45:3403).
 *
 * For m = 1 … maxDim, each delay vector y_i = (x_i, x_{i+τ}, …, x_{i+(m−1)τ}), i < N − mτ, gets its Euclidean
 * nearest neighbour y_j (|i − j| > theiler, distance R_m > 0). The pair is false when going to m + 1 either
 *   (1) |x_{i+mτ} − x_{j+mτ}| / R_m > R_tol, or
 *   (2) R_{m+1} / R_A > A_tol, with R_A the standard deviation of the series (ddof 1).
 * The share of false pairs is reported per m; the embedding dimension is the first m with a share below the
 * threshold. Shares come from up to `maxQueries` query vectors evenly spaced in time. With `stopEarly` the scan
 * ends at that m, or when the share has risen twice in succession after its minimum (noise-like data: the nearest
 * neighbours only move apart as m grows); this keeps the cost of high dimensions, where neighbour search tends to
 * brute force, for the data that need them. Null with a reason for a constant series or fewer than 200 vectors at m = maxDim. Research only.
 */
export function falseNearestNeighbours(x: Float64Array, options: FalseNearestNeighboursOptions = {}): Measured<FalseNearestNeighboursValue> {
  assertSeries(x, "x");
  const o = { ...FALSE_NEAREST_NEIGHBOURS_DEFAULTS, ...options };
  assertInteger(o.tau, "tau", 1);
  assertInteger(o.maxDim, "maxDim", 1, 30);
  assertInteger(o.theiler, "theiler", 0);
  assertInteger(o.maxQueries, "maxQueries", 1);
  assertPositive(o.rTol, "rTol");
  assertPositive(o.aTol, "aTol");
  assertPositive(o.threshold, "threshold");
  const params = { ...o, norm: "euclidean" };
  const method = "false-nearest-neighbours";
  const n = x.length;
  const last = delayVectorCount(n, o.maxDim + 1, o.tau);
  if (last < MIN_VECTORS) {
    return { ...notDefined(method, params, `too few points: ${Math.max(0, last)} delay vectors at m = ${o.maxDim} (need ${MIN_VECTORS})`), research: true };
  }
  const ra = sd(x, 1);
  if (!(ra > 0)) return { ...notDefined(method, params, "zero variance: the series is constant"), research: true };

  const dims: number[] = [];
  const falseFraction: number[] = [];
  const counted: number[] = [];
  let dimension: number | null = null;
  for (let m = 1; m <= o.maxDim; m++) {
    // Vectors whose (m+1)-th coordinate exists: i + mτ < n.
    const count = delayVectorCount(n, m + 1, o.tau);
    const step = Math.max(1, count / o.maxQueries);
    const queries: number[] = [];
    for (let q = 0; Math.floor(q) < count; q += step) queries.push(Math.floor(q));
    const nn = nearestNeighbours(x, m, o.tau, count, o.theiler, queries);
    let used = 0;
    let bad = 0;
    for (const i of queries) {
      const j = nn.index[i]!;
      if (j < 0) continue;
      used++;
      const rm = nn.distance[i]!;
      const extra = Math.abs(x[i + m * o.tau]! - x[j + m * o.tau]!);
      if (extra / rm > o.rTol || Math.sqrt(rm * rm + extra * extra) / ra > o.aTol) bad++;
    }
    const share = used > 0 ? bad / used : 1;
    dims.push(m);
    falseFraction.push(share);
    counted.push(used);
    if (dimension === null && used > 0 && share < o.threshold) dimension = m;
    if (o.stopEarly) {
      const k = falseFraction.length;
      const rising = k >= 3 && falseFraction[k - 1]! > falseFraction[k - 2]! && falseFraction[k - 2]! > falseFraction[k - 3]!;
      if (dimension !== null || rising) break;
    }
  }
  return {
    ...measured(method, params, {
      dimension,
      dimensionReason:
        dimension === null ? `the false-neighbour share stays at or above ${o.threshold} up to m = ${o.maxDim} (noise-like data)` : null,
      dims,
      falseFraction,
      counted,
      caveat: EMBEDDING_CAVEAT,
    }),
    research: true,
  };
}
