import { assertPositive, assertSeries } from "../assert";
import { measured, notDefined, type Measured } from "../result";
import { countLargeDifferences } from "./differences";

export const NN50_DEFAULTS = {
  /** A pair counts when |NN_{i+1} − NN_i| is strictly greater than this, ms (Task Force 1996: 50 ms). */
  thresholdMs: 50,
} as const;

/**
 * NN50: the number of pairs of adjacent NN intervals differing by more than 50 ms (strictly), counting every pair
 * whichever interval is the longer (the Task Force 1996 lists that and two one-sided variants; we use the two-sided
 * count). `thresholdMs` gives NNx (e.g. 20 for NN20).
 * Undefined (null) with fewer than 2 intervals.
 */
export function nn50(nn: Float64Array, options: { thresholdMs?: number } = {}): Measured<number> {
  assertSeries(nn, "nn");
  const thresholdMs = options.thresholdMs ?? NN50_DEFAULTS.thresholdMs;
  assertPositive(thresholdMs, "thresholdMs");
  const params = { thresholdMs };
  if (nn.length < 2) return notDefined("nn50", params, "fewer than 2 intervals: no successive difference");
  return measured("nn50", params, countLargeDifferences(nn, thresholdMs));
}
