import { assertSeries } from "../assert";
import { measured, notDefined, type Measured } from "../result";
import { mean } from "../stats";

/**
 * Mean NN interval, ms: (1/N) Σ NN_i (Task Force 1996).
 * Undefined (null) for an empty series.
 */
export function meanNN(nn: Float64Array): Measured<number> {
  assertSeries(nn, "nn");
  if (nn.length === 0) return notDefined("mean-nn", {}, "no intervals");
  return measured("mean-nn", {}, mean(nn));
}
