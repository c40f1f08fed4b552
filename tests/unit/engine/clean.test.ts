// Beat cleaning (DOMAIN §2.1). Hand-made series whose labels follow from the definitions (worked out in the
// comments), the correction policy, the range gate and percentage rules, invariants, and detection quality on the
// DOMAIN §6.5–6.6 simulator with known ground truth.
import { describe, expect, it } from "vitest";
import {
  CLEAN_DEFAULTS,
  LIPPONEN_TARVAINEN_DEFAULTS,
  RANGE_GATE_PRESETS,
  cleanBeats,
  lipponenTarvainen,
  percentageRule,
  rangeGate,
  type BeatLabel,
} from "@/lib/engine/clean";
import { addArtefacts, addDropouts, addEctopy, quantiseBeats, simulateHealthySleep, type TruthLabel } from "@/lib/engine/simulate";
import { quantileSorted } from "@/lib/engine/stats";
import { ALGORITHM_VERSION } from "@/lib/engine/version";

/** Exact arithmetic on whole-ms inputs; only the interpolation weights and time sums leave the integers. */
const FLOAT_TOL = 1e-9;

/** A quiet sinus pattern, period 4: dRR = ±10 ms, mRR ∈ {0, +10, −20} ms around the 11-beat median of 1000 ms. */
const PATTERN = [1000, 1010, 1000, 990];
const base = (n: number) => Array.from({ length: n }, (_, k) => PATTERN[k % 4]!);

/**
 * With minThresholdMs = 100 both thresholds sit on the floor: in every 91-beat window at least 85 of the |dRR| are
 * 10 ms, so QD(|dRR|) = 0, and |mRR| ≤ 20 ms in all but a few beats, so QD(|mRR|) ≤ 10 ms and 5.2·QD ≤ 52 < 100.
 * Then Th1 = Th2 = 100 ms everywhere and dRRs = dRR/100, which makes each label below a hand calculation.
 */
const PINNED = { minThresholdMs: 100 } as const;

const labelsOf = (rr: number[], opts = {}) => cleanBeats(Float64Array.from(rr), { ...PINNED, ...opts }).value!;

/** Indices whose label is not normal, with their labels. */
const flagged = (labels: readonly BeatLabel[]) => Object.fromEntries(labels.flatMap((l, i) => (l === "normal" ? [] : [[i, l]])));

describe("Lipponen & Tarvainen 2019 classification on hand-made series", () => {
  it("labels an isolated premature beat short–ectopic and interpolates both by the cubic through the neighbours", () => {
    // RR: … 39: 990, 40: 600, 41: 1400, 42: 1000, 43: 990 …  dRRs: d40 = −3.9, d41 = +8.0, d42 = −4.0, d39 = d43 = −0.1.
    // Beat 40: S11 = −3.9, S12 = min(d39, d41) = −0.1, not > 0.13·3.9 + 0.17 = 0.68, so not ectopic; S21 = −3.9,
    //   S22 = max(d41, d42) = 8.0 > 1: short (extra test |600 + 1400 − 1000| = 1000 ≥ 100, so not extra).
    // Beat 41: S11 = 8.0, S12 = max(d40, d42) = −3.9 < −0.13·8 − 0.17 = −1.21: ectopic.
    // Beat 42: S11 = −4.0 with S12 = min(d41, d43) = −0.1 (not ectopic), S22 = max(d43, d44) = 0.1 (not long/short),
    //   mRR = 0: normal — although |dRRs| = 4 > 1, which DOMAIN §2.1's shorthand "|dRRs| > 1" would flag.
    const rr = base(100);
    rr[40] = 600;
    rr[41] = 1400;
    const c = labelsOf(rr);
    expect(flagged(c.labels)).toEqual({ 40: "short", 41: "ectopic" });
    expect(c.actions[40]).toBe("interpolated");
    expect(c.actions[41]).toBe("interpolated");
    // Lagrange cubic through (38, 1000), (39, 990), (42, 1000), (43, 990): weights at 40 are (−0.3, 1, 0.5, −0.2) →
    // 992 ms; at 41 (−0.2, 0.5, 1, −0.3) → 998 ms (worked by hand).
    expect(c.nn.length).toBe(100);
    expect(c.nn[40]).toBeCloseTo(992, 9);
    expect(c.nn[41]).toBeCloseTo(998, 9);
    expect(c.edited[40]).toBe(1);
    expect(c.counts.byAction).toMatchObject({ kept: 98, interpolated: 2 });
    // The cluster still ends on the real beat 41, and the new beat 40 divides the real 2-s span in proportion.
    expect(c.times[41]).toBeCloseTo(c.inputTimes[41]!, 12);
    expect(c.times[40]! - c.inputTimes[39]!).toBeCloseTo((2 * 992) / (992 + 998), 12);
  });

  it("labels a missed beat and splits it in two halves", () => {
    // 50: 2000 (two 1000-ms intervals merged). d50 = +9.9, d51 = −10.1. S12 = max(d49, d51) = 0.1 is not below
    // −0.13·9.9 − 0.17, so not ectopic; S22 = min(d51, d52) = −10.1 < −1: long; |2000/2 − 1000| = 0 < Th2 = 100:
    // missed. Beat 51: S12 = min(d50, d52) = 0.1 < 1.48 and S22 = max(d52, d53) = 0.1: normal.
    const rr = base(100);
    rr[50] = 2000;
    const c = labelsOf(rr);
    expect(flagged(c.labels)).toEqual({ 50: "missed" });
    expect(c.nn.length).toBe(101);
    expect([c.nn[50], c.nn[51]]).toEqual([1000, 1000]);
    expect(c.times[50]! - c.inputTimes[49]!).toBeCloseTo(1, 12);
    expect(c.times[51]).toBe(c.inputTimes[50]);
    expect(Array.from(c.source.subarray(49, 53))).toEqual([49, 50, 50, 51]);
  });

  it("labels a false detection (extra) and merges its two halves", () => {
    // One 1000-ms interval split into 300 + 700 at index 50. d50 = (300 − 1010)/100 = −7.1, d51 = +4.0, d52 = +2.9.
    // Beat 50: S12 = min(d49 = 0.1, d51) = 0.1, not > 1.09: not ectopic; S22 = max(d51, d52) = 4.0 > 1: short;
    // medRR over 45…55 is 1000 and |300 + 700 − 1000| = 0 < 100: extra, and 51 is its second half.
    // Beat 52 (990): S11 = 2.9 but S12 = max(d51, d53) = 4.0 and S22 = min(d53, d54) = 0.1: normal.
    const rr = base(100);
    rr.splice(50, 1, 300, 700);
    const c = labelsOf(rr);
    expect(flagged(c.labels)).toEqual({ 50: "extra", 51: "extra" });
    expect(c.nn.length).toBe(100);
    expect(c.nn[50]).toBe(1000);
    expect(c.times[50]).toBe(c.inputTimes[51]);
    expect(c.counts.byAction.merged).toBe(2);
  });

  it("labels a lone long and a lone short interval and interpolates each", () => {
    // Long: 50: 1300. d50 = +2.9, d51 = −3.1; S12 = max(d49, d51) = 0.1 (not ectopic); S22 = min(d51, d52) = −3.1:
    // long; |650 − 1000| = 350 ≥ 100: not missed. Cubic through (48, 1000), (49, 1010), (51, 990), (52, 1000) at 50,
    // weights (−1, 4, 4, −1)/6: (−1000 + 4040 + 3960 − 1000)/6 = 1000 ms.
    const long = base(100);
    long[50] = 1300;
    const cl = labelsOf(long);
    expect(flagged(cl.labels)).toEqual({ 50: "long" });
    expect(cl.nn[50]).toBeCloseTo(1000, 9);
    // Short: 50: 700. d50 = −3.1, d51 = +2.9; S12 = min(d49, d51) = 0.1 < 0.57 (not ectopic); S22 = max(d51, d52) =
    // 2.9: short; |700 + 990 − 1000| = 690 ≥ 100: not extra.
    const short = base(100);
    short[50] = 700;
    const cs = labelsOf(short);
    expect(flagged(cs.labels)).toEqual({ 50: "short" });
    expect(cs.nn[50]).toBeCloseTo(1000, 9);
  });

  it("never bridges a run: three abnormal intervals in a row are removed, not interpolated", () => {
    // A couplet: 50: 600, 51: 600, 52: 1700. Beat 50: S22 = max(d51 = 0, d52 = 11) > 1: short. Beat 51: dRR = 0, but
    // medRR = 1000 and mRR = 2·(600 − 1000) = −800, |mRRs| = 8 > 3: short. Beat 52: S12 = max(d51, d53) = 0 (not
    // ectopic), S22 = min(d53 = −6.9, d54) < −1: long; |850 − 1000| = 150 ≥ 100: not missed. Beat 53 (1010): normal.
    const rr = base(100);
    rr[50] = 600;
    rr[51] = 600;
    rr[52] = 1700;
    const c = labelsOf(rr);
    expect(flagged(c.labels)).toEqual({ 50: "run", 51: "run", 52: "run" });
    expect(c.nn.length).toBe(97);
    expect(c.counts.byAction).toMatchObject({ removed: 3, interpolated: 0 });
    expect(c.edits).toHaveLength(1);
    expect(c.edits[0]).toMatchObject({ index: 50, count: 3, action: "removed", before: [600, 600, 1700], after: [] });
    // The interval after the run does not directly follow its predecessor in the output.
    expect(c.afterBreak[50]).toBe(1);
    expect(c.source[50]).toBe(53);
    expect(c.afterBreak.reduce((s, v) => s + v, 0)).toBe(1);
  });

  it("delete mode removes the abnormal intervals instead of interpolating (for Lomb–Scargle)", () => {
    const rr = base(100);
    rr[40] = 600;
    rr[41] = 1400;
    const c = labelsOf(rr, { mode: "delete" });
    expect(flagged(c.labels)).toEqual({ 40: "short", 41: "ectopic" });
    expect(c.nn.length).toBe(98);
    expect(c.edited.reduce((s, v) => s + v, 0)).toBe(0);
    expect(c.times[40]).toBe(c.inputTimes[42]);
    expect(c.afterBreak[40]).toBe(1);
    // Kept intervals keep their values and times: the output is a subsequence of the input.
    for (let k = 0; k < c.nn.length; k++) {
      expect(c.nn[k]).toBe(rr[c.source[k]!]);
      expect(c.times[k]).toBe(c.inputTimes[c.source[k]!]);
    }
    // An extra pair is still merged in delete mode: the sum of the halves is the true interval, no estimate enters.
    const extra = base(100);
    extra.splice(50, 1, 300, 700);
    const ce = labelsOf(extra, { mode: "delete" });
    expect(ce.nn.length).toBe(100);
    expect(ce.nn[50]).toBe(1000);
  });

  it("does not correct a cluster next to a time gap", () => {
    const rr = base(100);
    rr[40] = 600;
    rr[41] = 1400;
    const times = new Float64Array(100);
    let t = 0;
    for (let k = 0; k < 100; k++) times[k] = t += rr[k]! / 1000 + (k === 42 ? 30 : 0); // 30 s without beats before 42
    const c = cleanBeats(Float64Array.from(rr), { ...PINNED, times }).value!;
    expect(c.actions.slice(40, 42)).toEqual(["removed", "removed"]);
    expect(c.nn.length).toBe(98);
  });

  it("adapts its threshold to the series: Th1 = 5.2 × QD(|dRR|) over 91 beats", () => {
    // Period-4 pattern 1000, 1030, 1020, 990: |dRR| alternates 30, 10, so in a full window Q1 = 10, Q3 = 30,
    // QD = 10 and Th1 = 52 ms; every |dRRs| ≤ 30/52 < 1, so no beat is ectopic or long/short by dRR.
    const p = [1000, 1030, 1020, 990];
    const rr = Float64Array.from({ length: 200 }, (_, k) => p[k % 4]!);
    const lt = lipponenTarvainen(rr).value!;
    for (let j = 46; j < 154; j++) expect(lt.th1[j]).toBe(52);
    expect(lt.labels.every((l) => l === "normal")).toBe(true);
    rr[100] = 600;
    rr[101] = 1400;
    expect(flagged(lipponenTarvainen(rr).value!.labels)).toEqual({ 100: "short", 101: "ectopic" });
  });

  it("computes medRR, Th1 and Th2 exactly as their definitions (brute-force windows, type-7 quartiles)", () => {
    // Independent recomputation: sort every clipped centred window from scratch (stats.quantileSorted, R type 7).
    const s = quantiseBeats(addArtefacts(addEctopy(simulateHealthySleep({ seed: 11, beats: 600 }), { seed: 12 }), { seed: 13 }), 1);
    const lt = lipponenTarvainen(s.rr).value!;
    const n = s.rr.length;
    const win = (x: ArrayLike<number>, j: number, w: number) => {
      const h = (w - 1) / 2;
      return Float64Array.from({ length: Math.min(n, j + h + 1) - Math.max(0, j - h) }, (_, i) => x[Math.max(0, j - h) + i]!).sort();
    };
    const absD = Float64Array.from({ length: n }, (_, j) => (j === 0 ? 0 : Math.abs(s.rr[j]! - s.rr[j - 1]!)));
    const med = Float64Array.from({ length: n }, (_, j) => quantileSorted(win(s.rr, j, 11), 0.5));
    const absM = Float64Array.from({ length: n }, (_, j) => {
      const m = s.rr[j]! - med[j]!;
      return Math.abs(m < 0 ? 2 * m : m);
    });
    const qd = (x: Float64Array, j: number) => {
      const w = win(x, j, 91);
      return (quantileSorted(w, 0.75) - quantileSorted(w, 0.25)) / 2;
    };
    let worst = 0;
    for (let j = 0; j < n; j++) {
      worst = Math.max(worst, Math.abs(lt.medRR[j]! - med[j]!), Math.abs(lt.th1[j]! - Math.max(5.2 * qd(absD, j), 10)), Math.abs(lt.th2[j]! - Math.max(5.2 * qd(absM, j), 10)));
    }
    expect(worst).toBeLessThan(FLOAT_TOL);
  });

  it("gives no classification for fewer than 11 beats, and cleanBeats says so", () => {
    const rr = Float64Array.from(base(10));
    expect(lipponenTarvainen(rr).value).toBeNull();
    expect(lipponenTarvainen(rr).reason).toMatch(/fewer than 11 beats/);
    const c = cleanBeats(rr);
    expect(c.value!.nn.length).toBe(10);
    expect(c.value!.notes[0]).toMatch(/classification skipped/);
    expect(cleanBeats(new Float64Array(0))).toMatchObject({ value: null, reason: "no beats to clean" });
  });
});

describe("range gate (DOMAIN §2.1, cp)", () => {
  it("applies the adult (300–2000 ms) and neonatal (250–1500 ms) presets with inclusive bounds", () => {
    const rr = Float64Array.from([249, 250, 299, 300, 1500, 1501, 2000, 2001]);
    expect(Array.from(rangeGate(rr).value!.inRange)).toEqual([0, 0, 0, 1, 1, 1, 1, 0]);
    expect(Array.from(rangeGate(rr, { population: "neonatal" }).value!.inRange)).toEqual([0, 1, 1, 1, 1, 0, 0, 0]);
    expect(RANGE_GATE_PRESETS).toEqual({ adult: { minMs: 300, maxMs: 2000 }, neonatal: { minMs: 250, maxMs: 1500 } });
    expect(rangeGate(rr, { minMs: 1500, maxMs: 1501 }).value!.outOfRange).toBe(6);
    expect(() => rangeGate(rr, { minMs: 500, maxMs: 400 })).toThrow(RangeError);
  });

  it("removes out-of-range intervals in cleaning and never interpolates them", () => {
    const rr = base(100);
    rr[30] = 3000; // an isolated spike: out of the adult range
    rr[60] = 150;
    const c = labelsOf(rr);
    expect(flagged(c.labels)).toEqual({ 30: "out_of_range", 60: "out_of_range" });
    expect(c.actions[30]).toBe("removed");
    expect(c.nn.length).toBe(98);
    // A neonatal series at about 420 ms with one 1700-ms interval: in the adult range, out of the neonatal one.
    const neo = Float64Array.from({ length: 100 }, (_, k) => (k === 50 ? 1700 : [420, 424, 420, 416][k % 4]!));
    const cn = cleanBeats(neo, { population: "neonatal" });
    expect(cn.value!.labels[50]).toBe("out_of_range");
    expect(cn.params).toMatchObject({ population: "neonatal", gateMinMs: 250, gateMaxMs: 1500 });
  });
});

describe("percentage rules", () => {
  it("rejects an interval more than 20 % from the last accepted one (Malik et al., mem)", () => {
    // Reference starts at the median of the first intervals (1000). 1250 is 25 % off: rejected; 790 is 21 % off:
    // rejected; 1190 is 19 % off: accepted and becomes the reference; 1000 is 16 % off 1190: accepted.
    const rr = Float64Array.from([1000, 1000, 1250, 1000, 790, 1000, 1190, 1000]);
    expect(Array.from(percentageRule(rr).value!.rejected)).toEqual([0, 0, 1, 0, 1, 0, 0, 0]);
    // Compared with the previous *accepted* interval, a steady 15 % climb is never rejected.
    expect(percentageRule(Float64Array.from([1000, 1150, 1300, 1450])).value!.count).toBe(0);
  });

  it("Xu & Schuckers variant also needs agreement with the median of the 24 surrounding intervals", () => {
    // 1150 then 1240 after twelve 1000s: each within 20 % of the last accepted (15 %, 8 %), and the return to 1000
    // is 19 % below 1240, so the plain rule keeps all; but 1240 is 24 % above the surrounding median of 1000
    // [V Xu & Schuckers 2001].
    const rr = Float64Array.from([...Array(12).fill(1000), 1150, 1240, ...Array(12).fill(1000)]);
    expect(percentageRule(rr).value!.count).toBe(0);
    const xs = percentageRule(rr, { variant: "xu-schuckers" }).value!;
    expect(Array.from(xs.rejected).flatMap((r, i) => (r ? [i] : []))).toEqual([13]);
  });

  it("restarts a stale reference after 5 rejections in a row (our safeguard)", () => {
    // The first reference is the median of the first 11 intervals (1000). From beat 12 the rate steps to 1500 (+50 %):
    // 12…16 are rejected, then the reference restarts at the median of beats 11…21 (1500) and the rest is accepted.
    const rr = Float64Array.from([...Array(12).fill(1000), ...Array(20).fill(1500)]);
    const r = percentageRule(rr).value!;
    expect(Array.from(r.rejected).flatMap((x, i) => (x ? [i] : []))).toEqual([12, 13, 14, 15, 16]);
  });

  it("can drive cleanBeats alone or together with Lipponen–Tarvainen", () => {
    const rr = base(100);
    rr[50] = 1250; // 25 % off the previous accepted 1010: the percentage rule rejects it
    rr[70] = 1150; // 14 % off: the percentage rule keeps it
    const pr = labelsOf(rr, { detector: "percentage" });
    expect(flagged(pr.labels)).toEqual({ 50: "percentage" });
    expect(pr.actions[50]).toBe("interpolated");
    const both = labelsOf(rr, { detector: "both" });
    expect(both.labels[50]).toBe("long"); // Lipponen–Tarvainen labels take precedence
    expect(labelsOf(rr, { detector: "none" }).labels.every((l) => l === "normal")).toBe(true);
  });
});

describe("invariants on a night with every kind of artefact", () => {
  const s = quantiseBeats(
    addDropouts(addArtefacts(addEctopy(simulateHealthySleep({ seed: 21, durationS: 2 * 3600 }), { seed: 22, pvcRate: 0.02, pacRate: 0.005, coupletShare: 0.2, bigeminyPerHour: 1 }), { seed: 23, motionPerHour: 3 }), { seed: 24, gapsPerHour: 2 }),
    1,
  );
  for (const mode of ["interpolate", "delete"] as const) {
    it(`keeps lengths, counts and times consistent (${mode})`, () => {
      const r = cleanBeats(s.rr, { times: s.times, quality: s.quality, leadOff: s.leadOff, mode });
      expect(r.version).toBe(ALGORITHM_VERSION);
      expect(r.params).toMatchObject({ ...CLEAN_DEFAULTS, mode, timesGiven: true, deviceQualityGiven: true });
      const c = r.value!;
      const m = c.nn.length;
      for (const a of [c.times, c.source, c.edited, c.afterBreak]) expect(a.length).toBe(m);
      for (const a of [c.labels, c.actions, c.inputTimes]) expect(a.length).toBe(s.rr.length);
      expect(Object.values(c.counts.byLabel).reduce((x, y) => x + y, 0)).toBe(s.rr.length);
      expect(Object.values(c.counts.byAction).reduce((x, y) => x + y, 0)).toBe(s.rr.length);
      expect(c.counts.edited).toBe(s.rr.length - c.counts.byAction.kept);
      // Checked in one pass and asserted once each: an expect() per beat would dominate the test's run time.
      const bad = { value: [] as number[], order: [] as number[], notAsMeasured: [] as number[] };
      for (let k = 0; k < m; k++) {
        if (!(Number.isFinite(c.nn[k]!) && c.nn[k]! > 0)) bad.value.push(k);
        if (k > 0 && !(c.times[k]! > c.times[k - 1]!)) bad.order.push(k);
        // Every output interval that is not edited is a measured interval from a beat labelled normal.
        if (!c.edited[k] && (c.nn[k] !== s.rr[c.source[k]!] || c.labels[c.source[k]!] !== "normal")) bad.notAsMeasured.push(k);
      }
      expect(bad).toEqual({ value: [], order: [], notAsMeasured: [] });
      if (mode === "delete") expect(c.counts.byAction.interpolated + c.counts.byAction.split).toBe(0);
    });
  }
});

describe("detection quality on the simulator with known ground truth (DOMAIN §6.5–6.6, issue 3 item 10)", () => {
  // Targets from issue 3: sensitivity ≥ 0.95 and positive predictive value ≥ 0.90 at 2 % PVCs.
  const TARGET_SENSITIVITY = 0.95;
  const TARGET_PPV = 0.9;
  const SEEDS = [1, 2, 3];
  const HOURS = 8;
  const ECTOPIC: ReadonlySet<TruthLabel> = new Set(["pvc", "pac"]);
  const ARTEFACT: ReadonlySet<TruthLabel> = new Set(["missed", "extra", "motion", "spike"]);

  type Tally = {
    ectopic: number;
    ectopicFound: number;
    artefact: number;
    artefactFound: number;
    /** Flags on truly abnormal intervals, split by class (the pause after an ectopic beat counts as ectopic). */
    ectopicFlags: number;
    artefactFlags: number;
    /** False flags (truth normal) within two beats of only ectopic / only artefact intervals, or of neither or both. */
    falseNearEctopic: number;
    falseNearArtefact: number;
    falseOther: number;
    byClass: Record<string, [number, number]>;
  };
  const ECTOPIC_RELATED: ReadonlySet<TruthLabel> = new Set(["pvc", "pac", "post_ectopic"]);
  /** The classifier's subspaces look one beat back and two ahead, so a false flag a true event causes lies within
   *  two beats of it. */
  const ATTRIBUTION_REACH = 2;

  /**
   * Sensitivity: share of intervals ending at an ectopic beat (truth pvc/pac), or of artefact intervals, that
   * cleaning labels non-normal. PPV of a class: its true flags ÷ (its true flags + the false flags attributable to
   * it); a false flag near neither class or near both is charged to both.
   */
  function run(withEctopy: boolean, withArtefacts: boolean, useDeviceQuality: boolean): Tally {
    const t: Tally = { ectopic: 0, ectopicFound: 0, artefact: 0, artefactFound: 0, ectopicFlags: 0, artefactFlags: 0, falseNearEctopic: 0, falseNearArtefact: 0, falseOther: 0, byClass: {} };
    for (const seed of SEEDS) {
      let s = simulateHealthySleep({ seed, durationS: HOURS * 3600 });
      if (withEctopy) s = addEctopy(s, { seed: seed + 100, pvcRate: 0.02 });
      if (withArtefacts) s = addArtefacts(s, { seed: seed + 200 });
      s = quantiseBeats(s, 1);
      const c = cleanBeats(s.rr, { times: s.times, ...(useDeviceQuality && { quality: s.quality, leadOff: s.leadOff }) }).value!;
      const n = s.rr.length;
      for (let k = 0; k < n; k++) {
        const truth = s.truth[k]!;
        const flag = c.labels[k] !== "normal";
        t.byClass[truth] ??= [0, 0];
        t.byClass[truth]![1]++;
        if (flag) t.byClass[truth]![0]++;
        if (ECTOPIC.has(truth)) {
          t.ectopic++;
          if (flag) t.ectopicFound++;
        }
        if (ARTEFACT.has(truth)) {
          t.artefact++;
          if (flag) t.artefactFound++;
        }
        if (!flag) continue;
        if (ECTOPIC_RELATED.has(truth)) t.ectopicFlags++;
        else if (ARTEFACT.has(truth)) t.artefactFlags++;
        else {
          let nearE = false;
          let nearA = false;
          for (let j = Math.max(0, k - ATTRIBUTION_REACH); j <= Math.min(n - 1, k + ATTRIBUTION_REACH); j++) {
            nearE ||= ECTOPIC_RELATED.has(s.truth[j]!);
            nearA ||= ARTEFACT.has(s.truth[j]!);
          }
          if (nearE && !nearA) t.falseNearEctopic++;
          else if (nearA && !nearE) t.falseNearArtefact++;
          else t.falseOther++;
        }
      }
    }
    return t;
  }
  const ppvOf = (t: Tally) => ({
    all: (t.ectopicFlags + t.artefactFlags) / (t.ectopicFlags + t.artefactFlags + t.falseNearEctopic + t.falseNearArtefact + t.falseOther),
    ectopic: t.ectopicFlags / (t.ectopicFlags + t.falseNearEctopic + t.falseOther),
    artefact: t.artefactFlags / (t.artefactFlags + t.falseNearArtefact + t.falseOther),
  });
  const fmt = (x: number) => x.toFixed(4);

  it("2 % PVCs: ectopic sensitivity and PPV meet the target", () => {
    const t = run(true, false, true);
    const se = t.ectopicFound / t.ectopic;
    const ppv = ppvOf(t).all;
    console.log(`[clean] 2 % PVCs, ${SEEDS.length} × ${HOURS} h (${t.ectopic} PVCs): ectopic sensitivity ${fmt(se)}, PPV ${fmt(ppv)} (${t.falseNearEctopic + t.falseOther} false flags)`);
    expect(se).toBeGreaterThanOrEqual(TARGET_SENSITIVITY);
    expect(ppv).toBeGreaterThanOrEqual(TARGET_PPV);
  });

  it("2 % PVCs plus the §6.6 artefacts: ectopic and artefact sensitivity and PPV meet the target", () => {
    const t = run(true, true, true);
    const seE = t.ectopicFound / t.ectopic;
    const seA = t.artefactFound / t.artefact;
    const ppv = ppvOf(t);
    const perClass = Object.entries(t.byClass).map(([k, [f, n]]) => `${k} ${f}/${n}`).join(", ");
    console.log(
      `[clean] 2 % PVCs + artefacts, device quality used, ${SEEDS.length} × ${HOURS} h: ectopic Se ${fmt(seE)}, artefact Se ${fmt(seA)}, ` +
        `ectopic PPV ${fmt(ppv.ectopic)}, artefact PPV ${fmt(ppv.artefact)}, PPV of all flags ${fmt(ppv.all)}; ` +
        `false flags near ectopy ${t.falseNearEctopic}, near artefacts ${t.falseNearArtefact}, other ${t.falseOther}; flagged/total by truth: ${perClass}`,
    );
    expect(seE).toBeGreaterThanOrEqual(TARGET_SENSITIVITY);
    expect(seA).toBeGreaterThanOrEqual(TARGET_SENSITIVITY);
    expect(ppv.ectopic).toBeGreaterThanOrEqual(TARGET_PPV);
    expect(ppv.artefact).toBeGreaterThanOrEqual(TARGET_PPV);
    expect(ppv.all).toBeGreaterThanOrEqual(TARGET_PPV);
  });

  it("without device quality, missed, extra and spike artefacts are still found; motion bursts mostly are not", () => {
    // Motion-burst intervals are U(250, 1500) ms and inflate the classifier's adaptive thresholds while they last:
    // from the intervals alone most of them look like beats. The device's quality flag is what catches them.
    const t = run(false, true, false);
    const [mf, mn] = t.byClass.motion!;
    const other = ["missed", "extra", "spike"].map((k) => t.byClass[k]!);
    const seOther = other.reduce((s, [f]) => s + f, 0) / other.reduce((s, [, n]) => s + n, 0);
    console.log(`[clean] artefacts only, no device quality: missed/extra/spike Se ${fmt(seOther)}, motion Se ${fmt(mf / mn)}, PPV of all flags ${fmt(ppvOf(t).all)}`);
    expect(seOther).toBeGreaterThanOrEqual(TARGET_SENSITIVITY);
  });
});
