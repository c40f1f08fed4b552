// Delay-embedding helpers shared by the chaos measures: nearest neighbours in delay space with a Theiler window,
// and the mean period that sets the default Theiler window (Rosenstein, Collins & De Luca 1993).
import Fili from "fili";

/** Number of delay vectors (x_i, x_{i+τ}, …, x_{i+(m−1)τ}) a series of n points gives; ≤ 0 when none. */
export function delayVectorCount(n: number, m: number, tau: number): number {
  return n - (m - 1) * tau;
}

export interface Neighbours {
  /** Index of the nearest neighbour of vector i, or −1 when every candidate was excluded. */
  index: Int32Array;
  /** Its Euclidean distance (0 when index is −1). */
  distance: Float64Array;
}

const LEAF_SIZE = 8;

/**
 * Nearest neighbour (Euclidean) of each of the first `count` delay vectors (dimension m, delay τ) of x, among the
 * same `count` vectors, excluding temporal neighbours |i − j| ≤ theiler and exact duplicates (distance 0, which
 * would make every ratio of the chaos measures infinite — common practice with quantised data such as integer-ms
 * RR intervals). `queries` (default all) lists the vectors whose neighbour is wanted.
 *
 * Search: a k-d tree (Bentley, CACM 1975;18:509) split at the median of the widest coordinate, leaves of 8 vectors;
 * a branch is skipped when the query's distance to the splitting plane alone exceeds the best distance so far,
 * and partial sums of squares stop early. Exact; O(N log N) per query set for low-dimensional data, tending to
 * brute force only for noise in high dimensions.
 */
export function nearestNeighbours(
  x: Float64Array,
  m: number,
  tau: number,
  count: number,
  theiler: number,
  queries?: ArrayLike<number>,
): Neighbours {
  const tree = buildTree(x, m, tau, count);
  const index = new Int32Array(count).fill(-1);
  const distance = new Float64Array(count);
  const q = new Float64Array(m);
  const nq = queries ? queries.length : count;
  for (let t = 0; t < nq; t++) {
    const i = queries ? queries[t]! : t;
    for (let k = 0; k < m; k++) q[k] = x[i + k * tau]!;
    const s = { best: Infinity, bestJ: -1 };
    search(tree, x, tau, m, q, i, theiler, 0, s);
    if (s.bestJ >= 0) {
      index[i] = s.bestJ;
      distance[i] = Math.sqrt(s.best);
    }
  }
  return { index, distance };
}

interface Tree {
  perm: Uint32Array;
  // Per node: split coordinate (−1 for a leaf), split value, children, and the leaf's range in perm.
  dim: Int32Array;
  split: Float64Array;
  left: Int32Array;
  right: Int32Array;
  start: Int32Array;
  end: Int32Array;
}

function buildTree(x: Float64Array, m: number, tau: number, count: number): Tree {
  const maxNodes = 2 * Math.ceil(count / (LEAF_SIZE / 2)) + 1;
  const t: Tree = {
    perm: new Uint32Array(count),
    dim: new Int32Array(maxNodes),
    split: new Float64Array(maxNodes),
    left: new Int32Array(maxNodes),
    right: new Int32Array(maxNodes),
    start: new Int32Array(maxNodes),
    end: new Int32Array(maxNodes),
  };
  for (let i = 0; i < count; i++) t.perm[i] = i;
  let nodes = 0;
  const build = (lo: number, hi: number): number => {
    const node = nodes++;
    t.start[node] = lo;
    t.end[node] = hi;
    if (hi - lo <= LEAF_SIZE) {
      t.dim[node] = -1;
      return node;
    }
    let bestDim = 0;
    let bestSpread = -1;
    for (let k = 0; k < m; k++) {
      let mn = Infinity;
      let mx = -Infinity;
      for (let p = lo; p < hi; p++) {
        const v = x[t.perm[p]! + k * tau]!;
        if (v < mn) mn = v;
        if (v > mx) mx = v;
      }
      if (mx - mn > bestSpread) {
        bestSpread = mx - mn;
        bestDim = k;
      }
    }
    const mid = (lo + hi) >> 1;
    select(t.perm, x, bestDim * tau, lo, hi - 1, mid);
    t.dim[node] = bestDim;
    t.split[node] = x[t.perm[mid]! + bestDim * tau]!;
    t.left[node] = build(lo, mid);
    t.right[node] = build(mid, hi);
    return node;
  };
  build(0, count);
  return t;
}

/** Hoare's quickselect: reorders perm[lo..hi] so that perm[k] holds the k-th smallest key x[perm[·] + offset]. */
function select(perm: Uint32Array, x: Float64Array, offset: number, lo: number, hi: number, k: number): void {
  while (hi > lo) {
    const pivot = x[perm[(lo + hi) >> 1]! + offset]!;
    let i = lo;
    let j = hi;
    while (i <= j) {
      while (x[perm[i]! + offset]! < pivot) i++;
      while (x[perm[j]! + offset]! > pivot) j--;
      if (i <= j) {
        const tmp = perm[i]!;
        perm[i] = perm[j]!;
        perm[j] = tmp;
        i++;
        j--;
      }
    }
    if (k <= j) hi = j;
    else if (k >= i) lo = i;
    else return;
  }
}

function search(
  t: Tree,
  x: Float64Array,
  tau: number,
  m: number,
  q: Float64Array,
  self: number,
  theiler: number,
  node: number,
  s: { best: number; bestJ: number },
): void {
  const d = t.dim[node]!;
  if (d < 0) {
    for (let p = t.start[node]!; p < t.end[node]!; p++) {
      const j = t.perm[p]!;
      if (Math.abs(j - self) <= theiler) continue;
      let d2 = 0;
      for (let k = 0; k < m && d2 < s.best; k++) {
        const diff = x[j + k * tau]! - q[k]!;
        d2 += diff * diff;
      }
      if (d2 > 0 && d2 < s.best) {
        s.best = d2;
        s.bestJ = j;
      }
    }
    return;
  }
  const diff = q[d]! - t.split[node]!;
  const near = diff < 0 ? t.left[node]! : t.right[node]!;
  const far = diff < 0 ? t.right[node]! : t.left[node]!;
  search(t, x, tau, m, q, self, theiler, near, s);
  if (diff * diff < s.best) search(t, x, tau, m, q, self, theiler, far, s);
}

/**
 * Mean period of x in samples: the reciprocal of the power-weighted mean frequency of its periodogram
 * (Rosenstein et al. 1993 use it as the Theiler window). The mean is removed and the series zero-padded to a power
 * of two for fili's radix-2 FFT; padding refines the frequency grid without moving the weighted mean. Returns null
 * for a constant series.
 */
export function meanPeriod(x: Float64Array): number | null {
  const n = x.length;
  let len = 1;
  while (len < n) len *= 2;
  let mu = 0;
  for (let i = 0; i < n; i++) mu += x[i]!;
  mu /= n;
  const buf = new Float64Array(len);
  for (let i = 0; i < n; i++) buf[i] = x[i]! - mu;
  const { re, im } = new Fili.Fft(len).forward(buf, "none");
  let sp = 0;
  let sfp = 0;
  for (let k = 1; k <= len / 2; k++) {
    const p = re[k]! * re[k]! + im[k]! * im[k]!;
    sp += p;
    sfp += (k / len) * p;
  }
  if (!(sp > 0)) return null;
  return sp / sfp;
}
