import { assertPositive, assertSeries } from "../assert";
import { measured, notDefined, type Measured } from "../result";

export const TRIANGULAR_INDEX_DEFAULTS = {
  /** Histogram bin width, ms: 1/128 s = 7.8125 ms (Task Force 1996). */
  binMs: 1000 / 128,
  /**
   * Least total NN duration, s. The Task Force 1996 asks for at least 20 min (preferably 24 h) for the geometric
   * methods (mem).
   */
  minDurationS: 1200,
} as const;

/**
 * HRV triangular index (Task Force 1996): the total number of NN intervals divided by the height of the modal bin
 * of their histogram, N / max_b count_b. Dimensionless.
 *
 * **Bin alignment**: bins are [b·w, (b+1)·w) with w = 7.8125 ms, anchored at 0 ms. Devices that time beats at 128 Hz
 * report multiples of w exactly, so every such value falls at the left edge of its own bin and the histogram equals
 * the count of each reported value; other anchors would split or merge those values.
 *
 * Undefined (null) when the NN intervals cover less than `minDurationS`.
 */
export function triangularIndex(
  nn: Float64Array,
  options: { binMs?: number; minDurationS?: number } = {},
): Measured<number> {
  assertSeries(nn, "nn");
  const binMs = options.binMs ?? TRIANGULAR_INDEX_DEFAULTS.binMs;
  const minDurationS = options.minDurationS ?? TRIANGULAR_INDEX_DEFAULTS.minDurationS;
  assertPositive(binMs, "binMs");
  const params = { binMs, minDurationS, binAnchorMs: 0 };
  let total = 0;
  for (let i = 0; i < nn.length; i++) total += nn[i]!;
  if (nn.length === 0 || total / 1000 < minDurationS) {
    return notDefined("hrv-triangular-index", params, `NN intervals cover less than ${minDurationS / 60} min`);
  }
  let lo = Infinity;
  let hi = -Infinity;
  for (let i = 0; i < nn.length; i++) {
    const b = Math.floor(nn[i]! / binMs);
    if (b < lo) lo = b;
    if (b > hi) hi = b;
  }
  const counts = new Uint32Array(hi - lo + 1);
  let modal = 0;
  for (let i = 0; i < nn.length; i++) {
    const c = ++counts[Math.floor(nn[i]! / binMs) - lo]!;
    if (c > modal) modal = c;
  }
  return measured("hrv-triangular-index", params, nn.length / modal);
}
