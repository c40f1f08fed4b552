// Window detail and its Research panel on real PostgreSQL: a synthetic stay's beats (lib/engine/simulate, DOMAIN §6)
// go through the compute job, then the detail recomputes the window's plots from the beats. Every check is either
// engine consistency (the plotted numbers are the stored ones) or an analytic identity named beside it; no number is
// hard-coded.
import type { Knex } from "knex";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { runCompute } from "@/lib/compute/run";
import { sampleEntropy } from "@/lib/engine/entropy/sampen";
import { integrateLinear } from "@/lib/engine/frequency/bands";
import { addEctopy, simulateHealthySleep, simulateNicu, type SimulatedBeats } from "@/lib/engine/simulate";
import { linearFit } from "@/lib/engine/stats";
import { ALGORITHM_VERSION } from "@/lib/engine/version";
import { cleanForWindows } from "@/lib/engine/windows";
import { INDEX_EXPLANATIONS } from "@/lib/review/index-explanations";
import { windowResearch } from "@/lib/review/research";
import { stayScope, type StayScopeDTO } from "@/lib/review/stay-scope";
import { NO_WINDOWS_MESSAGE, windowDetail, type WindowDetailDTO } from "@/lib/review/window-detail";
import { seed } from "@/seeds/01_demo";
import { scratchDatabase } from "@/tests/support/db";
import { insertTestBeats, makeTestStay } from "@/tests/support/stays";

const MIN = 60_000;
const HOUR = 3_600_000;

/**
 * Recomputed versus stored: the same engine on the same beats with the same parameters gives the same double, and
 * jsonb's decimal text round-trips a double exactly; 1e-12 relative allows only for the last binary digit.
 */
const SAME_REL = 1e-12;
/** Identities that hold in exact arithmetic but are evaluated through different floating-point paths (a band
 *  integral summed again, a slope refitted in log10 instead of ln): a few hundred ulps. */
const IDENTITY_REL = 1e-9;

const close = (actual: number | null | undefined, expected: number | null | undefined, rel: number, what: string) => {
  expect(actual, what).not.toBeNull();
  expect(expected, what).not.toBeNull();
  expect(Math.abs(actual! - expected!), what).toBeLessThanOrEqual(rel * Math.max(Math.abs(expected!), Number.MIN_VALUE));
};

let db: Knex;
let cleanup: () => Promise<void>;
const unitId = async (code: "4W" | "2E") => (await db("units").where({ code }).first("id"))!.id as string;

beforeAll(async () => {
  ({ db, cleanup } = await scratchDatabase());
  await seed(db);
});
afterAll(async () => {
  await cleanup?.();
});

/** A stay of `hours` with simulated beats, computed by the compute job; returns its scope and the beats as stored. */
async function computedStay(code: "4W" | "2E", admitted: Date, hours: number, sim: SimulatedBeats) {
  const discharged = new Date(admitted.getTime() + hours * HOUR);
  const { stayId, deviceId } = await makeTestStay(db, await unitId(code), admitted, discharged);
  const stored = await insertTestBeats(db, deviceId, sim);
  const run = await runCompute({ trigger: "test", db, now: new Date(discharged.getTime() + HOUR) });
  expect(run.status).toBe("done");
  const scope = (await stayScope(stayId, db))!;
  return { scope, stored, discharged };
}

interface Stored {
  grade: string;
  values: Record<string, number>;
  quality: { nBeats: number; nInputBeats: number; coverage: number; shareEdited: number; shareEctopic: number };
  mse: (number | null)[] | null;
}

/** A stored window with values (the windows these tests read are all usable). */
async function storedRow(stayId: string, kind: "short" | "long", start: Date): Promise<Stored> {
  const row = await db("index_windows").where({ stay_id: stayId, kind, window_start: start, algorithm_version: ALGORITHM_VERSION }).first();
  if (!row?.values) throw new Error(`no stored ${kind} window with values at ${start.toISOString()}`);
  return { grade: row.grade, values: row.values as Record<string, number>, quality: row.quality as Stored["quality"], mse: row.mse };
}

const detailOf = async (scope: StayScopeDTO, start: Date | null) => {
  const d = await windowDetail(scope, start?.toISOString() ?? null, db);
  expect(d).not.toBeNull();
  expect(d!.window).not.toBeNull();
  return d as WindowDetailDTO;
};

describe("Window detail of a healthy night with ectopy", () => {
  const admitted = new Date("2025-06-10T01:00:00Z");
  let scope: StayScopeDTO;
  let stored: Awaited<ReturnType<typeof insertTestBeats>>;
  // A window in the middle of the first whole hour: the stored 60-min window 01:00–02:00 holds it.
  const start = new Date(admitted.getTime() + 27 * MIN);

  beforeAll(async () => {
    // Ectopy makes the cleaning edit beats, so the tachogram, the edited shares and the NN series all have work to show.
    // Beats from 30 s before admission: the first beat of the stay then opens its interval before admission, so
    // the first 5-min and 60-min windows start at admission (stored beat times are rounded to the ms).
    const sim = addEctopy(simulateHealthySleep({ seed: 71, durationS: 2 * 3600 + 90, startS: admitted.getTime() / 1000 - 30 }), { seed: 72, pvcRate: 0.01, pacRate: 0.01 });
    ({ scope, stored } = await computedStay("4W", admitted, 2, sim));
  });

  it("recomputes the stored short-term values exactly (source: engine consistency — same engine, beats and parameters)", async () => {
    const d = await detailOf(scope, start);
    const row = await storedRow(scope.stayId, "short", start);
    expect(d.window.start).toBe(start.toISOString());
    expect(d.window.grade).toBe(row.grade);
    expect(d.window.algorithmVersion).toBe(ALGORITHM_VERSION);
    expect(d.recomputed).toMatchObject({ available: true, matchesStored: true, differing: [] });
    for (const key of ["sdnn", "rmssd", "sd1", "sd2", "dfa_alpha1", "sampen", "vlf", "lf", "hf"]) {
      const v = d.window.values.find((x) => x.key === key)!;
      expect(v.value, key).toBe(row.values[key]);
      close(v.recomputed, row.values[key], SAME_REL, key);
      expect(v.version).toBe(ALGORITHM_VERSION);
      expect(v.params, key).not.toBeNull();
    }
    // The per-value parameters are the ones the compute job recorded (lib/compute/params.ts): SampEn m = 2, r = 0.2·SD.
    expect(d.window.values.find((v) => v.key === "sampen")!.params).toMatchObject({ m: 2, r: 0.2 });
    expect(d.parameters).toMatchObject({ algorithmVersion: ALGORITHM_VERSION, population: "adult" });
    expect(d.window.quality).toMatchObject({ grade: row.grade, nBeats: row.quality.nBeats, coverage: row.quality.coverage });
  });

  it("draws the Poincaré ellipse with the stored SD1 and SD2 (source: Brennan et al. 2001; DOMAIN §3.1 A8 SD1 = SDSD/√2)", async () => {
    const d = await detailOf(scope, start);
    const row = await storedRow(scope.stayId, "short", start);
    const p = d.plots.poincare!;
    close(p.sd1, row.values.sd1, SAME_REL, "sd1");
    close(p.sd2, row.values.sd2, SAME_REL, "sd2");
    close(p.sd1, row.values.sdsd! / Math.SQRT2, IDENTITY_REL, "SD1 = SDSD/√2");
    // Geometry: the 45° axes through the centre have half-lengths SD2 and SD1.
    const length = ([[x0, y0], [x1, y1]]: [[number, number], [number, number]]) => Math.hypot(x1 - x0, y1 - y0);
    close(length(p.axes.sd2), 2 * p.sd2, IDENTITY_REL, "SD2 axis");
    close(length(p.axes.sd1), 2 * p.sd1, IDENTITY_REL, "SD1 axis");
    // Every ellipse point satisfies v²/SD2² + u²/SD1² = 1 in the rotated frame (Brennan et al. 2001).
    p.ellipse.x.forEach((x, i) => {
      for (const y of [p.ellipse.upper[i]!, p.ellipse.lower[i]!]) {
        const dx = x - p.centre[0];
        const dy = y - p.centre[1];
        close(((dx + dy) / Math.SQRT2) ** 2 / p.sd2 ** 2 + ((dy - dx) / Math.SQRT2) ** 2 / p.sd1 ** 2, 1, 1e-6, "on the ellipse");
      }
    });
    expect(p.x).toHaveLength(row.quality.nBeats - 1);
  });

  it("integrates the spectrum to the stored VLF, LF and HF powers (source: Task Force 1996 band edges; engine consistency)", async () => {
    const d = await detailOf(scope, start);
    const row = await storedRow(scope.stayId, "short", start);
    const s = d.plots.spectrum!;
    const f = Float64Array.from(s.f);
    const psd = Float64Array.from(s.psd);
    for (const band of s.bands) {
      expect(band.reference).toBe(false);
      close(integrateLinear(f, psd, band.loHz, band.hiHz), row.values[band.key], IDENTITY_REL, band.key);
      close(band.powerMs2, row.values[band.key], SAME_REL, band.key);
    }
    expect(s.bands.map((b) => [b.loHz, b.hiHz])).toEqual([[0.003, 0.04], [0.04, 0.15], [0.15, 0.4]]);
    // Laguna et al. 1998: nothing above the mean Nyquist frequency.
    expect(s.f[s.f.length - 1]!).toBeLessThanOrEqual(s.nyquistHz + 1e-12);
  });

  it("fits DFA α1 on the window and α2 on the stored hour (source: Peng et al. 1995; a slope is the same in log10 and ln)", async () => {
    const d = await detailOf(scope, start);
    const row = await storedRow(scope.stayId, "short", start);
    const hourStart = new Date(admitted.getTime());
    const hourRow = await storedRow(scope.stayId, "long", hourStart);
    expect(d.hour).toMatchObject({ source: "stored", start: hourStart.toISOString() });
    const { alpha1, alpha2 } = d.plots.dfa!;
    expect(alpha1!.scales).toEqual(Array.from({ length: 13 }, (_, i) => 4 + i));
    close(alpha1!.alpha, row.values.dfa_alpha1, SAME_REL, "α1");
    close(linearFit(alpha1!.log10n, alpha1!.log10F).slope, row.values.dfa_alpha1, IDENTITY_REL, "α1 refitted");
    expect(alpha2!.scales[0]).toBe(16);
    expect(alpha2!.scales[alpha2!.scales.length - 1]).toBe(64);
    close(alpha2!.alpha, hourRow.values.dfa_alpha2, SAME_REL, "α2");
    close(linearFit(alpha2!.log10n, alpha2!.log10F).slope, hourRow.values.dfa_alpha2, IDENTITY_REL, "α2 refitted");
    expect(d.hour.values.find((v) => v.key === "dfa_alpha2")!.recomputed).toBe(hourRow.values.dfa_alpha2);
  });

  it("gives the MSE curve of the hour: the stored curve, with τ = 1 the SampEn(2, 0.15·SD) of the hour (source: Costa et al. 2002 definition)", async () => {
    const d = await detailOf(scope, start);
    const hourRow = await storedRow(scope.stayId, "long", admitted);
    const mse = d.plots.mse!;
    expect(mse.scales).toEqual(Array.from({ length: 20 }, (_, i) => i + 1));
    expect(mse.stored).toEqual(hourRow.mse);
    mse.sampen.forEach((v, i) => {
      const storedValue = hourRow.mse![i] ?? null;
      if (storedValue === null) expect(v).toBeNull();
      else close(v, storedValue, SAME_REL, `τ = ${i + 1}`);
      if (v === null) expect(mse.reasons[i]).toBeTruthy();
    });
    // The hour's NN series from one pass over the stay's beats (those from admission on, as the job reads them;
    // compute.test.ts shows the job's chunks equal one pass).
    const k = stored.times.findIndex((t) => t >= admitted.getTime() / 1000);
    const stay = { rr: stored.rr.subarray(k), times: stored.times.subarray(k), quality: stored.quality.subarray(k), leadOff: stored.leadOff.subarray(k) };
    const { interpolated } = cleanForWindows(stay, "adult", true);
    const ci = interpolated.value!;
    const from = ci.times.findIndex((t) => t >= admitted.getTime() / 1000);
    const to = ci.times.findIndex((t) => t >= admitted.getTime() / 1000 + 3600);
    const hourNN = ci.nn.slice(from, to);
    expect(mse.n).toBe(hourNN.length);
    close(mse.sampen[0], sampleEntropy(hourNN, { m: 2, r: 0.15 }).value!.sampen, SAME_REL, "τ = 1");
    // Coarse-graining by non-overlapping means leaves ⌊N/τ⌋ points (Costa et al. 2002).
    mse.points.forEach((p, i) => expect(p).toBe(Math.floor(hourNN.length / (i + 1))));
    expect(mse.note).toMatch(/5-min window/);
  });

  it("shows the tachogram with every input beat, its cleaning class and the device's beat type (source: DOMAIN §2.1)", async () => {
    const d = await detailOf(scope, start);
    const row = await storedRow(scope.stayId, "short", start);
    const t = d.plots.tachogram!;
    expect(t.t).toHaveLength(row.quality.nInputBeats);
    expect(t.nn).toHaveLength(row.quality.nBeats);
    expect(t.t.every((x) => x >= start.getTime() / 1000 && x < start.getTime() / 1000 + 300)).toBe(true);
    expect(t.deviceType.every((x) => x !== null)).toBe(true);
    // The edited share the quality panel shows is the share of input beats cleaning did not keep as measured.
    close(t.action.filter((a) => a !== "kept").length / t.t.length, row.quality.shareEdited, IDENTITY_REL, "share edited");
    close(t.label.filter((l) => l === "ectopic").length / t.t.length, row.quality.shareEctopic, IDENTITY_REL, "share ectopic");
  });

  it("defaults to the latest window and links to its neighbours and its night", async () => {
    const latest = await db("index_windows").where({ stay_id: scope.stayId, kind: "short" }).orderBy("window_start", "desc").first("window_start");
    const d = await detailOf(scope, null);
    expect(d.window.start).toBe(latest!.window_start.toISOString());
    expect(d.neighbours.next).toBeNull();
    const mid = await detailOf(scope, start);
    expect(mid.neighbours).toEqual({ previous: new Date(start.getTime() - MIN).toISOString(), next: new Date(start.getTime() + MIN).toISOString() });
    // 01:27Z on 10 June is 21:27 EDT on 9 June in the demo units' zone (America/New_York): before that evening's
    // 22:00 start, so the window leads into the night of 9 June, 33 min away, not the one that ended at 06:00.
    expect(scope.night).toMatchObject({ timeZone: "America/New_York", startsAt: "22:00" });
    expect(mid.window.night).toBe("2025-06-09");
    // A window in the second hour has no stored 60-min window yet (the stay ends before 03:00 is complete), so the
    // hour used is the 60 min ending with the window.
    const late = await detailOf(scope, new Date(admitted.getTime() + 100 * MIN));
    expect(late.hour).toMatchObject({ source: "preceding", end: new Date(admitted.getTime() + 105 * MIN).toISOString(), values: [] });
    expect(late.plots.mse!.stored).toBeNull();
  });

  it("has an explanation, unit and source for every index the screen shows (source: issue 5 item 4)", async () => {
    const d = await detailOf(scope, start);
    const keys = [...d.window.values.map((v) => v.key), ...d.hour.values.map((v) => v.key), "d2", "lyapunov", "fnn", "surrogate", "power_law"];
    expect(d.hour.values.length).toBeGreaterThan(0);
    for (const key of keys) {
      const e = INDEX_EXPLANATIONS[key];
      expect(e, key).toBeDefined();
      expect(e!.citation, key).toMatch(/\d{4}/);
      // One to three sentences, in our own words.
      const sentences = e!.explanation.split(/(?<=[.!?])\s+/).filter(Boolean);
      expect(sentences.length, key).toBeGreaterThanOrEqual(1);
      expect(sentences.length, key).toBeLessThanOrEqual(3);
      expect(e!.researchOnly, key).toBe(["d2", "lyapunov", "fnn", "surrogate", "power_law"].includes(key));
    }
  });

  it("answers null for a start that names no window", async () => {
    expect(await windowDetail(scope, new Date(start.getTime() + 30_000).toISOString(), db)).toBeNull();
    expect(await windowResearch(scope, "2020-01-01T00:00:00.000Z", db)).toBeNull();
  });

  it("builds every part of the Research panel with its caveat, deterministically per window (source: DOMAIN §2.7, §2.8, §5.6)", async () => {
    const first = await windowResearch(scope, start.toISOString(), db);
    const again = await windowResearch(scope, start.toISOString(), db);
    expect(first).toEqual(again);
    if (!first || first.window === null) throw new Error("expected a research result");
    expect(first.reason).toBeNull();
    expect(first.hour.source).toBe("stored");
    expect(first.embedding!.caveat).toMatch(/never used for flags/);
    for (const p of [first.correlationDimension!, first.lyapunov!, first.falseNeighbours!, first.surrogate!, first.powerLaw!.fit]) {
      expect(p.research).toBe(true);
      expect(p.caveat).toMatch(/never used for flags/);
      expect(p.version).toBe(ALGORITHM_VERSION);
      expect(p.value !== null || (p.reason?.length ?? 0) > 0).toBe(true);
    }
    const d2 = first.correlationDimension!.value!;
    expect(["saturated", "not saturated"]).toContain(d2.verdict);
    expect(d2.m).toEqual(d2.slopes.map((_, i) => i + 1));
    expect(first.falseNeighbours!.value!.dims.length).toBe(first.falseNeighbours!.value!.falseFraction.length);
    expect(first.lyapunov!.value!.steps.length).toBe(first.lyapunov!.value!.meanLogDivergence.length);
    const s = first.surrogate!.value!;
    // Rank test (Theiler et al. 1992): p ≤ (k + 1)/(S + 1).
    close(s.pValueBound, (s.atLeastAsExtreme + 1) / (s.surrogates + 1), IDENTITY_REL, "rank bound");
    // The empirical CCDF starts at 1 and falls (a CCDF is non-increasing).
    const { ccdf } = first.powerLaw!;
    expect(ccdf.p[0]).toBe(1);
    expect(ccdf.p.every((v, i) => i === 0 || v < ccdf.p[i - 1]!)).toBe(true);
    // Another window gets another seed.
    const other = await windowResearch(scope, new Date(start.getTime() + MIN).toISOString(), db);
    expect(other && other.window !== null && other.seed).not.toBe(first.seed);
  });
});

describe("a window the quality grading rejects", () => {
  it("shows no value, says why, and keeps the tachogram (source: DOMAIN §2.1, §5.7 — unusable windows show no value)", async () => {
    const admitted = new Date("2025-06-12T03:00:00Z");
    const all = simulateHealthySleep({ seed: 81, durationS: 3600 + 60, startS: admitted.getTime() / 1000 });
    // A 3-min dropout inside the window starting at 03:30: coverage at most 40 %, below the 80 % limit.
    const gapFrom = admitted.getTime() / 1000 + 31 * 60;
    const keep = Array.from(all.times, (t, k) => (t < gapFrom || t >= gapFrom + 180 ? k : -1)).filter((k) => k >= 0);
    const sim: SimulatedBeats = {
      ...all,
      rr: Float64Array.from(keep, (k) => all.rr[k]!),
      times: Float64Array.from(keep, (k) => all.times[k]!),
      beatType: keep.map((k) => all.beatType[k]!),
      quality: Float64Array.from(keep, (k) => all.quality[k]!),
      leadOff: Uint8Array.from(keep, (k) => all.leadOff[k]!),
      truth: keep.map((k) => all.truth[k]!),
      rhythm: keep.map((k) => all.rhythm[k]!),
    };
    const { scope } = await computedStay("4W", admitted, 1, sim);
    const start = new Date(admitted.getTime() + 30 * MIN);
    const d = await detailOf(scope, start);
    expect(d.window.grade).toBe("unusable");
    expect(d.window.quality.reasons.join(" ")).toMatch(/coverage/);
    for (const v of d.window.values) {
      expect(v.value, v.key).toBeNull();
      expect(v.recomputed, v.key).toBeNull();
      expect(v.reason, v.key).toMatch(/unusable/);
    }
    expect(d.plots.poincare).toBeNull();
    expect(d.plots.spectrum).toBeNull();
    expect(d.plotReasons.poincare).toMatch(/unusable/);
    expect(d.plots.dfa?.alpha1 ?? null).toBeNull();
    expect(d.plots.tachogram!.t.length).toBeGreaterThan(0);
    expect(d.recomputed.matchesStored).toBe(true);
  });
});

describe("a neonatal window", () => {
  it("draws the neonatal HF band for orientation beside the stored Task Force bands (source: DOMAIN §1 NICU, 0.24–1.04 Hz)", async () => {
    const admitted = new Date("2025-06-14T05:00:00Z");
    const sim = simulateNicu({ seed: 91, durationS: 3600 + 60, startS: admitted.getTime() / 1000 });
    const { scope } = await computedStay("2E", admitted, 1, sim);
    const start = new Date(admitted.getTime() + 20 * MIN);
    const d = await detailOf(scope, start);
    const row = await storedRow(scope.stayId, "short", start);
    expect(d.population).toBe("neonatal");
    const s = d.plots.spectrum!;
    const reference = s.bands.filter((b) => b.reference);
    expect(reference.map((b) => [b.key, b.loHz, b.hiHz])).toEqual([["hf_neonatal", 0.24, 1.04]]);
    // About 143 bpm gives a mean Nyquist frequency near 1.2 Hz, so the band is covered and integrated like the others.
    close(reference[0]!.powerMs2, integrateLinear(Float64Array.from(s.f), Float64Array.from(s.psd), 0.24, 1.04), SAME_REL, "neonatal HF");
    for (const band of s.bands.filter((b) => !b.reference)) close(band.powerMs2, row.values[band.key], SAME_REL, band.key);
    expect(d.recomputed.matchesStored).toBe(true);
  });
});

describe("a stay without windows", () => {
  it("answers { window: null, message } rather than failing", async () => {
    const admitted = new Date("2025-06-16T05:00:00Z");
    const { stayId } = await makeTestStay(db, await unitId("4W"), admitted, new Date(admitted.getTime() + HOUR));
    const scope = (await stayScope(stayId, db))!;
    expect(await windowDetail(scope, null, db)).toEqual({ window: null, message: NO_WINDOWS_MESSAGE });
    expect(await windowResearch(scope, null, db)).toEqual({ window: null, message: NO_WINDOWS_MESSAGE });
  });
});
