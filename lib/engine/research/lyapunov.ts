import { assertInteger, assertPositive, assertSeries } from "../assert";
import { measured, notDefined, type Measured } from "../result";
import { linearFit } from "../stats";
import { LYAPUNOV_CAVEAT } from "./caveats";
import { delayVectorCount, meanPeriod, nearestNeighbours } from "./embedding";

export const LYAPUNOV_DEFAULTS = {
  /** Embedding dimension; the caller usually passes the false-nearest-neighbour dimension. */
  m: 3,
  /** Embedding delay (samples). */
  tau: 1,
  /** Neighbours closer in time than this are excluded; null: the mean period, rounded up (Rosenstein et al.). */
  theiler: null as number | null,
  /** Divergence is followed for i = 0 … maxSteps samples. */
  maxSteps: 20,
  /** Automatic fit: the initial linear part ends where ⟨ln d(i)⟩ has covered this share of its rise to its maximum. */
  linearShare: 0.5,
  /** Explicit fit range [i0, i1] (inclusive, in samples), overriding the automatic one. */
  fitRange: null as readonly [number, number] | null,
} as const;

export type LyapunovOptions = {
  m?: number;
  tau?: number;
  theiler?: number | null;
  maxSteps?: number;
  linearShare?: number;
  fitRange?: readonly [number, number] | null;
  /** Beat (sample) times in seconds, same length as x, to also report the exponent per second. */
  beatTimes?: Float64Array;
};

/** Fewer delay vectors than this make the neighbour average meaningless (DOMAIN §2.9: 10³–10⁴ points). */
const MIN_VECTORS = 500;
/** Each step of the divergence curve must average at least this many pairs. */
const MIN_PAIRS_PER_STEP = 50;

export interface LyapunovValue {
  /** λ1 per sample step (per beat for an RR series); null when the curve has no rise to fit (see reason). */
  perBeat: number | null;
  perBeatReason: string | null;
  /** λ1 per second, from the mean beat interval of `beatTimes`; null when no beat times were given. */
  perSecond: number | null;
  perSecondReason: string | null;
  /** ⟨ln d_j(i)⟩ against i, for plotting, with the number of pairs averaged at each i. */
  steps: number[];
  meanLogDivergence: number[];
  pairs: number[];
  /** Fitted range of i (inclusive) and the r² of the fit. */
  fitFrom: number | null;
  fitTo: number | null;
  r2: number | null;
  theiler: number;
  caveat: string;
}

/**
 * Largest Lyapunov exponent by the method of Rosenstein, Collins & De Luca (Physica D 1993;65:117).
 *
 * Delay vectors y_j (dimension m, delay τ); for each j its nearest neighbour ĵ (Euclidean, |j − ĵ| > W, distance
 * > 0), with W the Theiler window (default: the mean period, 1/mean frequency of the power spectrum, as in the
 * paper). d_j(i) = ‖y_{j+i} − y_{ĵ+i}‖ while both indices stay in range; y(i) = ⟨ln d_j(i)⟩ over j with d_j(i) > 0.
 * λ1 is the least-squares slope of y(i) against i over the initial linear part: i = 0 … i_end, where i_end is the
 * last i before y first exceeds y(0) + linearShare·(max y − y(0)) (at least i = 0, 1), or `fitRange` when given.
 * Units: per sample step (per beat); per second = per beat ÷ mean beat interval from `beatTimes`.
 *
 * Null with a reason for a constant series or fewer than 500 delay vectors. Research only.
 */
export function largestLyapunovExponent(x: Float64Array, options: LyapunovOptions = {}): Measured<LyapunovValue> {
  assertSeries(x, "x");
  const { beatTimes, ...rest } = options;
  const o = { ...LYAPUNOV_DEFAULTS, ...rest };
  assertInteger(o.m, "m", 1, 30);
  assertInteger(o.tau, "tau", 1);
  assertInteger(o.maxSteps, "maxSteps", 2);
  assertPositive(o.linearShare, "linearShare");
  if (o.fitRange !== null) {
    assertInteger(o.fitRange[0], "fitRange[0]", 0, o.maxSteps);
    assertInteger(o.fitRange[1], "fitRange[1]", o.fitRange[0] + 1, o.maxSteps);
  }
  if (beatTimes !== undefined) {
    assertSeries(beatTimes, "beatTimes");
    if (beatTimes.length !== x.length) throw new RangeError("beatTimes must have the same length as x");
    for (let i = 1; i < beatTimes.length; i++) {
      if (!(beatTimes[i]! > beatTimes[i - 1]!)) throw new RangeError(`beatTimes must increase strictly (index ${i})`);
    }
  }
  const method = "lyapunov-rosenstein";
  const baseParams = { ...o, norm: "euclidean", withBeatTimes: beatTimes !== undefined };
  const n = x.length;
  const nv = delayVectorCount(n, o.m, o.tau);
  if (nv < MIN_VECTORS) {
    return { ...notDefined(method, baseParams, `too few points: ${Math.max(0, nv)} delay vectors (need ${MIN_VECTORS})`), research: true };
  }
  const period = meanPeriod(x);
  if (period === null) return { ...notDefined(method, baseParams, "zero variance: the series is constant"), research: true };
  const theiler = o.theiler ?? Math.ceil(period);
  assertInteger(theiler, "theiler", 0);
  const params = { ...baseParams, theiler };

  const nn = nearestNeighbours(x, o.m, o.tau, nv, theiler);
  const steps: number[] = [];
  const meanLog: number[] = [];
  const pairs: number[] = [];
  for (let i = 0; i <= o.maxSteps; i++) {
    let s = 0;
    let c = 0;
    for (let j = 0; j + i < nv; j++) {
      const k = nn.index[j]!;
      if (k < 0 || k + i >= nv) continue;
      let d2 = 0;
      for (let q = 0; q < o.m; q++) {
        const d = x[j + i + q * o.tau]! - x[k + i + q * o.tau]!;
        d2 += d * d;
      }
      if (d2 > 0) {
        s += 0.5 * Math.log(d2);
        c++;
      }
    }
    if (c < MIN_PAIRS_PER_STEP) break;
    steps.push(i);
    meanLog.push(s / c);
    pairs.push(c);
  }
  if (steps.length < 2) {
    return { ...notDefined(method, params, `fewer than ${MIN_PAIRS_PER_STEP} neighbour pairs to follow`), research: true };
  }

  let from: number;
  let to: number;
  if (o.fitRange !== null) {
    [from, to] = o.fitRange;
    to = Math.min(to, steps.length - 1);
  } else {
    const y0 = meanLog[0]!;
    const rise = Math.max(...meanLog) - y0;
    from = 0;
    to = 1;
    while (to + 1 < meanLog.length && meanLog[to + 1]! - y0 <= o.linearShare * rise) to++;
  }
  const value: LyapunovValue = {
    perBeat: null,
    perBeatReason: null,
    perSecond: null,
    perSecondReason: beatTimes === undefined ? "no beat times given" : null,
    steps,
    meanLogDivergence: meanLog,
    pairs,
    fitFrom: null,
    fitTo: null,
    r2: null,
    theiler,
    caveat: LYAPUNOV_CAVEAT,
  };
  if (to - from < 1) {
    value.perBeatReason = "the divergence curve is too short for the requested fit range";
    if (beatTimes !== undefined) value.perSecondReason = "no exponent per beat";
  } else {
    const fit = linearFit(steps.slice(from, to + 1), meanLog.slice(from, to + 1));
    value.perBeat = fit.slope;
    value.fitFrom = from;
    value.fitTo = to;
    value.r2 = fit.r2;
    if (beatTimes !== undefined) value.perSecond = fit.slope / ((beatTimes[n - 1]! - beatTimes[0]!) / (n - 1));
  }
  return { ...measured(method, params, value), research: true };
}
