// The beat-level part of DOMAIN §6.7: stretches with no beats (lead-off, transport loss). Transport effects on
// records (late, out-of-order, duplicate records, clock offset and drift) belong to the device simulator.
import { assertInteger } from "../assert";
import { createRng } from "../random";
import { assertNonNegative, assertProbability, type SimulatedBeats, type SimulatedGap } from "./types";

export interface DropoutOptions {
  seed: number;
  /** Gap starts form a Poisson process at this rate per hour (0.5–2). */
  gapsPerHour: number;
  /** Gap duration is log-normal: median, s, and SD of its logarithm. */
  medianDurationS: number;
  durationLogSd: number;
  /** Share of gaps that are lead-off (the device says so) rather than silent transport loss. */
  leadOffShare: number;
}

export const DROPOUT_DEFAULTS: Readonly<DropoutOptions> = {
  seed: 1,
  gapsPerHour: 1,
  medianDurationS: 20,
  // DOMAIN §6.7: median 20 s with about 5 % longer than 10 min ⇒ ln(600/20) = 1.645·σ ⇒ σ = 2.07.
  durationLogSd: Math.log(600 / 20) / 1.6449,
  leadOffShare: 0.5,
};

/**
 * Removes the beats inside gaps, DOMAIN §6.7. Gap starts are a Poisson process (1 per hour), durations log-normal
 * (median 20 s, about 5 % over 10 min). The beats whose times fall inside a gap are dropped; the first beat after
 * it keeps its own, true interval (the device resumes with a valid interval), so the beat times jump across the gap.
 * After a lead-off gap that beat carries leadOff = 1. The gaps are listed in `gaps`.
 */
export function addDropouts(series: SimulatedBeats, options: Partial<DropoutOptions> = {}): SimulatedBeats {
  const o: DropoutOptions = { ...DROPOUT_DEFAULTS, ...options };
  assertInteger(o.seed, "seed", 0, 0xffffffff);
  assertNonNegative("gapsPerHour", o.gapsPerHour);
  if (!(o.medianDurationS > 0)) throw new RangeError("medianDurationS must be > 0");
  assertNonNegative("durationLogSd", o.durationLogSd);
  assertProbability("leadOffShare", o.leadOffShare);
  const rng = createRng(o.seed);
  const n = series.rr.length;
  const gaps: SimulatedGap[] = [];
  if (n > 1 && o.gapsPerHour > 0) {
    const rate = o.gapsPerHour / 3600;
    let t = series.times[0]!;
    const end = series.times[n - 1]!;
    for (;;) {
      t += -Math.log(1 - rng.next()) / rate;
      if (t >= end) break;
      const d = o.medianDurationS * Math.exp(o.durationLogSd * rng.normal());
      gaps.push({ startS: t, endS: Math.min(t + d, end), kind: rng.next() < o.leadOffShare ? "lead_off" : "dropout" });
      t += d;
    }
  }
  const keep = new Uint8Array(n).fill(1);
  const leadOff = series.leadOff.slice();
  let k = 0;
  for (const g of gaps) {
    while (k < n && series.times[k]! < g.startS) k++;
    while (k < n && series.times[k]! <= g.endS) keep[k++] = 0;
    if (k < n && g.kind === "lead_off") leadOff[k] = 1;
  }
  let m = 0;
  for (let i = 0; i < n; i++) m += keep[i]!;
  const rr = new Float64Array(m);
  const times = new Float64Array(m);
  const quality = new Float64Array(m);
  const lead = new Uint8Array(m);
  const beatType: SimulatedBeats["beatType"] = [];
  const truth: SimulatedBeats["truth"] = [];
  const rhythm: SimulatedBeats["rhythm"] = [];
  for (let i = 0, j = 0; i < n; i++) {
    if (!keep[i]) continue;
    rr[j] = series.rr[i]!;
    times[j] = series.times[i]!;
    quality[j] = series.quality[i]!;
    lead[j] = leadOff[i]!;
    beatType.push(series.beatType[i]!);
    truth.push(series.truth[i]!);
    rhythm.push(series.rhythm[i]!);
    j++;
  }
  return {
    rr,
    times,
    beatType,
    quality,
    leadOff: lead,
    truth,
    rhythm,
    gaps: [...series.gaps.map((g) => ({ ...g })), ...gaps],
    steps: [...series.steps, { generator: "dropouts", params: { ...o } }],
  };
}
