// Centred rolling order statistics for the beat classifier: a sorted copy of the window is kept up to date by binary
// search and a shift, so a night of 34,000 beats with a 91-beat window costs about N·w element moves, not N·w·log w.

/** Type-7 quantile (R's default, as quantileSorted in stats.ts) of the sorted buf[0 … len). */
function q7(buf: Float64Array, len: number, p: number): number {
  const h = (len - 1) * p;
  const lo = Math.floor(h);
  const hi = Math.min(lo + 1, len - 1);
  return buf[lo]! + (h - lo) * (buf[hi]! - buf[lo]!);
}

/**
 * For every j, the sorted centred window x[j − half … j + half], clipped at the ends of the series (so the first
 * and last `half` windows are shorter), reduced to the median (`qd` false) or the quartile deviation
 * (Q3 − Q1)/2 (`qd` true). Element moves are plain loops: for windows this short they beat copyWithin's per-call
 * cost.
 */
function rollingOrderStatistic(x: ArrayLike<number>, window: number, qd: boolean): Float64Array {
  const half = (window - 1) >> 1;
  const n = x.length;
  const out = new Float64Array(n);
  const buf = new Float64Array(2 * half + 1);
  let len = 0;
  let hiIdx = 0; // next index to enter the window
  const rank = (v: number) => {
    let lo = 0;
    let hi = len;
    while (lo < hi) {
      const mid = (lo + hi) >> 1;
      if (buf[mid]! < v) lo = mid + 1;
      else hi = mid;
    }
    return lo;
  };
  for (let j = 0; j < n; j++) {
    const leaving = j - half - 1;
    const entering = j + half < n ? j + half : -1;
    if (leaving >= 0 && entering >= 0 && hiIdx === entering) {
      // Steady state: one value leaves and one enters. Overwrite in place, moving only the values between the old
      // and the new rank.
      const v = x[entering]!;
      hiIdx++;
      let at = rank(x[leaving]!);
      if (v >= buf[at]!) {
        while (at + 1 < len && buf[at + 1]! < v) {
          buf[at] = buf[at + 1]!;
          at++;
        }
      } else {
        while (at > 0 && buf[at - 1]! > v) {
          buf[at] = buf[at - 1]!;
          at--;
        }
      }
      buf[at] = v;
    } else {
      // Start and end of the series, where the clipped window grows or shrinks. Remove before inserting: the
      // buffer holds at most one full window.
      if (leaving >= 0) {
        const at = rank(x[leaving]!);
        len--;
        for (let i = at; i < len; i++) buf[i] = buf[i + 1]!;
      }
      const wantHi = Math.min(n, j + half + 1);
      while (hiIdx < wantHi) {
        const v = x[hiIdx++]!;
        const at = rank(v);
        for (let i = len; i > at; i--) buf[i] = buf[i - 1]!;
        buf[at] = v;
        len++;
      }
    }
    out[j] = qd ? (q7(buf, len, 0.75) - q7(buf, len, 0.25)) / 2 : q7(buf, len, 0.5);
  }
  return out;
}

/** Centred rolling median over `window` (odd) values, clipped at the ends; type-7 quantile at p = 0.5. */
export function rollingMedian(x: ArrayLike<number>, window: number): Float64Array {
  return rollingOrderStatistic(x, window, false);
}

/** Centred rolling quartile deviation (Q3 − Q1)/2 over `window` (odd) values, clipped at the ends; quartiles by
 *  R's type 7 (linear interpolation between order statistics). */
export function rollingQuartileDeviation(x: ArrayLike<number>, window: number): Float64Array {
  return rollingOrderStatistic(x, window, true);
}
