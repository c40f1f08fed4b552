// Detrended box variances shared by DFA and MF-DFA: the step both methods have in common (profile → boxes → least-
// squares polynomial fit per box → mean squared residual), written once so the two can never disagree.
//
// Numerical design. The profile y(k) = Σ_{i≤k} (x_i − x̄) of a long night can reach 10⁵ ms while the residuals inside
// a short box are a few ms — and in a multifractal series (or at q = −5) the tiny residuals are exactly the ones that
// matter. Forming Σy² from a global running sum would cancel away those digits. Instead each box is rebuilt from its
// own increments: inside a box that starts at profile index s,
//     z_k = y(s+k) − y(s) − k·c = Σ_{j=1..k} (x_{s+j} − c),   c = x_{s+1},
// which differs from y only by a constant and a linear term, both removed exactly by any fit of order ≥ 1. So the
// residuals are those of the profile itself (the global mean x̄ drops out too), but computed from numbers of the size
// of the local fluctuations, and a run of identical intervals gives z ≡ 0 and a residual of exactly 0.
// The fit is closed-form least squares: for a straight line (DFA-1, MF-DFA1) from the running sums Σz and Σk·z of the
// box; for higher orders by projection onto an orthonormal polynomial basis (discrete Gram polynomials built once per
// box size). Either way the work is O(n·(order+1)) per box and the residual is formed point by point, not as
// Σz² − (explained part), so no cancellation enters.

/**
 * Orthonormal basis of the polynomials of degree ≤ `order` sampled at k = 0…n−1 (discrete Gram polynomials),
 * stored row by row: element [j·n + k] is p_j(k). Built by modified Gram–Schmidt, twice, on monomials of the centred
 * and scaled index t = (2k − (n−1))/(n−1) ∈ [−1, 1], which keeps the basis orthonormal to rounding for order ≤ 3.
 */
function trendBasis(n: number, order: number): Float64Array {
  const basis = new Float64Array((order + 1) * n);
  const half = (n - 1) / 2;
  for (let j = 0; j <= order; j++) {
    const row = j * n;
    for (let k = 0; k < n; k++) basis[row + k] = ((k - half) / half) ** j;
    for (let pass = 0; pass < 2; pass++) {
      for (let i = 0; i < j; i++) {
        let dot = 0;
        for (let k = 0; k < n; k++) dot += basis[row + k]! * basis[i * n + k]!;
        for (let k = 0; k < n; k++) basis[row + k] = basis[row + k]! - dot * basis[i * n + k]!;
      }
    }
    let norm = 0;
    for (let k = 0; k < n; k++) norm += basis[row + k]! ** 2;
    norm = Math.sqrt(norm);
    for (let k = 0; k < n; k++) basis[row + k] = basis[row + k]! / norm;
  }
  return basis;
}

/**
 * A fitted box whose residual sum of squares is below this share of Σz² is taken as fitted exactly (residual 0): the
 * explicit residual of an exact fit is rounding noise of about 1e-16·|z| per point, i.e. ≈ 1e-32·Σz² in sum, while a
 * real fluctuation leaves far more than 1e-24·Σz². Without the floor an exactly quadratic box under order-2
 * detrending would give a spurious 1e-30 variance that dominates F_q for negative q.
 */
const EXACT_FIT_SHARE = 1e-24;

/**
 * Mean squared residual F²_ν(n) = (1/n)·Σ_k [y(s_ν+k) − ŷ_ν(k)]² of every box of `n` profile points, where ŷ_ν is the
 * least-squares polynomial fit of degree `order` (a straight line in closed form for order 1, a projection on
 * `trendBasis(n, order)` above it).
 *
 * Boxes are non-overlapping and start at the first profile point: N_n = ⌊N/n⌋ boxes, the N − n·N_n points left over
 * at the end are not used. With `bothEnds` the same is repeated from the last point backwards (Kantelhardt et al.
 * 2002), giving 2N_n boxes that cover every point; the forward boxes come first.
 *
 * @param x the series itself (the profile is formed inside, see the file comment); length N ≥ n.
 * @param scratch a buffer of length ≥ n, reused across calls.
 * @param out receives the F²_ν; length ≥ 2⌊N/n⌋ with `bothEnds`, else ⌊N/n⌋. Reused across calls.
 * @returns the number of boxes written to `out`.
 */
export function boxVariances(
  x: Float64Array,
  n: number,
  order: number,
  bothEnds: boolean,
  scratch: Float64Array,
  out: Float64Array,
): number {
  const count = Math.floor(x.length / n);
  const basis = order === 1 ? null : trendBasis(n, order);
  for (let b = 0; b < count; b++) out[b] = boxVariance(x, b * n, n, basis, scratch);
  if (!bothEnds) return count;
  for (let b = 0; b < count; b++) out[count + b] = boxVariance(x, x.length - (b + 1) * n, n, basis, scratch);
  return 2 * count;
}

/** F² of the box of n profile points starting at s; `basis` null means a straight line (closed form). */
function boxVariance(x: Float64Array, s: number, n: number, basis: Float64Array | null, z: Float64Array): number {
  const c = x[s + 1]!;
  let acc = 0;
  let zz = 0;
  let ss = 0;
  if (basis === null) {
    // Straight line, closed form: with k̄ = (n−1)/2 and Skk = Σ(k − k̄)² = n(n² − 1)/12, the slope is
    // Σ(k − k̄)z / Skk and the line passes through (k̄, z̄). Same result as the basis path below, in two passes.
    let sz = 0;
    let skz = 0;
    z[0] = 0;
    for (let k = 1; k < n; k++) {
      acc += x[s + k]! - c;
      z[k] = acc;
      zz += acc * acc;
      sz += acc;
      skz += k * acc;
    }
    if (zz === 0) return 0;
    const kBar = (n - 1) / 2;
    const zBar = sz / n;
    const slope = (skz - kBar * sz) / ((n * (n * n - 1)) / 12);
    for (let k = 0; k < n; k++) {
      const r = z[k]! - zBar - slope * (k - kBar);
      ss += r * r;
    }
  } else {
    z[0] = 0;
    for (let k = 1; k < n; k++) {
      acc += x[s + k]! - c;
      z[k] = acc;
      zz += acc * acc;
    }
    if (zz === 0) return 0;
    // Residual r = z − Σ_j ⟨z, p_j⟩ p_j, formed in place in z.
    for (let row = 0; row < basis.length; row += n) {
      let coef = 0;
      for (let k = 0; k < n; k++) coef += z[k]! * basis[row + k]!;
      for (let k = 0; k < n; k++) z[k] = z[k]! - coef * basis[row + k]!;
    }
    for (let k = 0; k < n; k++) ss += z[k]! * z[k]!;
  }
  return ss <= EXACT_FIT_SHARE * zz ? 0 : ss / n;
}
