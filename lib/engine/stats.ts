// Small descriptive statistics shared by the methods. Plain loops over typed arrays: these run millions of times
// per night, and a general statistics package would allocate on every call.

export function mean(x: ArrayLike<number>, from = 0, to = x.length): number {
  let s = 0;
  for (let i = from; i < to; i++) s += x[i]!;
  return s / (to - from);
}

/** Variance with `ddof` degrees of freedom removed (1 = sample variance, the Task Force convention for SDNN). */
export function variance(x: ArrayLike<number>, ddof = 1, from = 0, to = x.length): number {
  const n = to - from;
  const m = mean(x, from, to);
  let s = 0;
  for (let i = from; i < to; i++) {
    const d = x[i]! - m;
    s += d * d;
  }
  return s / (n - ddof);
}

export function sd(x: ArrayLike<number>, ddof = 1, from = 0, to = x.length): number {
  return Math.sqrt(variance(x, ddof, from, to));
}

/** Sample quantile, R's default type 7 (linear interpolation between order statistics). */
export function quantileSorted(sorted: ArrayLike<number>, p: number): number {
  const n = sorted.length;
  if (n === 0) return NaN;
  const h = (n - 1) * p;
  const lo = Math.floor(h);
  const hi = Math.min(lo + 1, n - 1);
  return sorted[lo]! + (h - lo) * (sorted[hi]! - sorted[lo]!);
}

export function median(x: ArrayLike<number>, from = 0, to = x.length): number {
  const s = Float64Array.from({ length: to - from }, (_, i) => x[from + i]!).sort();
  return quantileSorted(s, 0.5);
}

/** Ordinary least squares y = intercept + slope·x. */
export function linearFit(x: ArrayLike<number>, y: ArrayLike<number>): { slope: number; intercept: number; r2: number } {
  const n = x.length;
  let sx = 0, sy = 0;
  for (let i = 0; i < n; i++) {
    sx += x[i]!;
    sy += y[i]!;
  }
  const mx = sx / n, my = sy / n;
  let sxx = 0, sxy = 0, syy = 0;
  for (let i = 0; i < n; i++) {
    const dx = x[i]! - mx, dy = y[i]! - my;
    sxx += dx * dx;
    sxy += dx * dy;
    syy += dy * dy;
  }
  const slope = sxy / sxx;
  return { slope, intercept: my - slope * mx, r2: syy === 0 ? 1 : (sxy * sxy) / (sxx * syy) };
}

/** First index i with x[i] ≥ v in the non-decreasing x (x.length when none): binary search. */
export function lowerBound(x: ArrayLike<number>, v: number): number {
  let lo = 0;
  let hi = x.length;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (x[mid]! < v) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}
