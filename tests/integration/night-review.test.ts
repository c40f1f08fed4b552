// The Night review's data on real PostgreSQL: synthetic beats (lib/engine/simulate, DOMAIN §6) through the scheduled
// computation, then the night's windows, baselines, flags and annotations as the screen reads them, the zoom panel's
// heart rate (buckets and single beats, cleaning marks checked against the engine's own pass over the whole night),
// and the annotation writes behind the server actions (time checks across DST, optimistic concurrency, audit).
import type { Knex } from "knex";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Actor } from "@/lib/auth/guard";
import { runCompute } from "@/lib/compute/run";
import { addEctopy, simulateComplexityLoss, simulateHealthySleep } from "@/lib/engine/simulate";
import { heartRate } from "@/lib/engine/time-domain";
import { ALGORITHM_VERSION } from "@/lib/engine/version";
import { cleanForWindows, type BeatSeries } from "@/lib/engine/windows";
import { createAnnotationAs, updateAnnotationAs } from "@/lib/review/annotation-writes";
import { beatsView, bucketSeconds, MAX_BUCKETS, SINGLE_BEATS_MAX_S } from "@/lib/review/beats-view";
import { reviewNight } from "@/lib/review/night";
import { NIGHT_LONG_KEYS, NIGHT_SHORT_KEYS, nightWindows, type NightDTO } from "@/lib/review/night-windows";
import { stayScope, type StayScopeDTO } from "@/lib/review/stay-scope";
import { seed } from "@/seeds/01_demo";
import { demoPerson } from "@/seeds/demo-data";
import { seedRuleSets } from "@/seeds/02_rule_sets";
import { scratchDatabase } from "@/tests/support/db";
import { insertTestBeats, makeTestStay } from "@/tests/support/stays";

const MIN_MS = 60_000;
const HOUR_MS = 3_600_000;
const S = (iso: string) => Date.parse(iso) / 1000;

let db: Knex;
let cleanup: () => Promise<void>;
let unitId: string;
let actor: Actor;

/** Stay A: the fall-back night of 1 Nov 2025 in New York (9 h, DOMAIN W5), with a loss of complexity, ectopy and a
 *  20-min dropout inside the repeated hour (01:00–01:20 EST = 06:00–06:20Z). */
const A = {
  admitted: new Date("2025-11-02T00:30:00Z"), // 20:30 EDT on 1 Nov
  discharged: new Date("2025-11-02T11:40:00Z"), // 06:40 EST on 2 Nov
  gapFrom: S("2025-11-02T06:00:00Z"),
  gapTo: S("2025-11-02T06:20:00Z"),
};
/** Stay B: the spring-forward night of 7 Mar 2026 (7 h, DOMAIN W5), healthy sleep. */
const B = {
  admitted: new Date("2026-03-08T02:50:00Z"), // 21:50 EST on 7 Mar
  discharged: new Date("2026-03-08T10:10:00Z"), // 06:10 EDT on 8 Mar
};

let stayA: StayScopeDTO;
let stayB: StayScopeDTO;
/** Stay A's beats exactly as stored and read back (both sides of the dropout), and their device labels. */
let seriesA: BeatSeries & { times: Float64Array };
let typesA: string[];

beforeAll(async () => {
  ({ db, cleanup } = await scratchDatabase());
  await seed(db);
  await seedRuleSets(db);
  unitId = (await db("units").where({ code: "4W" }).first("id"))!.id;
  const clinician = (await db("users").where({ email: demoPerson("clinician").email }).first("id", "email", "name"))!;
  actor = { userId: clinician.id, email: clinician.email, name: clinician.name, grants: [{ unitId, role: "clinician" }], requestId: "night-review-test", clientAddress: null };

  // Stay B (2026) first: each run drops the beat partitions older than its own `now` minus the retention period, so
  // a run dated 2026 would drop stay A's 2025 beats.
  const b = await makeTestStay(db, unitId, B.admitted, B.discharged);
  await insertTestBeats(db, b.deviceId, simulateHealthySleep({ seed: 93, startS: B.admitted.getTime() / 1000, durationS: (B.discharged.getTime() - B.admitted.getTime()) / 1000 + 60 }));
  const runB = await runCompute({ trigger: "test", db, now: new Date(B.discharged.getTime() + HOUR_MS), baseline: { hours: 1, minWindows: 30 } });
  expect(runB.status).toBe("done");

  const a = await makeTestStay(db, unitId, A.admitted, A.discharged);
  const startS = A.admitted.getTime() / 1000;
  const durationS = (A.discharged.getTime() - A.admitted.getTime()) / 1000 + 60;
  // Baseline over the first hour; the drift ramps from 02:30Z to 04:00Z, inside the night (DOMAIN §6.2, shortened).
  const sim = addEctopy(simulateComplexityLoss({ seed: 91, startS, durationS, rampStartS: 2 * 3600, rampDurationS: 1.5 * 3600, betaEnd: 2 }), { seed: 92, pvcRate: 0.005, pacRate: 0.003 });
  const k1 = sim.times.findIndex((t) => t >= A.gapFrom);
  const k2 = sim.times.findIndex((t) => t >= A.gapTo);
  const before = await insertTestBeats(db, a.deviceId, sim, 0, k1);
  const after = await insertTestBeats(db, a.deviceId, sim, k2);
  const cat = (x: Float64Array, y: Float64Array) => Float64Array.from([...x, ...y]);
  seriesA = { rr: cat(before.rr, after.rr), times: cat(before.times, after.times), quality: cat(before.quality!, after.quality!), leadOff: Uint8Array.from([...before.leadOff!, ...after.leadOff!]) };
  typesA = [...sim.beatType.slice(0, k1), ...sim.beatType.slice(k2)];
  // One chunk for the whole stay (tests/integration/compute.test.ts checks that chunking through a dropout stores the
  // same windows); this file is about what the review reads.
  const runA = await runCompute({ trigger: "test", db, now: new Date(A.discharged.getTime() + HOUR_MS), baseline: { hours: 1, minWindows: 30 } });
  expect(runA.status).toBe("done");

  stayA = (await stayScope(a.stayId, db))!;
  stayB = (await stayScope(b.stayId, db))!;
}, 180_000);

afterAll(async () => {
  await cleanup?.();
});

const nightOf = (stay: StayScopeDTO, night: string) => nightWindows(stay, reviewNight(night, stay.night), db);

describe("nightWindows: the night's windows", () => {
  it("holds one 5-min window per minute and one 60-min window per hour of the night's real length (source: DOMAIN W5, 9 h and 7 h nights)", async () => {
    for (const [stay, night, hours] of [[stayA, "2025-11-01", 9], [stayB, "2026-03-07", 7]] as const) {
      const dto = await nightOf(stay, night);
      expect(dto.night.hours).toBe(hours);
      expect(dto.nights.map((n) => n.night)).toEqual([night]);
      expect(dto.short.t).toHaveLength(hours * 60);
      expect(dto.long.t).toHaveLength(hours);
      const from = S(dto.night.from);
      const to = S(dto.night.to);
      expect(dto.short.start[0]).toBe(from);
      expect(dto.short.start.every((s, i) => s >= from && s < to && dto.short.t[i]! - s === 300 && (i === 0 || s - dto.short.start[i - 1]! === 60))).toBe(true);
      expect(dto.long.start.every((s, i) => s >= from && s < to && dto.long.t[i]! - s === 3600)).toBe(true);
      expect(Object.keys(dto.short.values).sort()).toEqual([...NIGHT_SHORT_KEYS].sort());
      expect(Object.keys(dto.long.values).sort()).toEqual([...NIGHT_LONG_KEYS].sort());
    }
  });

  it("has no windows and no observed time for a night that ended before admission", async () => {
    const dto = await nightOf(stayA, "2025-10-31");
    expect(dto.short.t).toEqual([]);
    expect(dto.long.t).toEqual([]);
    expect(dto.coverage).toMatchObject({ share: null, windows: 0, usableWindows: 0 });
  });

  it("shows no value for an unusable window, and the stored value for every other (source: DOMAIN §2.1, §5.7)", async () => {
    const dto = await nightOf(stayA, "2025-11-01");
    const rows = await db("index_windows")
      .where({ stay_id: stayA.stayId, kind: "short", algorithm_version: ALGORITHM_VERSION })
      .where("window_start", ">=", new Date(dto.night.from))
      .where("window_start", "<", new Date(dto.night.to))
      .orderBy("window_start")
      .select("window_start", "grade", "values");
    expect(rows).toHaveLength(dto.short.t.length);
    let unusable = 0;
    rows.forEach((r, i) => {
      expect(dto.short.start[i]).toBe(r.window_start.getTime() / 1000);
      expect(dto.short.grade[i]).toBe(r.grade);
      for (const k of NIGHT_SHORT_KEYS) {
        if (r.grade === "unusable") expect(dto.short.values[k][i]).toBeNull();
        else expect(dto.short.values[k][i]).toBe(r.values?.[k] ?? null);
      }
      if (r.grade === "unusable") unusable++;
    });
    // Every window lying wholly inside the 20-min dropout has no beats: 16 windows start at 06:00Z … 06:15Z.
    const inside = dto.short.start.map((s, i) => [s, i] as const).filter(([s]) => s >= A.gapFrom && s + 300 <= A.gapTo);
    expect(inside).toHaveLength(16);
    for (const [, i] of inside) {
      expect(dto.short.grade[i]).toBe("unusable");
      expect(NIGHT_SHORT_KEYS.every((k) => dto.short.values[k][i] === null)).toBe(true);
    }
    expect(unusable).toBeGreaterThanOrEqual(16);
  });

  it("counts usable time as the union of usable windows: the dropout leaves 18–20 of the night's 540 minutes uncovered (source: analytic, from the 80 % coverage bound of a usable window)", async () => {
    const dto = await nightOf(stayA, "2025-11-01");
    // A usable window has ≥ 80 % coverage, so it reaches at most 60 s into the dropout from either side; every window
    // clear of the dropout is usable in this series. Beat boundaries add under a second.
    const SLACK = 2 / (540 * 60);
    expect(dto.coverage.share!).toBeGreaterThanOrEqual((540 - 20) / 540 - SLACK);
    expect(dto.coverage.share!).toBeLessThanOrEqual((540 - 18) / 540 + SLACK);
    expect(dto.coverage.observedFrom).toBe(dto.night.from);
    expect(dto.coverage.observedTo).toBe(dto.night.to);
    expect(dto.coverage.windows).toBe(540);
    expect(dto.coverage.usableWindows).toBe(dto.short.grade.filter((g) => g !== "unusable").length);
  });

  it("carries the stay's own baselines for the drawn indices, as stored", async () => {
    const dto = await nightOf(stayA, "2025-11-01");
    const stored = await db("baselines").where({ stay_id: stayA.stayId, algorithm_version: ALGORITHM_VERSION }).select("*");
    const drawn = new Set<string>([...NIGHT_SHORT_KEYS, ...NIGHT_LONG_KEYS]);
    const expected = stored.filter((b) => drawn.has(b.index_key) && b.median !== null);
    expect(expected.map((b) => b.index_key)).toEqual(expect.arrayContaining(["hr", "sdnn", "rmssd", "dfa_alpha1"]));
    expect(Object.keys(dto.baselines).sort()).toEqual(expected.map((b) => b.index_key).sort());
    for (const b of expected) {
      expect(dto.baselines[b.index_key as keyof NightDTO["baselines"]]).toMatchObject({ median: b.median, spread: b.spread, nWindows: b.n_windows });
    }
  });

  it("lists the flags whose condition overlapped the night, and none that ended before it or began after it", async () => {
    const night = reviewNight("2025-11-01", stayA.night);
    const ruleSet = (await db("rule_sets").where({ unit_id: unitId }).orderBy("version", "desc").first())!;
    const manual = (from: string, to: string) => ({
      stay_id: stayA.stayId, unit_id: unitId, rule_set_id: ruleSet.id, rule_set_version: ruleSet.version, rule_id: "coverage-below-80",
      severity: "watch" as const, state: "resolved" as const, condition_from: new Date(from), condition_to: new Date(to),
      details: { rule: { label: "Data quality: beat coverage below 80 % for 10 minutes" } },
    });
    const [early] = await db("flags").insert(manual("2025-11-02T00:40:00Z", "2025-11-02T02:00:00Z")).returning("id"); // ends as the night starts
    const [late] = await db("flags").insert(manual("2025-11-02T11:00:00Z", "2025-11-02T11:30:00Z")).returning("id"); // starts as it ends
    const [edge] = await db("flags").insert(manual("2025-11-02T01:50:00Z", "2025-11-02T02:05:00Z")).returning("id"); // overlaps its start

    const dto = await nightOf(stayA, "2025-11-01");
    const raised = await db("flags").where({ stay_id: stayA.stayId }).whereNot("rule_id", "coverage-below-80").select("id", "rule_id", "condition_from", "condition_to");
    const sdnn = raised.find((f) => f.rule_id === "sdnn-below-half-baseline");
    expect(sdnn, "the loss of complexity raises an SDNN flag (DOMAIN §6.2, rigid)").toBeDefined();
    expect(sdnn!.condition_from.getTime()).toBeGreaterThan(night.from.getTime());
    const ids = dto.flags.map((f) => f.id);
    expect(ids).toContain(sdnn!.id);
    expect(ids).toContain(edge!.id);
    expect(ids).not.toContain(early!.id);
    expect(ids).not.toContain(late!.id);
    expect(dto.flags.find((f) => f.id === sdnn!.id)).toMatchObject({ severity: "watch", index: "sdnn" });
  });
});

describe("beatsView: the zoom panel's heart rate", () => {
  it("gives single beats up to 15 min and buckets beyond, at most 1,500 of them", async () => {
    const from = Date.parse("2025-11-02T03:00:00Z");
    expect((await beatsView(stayA, from, from + SINGLE_BEATS_MAX_S * 1000, db)).mode).toBe("beats");
    const longer = await beatsView(stayA, from, from + SINGLE_BEATS_MAX_S * 1000 + 1000, db);
    expect(longer.mode).toBe("buckets");
    for (const [hours, bucketS] of [[8, 20], [9, 30], [1, 5]] as const) {
      const night = await beatsView(stayA, from - HOUR_MS, from - HOUR_MS + hours * HOUR_MS, db);
      if (night.mode !== "buckets") throw new Error("expected buckets");
      expect(night.bucketS).toBe(bucketS);
      expect(bucketSeconds(hours * 3600)).toBe(bucketS);
      expect(night.t.length).toBeLessThanOrEqual(MAX_BUCKETS);
      expect(night.t).toHaveLength(Math.ceil((hours * 3600) / bucketS));
    }
  });

  it("marks edited and ectopic beats exactly as the engine's cleaning of the whole night does", async () => {
    const whole = cleanForWindows(seriesA, "adult", true).interpolated.value!;
    // A 5-min span around the first ventricular beat after 03:00Z.
    const k = typesA.findIndex((t, i) => t === "V" && seriesA.times[i]! > S("2025-11-02T03:00:00Z"));
    const fromMs = Math.round((seriesA.times[k]! - 150) * 1000);
    const view = await beatsView(stayA, fromMs, fromMs + 5 * MIN_MS, db);
    if (view.mode !== "beats") throw new Error("expected single beats");
    const idx = [...seriesA.times.keys()].filter((i) => seriesA.times[i]! >= fromMs / 1000 && seriesA.times[i]! < fromMs / 1000 + 300);
    expect(view.t).toEqual(idx.map((i) => seriesA.times[i]));
    expect(view.rr).toEqual(idx.map((i) => seriesA.rr[i]));
    expect(view.hr).toEqual(idx.map((i) => 60000 / seriesA.rr[i]!));
    expect(view.type).toEqual(idx.map((i) => typesA[i]));
    expect(view.action).toEqual(idx.map((i) => whole.actions[i]));
    expect(view.label).toEqual(idx.map((i) => whole.labels[i]));
    expect(view.edited).toEqual(idx.map((i) => whole.actions[i] !== "kept"));
    expect(view.type).toContain("V");
    expect(view.edited.some(Boolean)).toBe(true);
  });

  it("gives heart rate per bucket from the engine's cleaned intervals, and nothing in the dropout (source: heart rate = 60000 / mean NN, Task Force 1996)", async () => {
    const whole = cleanForWindows(seriesA, "adult", true).interpolated.value!;
    const fromMs = (A.gapFrom - 20 * 60) * 1000;
    const view = await beatsView(stayA, fromMs, fromMs + HOUR_MS, db);
    if (view.mode !== "buckets") throw new Error("expected buckets");
    expect(view.bucketS).toBe(5);
    let empty = 0;
    view.t.forEach((t, j) => {
      const inBucket = [...whole.times.keys()].filter((i) => whole.times[i]! >= t && whole.times[i]! < t + view.bucketS);
      expect(view.n[j]).toBe(inBucket.length);
      if (!inBucket.length) {
        expect([view.mean[j], view.min[j], view.max[j]]).toEqual([null, null, null]);
        empty++;
        return;
      }
      const nn = Float64Array.from(inBucket, (i) => whole.nn[i]!);
      expect(view.mean[j]).toBeCloseTo(heartRate(nn).value!, 9);
      expect(view.min[j]).toBeCloseTo(60000 / Math.max(...nn), 9);
      expect(view.max[j]).toBeCloseTo(60000 / Math.min(...nn), 9);
    });
    // The 20-min dropout is 240 buckets of 5 s; the one holding the first beat after it is not empty.
    expect(empty).toBeGreaterThanOrEqual(239);
    expect(empty).toBeLessThanOrEqual(240);
  });

  it("refuses a span that runs backwards or exceeds 9 h", async () => {
    const from = Date.parse("2025-11-02T03:00:00Z");
    await expect(beatsView(stayA, from, from, db)).rejects.toThrow(RangeError);
    await expect(beatsView(stayA, from, from + 9 * HOUR_MS + 1000, db)).rejects.toThrow(RangeError);
  });
});

describe("annotation writes", () => {
  const auditCount = async () => Number((await db("audit_events").count<{ n: string }[]>("* as n"))[0]!.n);
  const annotationCount = async (stayId: string) => Number((await db("clinical_annotations").where({ stay_id: stayId }).count<{ n: string }[]>("* as n"))[0]!.n);

  it("adds an annotation in the unit's local time and audits it with before and after", async () => {
    const r = await createAnnotationAs(actor, { stayId: stayA.stayId, occurredAt: "2025-11-01T23:15", kind: "medication", note: "Invented: analgesic given" }, db);
    if (!r.ok) throw new Error(r.message);
    const row = (await db("clinical_annotations").where({ id: r.data!.id }).first())!;
    // 23:15 EDT = 03:15Z (EDT is UTC−4 until 2 Nov 2025, IANA tz database).
    expect(row.occurred_at.toISOString()).toBe("2025-11-02T03:15:00.000Z");
    expect(row).toMatchObject({ kind: "medication", note: "Invented: analgesic given", created_by: actor.userId, version: 1 });
    const audit = (await db("audit_events").where({ action: "annotation.create", target_id: r.data!.id }).first())!;
    expect(audit).toMatchObject({ unit_id: unitId, actor_user_id: actor.userId, actor_role: "clinician", outcome: "success" });
    expect(audit.detail).toMatchObject({ stayId: stayA.stayId, before: null, after: { occurredAt: "2025-11-02T03:15:00.000Z", kind: "medication", version: 1 } });
  });

  it("asks which 01:30 is meant on the fall-back night, and stores the one chosen (source: DOMAIN W5, 01:30 occurs at 05:30Z and 06:30Z)", async () => {
    const input = { stayId: stayA.stayId, occurredAt: "2025-11-02T01:30", kind: "repositioning" as const, note: "Invented: turned to the left side" };
    const [audits, rows] = [await auditCount(), await annotationCount(stayA.stayId)];
    const refused = await createAnnotationAs(actor, input, db);
    expect(refused).toMatchObject({ ok: false, code: "invalid_input", fieldErrors: { occurrence: [expect.stringMatching(/EDT.*EST/)] } });
    expect([await auditCount(), await annotationCount(stayA.stayId)]).toEqual([audits, rows]);
    for (const [occurrence, iso] of [["earlier", "2025-11-02T05:30:00.000Z"], ["later", "2025-11-02T06:30:00.000Z"]] as const) {
      const r = await createAnnotationAs(actor, { ...input, occurrence }, db);
      if (!r.ok) throw new Error(r.message);
      expect((await db("clinical_annotations").where({ id: r.data!.id }).first())!.occurred_at.toISOString()).toBe(iso);
    }
  });

  it("refuses a local time the spring change skipped, and a time outside the stay, writing nothing", async () => {
    const [audits, rowsA, rowsB] = [await auditCount(), await annotationCount(stayA.stayId), await annotationCount(stayB.stayId)];
    // 02:30 on 8 Mar 2026 does not exist in New York: clocks went from 02:00 EST to 03:00 EDT (IANA tz database).
    const skipped = await createAnnotationAs(actor, { stayId: stayB.stayId, occurredAt: "2026-03-08T02:30", kind: "procedure", note: "Invented" }, db);
    expect(skipped).toMatchObject({ ok: false, code: "invalid_input", fieldErrors: { occurredAt: [expect.stringMatching(/does not exist/)] } });
    const early = await createAnnotationAs(actor, { stayId: stayA.stayId, occurredAt: "2025-11-01T20:29", kind: "other", note: "Invented" }, db);
    expect(early).toMatchObject({ ok: false, fieldErrors: { occurredAt: [expect.stringMatching(/admitted/)] } });
    const late = await createAnnotationAs(actor, { stayId: stayA.stayId, occurredAt: "2025-11-02T06:41", kind: "other", note: "Invented" }, db);
    expect(late).toMatchObject({ ok: false, fieldErrors: { occurredAt: [expect.stringMatching(/discharged/)] } });
    expect([await auditCount(), await annotationCount(stayA.stayId), await annotationCount(stayB.stayId)]).toEqual([audits, rowsA, rowsB]);
  });

  it("edits with the version it saw; a stale version is refused with a clear message and changes nothing", async () => {
    const created = await createAnnotationAs(actor, { stayId: stayA.stayId, occurredAt: "2025-11-02T03:40", kind: "procedure", note: "Invented: line flushed" }, db);
    if (!created.ok) throw new Error(created.message);
    const id = created.data!.id;
    const edit = { id, version: 1, stayId: stayA.stayId, occurredAt: "2025-11-02T03:45", kind: "procedure" as const, note: "Invented: line flushed and dressing changed" };
    expect(await updateAnnotationAs(actor, edit, db)).toMatchObject({ ok: true });
    const row = (await db("clinical_annotations").where({ id }).first())!;
    // 03:45 EST = 08:45Z (after the change at 02:00 EDT, EST is UTC−5).
    expect(row).toMatchObject({ version: 2, note: edit.note, updated_by: actor.userId });
    expect(row.occurred_at.toISOString()).toBe("2025-11-02T08:45:00.000Z");
    const audit = (await db("audit_events").where({ action: "annotation.update", target_id: id }).first())!;
    expect(audit.detail).toMatchObject({
      before: { occurredAt: "2025-11-02T08:40:00.000Z", note: "Invented: line flushed", version: 1 },
      after: { occurredAt: "2025-11-02T08:45:00.000Z", note: edit.note, version: 2 },
    });

    const audits = await auditCount();
    const stale = await updateAnnotationAs(actor, { ...edit, note: "Invented: a second person's edit" }, db);
    expect(stale).toMatchObject({ ok: false, code: "conflict", message: expect.stringMatching(/Someone else changed this annotation.*Nothing was saved/) });
    expect(await db("clinical_annotations").where({ id }).first()).toEqual(row);
    expect(await auditCount()).toBe(audits);

    // Named through another stay (one the caller may hold a role for), the annotation is not found and unchanged.
    const elsewhere = await updateAnnotationAs(actor, { ...edit, version: 2, stayId: stayB.stayId, occurredAt: "2026-03-08T04:00" }, db);
    expect(elsewhere).toMatchObject({ ok: false, code: "not_found" });
    expect(await db("clinical_annotations").where({ id }).first()).toEqual(row);
  });

  it("shows the night's annotations on its Night review, and not those of the evening before it", async () => {
    const before = await createAnnotationAs(actor, { stayId: stayA.stayId, occurredAt: "2025-11-01T21:00", kind: "other", note: "Invented: before the night" }, db);
    if (!before.ok) throw new Error(before.message);
    const dto = await nightOf(stayA, "2025-11-01");
    const ids = dto.annotations.map((a) => a.id);
    expect(ids).not.toContain(before.data!.id);
    const all = await db("clinical_annotations").where({ stay_id: stayA.stayId }).orderBy("occurred_at").select("id", "occurred_at");
    const inNight = all.filter((a) => a.occurred_at >= new Date(dto.night.from) && a.occurred_at < new Date(dto.night.to));
    expect(ids).toEqual(inNight.map((a) => a.id));
    expect(ids.length).toBeGreaterThanOrEqual(4);
    expect(dto.annotations.every((a) => a.author === actor.name)).toBe(true);
  });
});
