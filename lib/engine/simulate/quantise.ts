// DOMAIN §6: a device reports beat times on its own clock grid — 1 ms, 1/128 s (7.8125 ms) or 1/1024 s (cp).
import { assertPositive } from "../assert";
import type { SimulatedBeats } from "./types";

/** Common device resolutions, ms. */
export const DEVICE_RESOLUTIONS_MS = { ms1: 1, hz128: 1000 / 128, hz1024: 1000 / 1024 } as const;

/** Tolerance for "this beat follows the previous one without a gap", ms. */
const CONTIGUOUS_TOLERANCE_MS = 1e-3;

/**
 * Rounds every beat time to the device grid and takes each interval as the difference of rounded times, so that
 * intervals are whole multiples of the resolution and still add up to the times (rounding each interval on its own
 * would let the error accumulate). The first interval, and the first after a gap, is rounded on its own.
 */
export function quantiseBeats(series: SimulatedBeats, resolutionMs: number): SimulatedBeats {
  assertPositive(resolutionMs, "resolutionMs");
  const n = series.rr.length;
  const rr = new Float64Array(n);
  const times = new Float64Array(n);
  const q = (ms: number) => Math.round(ms / resolutionMs) * resolutionMs;
  for (let k = 0; k < n; k++) {
    times[k] = q(series.times[k]! * 1000) / 1000;
    const contiguous = k > 0 && Math.abs((series.times[k]! - series.times[k - 1]!) * 1000 - series.rr[k]!) < CONTIGUOUS_TOLERANCE_MS;
    rr[k] = contiguous ? q(series.times[k]! * 1000) - q(series.times[k - 1]! * 1000) : q(series.rr[k]!);
  }
  return {
    ...series,
    rr,
    times,
    beatType: series.beatType.slice(),
    quality: series.quality.slice(),
    leadOff: series.leadOff.slice(),
    truth: series.truth.slice(),
    rhythm: series.rhythm.slice(),
    gaps: series.gaps.map((g) => ({ ...g })),
    steps: [...series.steps, { generator: "quantise", params: { resolutionMs } }],
  };
}
