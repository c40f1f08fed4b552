import { assertInteger, assertSeries } from "../assert";
import { measured, notDefined, type Measured } from "../result";
import { sd } from "../stats";

export const SDSD_DEFAULTS = {
  /** Sample SD of the differences (common practice), the same ddof as SDNN so that SD1 = SDSD/√2 holds exactly. */
  ddof: 1,
} as const;

/** The N − 1 successive differences NN_{i+1} − NN_i, ms. */
function successiveDifferences(nn: Float64Array): Float64Array {
  const d = new Float64Array(Math.max(nn.length - 1, 0));
  for (let i = 1; i < nn.length; i++) d[i - 1] = nn[i]! - nn[i - 1]!;
  return d;
}

/**
 * SDSD, ms: standard deviation of the successive differences ΔNN_i = NN_{i+1} − NN_i, with `ddof` removed from the
 * N − 1 differences (Task Force 1996). Differs from RMSSD only by subtracting the mean difference, (NN_N − NN_1)/(N−1),
 * and by the divisor.
 * Undefined (null) when there are no more than `ddof` differences.
 */
export function sdsd(nn: Float64Array, options: { ddof?: number } = {}): Measured<number> {
  assertSeries(nn, "nn");
  const ddof = options.ddof ?? SDSD_DEFAULTS.ddof;
  assertInteger(ddof, "ddof", 0, 1);
  const params = { ddof };
  const d = successiveDifferences(nn);
  if (d.length <= ddof || d.length === 0) return notDefined("sdsd", params, `fewer than ${ddof + 2} intervals`);
  return measured("sdsd", params, sd(d, ddof));
}
