// The shape every beat generator and modifier returns, and the small helpers they share. Synthetic data only
// (DOMAIN §6): nothing here comes from a patient.
import type { Rng } from "../random";
import type { Params } from "../result";

/** Beat type as a bedside device would report it (DOMAIN §6 stream record): N normal, V ventricular, S
 *  supraventricular, P paced, ? unknown (the device could not classify the beat, e.g. during motion). */
export type DeviceBeatType = "N" | "V" | "S" | "P" | "?";

/**
 * Hidden ground truth for each interval, for tests only (a device never sends it). An interval is named for what
 * ends it, except `post_ectopic`, which is the interval that starts at an ectopic beat and ends at a normal one:
 * - `normal`: a true beat-to-beat interval of the underlying rhythm (sinus, AF-like, paced alike: the rhythm itself
 *   is in `rhythm`);
 * - `pvc` / `pac`: ends at a premature ventricular / atrial beat; `post_ectopic`: the pause after one;
 * - `missed`: two true intervals merged because the detector missed the beat between them;
 * - `extra`: either half of a true interval split by a false detection;
 * - `motion`: inside a motion burst (random intervals, device quality < 0.3);
 * - `spike`: an isolated absurd value (3000 ms or 150 ms).
 */
export type TruthLabel = "normal" | "pvc" | "pac" | "post_ectopic" | "missed" | "extra" | "motion" | "spike";

/** Underlying rhythm of each beat; a device may or may not report it (an optional rhythm channel, DOMAIN §6.3). */
export type RhythmLabel = "sinus" | "af" | "flutter" | "paced";

export interface SimulationStep {
  /** Generator or modifier that ran, e.g. "healthy-sleep", "ectopy". */
  generator: string;
  /** Every parameter it used, after defaults, the seed included. */
  params: Params;
}

export interface SimulatedGap {
  startS: number;
  endS: number;
  /** `lead_off`: the device reported lead-off; `dropout`: beats lost in transport without a status message. */
  kind: "lead_off" | "dropout";
}

export interface SimulatedBeats {
  /** Interval ending at each beat, ms, as the device reports it. */
  rr: Float64Array;
  /** Time of each beat, s from the start of the recording. Within a stretch without gaps,
   *  times[k] = times[k−1] + rr[k]/1000 and times[0] = startS + rr[0]/1000; across a gap the time jumps. */
  times: Float64Array;
  beatType: DeviceBeatType[];
  /** Device-reported signal quality of each beat, 0 (unusable) … 1 (clean). */
  quality: Float64Array;
  /** 1 where the device reported lead-off (here: the first beat after a lead-off gap), else 0. */
  leadOff: Uint8Array;
  truth: TruthLabel[];
  rhythm: RhythmLabel[];
  /** Stretches with no beats, inserted by `addDropouts`. */
  gaps: SimulatedGap[];
  /** The chain of generators and modifiers that produced the series, in order. */
  steps: SimulationStep[];
}

/** Normal-beat device quality is drawn from U(lo, hi): a clean strip is rated high but not always 1 (cp). */
export const CLEAN_QUALITY_RANGE = [0.85, 1] as const;

/** Builds a series from per-beat intervals of one rhythm with no artefacts: times are the running sum from `startS`. */
export function seriesFromIntervals(
  rr: Float64Array,
  startS: number,
  rhythm: RhythmLabel,
  beatType: DeviceBeatType,
  quality: Float64Array,
  step: SimulationStep,
): SimulatedBeats {
  const n = rr.length;
  const times = new Float64Array(n);
  let t = startS;
  for (let k = 0; k < n; k++) {
    t += rr[k]! / 1000;
    times[k] = t;
  }
  return {
    rr,
    times,
    beatType: new Array<DeviceBeatType>(n).fill(beatType),
    quality,
    leadOff: new Uint8Array(n),
    truth: new Array<TruthLabel>(n).fill("normal"),
    rhythm: new Array<RhythmLabel>(n).fill(rhythm),
    gaps: [],
    steps: [step],
  };
}

/** Throws on options a caller got wrong (these are programming errors, not data conditions). */
export function assertRange(name: string, v: readonly number[], min: number, max: number): void {
  if (v.length !== 2 || !(v[0]! <= v[1]!) || !(v[0]! >= min) || !(v[1]! <= max)) {
    throw new RangeError(`${name} must be [lo, hi] with ${min} ≤ lo ≤ hi ≤ ${max}, got [${v.join(", ")}]`);
  }
}

export function assertProbability(name: string, p: number): void {
  if (!(Number.isFinite(p) && p >= 0 && p <= 1)) throw new RangeError(`${name} must be in [0, 1], got ${p}`);
}

export function assertNonNegative(name: string, v: number): void {
  if (!(Number.isFinite(v) && v >= 0)) throw new RangeError(`${name} must be a finite number ≥ 0, got ${v}`);
}

/** A seeded stream for one purpose, derived from the caller's seed so that, e.g., drawing device quality does not
 *  shift the physiological draws (changing one leaves the other series unchanged). */
export function subSeed(seed: number, stream: number): number {
  return (Math.imul(seed >>> 0, 0x9e3779b1) ^ Math.imul(stream + 1, 0x85ebca77)) >>> 0;
}

/** Per-beat device quality for clean beats, drawn from CLEAN_QUALITY_RANGE. */
export function cleanQuality(n: number, rng: Rng): Float64Array {
  const q = new Float64Array(n);
  const [lo, hi] = CLEAN_QUALITY_RANGE;
  for (let k = 0; k < n; k++) q[k] = rng.uniform(lo, hi);
  return q;
}
