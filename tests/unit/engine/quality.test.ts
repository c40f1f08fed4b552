// Per-window signal quality (DOMAIN §2.1, cp): grades at and around each documented threshold, coverage with a
// gap, longest gap. Series are 1000-ms beats on whole seconds, so every coverage and share below is an exact ratio
// of integers (e.g. 90 s of 100 s is the same double as the literal 0.9).
import { describe, expect, it } from "vitest";
import { QUALITY_THRESHOLDS, cleanBeats, windowQuality, type CleanedBeats } from "@/lib/engine/clean";

/** Beats ending at the given whole-second times, each with a 1000-ms interval (a time jump is a gap). Cleaning
 *  with detector "none" keeps every beat as measured, so the test controls edits and labels directly. */
function beatsAt(times: number[]): CleanedBeats {
  const rr = new Float64Array(times.length).fill(1000);
  return cleanBeats(rr, { times: Float64Array.from(times), detector: "none" }).value!;
}
const range = (from: number, to: number) => Array.from({ length: to - from + 1 }, (_, i) => from + i);
/** Beats at 1 … 100 s with the beats ending in (45, 45 + gap] removed: the window [0, 100) misses exactly `gap` s. */
const withGap = (gap: number) => beatsAt([...range(1, 45), ...range(46 + gap, 100)]);

describe("window quality thresholds", () => {
  it("documents its thresholds", () => {
    // DOMAIN §2.1: accept at coverage ≥ 90 % and edits ≤ 5 %; DOMAIN §1 flags coverage < 80 %; the rest is ours.
    expect(QUALITY_THRESHOLDS).toEqual({
      minBeats: 60,
      goodMinCoverage: 0.9,
      goodMaxEdited: 0.05,
      goodMaxDevicePoor: 0.05,
      goodMaxGapS: 60,
      limitedMinCoverage: 0.8,
      limitedMaxEdited: 0.1,
      limitedMaxDevicePoor: 0.2,
    });
  });

  it.each([
    [0, 1, "good"],
    [10, 0.9, "good"], // exactly at the 90 % bound: accepted
    [11, 0.89, "limited"],
    [20, 0.8, "limited"], // exactly at the 80 % bound
    [21, 0.79, "unusable"],
  ] as const)("a %i-s gap in 100 s gives coverage %f and grade %s", (gap, coverage, grade) => {
    const q = windowQuality(withGap(gap), { startS: 0, endS: 100 }).value!;
    expect(q.coverage).toBe(coverage);
    expect(q.longestGapS).toBe(gap);
    expect(q.grade).toBe(grade);
    expect(q.nBeats).toBe(99 - gap);
    if (grade !== "good") expect(q.reasons.join("; ")).toMatch(/coverage/);
  });

  it.each([
    [5, "good"], // 5 % edited: at the bound
    [6, "limited"],
    [10, "limited"],
    [11, "unusable"],
  ] as const)("%i edited beats of 100 give grade %s", (edits, grade) => {
    const c = beatsAt(range(1, 100));
    for (let k = 0; k < edits; k++) c.actions[9 * k + 3] = k % 2 ? "removed" : "interpolated";
    const q = windowQuality(c, { startS: 0, endS: 100.5 }).value!;
    expect(q.nInputBeats).toBe(100);
    expect(q.shareEdited).toBe(edits / 100);
    expect(q.grade).toBe(grade);
  });

  it.each([
    [5, "good"],
    [6, "limited"],
    [20, "limited"],
    [21, "unusable"],
  ] as const)("%i s of device-reported poor signal in 100 s give grade %s", (poor, grade) => {
    const c = beatsAt(range(1, 100));
    const quality = new Float64Array(100).fill(0.95);
    const leadOff = new Uint8Array(100);
    // Poor beats: half by low quality, half by lead-off; both count (DEVICE_QUALITY_POOR_BELOW = 0.5).
    for (let k = 0; k < poor; k++) {
      if (k % 2) quality[20 + k] = 0.2;
      else leadOff[20 + k] = 1;
    }
    const q = windowQuality(c, { startS: 0, endS: 100 }, { quality, leadOff }).value!;
    expect(q.devicePoorShare).toBe(poor / 100);
    expect(q.grade).toBe(grade);
    // A quality of exactly 0.5 is not poor: the bound is "below".
    quality.fill(0.5);
    leadOff.fill(0);
    expect(windowQuality(c, { startS: 0, endS: 100 }, { quality }).value!.devicePoorShare).toBe(0);
  });

  it("needs at least 60 beats", () => {
    const c = beatsAt(range(1, 100));
    const enough = windowQuality(c, { startS: 0, endS: 60.5 }).value!;
    expect([enough.nBeats, enough.grade]).toEqual([60, "good"]);
    const few = windowQuality(c, { startS: 0, endS: 59.5 }).value!;
    expect([few.nBeats, few.coverage, few.grade]).toEqual([59, 1, "unusable"]);
    expect(few.reasons).toEqual(["59 beats, fewer than 60"]);
  });

  it("grades a gap over 60 s limited even when coverage is high (stale data, DOMAIN §5.7)", () => {
    const at = (gap: number) => windowQuality(beatsAt([...range(1, 500), ...range(501 + gap, 1000)]), { startS: 0, endS: 1000 }).value!;
    expect([at(60).longestGapS, at(60).coverage, at(60).grade]).toEqual([60, 0.94, "good"]);
    expect([at(61).longestGapS, at(61).grade]).toEqual([61, "limited"]);
    expect(at(61).reasons).toEqual(["a gap of 61.0 s, longer than 60 s"]);
  });

  it("accepts custom thresholds and records them with the result", () => {
    const r = windowQuality(withGap(11), { startS: 0, endS: 100 }, { thresholds: { goodMinCoverage: 0.85 } });
    expect(r.value!.grade).toBe("good");
    expect(r.params).toMatchObject({ startS: 0, endS: 100, goodMinCoverage: 0.85, limitedMinCoverage: 0.8, poorBelow: 0.5 });
    expect(r.method).toBe("window-quality");
  });
});

describe("coverage and gaps", () => {
  it("finds a gap from the beat times and counts the window's edges", () => {
    // Beats from 11 s: the first interval covers [10, 11], so [0, 10) is uncovered at the start; a 15-s jump after
    // 50 s leaves [50, 65) uncovered. Coverage over [0, 100): (100 − 10 − 15)/100.
    const c = beatsAt([...range(11, 50), ...range(66, 100)]);
    const q = windowQuality(c, { startS: 0, endS: 100 }).value!;
    expect(q.coverage).toBe(0.75);
    expect(q.longestGapS).toBe(15);
    expect(q.grade).toBe("unusable");
    // A window entirely inside the gap: nothing covered, every share undefined rather than 0.
    const empty = windowQuality(c, { startS: 52, endS: 64 }).value!;
    expect(empty).toMatchObject({ nBeats: 0, nInputBeats: 0, coverage: 0, longestGapS: 12, shareEdited: null, shareEctopic: null, devicePoorShare: null, grade: "unusable" });
    // The trailing edge counts too: beats stop at 100 s, the window runs to 130 s.
    expect(windowQuality(c, { startS: 70, endS: 130 }).value!.longestGapS).toBe(30);
  });

  it("counts corrected intervals as covered and reports the ectopic and edited shares of the input", () => {
    // A premature beat (600 ms then 1400 ms) in 1000-ms beats: two input intervals edited, one labelled ectopic;
    // the interpolated pair still covers the 2 s between the real beats.
    const rr = new Float64Array(200).fill(1000);
    rr[100] = 600;
    rr[101] = 1400;
    const c = cleanBeats(rr).value!;
    expect(c.labels.slice(100, 102)).toEqual(["short", "ectopic"]);
    const q = windowQuality(c, { startS: 50, endS: 150 }).value!;
    expect(q.coverage).toBe(1);
    expect(q.nInputBeats).toBe(100);
    expect(q.shareEdited).toBe(0.02);
    expect(q.shareEctopic).toBe(0.01);
    expect(q.grade).toBe("good");
  });

  it("rejects a window that ends before it starts", () => {
    expect(() => windowQuality(beatsAt([1, 2, 3]), { startS: 5, endS: 5 })).toThrow(RangeError);
  });
});
