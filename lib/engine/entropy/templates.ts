// Template matching shared by the entropy methods (SampEn, ApEn, MSE): exact counts of template pairs within
// Chebyshev distance r, without comparing every pair.
//
// How: templates are put in columns of width just over r by their first point, and sorted within each column by
// their second point. A pair within r of each other must lie in the same or in neighbouring columns, and — both
// columns being sorted by the second point — only a run of templates whose second points lie within r needs to be
// looked at. Every pair found that way is then tested coordinate by coordinate, exactly as an all-pairs loop would.
// The runs are found by differences of sorted values; a difference of two doubles is the same number whichever way
// round it is taken, and rounding is monotone, so no pair within r is ever skipped: the counts are identical to an
// all-pairs comparison (tests/unit/engine/entropy.test.ts checks it, ties at r included).
//
// Cost: O(N) to bucket, O(N log N) at most to sort within columns, plus the pairs visited: those in the same or
// neighbouring columns whose second points lie within r. For r = 0.2 SD on Gaussian-like data that is roughly
// 0.02 · N²/2 pairs at m ≥ 2 (about 0.11 · N²/2 with the one-coordinate sort used for m = 1); the worst case (r wider
// than the whole range, e.g. a nearly constant series) is N²/2. Memory O(N·m).
import { assertInteger, assertPositive, assertSeries } from "../assert";
import { notDefined, type Measured, type Params } from "../result";
import { sd } from "../stats";

/** How a template distance d is compared with the tolerance r. Richman & Moorman 2000 and Pincus 1991 use `<=`. */
export type Comparison = "<=" | "<";

/** Whether `r` is an absolute tolerance (units of the series, e.g. ms) or a fraction of the series' SD. */
export type ToleranceUnit = "sd" | "absolute";

/** Human-readable form of the matching convention, stored with each value. */
export function conventionText(comparison: Comparison): "≤ r" | "< r" {
  return comparison === "<=" ? "≤ r" : "< r";
}

/**
 * The largest double below r (r > 0 finite), so that for any non-negative double d: d < r ⇔ d ≤ below(r). This
 * lets one scan serve both conventions exactly.
 */
function largestBelow(r: number): number {
  const f = new Float64Array([r]);
  const bits = new BigInt64Array(f.buffer);
  bits[0] = bits[0]! - 1n;
  return f[0]!;
}

/** The tolerance used in `d ≤ limit` tests for the chosen convention. */
export function matchLimit(r: number, comparison: Comparison): number {
  return comparison === "<=" ? r : largestBelow(r);
}

/**
 * Absolute tolerance for a series: `r` itself, or `r × SD` (sample SD, ddof = 1, computed in floating point and never
 * rounded to the data's resolution). `r` is null when that SD is zero (a constant series) and r is relative.
 */
export function absoluteTolerance(
  x: Float64Array,
  r: number,
  unit: ToleranceUnit,
): { r: number; sd: number } | { r: null; sd: number } {
  const s = x.length > 1 ? sd(x, 1) : 0;
  if (unit === "absolute") return { r, sd: s };
  return s > 0 ? { r: r * s, sd: s } : { r: null, sd: s };
}

/**
 * The checks and set-up SampEn and ApEn share: validated options, the absolute tolerance, the recorded parameters,
 * and the two cases where neither is defined (N < m + 2; SD = 0 with a relative r).
 */
export function prepareEntropy(
  method: "sampen" | "apen",
  x: Float64Array,
  o: { m: number; r: number; rUnit: ToleranceUnit; comparison: Comparison },
): { ok: true; params: Params; n: number; r: number; limit: number } | { ok: false; result: Measured<never> } {
  assertSeries(x, "x");
  assertInteger(o.m, "m", 1, 64);
  assertPositive(o.r, "r");
  const n = x.length;
  const tol = absoluteTolerance(x, o.r, o.rUnit);
  const params = { m: o.m, r: o.r, rUnit: o.rUnit, comparison: o.comparison, sdDdof: 1, rAbsolute: tol.r, n };
  if (n < o.m + 2) {
    return { ok: false, result: notDefined(method, params, `fewer than m + 2 = ${o.m + 2} points (N = ${n}): no pair of ${o.m + 1}-point templates`) };
  }
  if (tol.r === null) return { ok: false, result: notDefined(method, params, "zero variance: r = 0") };
  return { ok: true, params, n, r: tol.r, limit: matchLimit(tol.r, o.comparison) };
}

/** Columns are this much wider than r, so that rounding in (x − min)/width can never put two points within r more
 *  than one column apart: with at most MAX_COLUMNS columns that rounding error is below 2⁻²⁴ of a column. */
const COLUMN_WIDEN = 1 + 1e-6;
/** Above this many columns per template the data are sparse relative to r and one sorted run is cheaper. */
const MAX_COLUMNS_PER_TEMPLATE = 4;
const MAX_COLUMNS = 2 ** 26;
/** Columns up to this size are sorted by insertion (no comparator calls); larger ones by the built-in sort. */
const INSERTION_SORT_MAX = 24;

/** The result of {@link matchTemplates}. Template positions are in the internal sorted order. */
export interface TemplateMatches {
  /** Templates of length m: N − m + 1 (the last one has no (m+1)-th point). */
  templates: number;
  /** Richman & Moorman's B: pairs of m-point templates within r among the N − m templates that have an (m+1)-th point. */
  b: number;
  /** Richman & Moorman's A: those pairs that are also within r at the (m+1)-th point. */
  a: number;
  /** Per template: other m-point templates within r (all N − m + 1 of them). */
  countM: Uint32Array;
  /** Per template: other (m+1)-point templates within r (zero and unused where `extendable` is 0). */
  countM1: Uint32Array;
  /** 1 where the template has an (m+1)-th point. */
  extendable: Uint8Array;
}

/**
 * Finds every pair of m-point templates of x within `limit` (Chebyshev distance `d ≤ limit`) and whether they still
 * match at m + 1 points. Self-matches are not counted. See the file comment for the method and its cost.
 */
export function matchTemplates(x: Float64Array, m: number, limit: number): TemplateMatches {
  const N = x.length;
  const nT = N - m + 1;
  const nE = N - m;
  const w = m + 1;

  // Bucket by the first point. With m = 1 the second point is not part of an m-match, so there we sort by the first
  // point alone; likewise when r is tiny against the range (sparse data: few candidate pairs anyway).
  let lo = Infinity;
  let hi = -Infinity;
  for (let i = 0; i < nT; i++) {
    const v = x[i]!;
    if (v < lo) lo = v;
    if (v > hi) hi = v;
  }
  const width = limit * COLUMN_WIDEN;
  const span = (hi - lo) / width;
  const grid = m >= 2 && width > 0 && span <= Math.min(MAX_COLUMNS_PER_TEMPLATE * nT, MAX_COLUMNS);
  const key = grid ? 1 : 0;
  const nCols = grid ? Math.floor(span) + 1 : 1;

  const column = new Uint32Array(nT);
  const colStart = new Uint32Array(nCols + 1);
  if (grid) {
    for (let i = 0; i < nT; i++) {
      const c = Math.min(nCols - 1, Math.floor((x[i]! - lo) / width));
      column[i] = c;
      colStart[c + 1]!++;
    }
    for (let c = 0; c < nCols; c++) colStart[c + 1]! += colStart[c]!;
  } else {
    colStart[1] = nT;
  }
  const order = new Uint32Array(nT);
  const fill = colStart.slice(0, nCols);
  for (let i = 0; i < nT; i++) order[fill[column[i]!]!++] = i;

  // Sort each column by its key point.
  for (let c = 0; c < nCols; c++) {
    const s = colStart[c]!;
    const e = colStart[c + 1]!;
    if (e - s <= INSERTION_SORT_MAX) {
      for (let p = s + 1; p < e; p++) {
        const i = order[p]!;
        const v = x[i + key]!;
        let q = p - 1;
        while (q >= s && x[order[q]! + key]! > v) {
          order[q + 1] = order[q]!;
          q--;
        }
        order[q + 1] = i;
      }
    } else {
      order.subarray(s, e).sort((i, j) => x[i + key]! - x[j + key]!);
    }
  }

  // Rows in sorted order, so the scans read memory in sequence.
  const rows = new Float64Array(nT * w);
  const extendable = new Uint8Array(nT);
  for (let p = 0, o = 0; p < nT; p++, o += w) {
    const i = order[p]!;
    for (let k = 0; k < m; k++) rows[o + k] = x[i + k]!;
    if (i < nE) {
      rows[o + m] = x[i + m]!;
      extendable[p] = 1;
    }
  }

  const countM = new Uint32Array(nT);
  const countM1 = new Uint32Array(nT);
  let a = 0;
  let b = 0;

  // Each pair (p, q) whose key points are within limit: test the other points, then record it. The test is written
  // out in both scans rather than shared through a closure, which would keep a and b in a heap context (≈ 5× slower).
  for (let c = 0; c < nCols; c++) {
    const s = colStart[c]!;
    const e = colStart[c + 1]!;
    // Pairs within the column (or, without a grid, within the whole sorted run).
    for (let p = s, pb = s * w; p < e; p++, pb += w) {
      const kv = rows[pb + key]!;
      const pExt = extendable[p]!;
      same: for (let q = p + 1, qb = pb + w; q < e; q++, qb += w) {
        if (rows[qb + key]! - kv > limit) break;
        for (let k = 0; k < m; k++) {
          if (k !== key && Math.abs(rows[qb + k]! - rows[pb + k]!) > limit) continue same;
        }
        countM[p]!++;
        countM[q]!++;
        if (pExt & extendable[q]!) {
          b++;
          if (Math.abs(rows[qb + m]! - rows[pb + m]!) <= limit) {
            a++;
            countM1[p]!++;
            countM1[q]!++;
          }
        }
      }
    }
    if (!grid || c + 1 >= nCols) continue;
    // Pairs with the next column: a window of key points within limit, moving up as p does.
    const s2 = colStart[c + 1]!;
    const e2 = colStart[c + 2]!;
    let from = s2;
    for (let p = s, pb = s * w; p < e; p++, pb += w) {
      const kv = rows[pb + key]!;
      const pExt = extendable[p]!;
      while (from < e2 && kv - rows[from * w + key]! > limit) from++;
      next: for (let q = from, qb = from * w; q < e2; q++, qb += w) {
        if (rows[qb + key]! - kv > limit) break;
        for (let k = 0; k < m; k++) {
          if (k !== key && Math.abs(rows[qb + k]! - rows[pb + k]!) > limit) continue next;
        }
        countM[p]!++;
        countM[q]!++;
        if (pExt & extendable[q]!) {
          b++;
          if (Math.abs(rows[qb + m]! - rows[pb + m]!) <= limit) {
            a++;
            countM1[p]!++;
            countM1[q]!++;
          }
        }
      }
    }
  }

  return { templates: nT, a, b, countM, countM1, extendable };
}
