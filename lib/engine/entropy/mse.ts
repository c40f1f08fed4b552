// Multiscale entropy (Costa, Goldberger & Peng, Phys Rev Lett 2002;89:068102 and Phys Rev E 2005;71:021906).
import { assertInteger, assertPositive, assertSeries } from "../assert";
import { measured, notDefined, type Measured } from "../result";
import { linearFit } from "../stats";
import {
  absoluteTolerance,
  conventionText,
  matchLimit,
  matchTemplates,
  type Comparison,
  type ToleranceUnit,
} from "./templates";

export interface MultiscaleEntropyOptions {
  /** Template length m (points). */
  m?: number;
  /** Tolerance: a fraction of the SD of the ORIGINAL series (`rUnit: "sd"`), or absolute; fixed across scales. */
  r?: number;
  rUnit?: ToleranceUnit;
  /** Scales τ = 1 … maxScale. */
  maxScale?: number;
  /** Fewest coarse-grained points for a scale to get a value. */
  minPoints?: number;
  comparison?: Comparison;
}

/**
 * m = 2, r = 0.15 × SD of the original series (ddof = 1) at every scale, τ = 1…20 (Costa et al. 2002/2005); at least
 * 200 coarse-grained points per scale, so τ = 20 needs 4,000 beats (DOMAIN §2.9, common practice).
 */
export const MSE_DEFAULTS = {
  m: 2,
  r: 0.15,
  rUnit: "sd",
  maxScale: 20,
  minPoints: 200,
  comparison: "<=",
} as const satisfies Required<MultiscaleEntropyOptions>;

/** Scale ranges of the two summary slopes: the short scales 1–5 and the long scales 6–20 (DOMAIN §2.5). */
export const MSE_SLOPE_SCALES = { short: [1, 5], long: [6, 20] } as const;

export interface MseScale {
  /** Scale factor τ. */
  scale: number;
  /** Coarse-grained points at this scale, ⌊N/τ⌋. */
  points: number;
  sampen: number | null;
  /** Template pair counts (Richman & Moorman's A and B); null when the scale was not computed (too few points). */
  a: number | null;
  b: number | null;
  reason: string | null;
}

export interface MseSlope {
  /** Scales included, inclusive. */
  from: number;
  to: number;
  /** Least-squares slope of SampEn against τ, per unit of τ. */
  slope: number | null;
  reason: string | null;
}

export interface MultiscaleEntropy {
  /** One entry per scale τ = 1 … maxScale, for plotting. */
  curve: MseScale[];
  /** Complexity index Σ_τ SampEn(τ) over τ = 1 … maxScale; null when any scale is undefined (see `ciReason`). */
  ci: number | null;
  ciReason: string | null;
  slopes: { short: MseSlope; long: MseSlope };
  /** Absolute tolerance used at every scale, in the series' units. */
  r: number;
  /** Sample SD (ddof = 1) of the original series. */
  sd: number;
  m: number;
  /** Length of the original series. */
  n: number;
  convention: "≤ r" | "< r";
}

/** Non-overlapping means: y_j = (1/τ) Σ_{i = jτ}^{jτ+τ−1} x_i, j = 0 … ⌊N/τ⌋ − 1; a trailing partial block is dropped. */
function coarseGrain(x: Float64Array, scale: number): Float64Array {
  if (scale === 1) return x;
  const count = Math.floor(x.length / scale);
  const y = new Float64Array(count);
  for (let j = 0, i = 0; j < count; j++) {
    let s = 0;
    for (let k = 0; k < scale; k++, i++) s += x[i]!;
    y[j] = s / scale;
  }
  return y;
}

function listScales(scales: number[]): string {
  return scales.map((s) => `τ = ${s}`).join(", ");
}

function slopeOver(curve: MseScale[], from: number, to: number): MseSlope {
  const last = Math.min(to, curve.length);
  if (last - from < 1) {
    return { from, to, slope: null, reason: `fewer than two scales in τ = ${from}–${to} (maxScale = ${curve.length})` };
  }
  const part = curve.slice(from - 1, last);
  const missing = part.filter((c) => c.sampen === null).map((c) => c.scale);
  if (missing.length > 0) {
    return { from, to: last, slope: null, reason: `SampEn undefined at ${listScales(missing)}` };
  }
  const fit = linearFit(
    part.map((c) => c.scale),
    part.map((c) => c.sampen!),
  );
  return { from, to: last, slope: fit.slope, reason: null };
}

/**
 * Multiscale entropy (Costa, Goldberger & Peng 2002, 2005): for τ = 1 … maxScale, coarse-grain the series by
 * non-overlapping means of τ points and take SampEn(m, r) of the result (Richman & Moorman 2000, as in
 * `sampen.ts`), with r = 0.15 × SD of the **original** series held fixed across scales — so SampEn of white noise
 * falls with τ while that of 1/f noise stays flat (DOMAIN §3.1 A2, A3).
 *
 * Returns the curve (τ, points, SampEn, A, B per scale), the complexity index CI = Σ_τ SampEn(τ), and the
 * least-squares slopes of SampEn against τ over τ = 1–5 and 6–20 (`MSE_SLOPE_SCALES`).
 *
 * Undefined parts, each with a reason: a scale with fewer than `minPoints` (200) coarse-grained points, or with no
 * m- or (m+1)-point matches, has SampEn null. CI is a sum over all scales, so it is null when any scale is null —
 * a partial sum would not be comparable with a full one; a slope is null when any scale in its range is null. The
 * whole result is null when the original series has fewer than `minPoints` points or zero variance (r = 0).
 *
 * Cost: Σ_τ of SampEn's cost on ⌊N/τ⌋ points (`templates.ts`), dominated by τ = 1 and 2: O(N log N + K·m) per
 * scale with K a small fraction of N²/2 for typical data (N²/2 at worst). Memory O(N·m).
 *
 * @param x RR/NN intervals (ms), typically 1–6 h of beats (≥ 4,000 for τ = 20).
 */
export function multiscaleEntropy(x: Float64Array, options: MultiscaleEntropyOptions = {}): Measured<MultiscaleEntropy> {
  assertSeries(x, "x");
  const { m, r, rUnit, maxScale, minPoints, comparison } = { ...MSE_DEFAULTS, ...options };
  assertInteger(m, "m", 1, 64);
  assertPositive(r, "r");
  assertInteger(maxScale, "maxScale", 1, 1000);
  assertInteger(minPoints, "minPoints", m + 2);
  const N = x.length;
  const tol = absoluteTolerance(x, r, rUnit);
  const params = {
    m,
    r,
    rUnit,
    maxScale,
    minPoints,
    comparison,
    sdDdof: 1,
    rAbsolute: tol.r,
    n: N,
    shortSlopeScales: MSE_SLOPE_SCALES.short,
    longSlopeScales: MSE_SLOPE_SCALES.long,
  };

  if (N < minPoints) return notDefined("mse", params, `fewer than ${minPoints} points (N = ${N})`);
  if (tol.r === null) return notDefined("mse", params, "zero variance: r = 0");

  const limit = matchLimit(tol.r, comparison);
  const curve: MseScale[] = [];
  for (let scale = 1; scale <= maxScale; scale++) {
    const points = Math.floor(N / scale);
    if (points < minPoints) {
      curve.push({ scale, points, sampen: null, a: null, b: null, reason: `only ${points} coarse-grained points (need ≥ ${minPoints})` });
      continue;
    }
    const { a, b } = matchTemplates(coarseGrain(x, scale), m, limit);
    const reason =
      b === 0
        ? `no template matches of length m = ${m} (B = 0)`
        : a === 0
          ? `no template matches of length m + 1 = ${m + 1} (A = 0, B = ${b})`
          : null;
    curve.push({ scale, points, sampen: reason === null ? Math.log(b / a) : null, a, b, reason });
  }

  const missing = curve.filter((c) => c.sampen === null).map((c) => c.scale);
  let ci: number | null = null;
  let ciReason: string | null = null;
  if (missing.length > 0) {
    ciReason = `SampEn undefined at ${listScales(missing)}`;
  } else {
    ci = 0;
    for (const c of curve) ci += c.sampen!;
  }

  return measured("mse", params, {
    curve,
    ci,
    ciReason,
    slopes: {
      short: slopeOver(curve, MSE_SLOPE_SCALES.short[0], MSE_SLOPE_SCALES.short[1]),
      long: slopeOver(curve, MSE_SLOPE_SCALES.long[0], MSE_SLOPE_SCALES.long[1]),
    },
    r: tol.r,
    sd: tol.sd,
    m,
    n: N,
    convention: conventionText(comparison),
  });
}
