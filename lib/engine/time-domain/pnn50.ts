import { assertPositive, assertSeries } from "../assert";
import { measured, notDefined, type Measured } from "../result";
import { countLargeDifferences } from "./differences";

export const PNN50_DEFAULTS = {
  /** |ΔNN| strictly greater than this counts, ms (Task Force 1996: 50 ms). */
  thresholdMs: 50,
  denominator: "N-1 differences",
} as const;

/**
 * pNN50, percent: 100 × NN50 / (N − 1). **Denominator: the N − 1 successive differences** (the number of pairs that
 * could qualify), so a series whose every difference exceeds 50 ms gives 100 %. The Task Force 1996 text divides by
 * the total number of NN intervals N instead; the two differ by a factor N/(N−1) (0.3 % at 330 beats). `thresholdMs`
 * gives pNNx (e.g. 20 for pNN20).
 * Undefined (null) with fewer than 2 intervals.
 */
export function pnn50(nn: Float64Array, options: { thresholdMs?: number } = {}): Measured<number> {
  assertSeries(nn, "nn");
  const thresholdMs = options.thresholdMs ?? PNN50_DEFAULTS.thresholdMs;
  assertPositive(thresholdMs, "thresholdMs");
  const params = { thresholdMs, denominator: PNN50_DEFAULTS.denominator };
  if (nn.length < 2) return notDefined("pnn50", params, "fewer than 2 intervals: no successive difference");
  return measured("pnn50", params, (100 * countLargeDifferences(nn, thresholdMs)) / (nn.length - 1));
}
