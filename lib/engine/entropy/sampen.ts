// Sample entropy (Richman & Moorman, Am J Physiol Heart Circ Physiol 2000;278:H2039).
import { measured, notDefined, type Measured } from "../result";
import {
  conventionText,
  matchTemplates,
  prepareEntropy,
  type Comparison,
  type ToleranceUnit,
} from "./templates";

export interface SampleEntropyOptions {
  /** Template length m (points). */
  m?: number;
  /** Tolerance: a fraction of the series' SD (`rUnit: "sd"`) or an absolute value in the series' units. */
  r?: number;
  rUnit?: ToleranceUnit;
  /** `"<="` is Richman & Moorman's convention; `"<"` reproduces implementations that use a strict test. */
  comparison?: Comparison;
}

/** m = 2, r = 0.2 × SD (sample SD, ddof = 1), distance ≤ r: Richman & Moorman 2000; the usual short-term choice. */
export const SAMPEN_DEFAULTS = { m: 2, r: 0.2, rUnit: "sd", comparison: "<=" } as const satisfies Required<SampleEntropyOptions>;

/** Fewest beats for a dependable SampEn(m = 2) (Yentes et al., Ann Biomed Eng 2013, from memory; DOMAIN §2.9). Shorter
 *  series still get a value, flagged `belowRecommendedLength`. */
export const SAMPEN_RECOMMENDED_MIN_N = 200;

export interface SampleEntropy {
  /** −ln(A/B), dimensionless, ≥ 0. */
  sampen: number;
  /** Pairs of (m+1)-point templates within r. */
  a: number;
  /** Pairs of m-point templates within r (the same N − m templates). */
  b: number;
  /** Absolute tolerance used, in the series' units. */
  r: number;
  m: number;
  /** Series length N. */
  n: number;
  /** Templates compared, N − m. */
  templates: number;
  convention: "≤ r" | "< r";
  /** N < {@link SAMPEN_RECOMMENDED_MIN_N}: the value is defined but its spread is wide. */
  belowRecommendedLength: boolean;
}

/**
 * Sample entropy SampEn(m, r, N) = −ln(A/B) (Richman & Moorman 2000).
 *
 * B counts pairs i < j of the templates u_i = (x_i … x_{i+m−1}), i = 1 … N−m, with Chebyshev distance
 * max_k |x_{i+k} − x_{j+k}| ≤ r; A counts the pairs among the *same* N − m templates that still match at length m+1.
 * Self-matches are excluded, so A ≤ B and 0 ≤ SampEn ≤ ln[(N−m)(N−m−1)/2] when defined.
 *
 * r: by default 0.2 × sample SD (ddof = 1), computed in floating point — never rounded to the data's resolution,
 * because with 1-ms integer data distances equal to r are common and `≤` versus `<` then changes the result
 * (DOMAIN §2.5). `comparison: "<"` gives the strict variant some implementations use.
 *
 * Undefined (null with a reason): N < m + 2 (no pair of (m+1)-point templates); SD = 0 with a relative r (r = 0);
 * B = 0 (no m-point matches); A = 0 (no (m+1)-point matches; −ln 0 is infinite).
 *
 * Exact, and far below N²/2 comparisons for typical data: templates are bucketed by their first point and sorted by
 * their second, and only pairs in neighbouring buckets with second points within r are compared (`templates.ts`).
 * Cost O(N log N + K·m), K ≈ 0.02 · N²/2 for r = 0.2 SD on Gaussian-like data at m = 2 (≈ 0.11 · N²/2 at m = 1);
 * worst case N²/2 when r spans the whole range. Memory O(N·m).
 *
 * @param x RR/NN intervals (ms) or any finite series.
 */
export function sampleEntropy(x: Float64Array, options: SampleEntropyOptions = {}): Measured<SampleEntropy> {
  const o = { ...SAMPEN_DEFAULTS, ...options };
  const { m, comparison } = o;
  const prep = prepareEntropy("sampen", x, o);
  if (!prep.ok) return prep.result;
  const { params, n: N, r } = prep;

  const { a, b } = matchTemplates(x, m, prep.limit);
  const templates = N - m;
  if (b === 0) {
    return notDefined("sampen", params, `no template matches of length m = ${m} (B = 0 of ${templates} templates)`);
  }
  if (a === 0) {
    return notDefined("sampen", params, `no template matches of length m + 1 = ${m + 1} (A = 0, B = ${b})`);
  }
  return measured("sampen", params, {
    // ln(B/A) rather than −ln(A/B): equal, but gives +0 (not −0) when A = B.
    sampen: Math.log(b / a),
    a,
    b,
    r,
    m,
    n: N,
    templates,
    convention: conventionText(comparison),
    belowRecommendedLength: N < SAMPEN_RECOMMENDED_MIN_N,
  });
}
