import { assertSeries } from "../assert";
import { measured, notDefined, type Measured } from "../result";

export const POINCARE_DEFAULTS = {
  /** Sample SDs (ddof 1), the same as SDSD and SDNN, so that SD1 = SDSD/√2 exactly (DOMAIN §3.1 A8). */
  ddof: 1,
} as const;

export interface PoincareValue {
  /** SD across the line of identity, ms: SD of (NN_{i+1} − NN_i)/√2 = SDSD/√2. */
  sd1: number;
  /** SD along the line of identity, ms: SD of (NN_i + NN_{i+1})/√2. */
  sd2: number;
  /** SD1/SD2; null when SD2 = 0 (see `reasons.sd1Sd2`). */
  sd1Sd2: number | null;
  /** Area of the fitted ellipse, π·SD1·SD2, ms². */
  ellipseArea: number;
  /** The plot: x = NN_i, y = NN_{i+1} for i = 1 … N−1, ms. */
  x: Float64Array;
  y: Float64Array;
  reasons: { sd1Sd2?: string };
}

/**
 * Poincaré plot descriptors (Brennan, Palaniswami & Kamen, IEEE TBME 2001;48:1342). The N − 1 points
 * (NN_i, NN_{i+1}) are rotated by 45°: u = (y − x)/√2 across the line of identity and v = (x + y)/√2 along it.
 *
 * - SD1 = SD(u) = SDSD/√2 exactly (same ddof; DOMAIN §3.1 A8).
 * - SD2 = SD(v), computed directly from the rotated points (always real). Brennan's identity
 *   SD2² = 2·SDNN² − ½·SDSD² holds only asymptotically: the two differ by O(1/N) because SDNN uses all N intervals
 *   and SD(v) the N − 1 pairs, and at very small N the identity can even go negative.
 * - SD1/SD2 and the ellipse area π·SD1·SD2.
 *
 * Undefined (null) with fewer than 3 intervals (two points are needed for a sample SD).
 */
export function poincare(nn: Float64Array): Measured<PoincareValue> {
  assertSeries(nn, "nn");
  const ddof = POINCARE_DEFAULTS.ddof;
  const params = { ddof, sd2Formula: "SD of (NN_i + NN_i+1)/√2" };
  const n = nn.length;
  if (n < 3) return notDefined("poincare", params, "fewer than 3 intervals");
  const m = n - 1;
  const x = nn.slice(0, m);
  const y = nn.slice(1);
  let su = 0;
  let sv = 0;
  for (let i = 0; i < m; i++) {
    su += y[i]! - x[i]!;
    sv += x[i]! + y[i]!;
  }
  const mu = su / m;
  const mv = sv / m;
  let ssu = 0;
  let ssv = 0;
  for (let i = 0; i < m; i++) {
    const du = y[i]! - x[i]! - mu;
    const dv = x[i]! + y[i]! - mv;
    ssu += du * du;
    ssv += dv * dv;
  }
  // The 1/√2 of the rotation, squared, is the ½ here.
  const sd1 = Math.sqrt((0.5 * ssu) / (m - ddof));
  const sd2 = Math.sqrt((0.5 * ssv) / (m - ddof));
  const reasons: PoincareValue["reasons"] = {};
  if (sd2 === 0) reasons.sd1Sd2 = "SD2 is zero: every pair of successive intervals has the same sum";
  return measured("poincare", params, {
    sd1,
    sd2,
    sd1Sd2: sd2 === 0 ? null : sd1 / sd2,
    ellipseArea: Math.PI * sd1 * sd2,
    x,
    y,
    reasons,
  });
}
