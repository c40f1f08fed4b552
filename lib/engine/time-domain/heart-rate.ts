import { assertSeries } from "../assert";
import { measured, notDefined, type Measured } from "../result";
import { mean } from "../stats";

/**
 * Heart rate, beats per minute, defined as **60000 / mean NN** (mean NN in ms): the rate that gives the same number
 * of beats over the window. It is *not* the mean of the instantaneous rates 60000 / NN_i; by Jensen's inequality
 * (1/x is convex) that mean is always ≥ this value, equal only for a constant series (DOMAIN §2.2).
 * Undefined (null) for an empty series.
 */
export function heartRate(nn: Float64Array): Measured<number> {
  assertSeries(nn, "nn");
  const params = { definition: "60000 / mean NN" };
  if (nn.length === 0) return notDefined("hr", params, "no intervals");
  const m = mean(nn);
  if (!(m > 0)) return notDefined("hr", params, "mean NN is not positive");
  return measured("hr", params, 60000 / m);
}
