import { assertInteger, assertSeries } from "../assert";
import { measured, notDefined, type Measured } from "../result";
import { sd } from "../stats";

export const SDNN_DEFAULTS = {
  /** Degrees of freedom removed: 1 = sample SD (common practice; the Task Force text does not say). */
  ddof: 1,
} as const;

/**
 * SDNN, ms: standard deviation of the NN intervals, √[Σ(NN_i − mean)² / (N − ddof)] (Task Force 1996).
 * Compare only between windows of equal length: SDNN grows with the recording length (DOMAIN §2.2).
 * Undefined (null) when N ≤ ddof.
 */
export function sdnn(nn: Float64Array, options: { ddof?: number } = {}): Measured<number> {
  assertSeries(nn, "nn");
  const ddof = options.ddof ?? SDNN_DEFAULTS.ddof;
  assertInteger(ddof, "ddof", 0, 1);
  const params = { ddof };
  if (nn.length === 0) return notDefined("sdnn", params, "no intervals");
  if (nn.length <= ddof) return notDefined("sdnn", params, "fewer than 2 intervals");
  return measured("sdnn", params, sd(nn, ddof));
}
