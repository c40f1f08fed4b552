// A simulated device's own clock (DOMAIN §4, §6.7): a fixed offset from true time, a drift, and for a drifting
// clock one correction a night (the device re-synchronises and the drift it gathered since the last correction is
// stepped away). Pure: true time in, device time out.
import { dailyLocalInstants } from "./night";

export interface DeviceClockSpec {
  /** Device minus true time right after a correction (or always, without drift), ms. */
  offsetMs: number;
  /** Rate error, parts per million (+20 ppm gains about 1.7 s a day). */
  driftPpm: number;
  /** Local time of the nightly correction, "HH:mm:ss"; required when driftPpm ≠ 0. */
  correctionLocal: string | null;
  timeZone: string;
}

export interface DeviceClock {
  /** Device minus true time, ms, at true time `t` (epoch ms). Kept apart from t itself: added to an epoch in ms
   *  it would be rounded to the 0.24 µs grid of a double near 1.7e12, too coarse to test contiguity of beats. */
  offsetAt(t: number): number;
  /** Corrections (true instants) inside the range the clock was built for. */
  corrections: readonly number[];
}

/**
 * The clock over the true-time range [fromMs, toMs]: device time = t + offset + drift·(t − c(t)), c(t) the last
 * correction at or before t. At each correction the device time steps back by the drift gathered since the one
 * before (about −1.7 s after a day at +20 ppm; less after the first, partial, stretch it simulates).
 */
export function deviceClock(spec: DeviceClockSpec, fromMs: number, toMs: number): DeviceClock {
  if (!Number.isFinite(spec.offsetMs)) throw new RangeError(`clock offset must be finite, got ${spec.offsetMs}`);
  if (!(Number.isFinite(spec.driftPpm) && Math.abs(spec.driftPpm) <= 1000)) {
    throw new RangeError(`clock drift must be within ±1000 ppm, got ${spec.driftPpm}`);
  }
  if (!(toMs >= fromMs)) throw new RangeError("clock range must not be empty");
  if (spec.driftPpm === 0) {
    return { offsetAt: () => spec.offsetMs, corrections: [] };
  }
  if (spec.correctionLocal === null) throw new RangeError("a drifting clock needs a nightly correction time");
  // From a day before the range, so every instant in it has a correction before it.
  const all = dailyLocalInstants(fromMs - 86_400_000, toMs, spec.correctionLocal, spec.timeZone);
  const rate = spec.driftPpm * 1e-6;
  const offsetAt = (t: number) => {
    let lo = 0;
    let hi = all.length - 1;
    if (!(all[0]! <= t)) throw new RangeError("instant before the clock's range");
    while (lo < hi) {
      const mid = (lo + hi + 1) >> 1;
      if (all[mid]! <= t) lo = mid;
      else hi = mid - 1;
    }
    return spec.offsetMs + rate * (t - all[lo]!);
  };
  return { offsetAt, corrections: all.filter((c) => c > fromMs && c <= toMs) };
}
