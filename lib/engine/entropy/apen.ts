// Approximate entropy (Pincus, Proc Natl Acad Sci USA 1991;88:2297).
import { measured, type Measured } from "../result";
import {
  conventionText,
  matchTemplates,
  prepareEntropy,
  type Comparison,
  type ToleranceUnit,
} from "./templates";

export interface ApproximateEntropyOptions {
  /** Template length m (points). */
  m?: number;
  /** Tolerance: a fraction of the series' SD (`rUnit: "sd"`) or an absolute value in the series' units. */
  r?: number;
  rUnit?: ToleranceUnit;
  /** `"<="` is Pincus's convention (a template is similar when no coordinate differs by more than r). */
  comparison?: Comparison;
}

/** m = 2, r = 0.2 × SD (sample SD, ddof = 1), distance ≤ r: Pincus 1991 and common practice for heartbeat series. */
export const APEN_DEFAULTS = { m: 2, r: 0.2, rUnit: "sd", comparison: "<=" } as const satisfies Required<ApproximateEntropyOptions>;

/** Fewest beats for ApEn to be compared at all (common practice; DOMAIN §2.9). Shorter series still get a value,
 *  flagged `belowRecommendedLength`. */
export const APEN_RECOMMENDED_MIN_N = 1000;

const BIAS_CAVEAT =
  "ApEn counts each template as its own match, so it is biased low and depends strongly on N: for independent " +
  "Gaussian noise (r = 0.2 SD) it tends to about 2.34 for very long series but is only about 1.1 at N = 300 and " +
  "about 1.65 at N = 1000. Compare ApEn only between series of equal length; prefer SampEn.";

export interface ApproximateEntropy {
  /** Φ^m − Φ^(m+1), dimensionless; may be slightly negative for short or periodic series. */
  apen: number;
  /** Φ^m: mean of ln C_i^m over the N − m + 1 templates of length m. */
  phiM: number;
  /** Φ^(m+1): mean of ln C_i^(m+1) over the N − m templates of length m + 1. */
  phiM1: number;
  /** Absolute tolerance used, in the series' units. */
  r: number;
  m: number;
  /** Series length N — always shown next to ApEn, because ApEn depends on it. */
  n: number;
  convention: "≤ r" | "< r";
  /** N < {@link APEN_RECOMMENDED_MIN_N}. */
  belowRecommendedLength: boolean;
  /** The small-N bias, in plain words, for display next to the value. */
  caveat: string;
}

/**
 * Approximate entropy ApEn(m, r, N) = Φ^m(r) − Φ^(m+1)(r) (Pincus 1991), where
 * Φ^k(r) = (N−k+1)⁻¹ Σ_i ln C_i^k(r) and C_i^k(r) is the share of the N−k+1 templates of length k within Chebyshev
 * distance ≤ r of template i, **including i itself** (so every C_i^k > 0 and ApEn is defined for any N ≥ m + 2).
 * Because Φ^m and Φ^(m+1) average over different numbers of templates, ApEn can be slightly negative for short or
 * periodic series (the period-3 series [1,2,3]×4 at r = 0.5 gives −0.00116, pracma alike); it lies between
 * −ln M / M − ln(M/(M−1)) and ln(M−1), M = N − m + 1.
 *
 * The self-match makes ApEn biased low, strongly so at small N: for iid Gaussian noise at r = 0.2 SD the asymptotic
 * value is 2.335, yet N = 300 gives about 1.09 and N = 1000 about 1.65 (DOMAIN §3.1 A4, computed there). Always report
 * N (it is in the value) and prefer SampEn (`sampen.ts`) for short windows.
 *
 * r: by default 0.2 × sample SD (ddof = 1), in floating point. Undefined (null with a reason): N < m + 2, or SD = 0
 * with a relative r (r = 0).
 *
 * Cost: exact, without comparing every pair — templates are bucketed by first point and sorted by second
 * (`templates.ts`): O(N log N + K·m), K ≈ 0.02 · N²/2 for r = 0.2 SD on Gaussian-like data at m = 2; N²/2 at worst.
 * Memory O(N·m).
 *
 * @param x RR/NN intervals (ms) or any finite series.
 */
export function approximateEntropy(x: Float64Array, options: ApproximateEntropyOptions = {}): Measured<ApproximateEntropy> {
  const o = { ...APEN_DEFAULTS, ...options };
  const { m, comparison } = o;
  const prep = prepareEntropy("apen", x, o);
  if (!prep.ok) return prep.result;
  const { params, n: N, r } = prep;

  const { countM, countM1, extendable } = matchTemplates(x, m, prep.limit);
  // C_i counts the template itself (Pincus's self-match), hence the + 1.
  const nM = N - m + 1;
  const nM1 = N - m;
  let sumM = 0;
  let sumM1 = 0;
  for (let p = 0; p < nM; p++) {
    sumM += Math.log((countM[p]! + 1) / nM);
    if (extendable[p]) sumM1 += Math.log((countM1[p]! + 1) / nM1);
  }
  const phiM = sumM / nM;
  const phiM1 = sumM1 / nM1;
  return measured("apen", params, {
    apen: phiM - phiM1,
    phiM,
    phiM1,
    r,
    m,
    n: N,
    convention: conventionText(comparison),
    belowRecommendedLength: N < APEN_RECOMMENDED_MIN_N,
    caveat: BIAS_CAVEAT,
  });
}
