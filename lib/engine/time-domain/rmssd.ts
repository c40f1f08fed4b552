import { assertSeries } from "../assert";
import { measured, notDefined, type Measured } from "../result";

/**
 * RMSSD, ms: √[(1/(N−1)) Σ (NN_{i+1} − NN_i)²], the root mean square of the N − 1 successive differences
 * (Task Force 1996). No mean is subtracted from the differences (that is SDSD).
 * Undefined (null) with fewer than 2 intervals.
 */
export function rmssd(nn: Float64Array): Measured<number> {
  assertSeries(nn, "nn");
  const n = nn.length;
  if (n < 2) return notDefined("rmssd", {}, "fewer than 2 intervals: no successive difference");
  let s = 0;
  for (let i = 1; i < n; i++) {
    const d = nn[i]! - nn[i - 1]!;
    s += d * d;
  }
  return measured("rmssd", {}, Math.sqrt(s / (n - 1)));
}
