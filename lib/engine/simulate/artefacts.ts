// DOMAIN §6.6: detection artefacts — missed and false detections, motion bursts, isolated spikes and timestamp
// jitter — with their true labels in the hidden ground-truth channel.
import { assertInteger } from "../assert";
import { createRng } from "../random";
import { assertNonNegative, assertProbability, assertRange, type DeviceBeatType, type SimulatedBeats, type TruthLabel } from "./types";

export interface ArtefactOptions {
  seed: number;
  /** Probability per beat of a missed detection (0.1–1 %): the beat vanishes and two intervals merge. */
  missedRate: number;
  /** Probability per beat of a false detection: the interval splits into f·RR and (1 − f)·RR, f ~ U(lo, hi). */
  extraRate: number;
  extraFraction: readonly number[];
  /** Probability per beat of an isolated spike; the value is drawn from spikeValuesMs with equal chance. */
  spikeRate: number;
  spikeValuesMs: readonly number[];
  /** Motion bursts: Poisson rate per hour, duration range (s), intervals U(lo, hi) ms, device quality U(lo, hi). */
  motionPerHour: number;
  motionDurationS: readonly number[];
  motionRrMs: readonly number[];
  motionQuality: readonly number[];
  /** Timestamp jitter: every beat time moves by U(−jitter, jitter) ms and the intervals follow. */
  jitterMs: number;
}

/** Rates inside DOMAIN §6.6's ranges; the motion-burst rate (1 per hour) and spike rate are our choice (cp). */
export const ARTEFACT_DEFAULTS: Readonly<ArtefactOptions> = {
  seed: 1,
  missedRate: 0.005,
  extraRate: 0.005,
  extraFraction: [0.2, 0.5],
  spikeRate: 0.001,
  spikeValuesMs: [3000, 150],
  motionPerHour: 1,
  motionDurationS: [5, 60],
  motionRrMs: [250, 1500],
  motionQuality: [0, 0.3],
  jitterMs: 2,
};

/** Tolerance for "this beat follows the previous one without a gap", s: far below any interval, far above rounding. */
const CONTIGUOUS_TOLERANCE_S = 1e-6;

/**
 * Adds detection artefacts, DOMAIN §6.6:
 * - missed detection at k: RR_k + RR_{k+1} reported as one interval (truth "missed");
 * - false detection at k: RR_k reported as f·RR_k and (1 − f)·RR_k, f ~ U(0.2, 0.5) (both truth "extra");
 * - spike at k: RR_k replaced by 3000 or 150 ms (truth "spike"); later beat times move with it;
 * - motion burst of 5–60 s: the beats inside are replaced by intervals U(250, 1500) ms that fill the same span
 *   (the last one closes it exactly), device quality U(0, 0.3), type "?", truth "motion";
 * - timestamp jitter ±2 ms on every beat time, the intervals recomputed from the moved times.
 * Missed, extra and spike events go only on normal beats whose predecessor is normal and untouched, so each is an
 * isolated event. Bursts that would span a gap in the series are skipped.
 */
export function addArtefacts(series: SimulatedBeats, options: Partial<ArtefactOptions> = {}): SimulatedBeats {
  const o: ArtefactOptions = { ...ARTEFACT_DEFAULTS, ...options };
  assertInteger(o.seed, "seed", 0, 0xffffffff);
  assertProbability("missedRate", o.missedRate);
  assertProbability("extraRate", o.extraRate);
  assertProbability("spikeRate", o.spikeRate);
  assertProbability("missedRate + extraRate + spikeRate", o.missedRate + o.extraRate + o.spikeRate);
  assertRange("extraFraction", o.extraFraction, 0.01, 0.99);
  assertRange("motionDurationS", o.motionDurationS, 0, 3600);
  assertRange("motionRrMs", o.motionRrMs, 1, 10000);
  assertRange("motionQuality", o.motionQuality, 0, 1);
  assertNonNegative("motionPerHour", o.motionPerHour);
  assertNonNegative("jitterMs", o.jitterMs);
  if (o.spikeRate > 0 && o.spikeValuesMs.length === 0) throw new RangeError("spikeValuesMs must not be empty");

  const rng = createRng(o.seed);
  const u = (r: readonly number[]) => rng.uniform(r[0]!, r[1]!);
  const n = series.rr.length;
  const inT = series.times;
  const inRr = series.rr;
  const contiguous = (k: number) => k === 0 || Math.abs(inT[k]! - inT[k - 1]! - inRr[k]! / 1000) < CONTIGUOUS_TOLERANCE_S;

  // Motion bursts: input beat ranges [a, b] (a ≥ 1) to be replaced.
  const burstStart = new Int32Array(n).fill(-1);
  if (n > 2 && o.motionPerHour > 0) {
    const rate = o.motionPerHour / 3600;
    let t = inT[0]!;
    let k = 1;
    for (;;) {
      t += -Math.log(1 - rng.next()) / rate;
      if (t >= inT[n - 1]!) break;
      const stop = t + u(o.motionDurationS);
      while (k < n && inT[k]! < t) k++;
      const a = k;
      let b = a;
      while (b + 1 < n && inT[b + 1]! <= stop) b++;
      let ok = a < n - 1 && inT[a]! <= stop;
      for (let j = a; ok && j <= b; j++) ok = contiguous(j);
      if (ok) {
        burstStart[a] = b;
        k = b + 2;
      }
      t = Math.max(t, stop);
    }
  }

  const rr: number[] = [];
  const times: number[] = [];
  const beatType: DeviceBeatType[] = [];
  const quality: number[] = [];
  const leadOff: number[] = [];
  const truth: TruthLabel[] = [];
  const rhythm: SimulatedBeats["rhythm"] = [];
  let shift = 0; // s, from spikes
  const push = (v: number, time: number, k: number, label: TruthLabel, type: DeviceBeatType, q: number) => {
    rr.push(v);
    times.push(time);
    beatType.push(type);
    quality.push(q);
    leadOff.push(series.leadOff[k]!);
    truth.push(label);
    rhythm.push(series.rhythm[k]!);
  };
  let prevTouched = true; // the first beat has no predecessor to check
  for (let k = 0; k < n; k++) {
    const b = burstStart[k]!;
    if (b >= 0) {
      const from = inT[k - 1]! + shift;
      const to = inT[b]! + shift;
      const longest = o.motionRrMs[1]! / 1000;
      let t = from;
      while (to - t > longest) {
        const v = u(o.motionRrMs);
        t += v / 1000;
        push(v, t, k, "motion", "?", u(o.motionQuality));
      }
      push((to - t) * 1000, to, b, "motion", "?", u(o.motionQuality));
      k = b;
      prevTouched = true;
      continue;
    }
    const eligible = !prevTouched && series.truth[k] === "normal" && contiguous(k);
    const draw = eligible ? rng.next() : 1;
    const t = inT[k]! + shift;
    if (draw < o.missedRate && k + 1 < n && burstStart[k + 1] === -1 && series.truth[k + 1] === "normal" && contiguous(k + 1)) {
      push(inRr[k]! + inRr[k + 1]!, inT[k + 1]! + shift, k + 1, "missed", series.beatType[k + 1]!, series.quality[k + 1]!);
      k += 1;
      prevTouched = true;
    } else if (draw >= o.missedRate && draw < o.missedRate + o.extraRate) {
      const f = u(o.extraFraction);
      push(f * inRr[k]!, t - ((1 - f) * inRr[k]!) / 1000, k, "extra", series.beatType[k]!, series.quality[k]!);
      push((1 - f) * inRr[k]!, t, k, "extra", series.beatType[k]!, series.quality[k]!);
      prevTouched = true;
    } else if (draw >= o.missedRate + o.extraRate && draw < o.missedRate + o.extraRate + o.spikeRate) {
      const v = o.spikeValuesMs[rng.int(o.spikeValuesMs.length)]!;
      shift += (v - inRr[k]!) / 1000;
      push(v, inT[k]! + shift, k, "spike", series.beatType[k]!, series.quality[k]!);
      prevTouched = true;
    } else {
      push(inRr[k]!, t, k, series.truth[k]!, series.beatType[k]!, series.quality[k]!);
      prevTouched = series.truth[k] !== "normal";
    }
  }

  // Jitter: move each beat time, and let each interval take up the difference with its predecessor.
  const m = rr.length;
  let prevJ = 0;
  for (let k = 0; k < m; k++) {
    const j = o.jitterMs > 0 ? rng.uniform(-o.jitterMs, o.jitterMs) : 0;
    times[k] = times[k]! + j / 1000;
    rr[k] = rr[k]! + j - prevJ;
    prevJ = j;
  }

  return {
    rr: new Float64Array(rr),
    times: new Float64Array(times),
    beatType,
    quality: new Float64Array(quality),
    leadOff: new Uint8Array(leadOff),
    truth,
    rhythm,
    gaps: series.gaps.map((g) => ({ ...g })),
    steps: [...series.steps, { generator: "artefacts", params: { ...o } }],
  };
}
