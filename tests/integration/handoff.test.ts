// The Handoff summary on real PostgreSQL: hours monitored, coverage and window counts over DST nights of 7 and 9
// hours (DOMAIN W5), gaps and lead-off where beats were cut, arrows against the personal baseline on a loss-of-
// complexity night and on healthy sleep, which patients a unit's summary hands over, and the versioned clinician's
// note with its audit entries. Beats are synthetic (lib/engine/simulate, DOMAIN §6); windows come from the real
// compute job.
import { randomBytes } from "node:crypto";
import type { Knex } from "knex";
import { fromZonedTime } from "date-fns-tz";
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";

// The note action runs for real; only Next's request plumbing is replaced: the session, the headers, the cache.
const session = vi.hoisted(() => ({ current: null as null | { user: { id: string } } }));
vi.mock("next-auth", async (orig) => ({ ...(await orig<object>()), getServerSession: async () => session.current }));
vi.mock("next/headers", () => ({ headers: async () => new Headers({ "x-request-id": "req-handoff-test", "x-forwarded-for": "192.0.2.9" }) }));
vi.mock("next/cache", () => ({ revalidatePath: () => undefined }));

import type { Actor } from "@/lib/auth/guard";
import { runCompute } from "@/lib/compute/run";
import { db as appDb } from "@/lib/db/knex";
import { simulateComplexityLoss, simulateHealthySleep, type SimulatedBeats } from "@/lib/engine/simulate";
import { describeChange, GAP_LISTED_AFTER_S, patientHandoff, saveHandoffNoteAs, unitHandoff, type PatientHandoffDTO } from "@/lib/review/handoff";
import { saveHandoffNote } from "@/lib/review/handoff-actions";
import { HANDOFF_NOTE_MAX, handoffNoteSchema } from "@/lib/review/handoff.validation";
import { reviewNight, type NightTimes } from "@/lib/review/night";
import { stayScope } from "@/lib/review/stay-scope";
import { seed } from "@/seeds/01_demo";
import { demoPerson, DEMO_TIME_ZONE } from "@/seeds/demo-data";
import { seedRuleSets } from "@/seeds/02_rule_sets";
import { scratchDatabase } from "@/tests/support/db";
import { insertTestBeats, makeTestStay } from "@/tests/support/stays";

const MIN = 60_000;
const HOUR = 3_600_000;
/** The demo units' zone and night (units columns default to 22:00 → 06:00). */
const NIGHT_TIMES: NightTimes = { timeZone: DEMO_TIME_ZONE, startsAt: "22:00", endsAt: "06:00" };
/** Longest interval the healthy-sleep model makes is well under this (μ ≤ 1040 ms ± a few σ of 45 ms; DOMAIN §6.1):
 *  each edge of a cut can move the uncovered time by at most one interval. */
const ONE_BEAT_S = 1.5;
/** Beats run on this long after each night, so every 5-min window starting in the night is complete. */
const AFTER_NIGHT_MS = 10 * MIN;
/** "Now" for the summaries: long after every test night, so each is over. */
const LATER = new Date("2026-12-01T12:00:00Z");

let db: Knex;
let cleanup: () => Promise<void>;
let unit4W: string;

const stayOf = async (stayId: string) => (await stayScope(stayId, db))!;
const handoff = async (stayId: string, night: string) => patientHandoff(await stayOf(stayId), reviewNight(night, NIGHT_TIMES), db, LATER);
const trend = (h: PatientHandoffDTO, key: string) => h.indices.find((t) => t.key === key)!;

/** The series without the beats whose times fall in each cut (s); after a lead-off cut the next beat says so, as a
 *  device reports lead-off when it resumes (DOMAIN §6.7). */
function cutBeats(sim: SimulatedBeats, cuts: { fromS: number; toS: number; leadOff: boolean }[]): SimulatedBeats {
  const keep: number[] = [];
  const leadOff: number[] = [];
  let pendingLeadOff = false;
  for (let k = 0; k < sim.rr.length; k++) {
    const t = sim.times[k]!;
    const cut = cuts.find((c) => t >= c.fromS && t <= c.toS);
    if (cut) {
      pendingLeadOff ||= cut.leadOff;
      continue;
    }
    keep.push(k);
    leadOff.push(pendingLeadOff ? 1 : sim.leadOff[k]!);
    pendingLeadOff = false;
  }
  return {
    ...sim,
    rr: Float64Array.from(keep, (k) => sim.rr[k]!),
    times: Float64Array.from(keep, (k) => sim.times[k]!),
    beatType: keep.map((k) => sim.beatType[k]!),
    quality: Float64Array.from(keep, (k) => sim.quality[k]!),
    leadOff: Uint8Array.from(leadOff),
    truth: keep.map((k) => sim.truth[k]!),
    rhythm: keep.map((k) => sim.rhythm[k]!),
  };
}

beforeAll(async () => {
  ({ db, cleanup } = await scratchDatabase());
  await seed(db);
  await seedRuleSets(db);
  unit4W = (await db("units").where({ code: "4W" }).first("id"))!.id;
});
afterAll(async () => {
  await cleanup?.();
  await appDb.destroy();
});

describe("a 7-h spring-forward night with beats cut out (2026-03-07, America/New_York)", () => {
  const night = reviewNight("2026-03-07", NIGHT_TIMES);
  const F = night.from.getTime() / 1000;
  const cuts = [
    { fromS: F + 2 * 3600, toS: F + 2 * 3600 + 40 * 60, leadOff: false },
    { fromS: F + 4 * 3600, toS: F + 4 * 3600 + 12 * 60, leadOff: true },
    { fromS: F + 5.5 * 3600, toS: F + 5.5 * 3600 + 3 * 60, leadOff: false },
  ];
  const cutMinutes = [40, 12, 3];
  let stayId: string;
  let h: PatientHandoffDTO;

  beforeAll(async () => {
    // Admitted and monitored from a few minutes before the night, so the 22:00 window has all its beats.
    const admitted = new Date(night.from.getTime() - 5 * MIN);
    const s = await makeTestStay(db, unit4W, admitted, new Date(night.to.getTime() + 30 * MIN));
    stayId = s.stayId;
    const sim = simulateHealthySleep({ seed: 501, durationS: (night.to.getTime() - admitted.getTime() + AFTER_NIGHT_MS) / 1000, startS: admitted.getTime() / 1000 });
    await insertTestBeats(db, s.deviceId, cutBeats(sim, cuts));
    const run = await runCompute({ trigger: "test", db, now: new Date(night.to.getTime() + 2 * HOUR) });
    expect(run.status).toBe("done");
    h = await handoff(stayId, "2026-03-07");
  }, 240_000);

  it("is a 7-h night: 22:00 EST → 06:00 EDT (source: DOMAIN W5, tz rules for 2026)", () => {
    expect(h.night).toMatchObject({ night: "2026-03-07", hours: 7, inProgress: false, elapsedHours: 7 });
    expect(h.presentHours).toBe(7);
  });

  it("counts the hours with beats: the night less the cut stretches, each edge within one beat (source: analytic, intervals [t − RR, t] tile the series)", () => {
    const expectedS = 7 * 3600 - cutMinutes.reduce((a, m) => a + m * 60, 0);
    expect(Math.abs(h.monitoredHours * 3600 - expectedS)).toBeLessThanOrEqual(2 * ONE_BEAT_S * cuts.length);
  });

  it("stores one 5-min window per minute of the real 7 h, and coverage uses the real length (source: analytic, windows on whole minutes; DOMAIN W5)", () => {
    expect(h.windows.total).toBe(7 * 60);
    expect(h.windows.good + h.windows.limited + h.windows.unusable).toBe(h.windows.total);
    // A window overlapping a cut by more than 1 min has coverage below 80 %, hence unusable; one clear of the cut is
    // usable (clean healthy beats). So usable windows cover the night except the cut, give or take the 1-min overlap
    // allowed and the 1-min grid at each edge.
    const nightMin = 7 * 60;
    const lower = (nightMin - cutMinutes.reduce((a, m) => a + m + 2, 0)) / nightMin;
    const upper = (nightMin - cutMinutes.reduce((a, m) => a + m - 2, 0)) / nightMin;
    expect(h.coverage).toBeGreaterThanOrEqual(lower);
    expect(h.coverage).toBeLessThanOrEqual(upper);
    // Windows starting within 4 min before a cut until 1 min before its end overlap it by more than 1 min.
    const surelyUnusable = cutMinutes.reduce((a, m) => a + m + 3 - 1, 0);
    expect(h.windows.unusable).toBeGreaterThanOrEqual(surelyUnusable);
    expect(h.windows.unusable).toBeLessThanOrEqual(cutMinutes.reduce((a, m) => a + m + 5, 0));
    expect(h.device.unusableShare).toBeCloseTo(h.windows.unusable / h.windows.total, 12);
  });

  it("summarises the night while in progress against the hours passed, not the whole length (source: analytic, as above with 3 h elapsed and the 40-min cut inside them)", async () => {
    const p = await patientHandoff(await stayOf(stayId), night, db, new Date(night.from.getTime() + 3 * HOUR));
    expect(p.night).toMatchObject({ hours: 7, inProgress: true, elapsedHours: 3 });
    expect(Math.abs(p.monitoredHours * 3600 - (3 * 3600 - 40 * 60))).toBeLessThanOrEqual(2 * ONE_BEAT_S);
    expect(p.coverage).toBeGreaterThanOrEqual((180 - 42) / 180);
    expect(p.coverage).toBeLessThanOrEqual((180 - 38) / 180);
  });

  it("lists the gaps longer than 5 min where beats were cut, lead-off where the device said so (source: the cuts made above)", () => {
    const listed = cuts.filter((c) => c.toS - c.fromS > GAP_LISTED_AFTER_S);
    expect(h.device.gaps).toHaveLength(listed.length);
    for (const [i, c] of listed.entries()) {
      const g = h.device.gaps[i]!;
      expect(Math.abs(Date.parse(g.from) / 1000 - c.fromS)).toBeLessThanOrEqual(ONE_BEAT_S);
      expect(Math.abs(Date.parse(g.to) / 1000 - c.toS)).toBeLessThanOrEqual(ONE_BEAT_S);
      expect(g.leadOff).toBe(c.leadOff);
    }
    // Lead-off time runs from the beat before the 12-min cut to the beat after it: the cut plus up to two intervals.
    expect(h.device.leadOffMinutes * 60).toBeGreaterThanOrEqual(12 * 60 - ONE_BEAT_S);
    expect(h.device.leadOffMinutes * 60).toBeLessThanOrEqual(12 * 60 + 2 * ONE_BEAT_S);
    expect(h.device.streams.map((s) => s.serial)).toHaveLength(1);
  });

  it("shows the data-quality flag the long cuts raised, with its rule label and state (source: seeded DEFAULT rule set, coverage < 80 % for 10 min)", () => {
    // The 40-min cut holds coverage below 80 % for more than 10 min and raises the flag; the 12-min cut recurs while
    // nobody has looked at it yet, so it joins the same open flag (lib/flags/evaluate-stay.ts).
    const dq = h.flags.filter((f) => f.ruleId === "coverage-below-80");
    expect(dq).toHaveLength(1);
    expect(dq[0]).toMatchObject({ label: "Data quality: beat coverage below 80 % for 10 minutes", state: "open", severity: "watch" });
    expect(Math.abs(Date.parse(dq[0]!.conditionFrom) / 1000 - cuts[0]!.fromS)).toBeLessThanOrEqual(5 * 60);
  });

  it("gives steady arrows on healthy sleep against a baseline from the same night (source: DOMAIN §6.1 stationary sleep model)", () => {
    for (const key of ["hr", "sdnn", "rmssd", "dfa_alpha1", "sampen"]) expect(trend(h, key).direction, key).toBe("steady");
  });
});

describe("a 9-h fall-back night (2026-10-31, America/New_York)", () => {
  const night = reviewNight("2026-10-31", NIGHT_TIMES);
  let h: PatientHandoffDTO;

  beforeAll(async () => {
    // Admitted half an hour before the night: beats before 22:00 do not count.
    const admitted = new Date(night.from.getTime() - 30 * MIN);
    const s = await makeTestStay(db, unit4W, admitted, new Date(night.to.getTime() + 30 * MIN));
    await insertTestBeats(db, s.deviceId, simulateHealthySleep({ seed: 502, durationS: (night.to.getTime() - admitted.getTime() + AFTER_NIGHT_MS) / 1000, startS: admitted.getTime() / 1000 }));
    const run = await runCompute({ trigger: "test", db, now: new Date(night.to.getTime() + 2 * HOUR) });
    expect(run.status).toBe("done");
    h = await handoff(s.stayId, "2026-10-31");
  }, 240_000);

  it("monitors all 9 h, covers the whole real length and counts 540 windows, not 480 (source: DOMAIN W5)", () => {
    expect(h.night).toMatchObject({ hours: 9, elapsedHours: 9 });
    expect(h.monitoredHours).toBeCloseTo(9, 9);
    expect(h.coverage).toBeCloseTo(1, 9);
    expect(h.windows).toEqual({ good: 540, limited: 0, unusable: 0, total: 540 });
    expect(h.device.gaps).toEqual([]);
    expect(h.device.leadOffMinutes).toBe(0);
  });

  it("takes the 60-min indices from one window per real hour (source: analytic, windows on whole hours)", () => {
    expect(trend(h, "dfa_alpha2").nWindows).toBe(9);
  });

  it("gives steady arrows on healthy sleep (source: DOMAIN §6.1 stationary sleep model)", () => {
    for (const key of ["hr", "sdnn", "rmssd", "dfa_alpha1", "sampen"]) expect(trend(h, key).direction, key).toBe("steady");
  });
});

describe("a loss-of-complexity night (2026-06-10)", () => {
  const night = reviewNight("2026-06-10", NIGHT_TIMES);
  let h: PatientHandoffDTO;

  beforeAll(async () => {
    const s = await makeTestStay(db, unit4W, night.from, new Date(night.to.getTime() + 30 * MIN));
    const startS = night.from.getTime() / 1000;
    // "Decorrelated" drift (DOMAIN §6.2, β_end = 0) from 1.25 h to 2.75 h, after a 1-h baseline.
    await insertTestBeats(db, s.deviceId, simulateComplexityLoss({ seed: 503, startS, durationS: 8 * 3600 + AFTER_NIGHT_MS / 1000, rampStartS: 4500, rampDurationS: 5400, betaEnd: 0 }));
    const run = await runCompute({ trigger: "test", db, now: new Date(night.to.getTime() + 2 * HOUR), baseline: { hours: 1, minWindows: 30 } });
    expect(run.status).toBe("done");
    h = await handoff(s.stayId, "2026-06-10");
  }, 240_000);

  it("points SDNN, RMSSD and α1 down and heart rate and SampEn up, in shape and words (source: DOMAIN §6.2 table, λ = 1: SDNN 48 → 9.2 ms, RMSSD 28 → 12.7 ms, α1 1.09 → 0.62, SampEn 1.62 → 2.22, HR 60 → 80/min)", () => {
    expect(h.night.hours).toBe(8);
    expect(trend(h, "sdnn").direction).toBe("down");
    expect(trend(h, "rmssd").direction).toBe("down");
    expect(trend(h, "dfa_alpha1").direction).toBe("down");
    expect(trend(h, "hr").direction).toBe("up");
    expect(trend(h, "sampen").direction).toBe("up");
    const sdnn = trend(h, "sdnn");
    expect(describeChange(sdnn)).toBe(`▼ below baseline by ${Math.abs(sdnn.change!).toFixed(0)} ms`);
    expect(Math.abs(sdnn.change!)).toBeGreaterThan(sdnn.baselineSpread!);
  });

  it("shows the α1 and SDNN flags the drift raised (source: seeded DEFAULT rule set; tests/integration/flags.test.ts)", () => {
    expect(h.flags.map((f) => f.ruleId).sort()).toEqual(["alpha1-below-baseline", "sdnn-below-half-baseline"]);
    expect(h.flags.every((f) => f.label.length > 0 && f.state === "open")).toBe(true);
  });
});

describe("which patients a unit's summary hands over", () => {
  const night = reviewNight("2026-03-07", NIGHT_TIMES);
  let leftDuring: string;
  let leftBefore: string;
  let current: string;
  let stayedThrough: string;

  beforeAll(async () => {
    const local = (s: string) => fromZonedTime(s, DEMO_TIME_ZONE);
    leftDuring = (await makeTestStay(db, unit4W, local("2026-03-07T18:00:00"), local("2026-03-08T01:00:00"))).stayId;
    leftBefore = (await makeTestStay(db, unit4W, local("2026-03-06T18:00:00"), local("2026-03-07T12:00:00"))).stayId;
    stayedThrough = (await makeTestStay(db, unit4W, local("2026-03-07T20:00:00"), local("2026-03-08T09:00:00"))).stayId;
    const s = await makeTestStay(db, unit4W, local("2026-03-08T08:00:00"), local("2026-03-09T08:00:00"));
    current = s.stayId;
    await db("stays").where({ id: current }).update({ discharged_at: null });
  });

  it("for an earlier night: everyone who was in the unit during it, in bed order (source: issue 5 item 5)", async () => {
    const u = (await unitHandoff(unit4W, night, db, LATER))!;
    const ids = u.stays.map((s) => s.stay.stayId);
    expect(ids).toContain(leftDuring);
    expect(ids).toContain(stayedThrough);
    expect(ids).not.toContain(leftBefore);
    expect(ids).not.toContain(current);
    expect(u.night.hours).toBe(7);
    // The patient who left at 01:00 was in the bed 3 h of the night, with no beats at all: one gap of 3 h.
    const gone = u.stays.find((s) => s.stay.stayId === leftDuring)!;
    expect(gone).toMatchObject({ presentHours: 3, monitoredHours: 0 });
    expect(gone.device.gaps).toEqual([{ from: night.from.toISOString(), to: fromZonedTime("2026-03-08T01:00:00", DEMO_TIME_ZONE).toISOString(), minutes: 180, leadOff: false }]);
  });

  it("for the latest night: current patients and those discharged during it, not those who left since (source: issue 5 item 5)", async () => {
    const morning = fromZonedTime("2026-03-08T10:00:00", DEMO_TIME_ZONE);
    const u = (await unitHandoff(unit4W, night, db, morning))!;
    const ids = u.stays.map((s) => s.stay.stayId);
    expect(ids).toContain(leftDuring);
    expect(ids).toContain(current);
    expect(ids).not.toContain(stayedThrough);
    expect(ids).not.toContain(leftBefore);
  });
});

describe("the clinician's note", () => {
  const night = "2026-03-07";
  let stayId: string;
  let clinician: Actor;
  let other: Actor;
  const actor = (userId: string, email: string, name: string): Actor => ({
    userId, email, name, grants: [{ unitId: unit4W, role: "clinician" }], requestId: "req-handoff-note", clientAddress: null,
  });
  const noteRow = () => db("handoff_notes").where({ stay_id: stayId }).first("note", "version");
  const input = (fields: Record<string, unknown>) => handoffNoteSchema.parse({ stayId, night, ...fields });
  const audits = (action: string) => db("audit_events").where({ action, target_id: stayId }).orderBy("seq").select("*");

  beforeAll(async () => {
    const n = reviewNight(night, NIGHT_TIMES);
    stayId = (await makeTestStay(db, unit4W, n.from, n.to)).stayId;
    const me = (await db("users").where({ email: demoPerson("clinician").email }).first("id", "email", "name"))!;
    clinician = actor(me.id, me.email, me.name);
    const [row] = await db("users").insert({ email: `second-${randomBytes(3).toString("hex")}@test.example`, name: "Dr. Second Reader", password_hash: "unused" }).returning(["id", "email", "name"]);
    await db("user_unit_roles").insert({ user_id: row!.id, unit_id: unit4W, role: "clinician", granted_by: null });
    other = actor(row!.id, row!.email, row!.name);
  });

  it("inserts a new note at version 1 and audits it", async () => {
    const r = await saveHandoffNoteAs(clinician, input({ note: "Settled night. Watch SDNN trend.", version: "0" }), db, LATER);
    expect(r).toMatchObject({ ok: true, data: { version: 1, note: "Settled night. Watch SDNN trend.", updatedBy: clinician.name } });
    expect(await noteRow()).toEqual({ note: "Settled night. Watch SDNN trend.", version: 1 });
    const [a] = await audits("handoff_note.create");
    expect(a).toMatchObject({ actor_user_id: clinician.userId, actor_role: "clinician", unit_id: unit4W, target_type: "stay", outcome: "success" });
    expect(a!.detail).toEqual({ night, before: null, after: { note: "Settled night. Watch SDNN trend.", version: 1 } });
  });

  it("updates with the stored version, audited with before and after", async () => {
    const r = await saveHandoffNoteAs(other, input({ note: "Settled night. SDNN trend reviewed at 05:30.", version: "1" }), db, LATER);
    expect(r).toMatchObject({ ok: true, data: { version: 2, updatedBy: other.name } });
    expect(await noteRow()).toEqual({ note: "Settled night. SDNN trend reviewed at 05:30.", version: 2 });
    const [a] = await audits("handoff_note.update");
    expect(a!.detail).toMatchObject({
      night,
      before: { note: "Settled night. Watch SDNN trend.", version: 1, updated_by: clinician.userId },
      after: { note: "Settled night. SDNN trend reviewed at 05:30.", version: 2 },
    });
  });

  it("refuses a stale version, says who saved what and when, changes nothing and records the refusal", async () => {
    const r = await saveHandoffNoteAs(clinician, input({ note: "My edit from an old page.", version: "1" }), db, LATER);
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.code).toBe("conflict");
    expect(r.message).toMatch(/^Someone else \(Dr\. Second Reader\) saved this note at \d\d:\d\d E[SD]T; here is their text:/);
    expect(r.message).toContain("Settled night. SDNN trend reviewed at 05:30.");
    expect(await noteRow()).toEqual({ note: "Settled night. SDNN trend reviewed at 05:30.", version: 2 });
    const [a] = await audits("handoff_note.save");
    expect(a).toMatchObject({ outcome: "failure", actor_user_id: clinician.userId });
    expect(a!.detail).toMatchObject({ reason: "stale_version", version_sent: 1, version_stored: 2 });
    // A second "new note" for the same night is stale too.
    expect(await saveHandoffNoteAs(clinician, input({ note: "Another first note.", version: "0" }), db, LATER)).toMatchObject({ ok: false, code: "conflict" });
    expect(await noteRow()).toEqual({ note: "Settled night. SDNN trend reviewed at 05:30.", version: 2 });
  });

  it(`refuses a note longer than ${HANDOFF_NOTE_MAX} characters, and a night the patient was not in the unit`, async () => {
    const long = handoffNoteSchema.safeParse({ stayId, night, note: "x".repeat(HANDOFF_NOTE_MAX + 1), version: "2" });
    expect(long.success).toBe(false);
    expect(long.error!.issues.map((i) => i.path[0])).toEqual(["note"]);
    expect(handoffNoteSchema.safeParse({ stayId, night, note: "x".repeat(HANDOFF_NOTE_MAX), version: "2" }).success).toBe(true);
    // The table's own check holds even if a caller skipped the schema.
    await expect(db("handoff_notes").where({ stay_id: stayId }).update({ note: "x".repeat(HANDOFF_NOTE_MAX + 1) })).rejects.toThrow(/handoff_notes_note_check/);
    const elsewhere = await saveHandoffNoteAs(clinician, input({ note: "Wrong night.", version: "0", night: "2026-03-01" }), db, LATER);
    expect(elsewhere).toMatchObject({ ok: false, code: "invalid_input", fieldErrors: { night: [expect.stringMatching(/not in the unit/)] } });
    expect(await noteRow()).toEqual({ note: "Settled night. SDNN trend reviewed at 05:30.", version: 2 });
  });

  it("refuses a clinician of another unit in the service itself", async () => {
    const outsider = { ...other, grants: [{ unitId: (await db("units").where({ code: "2E" }).first("id"))!.id, role: "clinician" as const }] };
    expect(await saveHandoffNoteAs(outsider, input({ note: "Not my unit.", version: "2" }), db, LATER)).toMatchObject({ ok: false, code: "forbidden" });
    expect(await noteRow()).toEqual({ note: "Settled night. SDNN trend reviewed at 05:30.", version: 2 });
  });

  it("shows the note on the summary with its author and version", async () => {
    const h = await handoff(stayId, night);
    expect(h.note).toMatchObject({ note: "Settled night. SDNN trend reviewed at 05:30.", version: 2, updatedBy: other.name, night });
  });
});

describe("the saveHandoffNote action (app database, demo seed)", () => {
  const form = (fields: Record<string, string>) => {
    const fd = new FormData();
    for (const [k, v] of Object.entries(fields)) fd.append(k, v);
    return fd;
  };
  const as = (id: string | null) => {
    session.current = id ? { user: { id } } : null;
  };
  const notes = async () => Number((await appDb("handoff_notes").count({ n: "*" }).first())!.n);
  const fields = (note: string) => ({ stayId: "00000000-0000-4000-8000-000000000000", night: "2026-11-30", note, version: "0" });

  it("refuses the signed-out, a charge nurse (no handoff.write) and a note too long, writing no note", async () => {
    const before = await notes();
    as(null);
    expect(await saveHandoffNote(null, form(fields("Hello")))).toMatchObject({ ok: false, code: "unauthorized" });
    as((await appDb("users").where({ email: demoPerson("charge_nurse").email }).first("id"))!.id);
    expect(await saveHandoffNote(null, form(fields("Hello")))).toMatchObject({ ok: false, code: "forbidden" });
    as((await appDb("users").where({ email: demoPerson("clinician").email }).first("id"))!.id);
    const long = await saveHandoffNote(null, form(fields("y".repeat(HANDOFF_NOTE_MAX + 1))));
    expect(long).toMatchObject({ ok: false, code: "invalid_input", fieldErrors: { note: [expect.stringMatching(/2000 characters/)] } });
    expect(await notes()).toBe(before);
  });
});
