// Five-minute segments of a long recording, shared by SDANN and the SDNN index (Task Force 1996).
import { coveredSpanS } from "./beat-times";

export const SEGMENT_DEFAULTS = {
  /** Segment length, s (Task Force 1996: 5 min). */
  segmentS: 300,
  /**
   * A segment is used only if its NN intervals cover at least this share of it — the acceptance rule for a window in
   * DOMAIN §2.1 (coverage ≥ 90 %, common practice), so gaps and the partial last segment do not enter.
   */
  minCoverage: 0.9,
  /** These indices describe 24-h recordings (Task Force 1996); shorter ones give null. */
  minRecordingS: 24 * 3600,
} as const;

export interface SegmentOptions {
  segmentS?: number;
  minCoverage?: number;
  minRecordingS?: number;
}

export interface Segments {
  /** Mean NN of each accepted segment, ms. */
  means: Float64Array;
  /** SD (ddof 1) of each accepted segment, ms. */
  sds: Float64Array;
  params: { segmentS: number; minCoverage: number; minRecordingS: number };
}

/**
 * Splits a recording into consecutive segments of `segmentS` seconds counted from the beat that opens the first
 * interval (t₀ = times[0] − nn[0]/1000). Interval i belongs to segment j when its closing beat lies in
 * (t₀ + j·S, t₀ + (j+1)·S]. Returns the mean and SD of each segment whose intervals cover ≥ minCoverage of it, or a
 * reason when the recording is shorter than minRecordingS.
 */
export function fiveMinuteSegments(
  nn: Float64Array,
  times: Float64Array,
  options: SegmentOptions,
): { ok: true; segments: Segments } | { ok: false; reason: string; params: Segments["params"] } {
  const params = {
    segmentS: options.segmentS ?? SEGMENT_DEFAULTS.segmentS,
    minCoverage: options.minCoverage ?? SEGMENT_DEFAULTS.minCoverage,
    minRecordingS: options.minRecordingS ?? SEGMENT_DEFAULTS.minRecordingS,
  };
  const n = nn.length;
  if (n === 0) return { ok: false, reason: "no intervals", params };
  const span = coveredSpanS(nn, times);
  if (span < params.minRecordingS) {
    return { ok: false, reason: `recording shorter than ${params.minRecordingS / 3600} h`, params };
  }
  const t0 = times[0]! - nn[0]! / 1000;
  const means: number[] = [];
  const sds: number[] = [];
  let i = 0;
  while (i < n) {
    const j = Math.ceil((times[i]! - t0) / params.segmentS) - 1;
    const end = t0 + (j + 1) * params.segmentS;
    // The first beat always joins (guards against rounding between the two comparisons).
    let k = i + 1;
    let sum = nn[i]!;
    while (k < n && times[k]! <= end) sum += nn[k++]!;
    const count = k - i;
    if (count >= 2 && sum / 1000 >= params.minCoverage * params.segmentS) {
      const m = sum / count;
      let ss = 0;
      for (let q = i; q < k; q++) ss += (nn[q]! - m) * (nn[q]! - m);
      means.push(m);
      sds.push(Math.sqrt(ss / (count - 1)));
    }
    i = k;
  }
  return { ok: true, segments: { means: Float64Array.from(means), sds: Float64Array.from(sds), params } };
}
