import { assertInteger, assertPositive, assertSeries } from "../assert";
import { measured, notDefined, type Measured } from "../result";
import { linearFit } from "../stats";
import { boxVariances } from "./boxes";

const qGrid = (from: number, to: number, step: number): readonly number[] =>
  Array.from({ length: Math.round((to - from) / step) + 1 }, (_, i) => from + i * step);

/**
 * Default parameters.
 * - q from −5 to 5 in steps of 0.5 (DOMAIN §2.6; the step is common practice) — 21 moments including q = 0.
 * - Detrending order 1 (MF-DFA1, Kantelhardt et al. 2002).
 * - Scales from 10 beats to N/5 (DOMAIN §2.6, common practice), 20 of them log-spaced (rounded to whole beats,
 *   duplicates dropped; common practice).
 * - Boxes cut from both ends, 2N_s of them, as in Kantelhardt et al. 2002.
 * - At least 2000 beats (DOMAIN §2.9, common practice).
 */
export const MFDFA_DEFAULTS = {
  q: qGrid(-5, 5, 0.5),
  order: 1,
  minScale: 10,
  maxScaleFraction: 0.2,
  scaleCount: 20,
  bothEnds: true,
  minBeats: 2000,
} as const;

export interface MfdfaOptions {
  /** Moments q, strictly increasing, at least 3 (for the finite differences of τ(q)). */
  q?: readonly number[];
  /** Degree of the polynomial removed in each box, 1–3. */
  order?: number;
  /** Smallest scale s in beats (≥ order + 2). */
  minScale?: number;
  /** Largest scale as a share of N. */
  maxScaleFraction?: number;
  /** Number of log-spaced scales requested between the smallest and the largest. */
  scaleCount?: number;
  /** Explicit scales in beats (strictly increasing integers ≥ order + 2), replacing the log-spaced set; those above
   *  N·maxScaleFraction are dropped. */
  scales?: readonly number[];
  /** Cut boxes from the end as well as from the start (2N_s boxes). */
  bothEnds?: boolean;
  /** Fewest beats for which the spectrum is reported. */
  minBeats?: number;
}

export interface MfdfaValue {
  /** The moments q. */
  q: number[];
  /** Generalised Hurst exponent h(q): slope of ln F_q(s) against ln s. */
  h: number[];
  /** r² of each of those fits. */
  r2: number[];
  /** Mass exponent τ(q) = q·h(q) − 1. */
  tau: number[];
  /** Singularity strength α = τ′(q) (finite differences, see `mfdfa`). */
  alpha: number[];
  /** Singularity spectrum f(α) = q·α − τ(q). */
  f: number[];
  /** Width Δh = h(q_min) − h(q_max); ≈ 0 for a monofractal, larger for a richer multifractal. */
  width: number;
  /** Scales s in beats. */
  scales: number[];
  /** F_q(s) in the unit of the series (ms): fluctuation[i][j] is for q[i] at scales[j]. */
  fluctuation: number[][];
}

/** Fewest distinct scales for a slope worth reporting (common practice). */
const MIN_SCALES = 4;

/**
 * Multifractal detrended fluctuation analysis (Kantelhardt, Zschiegner, Koscielny-Bunde, Havlin, Bunde & Stanley,
 * Physica A 2002;316:87).
 *
 * Profile y(k) = Σ_{i≤k} (x_i − x̄). For each scale s the profile is cut into N_s = ⌊N/s⌋ non-overlapping segments from
 * the start and N_s from the end (2N_s in all); a polynomial of degree `order` is fitted in each segment ν and
 * F²(s, ν) is the mean squared residual. Then
 *   F_q(s) = { (1/2N_s) Σ_ν [F²(s, ν)]^(q/2) }^(1/q),   F_0(s) = exp{ (1/4N_s) Σ_ν ln F²(s, ν) },
 * evaluated in the log domain (log-sum-exp) so that q = ±5 cannot overflow. h(q) is the least-squares slope of ln F_q(s)
 * against ln s; τ(q) = q·h(q) − 1; α = dτ/dq by the derivative of the parabola through three neighbouring q (centred
 * inside the grid, one-sided at its two ends; second-order accurate on any spacing); f(α) = q·α − τ(q);
 * Δh = h(q_min) − h(q_max).
 *
 * @param x the series (NN intervals in ms; h(q) is invariant to shifting and scaling it).
 * @returns null with a reason for fewer than `minBeats` beats, fewer than four scales, or — when some q ≤ 0 — any
 *   segment with zero detrended variance (a run of identical intervals: its (F²)^(q/2) is infinite), or a scale at
 *   which every segment is fitted exactly.
 * @throws TypeError / RangeError for a non-Float64Array, a non-finite value, or invalid options.
 */
export function mfdfa(x: Float64Array, options: MfdfaOptions = {}): Measured<MfdfaValue> {
  assertSeries(x, "x");
  const q = options.q ?? MFDFA_DEFAULTS.q;
  const order = options.order ?? MFDFA_DEFAULTS.order;
  const minScale = options.minScale ?? MFDFA_DEFAULTS.minScale;
  const maxScaleFraction = options.maxScaleFraction ?? MFDFA_DEFAULTS.maxScaleFraction;
  const scaleCount = options.scaleCount ?? MFDFA_DEFAULTS.scaleCount;
  const bothEnds = options.bothEnds ?? MFDFA_DEFAULTS.bothEnds;
  const minBeats = options.minBeats ?? MFDFA_DEFAULTS.minBeats;
  if (q.length < 3) throw new RangeError("q needs at least 3 values");
  q.forEach((v, i) => {
    if (!Number.isFinite(v)) throw new RangeError(`q[${i}] is not a finite number`);
    if (i > 0 && v <= q[i - 1]!) throw new RangeError("q must be strictly increasing");
  });
  assertInteger(order, "order", 1, 3);
  assertInteger(minScale, "minScale", order + 2);
  assertPositive(maxScaleFraction, "maxScaleFraction");
  if (maxScaleFraction > 1) throw new RangeError(`maxScaleFraction must be ≤ 1, got ${maxScaleFraction}`);
  assertInteger(scaleCount, "scaleCount", 2);
  assertInteger(minBeats, "minBeats", 1);
  options.scales?.forEach((s, i, all) => {
    assertInteger(s, `scales[${i}]`, order + 2);
    if (i > 0 && s <= all[i - 1]!) throw new RangeError("scales must be strictly increasing");
  });

  const N = x.length;
  const largest = Math.floor(maxScaleFraction * N);
  const scales = options.scales ? options.scales.filter((s) => s <= largest) : logSpacedScales(minScale, largest, scaleCount);
  const method = "mfdfa";
  const params = { q, order, minScale, maxScaleFraction, scaleCount, bothEnds, minBeats, scales };
  if (N < minBeats) return notDefined(method, params, `fewer than ${minBeats} beats (${N})`);
  if (scales.length < MIN_SCALES) {
    return notDefined(method, params, `fewer than ${MIN_SCALES} scales between ${minScale} and N·${maxScaleFraction} = ${largest} beats`);
  }

  // lnF[i][j] = ln F_{q_i}(s_j).
  const lnF = q.map(() => new Float64Array(scales.length));
  const scratch = new Float64Array(scales[scales.length - 1]!);
  const f2 = new Float64Array(2 * Math.floor(N / scales[0]!));
  for (let j = 0; j < scales.length; j++) {
    const s = scales[j]!;
    const boxes = boxVariances(x, s, order, bothEnds, scratch, f2);
    let zeros = 0;
    for (let b = 0; b < boxes; b++) {
      if (f2[b] === 0) zeros++;
      f2[b] = Math.log(f2[b]!);
    }
    if (zeros === boxes) {
      return notDefined(method, params, `zero fluctuation at s = ${s}: every segment is fitted exactly by its trend (constant intervals)`);
    }
    if (zeros > 0 && q[0]! <= 0) {
      return notDefined(
        method,
        params,
        `${zeros} of ${boxes} segments at s = ${s} have zero detrended variance (runs of identical intervals), so F_q(s) is undefined for q ≤ 0`,
      );
    }
    for (let i = 0; i < q.length; i++) lnF[i]![j] = logFluctuation(f2, boxes, q[i]!);
  }

  const lnS = scales.map(Math.log);
  const h: number[] = [];
  const r2: number[] = [];
  for (let i = 0; i < q.length; i++) {
    const fit = linearFit(lnS, lnF[i]!);
    h.push(fit.slope);
    r2.push(fit.r2);
  }
  const qs = [...q];
  const tau = qs.map((qi, i) => qi * h[i]! - 1);
  const alpha = qs.map((_, i) => derivative(qs, tau, i));
  const f = qs.map((qi, i) => qi * alpha[i]! - tau[i]!);
  return measured(method, params, {
    q: qs,
    h,
    r2,
    tau,
    alpha,
    f,
    width: h[0]! - h[h.length - 1]!,
    scales,
    fluctuation: lnF.map((row) => Array.from(row, Math.exp)),
  });
}

/** ln F_q from ln F² of the first `n` segments: (1/q)·ln mean exp((q/2)·ln F²), or mean(ln F²)/2 at q = 0. */
function logFluctuation(lnF2: Float64Array, n: number, q: number): number {
  if (q === 0) {
    let sum = 0;
    for (let b = 0; b < n; b++) sum += lnF2[b]!;
    return sum / (2 * n);
  }
  const half = q / 2;
  let max = -Infinity;
  for (let b = 0; b < n; b++) max = Math.max(max, half * lnF2[b]!);
  let sum = 0;
  for (let b = 0; b < n; b++) sum += Math.exp(half * lnF2[b]! - max);
  return (max + Math.log(sum / n)) / q;
}

/** Integers round(lo·(hi/lo)^(i/(count−1))), i = 0…count−1, without duplicates; empty when hi < lo. */
function logSpacedScales(lo: number, hi: number, count: number): number[] {
  if (hi < lo) return [];
  const out: number[] = [];
  for (let i = 0; i < count; i++) {
    const s = Math.round(lo * Math.pow(hi / lo, i / (count - 1)));
    if (out.length === 0 || s > out[out.length - 1]!) out.push(s);
  }
  return out;
}

/** dy/dx at x[i] from the parabola through the three grid points nearest to it (Lagrange form). */
function derivative(x: readonly number[], y: readonly number[], i: number): number {
  const c = Math.min(Math.max(i, 1), x.length - 2);
  const x0 = x[c - 1]!, x1 = x[c]!, x2 = x[c + 1]!;
  const t = x[i]!;
  return (
    (y[c - 1]! * (2 * t - x1 - x2)) / ((x0 - x1) * (x0 - x2)) +
    (y[c]! * (2 * t - x0 - x2)) / ((x1 - x0) * (x1 - x2)) +
    (y[c + 1]! * (2 * t - x0 - x1)) / ((x2 - x0) * (x2 - x1))
  );
}
