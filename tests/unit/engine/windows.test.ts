import { describe, expect, it } from "vitest";
import { addDropouts, simulateHealthySleep } from "@/lib/engine/simulate";
import { computeWindows } from "@/lib/engine/windows";
import { lombScargle } from "@/lib/engine/frequency/lomb-scargle";
import { SHORT_WINDOW_LOMB_SCARGLE, SHORT_TERM_KEYS } from "@/lib/engine/indices";
import { sdnn, rmssd } from "@/lib/engine/time-domain";
import { sampleEntropy } from "@/lib/engine/entropy/sampen";
import { dfa } from "@/lib/engine/fractal/dfa";
import { ALGORITHM_VERSION } from "@/lib/engine/version";
import { summariseRecording, WHOLE_KEYS } from "@/lib/engine/summary";

const healthyHour = () => simulateHealthySleep({ seed: 11, durationS: 3700 });

describe("rolling windows", () => {
  it("lays complete 5-min windows every minute and one 60-min window per hour", () => {
    const sim = healthyHour();
    const run = computeWindows({ rr: sim.rr, times: sim.times });
    const start = sim.times[0]! - sim.rr[0]! / 1000;
    const last = sim.times[sim.times.length - 1]!;
    // Complete windows only: start + k·60 + 300 ≤ last beat.
    expect(run.short).toHaveLength(Math.floor((last - start - 300) / 60) + 1);
    expect(run.long).toHaveLength(1);
    expect(run.short[1]!.startS - run.short[0]!.startS).toBeCloseTo(60, 9);
    expect(run.short.every((w) => w.endS - w.startS === 300)).toBe(true);
    expect(run.version).toBe(ALGORITHM_VERSION);
    expect(run.params.methods).toHaveProperty("sampen");
    expect(run.params.methods).toHaveProperty("lomb-scargle");
    expect(run.params.windows).toMatchObject({ shortWindowS: 300, shortStrideS: 60, longWindowS: 3600 });
  });

  it("gives each window the values of the methods on its own slice", () => {
    const sim = healthyHour();
    const run = computeWindows({ rr: sim.rr, times: sim.times }, { clean: false });
    const w = run.short[7]!;
    const idx: number[] = [];
    sim.times.forEach((t, i) => t >= w.startS && t < w.endS && idx.push(i));
    const slice = Float64Array.from(idx, (i) => sim.rr[i]!);
    expect(w.values!.sdnn).toBeCloseTo(sdnn(slice).value!, 10);
    expect(w.values!.rmssd).toBeCloseTo(rmssd(slice).value!, 10);
    expect(w.values!.sampen).toBeCloseTo(sampleEntropy(slice).value!.sampen, 10);
    expect(w.values!.dfa_alpha1).toBeCloseTo(dfa(slice).value!.alpha, 10);
    expect(Object.keys(w.values!).sort()).toEqual([...SHORT_TERM_KEYS].sort());
  });

  it("keeps the quality and drops the values of a window over a data gap", () => {
    const sim = healthyHour();
    // Remove 3 minutes of beats: windows overlapping the hole lose coverage.
    const keep = Array.from(sim.times.keys()).filter((i) => sim.times[i]! < 1200 || sim.times[i]! > 1380);
    const rr = Float64Array.from(keep, (i) => sim.rr[i]!);
    const times = Float64Array.from(keep, (i) => sim.times[i]!);
    const run = computeWindows({ rr, times });
    const over = run.short.find((w) => w.startS >= 1150 && w.endS <= 1500)!;
    expect(over.quality.grade).toBe("unusable");
    expect(over.values).toBeNull();
    expect(over.quality.coverage).toBeLessThan(0.8);
    expect(run.short[0]!.quality.grade).toBe("good");
    expect(run.short[0]!.values!.sdnn).not.toBeNull();
  });

  it("uses a Lomb–Scargle grid coarse enough to be fast and fine enough to keep band powers within 1 %", () => {
    // The DOMAIN §3.1 A9 two-tone series (300 beats), built as DOMAIN describes.
    const rr: number[] = [];
    const t: number[] = [];
    let tk = 0;
    while (tk <= 300) {
      const r = 1000 + 30 * Math.sin(2 * Math.PI * 0.1 * tk) + 50 * Math.sin(2 * Math.PI * 0.25 * tk);
      if (tk + r / 1000 > 300) break;
      tk += r / 1000;
      rr.push(r);
      t.push(tk);
    }
    const fine = lombScargle(Float64Array.from(rr), Float64Array.from(t)).value!;
    const coarse = lombScargle(Float64Array.from(rr), Float64Array.from(t), SHORT_WINDOW_LOMB_SCARGLE).value!;
    const WITHIN = 0.01; // the claim made beside SHORT_WINDOW_LOMB_SCARGLE
    expect(Math.abs(coarse.lf! / fine.lf! - 1)).toBeLessThan(WITHIN);
    expect(Math.abs(coarse.hf! / fine.hf! - 1)).toBeLessThan(WITHIN);
  });

  it("summarises a whole recording with every documented key, null values carrying a reason", () => {
    const sim = addDropouts(healthyHour(), { seed: 3 });
    const { whole } = summariseRecording({ rr: sim.rr, times: sim.times });
    for (const k of WHOLE_KEYS) {
      expect(whole).toHaveProperty(k);
      if (whole[k] === null) expect(whole.reasons[k], `reason for ${k}`).toBeTruthy();
    }
    expect(whole.beta).toBeNull(); // an hour is shorter than β's 3 h
    expect(whole.reasons.beta).toMatch(/3 h/);
    expect(whole.mse).toHaveLength(20);
    expect(whole.quality.grade).toMatch(/good|limited|unusable/);
  });
});
