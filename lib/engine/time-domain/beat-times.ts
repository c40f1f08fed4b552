// Beat times shared by the methods that need them (SDANN, SDNN index, the spectra). Convention throughout the engine:
// `times[i]` is the time, in seconds, of the beat that *closes* interval `nn[i]` — the running sum of the intervals
// when no beat was deleted (t_k = t_{k−1} + RR_k / 1000, as in DOMAIN §3.1 A9). Deleted beats leave gaps in `times`.
import { assertSeries } from "../assert";

/** Throws (programming error) unless `times` is a finite, strictly increasing Float64Array as long as `nn`. */
export function assertBeatTimes(nn: Float64Array, times: unknown): asserts times is Float64Array {
  assertSeries(times, "times");
  if (times.length !== nn.length) {
    throw new RangeError(`times has ${times.length} values but nn has ${nn.length}: they must pair one to one`);
  }
  for (let i = 1; i < times.length; i++) {
    if (!(times[i]! > times[i - 1]!)) throw new RangeError(`times must increase strictly: times[${i}] ≤ times[${i - 1}]`);
  }
}

/**
 * Time covered by the beats, s: from the beat that opens the first interval (times[0] − nn[0]/1000) to the last beat.
 * Equal to Σ NN / 1000 when no beat was deleted.
 */
export function coveredSpanS(nn: Float64Array, times: Float64Array): number {
  const n = nn.length;
  return times[n - 1]! - (times[0]! - nn[0]! / 1000);
}
