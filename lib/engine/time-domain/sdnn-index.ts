import { assertSeries } from "../assert";
import { measured, notDefined, type Measured } from "../result";
import { mean } from "../stats";
import { assertBeatTimes } from "./beat-times";
import { fiveMinuteSegments, SEGMENT_DEFAULTS, type SegmentOptions } from "./segments";

export const SDNN_INDEX_DEFAULTS = { ...SEGMENT_DEFAULTS, ddof: 1 } as const;

/**
 * SDNN index, ms: the mean of the SDNN (ddof 1) of the 5-min segments of a recording of 24 h or longer
 * (Task Force 1996). Segments as for SDANN (cut by beat time; a segment enters only if covered ≥ 90 %).
 * Undefined (null) for recordings shorter than 24 h or without an accepted segment.
 */
export function sdnnIndex(nn: Float64Array, times: Float64Array, options: SegmentOptions = {}): Measured<number> {
  assertSeries(nn, "nn");
  assertBeatTimes(nn, times);
  const cut = fiveMinuteSegments(nn, times, options);
  const params = { ...(cut.ok ? cut.segments.params : cut.params), ddof: SDNN_INDEX_DEFAULTS.ddof };
  if (!cut.ok) return notDefined("sdnn-index", params, cut.reason);
  const { sds } = cut.segments;
  if (sds.length === 0) return notDefined("sdnn-index", params, "no five-minute segment with enough beats");
  return measured("sdnn-index", params, mean(sds));
}
