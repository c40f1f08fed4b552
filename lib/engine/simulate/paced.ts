// DOMAIN §6.4: a fixed-rate paced rhythm.
import { assertInteger } from "../assert";
import { createRng } from "../random";
import { assertNonNegative, cleanQuality, seriesFromIntervals, subSeed, type SimulatedBeats } from "./types";

export interface PacedOptions {
  seed: number;
  durationS: number;
  beats: number | null;
  startS: number;
  /** Pacing interval, ms (857 ms = 70 bpm). */
  intervalMs: number;
  /** Uniform jitter ± this much, ms. */
  jitterMs: number;
}

export const PACED_DEFAULTS: Readonly<PacedOptions> = {
  seed: 1,
  durationS: 3600,
  beats: null,
  startS: 0,
  intervalMs: 857,
  jitterMs: 1,
};

/**
 * Paced rhythm, DOMAIN §6.4: RR = 857 ± 1 ms (uniform jitter), device beat type "P", rhythm "paced". SDNN is about
 * jitter/√3 ≈ 0.58 ms (< 3 ms, §6.4); entropy and scaling indices are degenerate on it and must be suppressed.
 */
export function simulatePaced(options: Partial<PacedOptions> = {}): SimulatedBeats {
  const o: PacedOptions = { ...PACED_DEFAULTS, ...options };
  assertInteger(o.seed, "seed", 0, 0xffffffff);
  if (o.beats !== null) assertInteger(o.beats, "beats", 1);
  else assertNonNegative("durationS", o.durationS);
  assertNonNegative("jitterMs", o.jitterMs);
  if (!(o.intervalMs > o.jitterMs)) throw new RangeError("intervalMs must exceed jitterMs");
  const rng = createRng(o.seed);
  const n = o.beats ?? Math.floor((o.durationS * 1000) / (o.intervalMs + o.jitterMs));
  const rr = new Float64Array(n);
  for (let k = 0; k < n; k++) rr[k] = o.intervalMs + rng.uniform(-o.jitterMs, o.jitterMs);
  const quality = cleanQuality(n, createRng(subSeed(o.seed, 1)));
  return seriesFromIntervals(rr, o.startS, "paced", "P", quality, { generator: "paced", params: { ...o } });
}
