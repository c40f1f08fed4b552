// Time-domain indices (Task Force 1996) checked against the worked fixture W1 (DOMAIN §3.2), exact results of their
// definitions on constructed series (pNN50 denominator, histogram bins, 24-h segments), and invariance properties.
import { describe, expect, it } from "vitest";
import { createRng } from "@/lib/engine/random";
import {
  heartRate,
  meanNN,
  nn50,
  PNN50_DEFAULTS,
  pnn50,
  rmssd,
  sdann,
  sdnn,
  sdnnIndex,
  sdsd,
  TRIANGULAR_INDEX_DEFAULTS,
  triangularIndex,
} from "@/lib/engine/time-domain";
import { ALGORITHM_VERSION } from "@/lib/engine/version";

// ---------------------------------------------------------------------------------------------------------------
// Tolerances
/** W1 values are printed to 7 decimals (DOMAIN §3.2): half a unit in the last place. */
const W1_TOL = 5e-8;
/** Closed-form values computed with the same operations in another order: a few ulps. */
const EXACT_TOL = 1e-9;
/** Shift/scale invariance: sums of ~1000 values in different magnitudes round differently in the last bits. */
const INVARIANCE_REL_TOL = 1e-9;

const W1 = Float64Array.from([800, 810, 790, 820, 780]);

/** Bounded RR-like series: uniform 600–1200 ms with a slow swing, seeded. */
function randomSeries(n: number, seed: number): Float64Array {
  const rng = createRng(seed);
  return Float64Array.from({ length: n }, (_, i) => 900 + 100 * Math.sin(i / 37) + rng.uniform(-200, 200));
}

/** Beat times that close each interval: the running sum (DOMAIN §3.1 A9 convention). */
function cumulativeTimes(nn: Float64Array): Float64Array {
  const t = new Float64Array(nn.length);
  let ms = 0;
  for (let i = 0; i < nn.length; i++) {
    ms += nn[i]!;
    t[i] = ms / 1000;
  }
  return t;
}

describe("W1 worked fixture (DOMAIN §3.2): RR = [800, 810, 790, 820, 780] ms", () => {
  it("mean NN 800 ms and HR 75 bpm", () => {
    expect(meanNN(W1).value).toBeCloseTo(800, 12);
    expect(heartRate(W1).value!).toBeCloseTo(75, 12);
  });
  it("SDNN (ddof 1) 15.8113883, RMSSD 27.3861279, SDSD (ddof 1) 31.0912635", () => {
    expect(Math.abs(sdnn(W1).value! - 15.8113883)).toBeLessThan(W1_TOL);
    expect(Math.abs(rmssd(W1).value! - 27.3861279)).toBeLessThan(W1_TOL);
    expect(Math.abs(sdsd(W1).value! - 31.0912635)).toBeLessThan(W1_TOL);
  });
  it("NN50 0, pNN50 0 %, and pNN20 = 2/4 (differences 10, −20, 30, −40 ms; 30 and 40 exceed 20)", () => {
    expect(nn50(W1).value).toBe(0);
    expect(pnn50(W1).value).toBe(0);
    expect(nn50(W1, { thresholdMs: 20 }).value).toBe(2);
    expect(pnn50(W1, { thresholdMs: 20 }).value).toBe(50);
  });
  it("records the parameters and the algorithm version", () => {
    const r = sdnn(W1);
    expect(r).toMatchObject({ method: "sdnn", params: { ddof: 1 }, version: ALGORITHM_VERSION, reason: null });
    expect(pnn50(W1).params).toMatchObject({ thresholdMs: 50, denominator: PNN50_DEFAULTS.denominator });
  });
});

describe("definitions the Task Force leaves open (DOMAIN §2.2)", () => {
  it("HR is 60000 / mean NN, below the mean of 60000/NN (Jensen's inequality)", () => {
    // W1: mean of 60000/RR = 75.0176…, not 75.
    const meanOfRates = Array.from(W1, (v) => 60000 / v).reduce((a, b) => a + b) / W1.length;
    expect(meanOfRates).toBeGreaterThan(75.01);
    expect(heartRate(W1).value!).toBeCloseTo(75, 12);
    expect(heartRate(W1).params).toMatchObject({ definition: "60000 / mean NN" });
  });
  it("pNN50 divides by the N − 1 differences: every difference > 50 ms gives 100 %, not the Task Force's 75 %", () => {
    const x = Float64Array.from([800, 900, 800, 900]);
    expect(nn50(x).value).toBe(3);
    expect(pnn50(x).value).toBe(100);
  });
  it("NN50 counts strictly greater than 50 ms, in both directions", () => {
    const x = Float64Array.from([800, 850, 800, 851, 800]);
    expect(nn50(x).value).toBe(2); // |+50| and |−50| do not count; |+51| and |−51| do.
  });
  it("RMSSD has no mean subtracted, SDSD does: for a linear ramp RMSSD = step and SDSD = 0", () => {
    const ramp = Float64Array.from({ length: 20 }, (_, i) => 800 + 5 * i);
    expect(rmssd(ramp).value!).toBeCloseTo(5, 12);
    expect(sdsd(ramp).value!).toBeCloseTo(0, 12);
  });
});

describe("HRV triangular index (Task Force 1996: N / modal bin count, bin 1/128 s)", () => {
  const bin = TRIANGULAR_INDEX_DEFAULTS.binMs;
  it("uses bins of 7.8125 ms", () => {
    expect(bin).toBe(7.8125);
  });
  it("on 128-Hz-quantised data each reported value is its own bin: 700 + 400 + 200 beats give 1300/700", () => {
    const values = [...Array(700).fill(125 * bin), ...Array(400).fill(128 * bin), ...Array(200).fill(130 * bin)];
    const r = triangularIndex(Float64Array.from(values));
    expect(r.value!).toBeCloseTo(1300 / 700, 12);
  });
  it("bins are anchored at 0 ms: 1000 and 1007 ms share [1000, 1007.8125); 999.9 ms does not", () => {
    const values = [...Array(600).fill(1000), ...Array(600).fill(1007), ...Array(700).fill(999.9)];
    // Modal bin [1000, 1007.8125) holds 1200 of 1900.
    expect(triangularIndex(Float64Array.from(values)).value!).toBeCloseTo(1900 / 1200, 12);
  });
  it("is null under 20 min of NN intervals (Task Force advice for geometric methods, mem)", () => {
    const r = triangularIndex(new Float64Array(300).fill(1000));
    expect(r.value).toBeNull();
    expect(r.reason).toMatch(/20 min/);
  });
});

describe("SDANN and SDNN index (Task Force 1996: 5-min segments of a ≥ 24-h recording)", () => {
  // 288 segments of exactly 300 s. Segment j has level c_j ∈ {750, 1000, 1250, 1500} ms (cycling) and alternates
  // c_j − a_j, c_j + a_j with a_j ∈ {5, 10, 15}; every segment holds an even number of whole-ms beats summing to
  // 300 000 ms, so segment boundaries fall exactly on beats.
  const levels = [750, 1000, 1250, 1500];
  const amplitudes = [5, 10, 15];
  const parts: number[] = [];
  const segmentSds: number[] = [];
  const segmentMeans: number[] = [];
  for (let j = 0; j < 288; j++) {
    const c = levels[j % 4]!;
    const a = amplitudes[j % 3]!;
    const count = 300000 / c;
    for (let i = 0; i < count; i++) parts.push(i % 2 === 0 ? c - a : c + a);
    segmentMeans.push(c);
    // Sample SD of ±a repeated count/2 times each: a·√(count/(count − 1)).
    segmentSds.push(a * Math.sqrt(count / (count - 1)));
  }
  const nn = Float64Array.from(parts);
  const times = cumulativeTimes(nn);

  it("SDANN is the sample SD of the 288 segment levels", () => {
    const m = segmentMeans.reduce((s, v) => s + v, 0) / 288;
    const expected = Math.sqrt(segmentMeans.reduce((s, v) => s + (v - m) ** 2, 0) / 287);
    expect(Math.abs(sdann(nn, times).value! - expected)).toBeLessThan(EXACT_TOL);
  });
  it("SDNN index is the mean of the 288 within-segment sample SDs", () => {
    const expected = segmentSds.reduce((s, v) => s + v, 0) / 288;
    expect(Math.abs(sdnnIndex(nn, times).value! - expected)).toBeLessThan(EXACT_TOL);
  });
  it("constant segment means give SDANN exactly 0 (a true zero, not a missing value)", () => {
    const flat = Float64Array.from({ length: 86400 }, (_, i) => (i % 2 === 0 ? 990 : 1010));
    expect(sdann(flat, cumulativeTimes(flat)).value).toBe(0);
  });
  it("are null, with a reason, for a 23-h recording", () => {
    const short = nn.subarray(0, nn.length - 12 * 300);
    const t = times.subarray(0, short.length);
    for (const r of [sdann(short, t), sdnnIndex(short, t)]) {
      expect(r.value).toBeNull();
      expect(r.reason).toMatch(/shorter than 24 h/);
    }
  });
  it("leave out segments less than 90 % covered (a 2-min gap in one segment)", () => {
    // Delete 120 s of beats in segment 1 (level 1000 ms, beats 400 … 699): that segment drops out.
    const keep = (i: number) => !(i >= 450 && i < 570);
    const gappedNN = nn.filter((_, i) => keep(i));
    const gappedT = times.filter((_, i) => keep(i));
    const others = segmentMeans.filter((_, j) => j !== 1);
    const m = others.reduce((s, v) => s + v, 0) / others.length;
    const expected = Math.sqrt(others.reduce((s, v) => s + (v - m) ** 2, 0) / (others.length - 1));
    expect(Math.abs(sdann(gappedNN, gappedT).value! - expected)).toBeLessThan(EXACT_TOL);
  });
  it("reject times that do not match the intervals", () => {
    expect(() => sdann(nn, times.subarray(1))).toThrow(RangeError);
  });
});

describe("undefined inputs give null with a reason, never NaN or 0", () => {
  const empty = new Float64Array(0);
  const one = Float64Array.from([800]);
  const two = Float64Array.from([800, 820]);
  it.each([
    ["mean NN", () => meanNN(empty)],
    ["HR", () => heartRate(empty)],
    ["SDNN", () => sdnn(one)],
    ["RMSSD", () => rmssd(one)],
    ["SDSD", () => sdsd(two)],
    ["NN50", () => nn50(one)],
    ["pNN50", () => pnn50(one)],
  ])("%s", (_name, run) => {
    const r = run();
    expect(r.value).toBeNull();
    expect(r.reason).toEqual(expect.any(String));
  });
  it("throws on NaN (a programming error)", () => {
    expect(() => sdnn(Float64Array.from([800, NaN]))).toThrow(RangeError);
  });
});

describe("properties on seeded random series", () => {
  const seeds = [1, 2, 3, 4, 5];
  it("outputs are finite and within their ranges", () => {
    for (const seed of seeds) {
      const x = randomSeries(1000, seed);
      for (const v of [sdnn(x).value!, rmssd(x).value!, sdsd(x).value!]) {
        expect(Number.isFinite(v) && v > 0).toBe(true);
      }
      expect(nn50(x).value!).toBeLessThanOrEqual(x.length - 1);
      expect(pnn50(x).value!).toBeGreaterThanOrEqual(0);
      expect(pnn50(x).value!).toBeLessThanOrEqual(100);
      const rates = Array.from(x, (v) => 60000 / v);
      expect(heartRate(x).value!).toBeLessThanOrEqual(rates.reduce((a, b) => a + b) / x.length);
      // RMSSD² = SDSD²·(N−2)/(N−1) + mean difference² (definitions).
      const md = (x[x.length - 1]! - x[0]!) / (x.length - 1);
      const lhs = rmssd(x).value! ** 2;
      const rhs = (sdsd(x).value! ** 2 * (x.length - 2)) / (x.length - 1) + md * md;
      expect(Math.abs(lhs - rhs) / lhs).toBeLessThan(INVARIANCE_REL_TOL);
    }
  });
  it("adding a constant leaves SDNN, RMSSD, SDSD, NN50 unchanged", () => {
    for (const seed of seeds) {
      const x = randomSeries(1000, seed);
      const y = x.map((v) => v + 137.25);
      for (const f of [sdnn, rmssd, sdsd]) {
        expect(Math.abs(f(y).value! - f(x).value!) / f(x).value!).toBeLessThan(INVARIANCE_REL_TOL);
      }
      expect(nn50(y).value).toBe(nn50(x).value);
    }
  });
  it("scaling by k scales SDNN, RMSSD and SDSD by k", () => {
    for (const seed of seeds) {
      const x = randomSeries(1000, seed);
      const k = 1.7;
      const y = x.map((v) => v * k);
      for (const f of [sdnn, rmssd, sdsd]) {
        expect(Math.abs(f(y).value! - k * f(x).value!) / f(y).value!).toBeLessThan(INVARIANCE_REL_TOL);
      }
    }
  });
});
