// Logarithms of the standard normal tail probabilities, accurate far into the tails, for the lognormal fits of the
// power-law comparison (truncated and discretised lognormals need ln Q(z) and ln[Q(a) − Q(b)] without underflow).
// Written from the textbook expansions of erfc (Abramowitz & Stegun 7.1.6 series, 7.1.14 continued fraction);
// checked against scipy.special.log_ndtr in tests/reference/scipy_zeta.py.

const SQRT_PI = Math.sqrt(Math.PI);
const SERIES_LIMIT = 1; // below x = 1, 1 − erf keeps ≥ 15 digits (erfc ≥ 0.157); above it the continued fraction converges within ~100 steps

/** erf(x) for 0 ≤ x < 2: (2/√π)·e^(−x²)·Σ 2ⁿx^(2n+1)/(1·3·…·(2n+1)) — every term positive, so no cancellation. */
function erfSeries(x: number): number {
  const x2 = 2 * x * x;
  let term = x;
  let sum = x;
  for (let n = 1; n < 200; n++) {
    term *= x2 / (2 * n + 1);
    sum += term;
    if (term < 1e-17 * sum) break;
  }
  return (2 / SQRT_PI) * Math.exp(-x * x) * sum;
}

/** ln erfc(x) for x ≥ 2 by the continued fraction erfc(x) = e^(−x²)/√π · 1/(x + ½/(x + 1/(x + (3/2)/(x + …)))),
 *  evaluated with the modified Lentz method. */
function logErfcContinuedFraction(x: number): number {
  const tiny = 1e-300;
  let f = x;
  let c = f;
  let d = 0;
  for (let k = 1; k < 500; k++) {
    const a = k / 2;
    d = x + a * d;
    d = Math.abs(d) < tiny ? 1 / tiny : 1 / d;
    c = x + a / c;
    if (Math.abs(c) < tiny) c = tiny;
    const delta = c * d;
    f *= delta;
    if (Math.abs(delta - 1) < 1e-16) break;
  }
  return -x * x - Math.log(SQRT_PI * f);
}

/** ln Q(z) = ln P(Z > z) for a standard normal Z. */
export function logNormalSf(z: number): number {
  if (z >= 0) {
    const x = z / Math.SQRT2;
    return x < SERIES_LIMIT ? Math.log(0.5 * (1 - erfSeries(x))) : logErfcContinuedFraction(x) - Math.LN2;
  }
  return Math.log1p(-Math.exp(logNormalSf(-z)));
}

/** ln Φ(z) = ln P(Z ≤ z). */
export function logNormalCdf(z: number): number {
  return logNormalSf(-z);
}

/** Φ(z). */
export function normalCdf(z: number): number {
  return Math.exp(logNormalCdf(z));
}

/** ln[P(a < Z ≤ b)] for a < b, computed on the side of the distribution where the difference keeps its digits. */
export function logNormalInterval(a: number, b: number): number {
  if (a >= 0) {
    // Both in the upper tail: Q(a) − Q(b) = Q(a)·(1 − Q(b)/Q(a)).
    const la = logNormalSf(a);
    return la + Math.log1p(-Math.exp(logNormalSf(b) - la));
  }
  if (b <= 0) {
    const lb = logNormalCdf(b);
    return lb + Math.log1p(-Math.exp(logNormalCdf(a) - lb));
  }
  // Straddles zero: both tails are ≤ ½, the difference is ≥ Φ(b) − ½ > 0 without cancellation.
  return Math.log1p(-Math.exp(logNormalCdf(a)) - Math.exp(logNormalSf(b)));
}
