// Even resampling of the beat series for FFT-based spectra: a natural cubic spline through (t_k, NN_k).

export interface Resampled {
  /** Time of the first sample, s (= t_1). */
  startS: number;
  /** Sampling rate, Hz. */
  rateHz: number;
  /** Samples at startS + i / rateHz, i = 0 … ⌊(t_N − t_1)·rate⌋, ms. */
  values: Float64Array;
}

/**
 * Natural cubic spline (second derivative zero at both ends; the same curve as
 * scipy.interpolate.CubicSpline(bc_type="natural")) through (times[k], values[k]), sampled at `rateHz` from times[0]
 * to the last time. Solves the tridiagonal system for the knot second derivatives by the Thomas algorithm (the
 * matrix is strictly diagonally dominant, so no pivoting is needed). Two knots give the straight line.
 */
export function resampleNaturalSpline(times: Float64Array, values: Float64Array, rateHz: number): Resampled {
  const n = times.length;
  const startS = times[0]!;
  // The allowance keeps the last sample when (t_N − t_1)·rate is an integer up to rounding.
  const count = Math.floor((times[n - 1]! - startS) * rateHz + 1e-9) + 1;
  const out = new Float64Array(count);
  const m = new Float64Array(n); // second derivatives at the knots; m[0] = m[n−1] = 0 (natural)
  if (n > 2) {
    const diag = new Float64Array(n);
    const rhs = new Float64Array(n);
    for (let i = 1; i < n - 1; i++) {
      const h0 = times[i]! - times[i - 1]!;
      const h1 = times[i + 1]! - times[i]!;
      diag[i] = 2 * (h0 + h1);
      rhs[i] = 6 * ((values[i + 1]! - values[i]!) / h1 - (values[i]! - values[i - 1]!) / h0);
    }
    // Forward sweep: row i is h0·m[i−1] + diag·m[i] + h1·m[i+1] = rhs.
    for (let i = 2; i < n - 1; i++) {
      const h0 = times[i]! - times[i - 1]!;
      const factor = h0 / diag[i - 1]!;
      diag[i] = diag[i]! - factor * h0;
      rhs[i] = rhs[i]! - factor * rhs[i - 1]!;
    }
    for (let i = n - 2; i >= 1; i--) {
      const h1 = times[i + 1]! - times[i]!;
      m[i] = (rhs[i]! - (i + 1 < n - 1 ? h1 * m[i + 1]! : 0)) / diag[i]!;
    }
  }
  let seg = 0;
  for (let q = 0; q < count; q++) {
    const t = startS + q / rateHz;
    while (seg < n - 2 && t > times[seg + 1]!) seg++;
    const t0 = times[seg]!;
    const t1 = times[seg + 1]!;
    const h = t1 - t0;
    const a = t1 - t;
    const b = t - t0;
    out[q] =
      (m[seg]! * a * a * a + m[seg + 1]! * b * b * b) / (6 * h) +
      (values[seg]! / h - (m[seg]! * h) / 6) * a +
      (values[seg + 1]! / h - (m[seg + 1]! * h) / 6) * b;
  }
  return { startS, rateHz, values: out };
}
