// Small derivative-free minimisers for the maximum-likelihood fits of the power-law comparison. Written from the
// published algorithms: Brent's localmin (Brent, "Algorithms for Minimization without Derivatives", 1973, ch. 5)
// and the Nelder–Mead simplex (Comput J 1965;7:308) with the standard coefficients 1, 2, ½, ½.

const GOLDEN = (3 - Math.sqrt(5)) / 2;

/**
 * Minimum of a unimodal f on [a, b] by golden-section search with parabolic steps (Brent 1973). Stops when the
 * bracket is narrower than 2·(relTol·|x| + absTol).
 */
export function brentMinimize(
  f: (x: number) => number,
  a: number,
  b: number,
  relTol = 1e-12,
  absTol = 1e-14,
  maxIter = 200,
): { x: number; fx: number } {
  let x = a + GOLDEN * (b - a);
  let w = x;
  let v = x;
  let fx = f(x);
  let fw = fx;
  let fv = fx;
  let d = 0;
  let e = 0;
  for (let iter = 0; iter < maxIter; iter++) {
    const m = 0.5 * (a + b);
    const tol = relTol * Math.abs(x) + absTol;
    const tol2 = 2 * tol;
    if (Math.abs(x - m) <= tol2 - 0.5 * (b - a)) break;
    let golden = true;
    if (Math.abs(e) > tol) {
      // Parabola through (v, fv), (w, fw), (x, fx).
      let r = (x - w) * (fx - fv);
      let q = (x - v) * (fx - fw);
      let p = (x - v) * q - (x - w) * r;
      q = 2 * (q - r);
      if (q > 0) p = -p;
      else q = -q;
      r = e;
      e = d;
      if (Math.abs(p) < Math.abs(0.5 * q * r) && p > q * (a - x) && p < q * (b - x)) {
        d = p / q;
        const u = x + d;
        if (u - a < tol2 || b - u < tol2) d = x < m ? tol : -tol;
        golden = false;
      }
    }
    if (golden) {
      e = (x < m ? b : a) - x;
      d = GOLDEN * e;
    }
    const u = Math.abs(d) >= tol ? x + d : x + (d > 0 ? tol : -tol);
    const fu = f(u);
    if (fu <= fx) {
      if (u < x) b = x;
      else a = x;
      v = w;
      fv = fw;
      w = x;
      fw = fx;
      x = u;
      fx = fu;
    } else {
      if (u < x) a = u;
      else b = u;
      if (fu <= fw || w === x) {
        v = w;
        fv = fw;
        w = u;
        fw = fu;
      } else if (fu <= fv || v === x || v === w) {
        v = u;
        fv = fu;
      }
    }
  }
  return { x, fx };
}

/**
 * Minimum of f over Rⁿ by the Nelder–Mead simplex, started from x0 with the given step per coordinate. Stops when
 * the spread of f over the simplex is below fTol·(|f_best| + fTol) and the simplex is narrower than xTol, or after
 * maxIter steps. Restarts once from the best point, the usual guard against a collapsed simplex.
 */
export function nelderMead(
  f: (x: Float64Array) => number,
  x0: ArrayLike<number>,
  step: ArrayLike<number>,
  fTol = 1e-13,
  xTol = 1e-10,
  maxIter = 4000,
): { x: Float64Array; fx: number } {
  let best = runSimplex(f, Float64Array.from(x0), step, fTol, xTol, maxIter);
  best = runSimplex(f, best.x, step, fTol, xTol, maxIter);
  return best;
}

function runSimplex(
  f: (x: Float64Array) => number,
  start: Float64Array,
  step: ArrayLike<number>,
  fTol: number,
  xTol: number,
  maxIter: number,
): { x: Float64Array; fx: number } {
  const n = start.length;
  const pts: Float64Array[] = [Float64Array.from(start)];
  for (let i = 0; i < n; i++) {
    const p = Float64Array.from(start);
    p[i] = p[i]! + step[i]!;
    pts.push(p);
  }
  const fs = pts.map((p) => f(p));
  const centroid = new Float64Array(n);
  const trial = new Float64Array(n);
  const trial2 = new Float64Array(n);
  const order = pts.map((_, i) => i);
  for (let iter = 0; iter < maxIter; iter++) {
    order.sort((i, j) => fs[i]! - fs[j]!);
    const lo = order[0]!;
    const hi = order[n]!;
    const nextHi = order[n - 1]!;
    let width = 0;
    for (let k = 1; k <= n; k++) {
      for (let i = 0; i < n; i++) width = Math.max(width, Math.abs(pts[order[k]!]![i]! - pts[lo]![i]!));
    }
    if (Math.abs(fs[hi]! - fs[lo]!) <= fTol * (Math.abs(fs[lo]!) + fTol) && width <= xTol) break;
    centroid.fill(0);
    for (let k = 0; k < n; k++) {
      const p = pts[order[k]!]!;
      for (let i = 0; i < n; i++) centroid[i] = centroid[i]! + p[i]! / n;
    }
    const worst = pts[hi]!;
    for (let i = 0; i < n; i++) trial[i] = centroid[i]! + (centroid[i]! - worst[i]!);
    const fr = f(trial);
    if (fr < fs[lo]!) {
      for (let i = 0; i < n; i++) trial2[i] = centroid[i]! + 2 * (centroid[i]! - worst[i]!);
      const fe = f(trial2);
      if (fe < fr) {
        worst.set(trial2);
        fs[hi] = fe;
      } else {
        worst.set(trial);
        fs[hi] = fr;
      }
      continue;
    }
    if (fr < fs[nextHi]!) {
      worst.set(trial);
      fs[hi] = fr;
      continue;
    }
    // Contraction: outside if the reflection improved on the worst point, inside otherwise.
    const outside = fr < fs[hi]!;
    for (let i = 0; i < n; i++) {
      trial2[i] = outside ? centroid[i]! + 0.5 * (trial[i]! - centroid[i]!) : centroid[i]! + 0.5 * (worst[i]! - centroid[i]!);
    }
    const fc = f(trial2);
    if (fc < (outside ? fr : fs[hi]!)) {
      worst.set(trial2);
      fs[hi] = fc;
      continue;
    }
    // Shrink towards the best point.
    const best = pts[lo]!;
    for (let k = 1; k <= n; k++) {
      const p = pts[order[k]!]!;
      for (let i = 0; i < n; i++) p[i] = best[i]! + 0.5 * (p[i]! - best[i]!);
      fs[order[k]!] = f(p);
    }
  }
  let b = 0;
  for (let k = 1; k <= n; k++) if (fs[k]! < fs[b]!) b = k;
  return { x: Float64Array.from(pts[b]!), fx: fs[b]! };
}
