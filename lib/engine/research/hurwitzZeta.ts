// Hurwitz zeta function for the discrete power-law fit (normalising constant of p(x) = x^(−α)/ζ(α, x_min)).

/** B₂ … B₂₀, the even Bernoulli numbers (from memory). The check against scipy.special.zeta to 1e-13
 *  (tests/unit/engine/research.test.ts) exposes an error in the leading ones; from B₁₄ on, each term adds less than
 *  1e-14 of ζ once a ≥ s + 20 (s ≤ 50), so those are kept only as margin. */
const BERNOULLI_EVEN = [1 / 6, -1 / 30, 1 / 42, -1 / 30, 5 / 66, -691 / 2730, 7 / 6, -3617 / 510, 43867 / 798, -174611 / 330];

/** Direct terms are summed until the remaining argument a = q + n reaches this plus s: then the Euler–Maclaurin
 *  remainder after ten Bernoulli terms is below ((s + 20)/(2πa))²⁰ ≈ 1e-16 of the tail. */
const DIRECT_UNTIL = 20;

/**
 * Hurwitz zeta ζ(s, q) = Σ_{k≥0} (k + q)^(−s) for s > 1, q > 0.
 *
 * Method: sum the first n terms directly, then the Euler–Maclaurin formula for the tail at a = q + n:
 *   Σ_{k≥0} (a + k)^(−s) = a^(1−s)/(s−1) + a^(−s)/2 + Σ_{j=1..10} B₂ⱼ/(2j)! · s(s+1)…(s+2j−2) · a^(−s−2j+1) + R,
 * with n chosen so that a ≥ s + 20 (R below 1e-16 relative). Relative accuracy about 1e-15 for s in (1, 50].
 * Throws RangeError outside s > 1, q > 0 (the series diverges there).
 */
export function hurwitzZeta(s: number, q: number): number {
  if (!(s > 1) || !Number.isFinite(s)) throw new RangeError(`hurwitzZeta needs a finite s > 1, got ${s}`);
  if (!(q > 0) || !Number.isFinite(q)) throw new RangeError(`hurwitzZeta needs a finite q > 0, got ${q}`);
  const n = Math.max(0, Math.ceil(DIRECT_UNTIL + s - q));
  let direct = 0;
  // Smallest terms first, so the rounding of the big ones does not swallow them.
  for (let k = n - 1; k >= 0; k--) direct += Math.pow(q + k, -s);
  const a = q + n;
  const aPow = Math.pow(a, -s);
  let tail = (a * aPow) / (s - 1) + aPow / 2;
  // term_j = B₂ⱼ/(2j)! · (s)_{2j−1} · a^(−s−2j+1), built up from term_1 = B₂/2 · s · a^(−s−1).
  let rising = s; // (s)_{2j−1}
  let factorial = 2; // (2j)!
  let power = aPow / a; // a^(−s−2j+1)
  for (let j = 1; j <= BERNOULLI_EVEN.length; j++) {
    if (j > 1) {
      rising *= (s + 2 * j - 3) * (s + 2 * j - 2);
      factorial *= (2 * j - 1) * (2 * j);
      power /= a * a;
    }
    tail += (BERNOULLI_EVEN[j - 1]! / factorial) * rising * power;
  }
  return direct + tail;
}
