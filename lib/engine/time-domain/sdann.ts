import { assertSeries } from "../assert";
import { measured, notDefined, type Measured } from "../result";
import { sd } from "../stats";
import { assertBeatTimes } from "./beat-times";
import { fiveMinuteSegments, SEGMENT_DEFAULTS, type SegmentOptions } from "./segments";

export const SDANN_DEFAULTS = { ...SEGMENT_DEFAULTS, ddof: 1 } as const;

/**
 * SDANN, ms: the standard deviation (ddof 1) of the mean NN of the 5-min segments of a recording of 24 h or longer
 * (Task Force 1996). Segments are cut by beat time from the start of the recording; a segment enters only if its
 * intervals cover ≥ 90 % of it (see `fiveMinuteSegments`).
 * Undefined (null) for recordings shorter than 24 h or with fewer than 2 accepted segments.
 */
export function sdann(nn: Float64Array, times: Float64Array, options: SegmentOptions = {}): Measured<number> {
  assertSeries(nn, "nn");
  assertBeatTimes(nn, times);
  const cut = fiveMinuteSegments(nn, times, options);
  const params = { ...(cut.ok ? cut.segments.params : cut.params), ddof: SDANN_DEFAULTS.ddof };
  if (!cut.ok) return notDefined("sdann", params, cut.reason);
  const { means } = cut.segments;
  if (means.length < 2) return notDefined("sdann", params, "fewer than 2 five-minute segments with enough beats");
  return measured("sdann", params, sd(means, SDANN_DEFAULTS.ddof));
}
