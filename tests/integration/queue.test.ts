// The Review queue on real PostgreSQL: the acknowledgement race (optimistic concurrency), every transition's history
// and audit, the refused transitions (including resolving while the condition holds), the escalation e-mail's
// minimum-necessary content, the queue's order, filters, waiting time against the unit's target and chart, and a
// recurrence after `resolved` as a new, linked flag. Flags are written directly for the demo stays (each field
// chosen), except the recurrence, which the flag evaluator raises from chosen windows.
import { randomBytes } from "node:crypto";
import type { Knex } from "knex";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Actor } from "@/lib/auth/guard";
import type { Role } from "@/lib/auth/roles";
import type { FlagState, IndexWindowInsert } from "@/lib/db/tables";
import { ALGORITHM_VERSION } from "@/lib/engine/version";
import { evaluateStayFlags } from "@/lib/flags/evaluate-stay";
import { saveRuleSetVersion } from "@/lib/flags/rule-sets";
import { acknowledgeSchema, escalateSchema, queueFiltersSchema, resolveSchema } from "@/lib/queue/queue.validation";
import { cliniciansOfUnit, reviewQueue } from "@/lib/queue/repository";
import { acknowledgeFlagAs, escalateFlagAs, resolveFlagAs } from "@/lib/queue/transitions";
import { seed } from "@/seeds/01_demo";
import { DEFAULT_RULE_SET, seedRuleSets } from "@/seeds/02_rule_sets";
import { demoPerson, DEMO_STAYS, DEMO_TIME_ZONE } from "@/seeds/demo-data";
import { scratchDatabase } from "@/tests/support/db";
import { makeTestStay } from "@/tests/support/stays";

const MIN = 60_000;
const HOUR = 3_600_000;

let db: Knex;
let cleanup: () => Promise<void>;
let unit4W: string;
let unit2E: string;
let ruleSet4W: { id: string; version: number };
let nurse: Actor;
let secondNurse: Actor;
let clinician: Actor;
let clinician2E: Actor;
let biomed: Actor;

const actor = (u: { id: string; email: string; name: string }, grants: { unitId: string; role: Role }[]): Actor => ({
  userId: u.id, email: u.email, name: u.name, grants, requestId: `req-queue-${randomBytes(3).toString("hex")}`, clientAddress: null,
});

async function person(name: string, unitId: string, role: Role): Promise<Actor> {
  const [u] = await db("users").insert({ email: `${role}-${randomBytes(3).toString("hex")}@test.example`, name, password_hash: "unused" }).returning(["id", "email", "name"]);
  await db("user_unit_roles").insert({ user_id: u!.id, unit_id: unitId, role, granted_by: null });
  return actor(u!, [{ unitId, role }]);
}

async function demoActor(role: Role, unitId: string): Promise<Actor> {
  const u = (await db("users").where({ email: demoPerson(role).email }).first("id", "email", "name"))!;
  return actor(u, [{ unitId, role }]);
}

/** The demo stay of a record number, with its bed. */
async function demoStay(recordNumber: string) {
  return (await db("stays as s").join("patients as p", "p.id", "s.patient_id").join("beds as b", "b.id", "s.bed_id")
    .where("p.record_number", recordNumber).first("s.id as stayId", "b.label as bedLabel", "p.display_name as displayName", "p.record_number as recordNumber"))!;
}

const SDNN_RULE = DEFAULT_RULE_SET.rules[1]!;
const ALPHA_RULE = DEFAULT_RULE_SET.rules[0]!;

/** A flag as the evaluator writes one (lib/flags/evaluate-stay.ts), with the fields a test chooses. */
async function insertFlag(stayId: string, o: {
  raisedAt: Date; severity?: "watch" | "review"; state?: FlagState; conditionTo?: Date | null; rule?: typeof SDNN_RULE; conditionFrom?: Date;
}, unit = { unitId: unit4W, ruleSet: ruleSet4W }) {
  const rule = o.rule ?? SDNN_RULE;
  const from = o.conditionFrom ?? new Date(o.raisedAt.getTime() - 15 * MIN);
  const [row] = await db("flags")
    .insert({
      stay_id: stayId, unit_id: unit.unitId, rule_set_id: unit.ruleSet.id, rule_set_version: unit.ruleSet.version, rule_id: rule.id,
      severity: o.severity ?? rule.severity, state: o.state ?? "open", condition_from: from, condition_to: o.conditionTo ?? null, raised_at: o.raisedAt,
      details: { rule, window_kind: "short", algorithm_version: ALGORITHM_VERSION, threshold: 20, trigger_windows: [{ start: from.toISOString(), end: new Date(from.getTime() + 5 * MIN).toISOString(), value: 12 }] },
    })
    .returning("*");
  return row!;
}

const count = async (table: "flag_events" | "audit_events" | "mail_outbox", where: Record<string, unknown> = {}) =>
  Number((await db(table).where(where).count<{ n: string }[]>("* as n"))[0]!.n);
const eventsOf = (flagId: string) => db("flag_events").where({ flag_id: flagId }).orderBy("id").select("*");
const auditsOf = (flagId: string) => db("audit_events").where({ target_type: "flag", target_id: flagId }).orderBy("seq").select("*");

const ack = (a: Actor, flagId: string, version: number, reason = "known_rhythm", note?: string) =>
  acknowledgeFlagAs(a, acknowledgeSchema.parse({ flagId, version: String(version), reason, note }), db);
const escalate = (a: Actor, flagId: string, version: number, recipientId: string, note?: string) =>
  escalateFlagAs(a, escalateSchema.parse({ flagId, version: String(version), recipientId, note }), db);
const resolve = (a: Actor, flagId: string, version: number) => resolveFlagAs(a, resolveSchema.parse({ flagId, version: String(version) }), db);

beforeAll(async () => {
  ({ db, cleanup } = await scratchDatabase());
  await seed(db);
  await seedRuleSets(db);
  unit4W = (await db("units").where({ code: "4W" }).first("id"))!.id;
  unit2E = (await db("units").where({ code: "2E" }).first("id"))!.id;
  ruleSet4W = (await db("rule_sets").where({ unit_id: unit4W }).first("id", "version"))!;
  nurse = await demoActor("charge_nurse", unit4W);
  secondNurse = await person("Avery Second-Nurse", unit4W, "charge_nurse");
  clinician = await demoActor("clinician", unit4W);
  clinician2E = await person("Dr. Neonatal Only", unit2E, "clinician");
  biomed = await demoActor("biomed", unit4W);
});
afterAll(async () => {
  await cleanup?.();
});

describe("the acknowledgement race", () => {
  it("lets exactly one of two nurses acknowledging the same version win; the other sees the new state and nothing of theirs is written (source: issue 6 item 2, optimistic concurrency)", async () => {
    const stay = await demoStay(DEMO_STAYS[0]!.recordNumber);
    const flag = await insertFlag(stay.stayId, { raisedAt: new Date(Date.now() - 20 * MIN) });
    const results = await Promise.all([ack(nurse, flag.id, 1, "known_rhythm"), ack(secondNurse, flag.id, 1, "artifact_or_poor_signal")]);
    const winners = results.filter((r) => r.ok);
    const losers = results.filter((r) => !r.ok);
    expect(winners).toHaveLength(1);
    expect(losers).toHaveLength(1);
    const winner = results[0]!.ok ? nurse : secondNurse;
    const loser = losers[0]!;
    expect(loser).toMatchObject({ ok: false, code: "conflict", current: { state: "acknowledged", version: 2, lastTransition: { to: "acknowledged", actorName: winner.name } } });
    // "<name> acknowledged this flag at HH:MM EST (reason: …) — here is its state now"
    expect(loser.message).toMatch(new RegExp(`^${winner.name} acknowledged this flag at \\d\\d:\\d\\d E[SD]T \\(reason: `));
    expect(loser.message).toMatch(/state now: acknowledged/);
    expect(await db("flags").where({ id: flag.id }).first("state", "version")).toEqual({ state: "acknowledged", version: 2 });
    const events = await eventsOf(flag.id);
    expect(events).toHaveLength(1);
    expect(events[0]).toMatchObject({ from_state: "open", to_state: "acknowledged", actor_id: winner.userId });
    const audits = await auditsOf(flag.id);
    expect(audits).toHaveLength(1);
    expect(audits[0]).toMatchObject({ action: "flag.acknowledge", actor_user_id: winner.userId, actor_role: "charge_nurse", unit_id: unit4W, outcome: "success" });
  });
});

describe("transitions", () => {
  it("writes a flag_events row and an audit entry with from → to for each step: open → acknowledged → escalated → resolved (source: GLOSSARY flag states; issue 6 item 2)", async () => {
    const stay = await demoStay(DEMO_STAYS[1]!.recordNumber);
    const flag = await insertFlag(stay.stayId, { raisedAt: new Date(Date.now() - 30 * MIN) });
    expect(await ack(nurse, flag.id, 1, "expected_clinical_context", "Sedation bolus at 01:50")).toMatchObject({ ok: true, data: { state: "acknowledged", version: 2 } });
    expect(await escalate(nurse, flag.id, 2, clinician.userId, "Please look at the trend")).toMatchObject({ ok: true, data: { state: "escalated", version: 3 } });
    // The condition ends (the evaluator sets condition_to), then the flag can be resolved.
    await db("flags").where({ id: flag.id }).update({ condition_to: new Date() });
    expect(await resolve(nurse, flag.id, 3)).toMatchObject({ ok: true, data: { state: "resolved", version: 4 } });

    const events = await eventsOf(flag.id);
    expect(events.map((e) => [e.from_state, e.to_state, e.reason, e.recipient_id, e.actor_id])).toEqual([
      ["open", "acknowledged", "expected_clinical_context", null, nurse.userId],
      ["acknowledged", "escalated", null, clinician.userId, nurse.userId],
      ["escalated", "resolved", null, null, nurse.userId],
    ]);
    expect(events[0]!.note).toBe("Sedation bolus at 01:50");
    const audits = await auditsOf(flag.id);
    expect(audits.map((a) => [a.action, (a.detail.before as { state: string }).state, (a.detail.after as { state: string }).state])).toEqual([
      ["flag.acknowledge", "open", "acknowledged"],
      ["flag.escalate", "acknowledged", "escalated"],
      ["flag.resolve", "escalated", "resolved"],
    ]);
    expect(audits[0]!.detail).toMatchObject({ reason: "expected_clinical_context", noteLength: "Sedation bolus at 01:50".length, stayId: stay.stayId });
    // The note's text lives in flag_events, not in the audit trail.
    expect(JSON.stringify(audits[0]!.detail)).not.toContain("Sedation");
    expect(audits[1]!.detail).toMatchObject({ recipientId: clinician.userId });
  });

  it("escalates an open flag directly (source: GLOSSARY: open/acknowledged → escalated)", async () => {
    const stay = await demoStay(DEMO_STAYS[2]!.recordNumber);
    const flag = await insertFlag(stay.stayId, { raisedAt: new Date(Date.now() - 5 * MIN) });
    expect(await escalate(nurse, flag.id, 1, clinician.userId)).toMatchObject({ ok: true, data: { state: "escalated", version: 2 } });
    expect((await eventsOf(flag.id)).map((e) => [e.from_state, e.to_state])).toEqual([["open", "escalated"]]);
  });

  it("refuses disallowed transitions and resolving while the condition holds, writing nothing (source: DOMAIN §1 'acknowledging is not silencing'; GLOSSARY states)", async () => {
    const stay = await demoStay(DEMO_STAYS[3]!.recordNumber);
    const open = await insertFlag(stay.stayId, { raisedAt: new Date(Date.now() - 10 * MIN), conditionTo: new Date() });
    const holding = await insertFlag(stay.stayId, { raisedAt: new Date(Date.now() - 9 * MIN), state: "acknowledged" });
    const escalated = await insertFlag(stay.stayId, { raisedAt: new Date(Date.now() - 8 * MIN), state: "escalated" });
    const before = { events: await count("flag_events"), audits: await count("audit_events"), mail: await count("mail_outbox") };

    const resolveOpen = await resolve(nurse, open.id, 1);
    expect(resolveOpen).toMatchObject({ ok: false, code: "conflict", current: { state: "open", version: 1 } });
    expect(resolveOpen.message).toMatch(/only a flag that is acknowledged or escalated can be resolved/);
    const ackEscalated = await ack(nurse, escalated.id, 1);
    expect(ackEscalated).toMatchObject({ ok: false, code: "conflict", current: { state: "escalated" } });
    const resolveHolding = await resolve(nurse, holding.id, 1);
    expect(resolveHolding).toMatchObject({ ok: false, code: "conflict", current: { state: "acknowledged", conditionTo: null } });
    expect(resolveHolding.message).toMatch(/condition still holds.*Acknowledging is not silencing/);
    const escalateEscalated = await escalate(nurse, escalated.id, 1, clinician.userId);
    expect(escalateEscalated).toMatchObject({ ok: false, code: "conflict" });
    // A stale version is refused too, even for an allowed state.
    expect(await ack(nurse, open.id, 7)).toMatchObject({ ok: false, code: "conflict" });

    expect({ events: await count("flag_events"), audits: await count("audit_events"), mail: await count("mail_outbox") }).toEqual(before);
    expect(await db("flags").whereIn("id", [open.id, holding.id, escalated.id]).orderBy("raised_at").select("state", "version")).toEqual([
      { state: "open", version: 1 }, { state: "acknowledged", version: 1 }, { state: "escalated", version: 1 },
    ]);
  });
});

describe("escalation", () => {
  it("enqueues exactly one e-mail to the clinician with bed, unit, rule and link — no patient name or record number (source: issue 6 item 3, HIPAA minimum necessary)", async () => {
    process.env.NEXTAUTH_URL = "http://127.0.0.1:3999";
    const stay = await demoStay(DEMO_STAYS[4]!.recordNumber);
    const flag = await insertFlag(stay.stayId, { raisedAt: new Date("2026-12-01T07:20:00Z"), conditionFrom: new Date("2026-12-01T07:05:00Z"), rule: ALPHA_RULE });
    const r = await escalate(nurse, flag.id, 1, clinician.userId, `Concerned about ${stay.displayName}`);
    expect(r.ok).toBe(true);
    const mails = await db("mail_outbox").where({ flag_id: flag.id }).select("*");
    expect(mails).toHaveLength(1);
    const m = mails[0]!;
    expect(m).toMatchObject({ kind: "escalation", to_address: demoPerson("clinician").email, dedupe_key: `escalation:${flag.id}:2`, status: "queued" });
    const all = `${m.subject}\n${m.body_text}`;
    expect(all).toContain(stay.bedLabel);
    expect(all).toContain("4 West Step-Down");
    expect(all).toContain(ALPHA_RULE.label);
    expect(m.body_text).toContain("Severity: review");
    // 07:05 UTC on 1 Dec 2026 is 02:05 EST in the demo zone (America/New_York, UTC−5 in winter).
    expect(m.body_text).toContain("Tue 1 Dec 2026, 02:05 EST");
    expect(m.body_text).toContain(`http://127.0.0.1:3999/stays/${stay.stayId}/window?start=${encodeURIComponent("2026-12-01T07:05:00.000Z")}`);
    expect(all).not.toContain(stay.displayName);
    expect(all).not.toContain(stay.displayName.split(",")[0]!);
    expect(all).not.toContain(stay.recordNumber);
  });

  it("refuses a recipient who is not a clinician, or a clinician of another unit, writing nothing (source: issue 6 item 2 'escalate to a clinician of the unit')", async () => {
    const stay = await demoStay(DEMO_STAYS[5]!.recordNumber);
    const flag = await insertFlag(stay.stayId, { raisedAt: new Date(Date.now() - 3 * MIN) });
    const before = { events: await count("flag_events"), audits: await count("audit_events"), mail: await count("mail_outbox") };
    for (const recipient of [biomed, clinician2E, secondNurse]) {
      const r = await escalate(nurse, flag.id, 1, recipient.userId);
      expect(r).toMatchObject({ ok: false, code: "invalid_input", fieldErrors: { recipientId: ["Choose an active clinician of 4 West Step-Down."] } });
    }
    expect({ events: await count("flag_events"), audits: await count("audit_events"), mail: await count("mail_outbox") }).toEqual(before);
    expect(await db("flags").where({ id: flag.id }).first("state", "version")).toEqual({ state: "open", version: 1 });
    // The escalation list offers exactly the unit's active clinicians.
    expect(await cliniciansOfUnit(unit4W, db)).toEqual([{ id: clinician.userId, name: clinician.name }]);
  });
});

describe("the queue", () => {
  let unitQ: string;
  let ruleSetQ: { id: string; version: number };
  let stays: { stayId: string; bedLabel: string }[];
  const NOW = new Date("2026-12-02T08:00:00Z");

  beforeAll(async () => {
    // A unit of its own, so the other tests' flags do not mix in; target 30 min (the migration's default).
    [{ id: unitQ }] = (await db("units").insert({ code: "QU", name: "Queue test unit", kind: "adult", time_zone: DEMO_TIME_ZONE }).returning("id")) as [{ id: string }];
    const rs = await db.transaction((trx) => saveRuleSetVersion(trx, { unitId: unitQ, name: "Queue test", document: DEFAULT_RULE_SET, audit: { actor: { userId: null, email: null, role: "system" }, requestId: "t", clientAddress: null } }));
    ruleSetQ = { id: rs.id, version: rs.version };
    stays = [];
    for (let i = 0; i < 2; i++) {
      const s = await makeTestStay(db, unitQ, new Date(NOW.getTime() - 24 * HOUR), new Date(NOW.getTime() + HOUR));
      const bed = await db("stays as s").join("beds as b", "b.id", "s.bed_id").where("s.id", s.stayId).first("b.label");
      stays.push({ stayId: s.stayId, bedLabel: bed!.label });
    }
  });

  const insertQ = (stayId: string, o: Parameters<typeof insertFlag>[1]) => insertFlag(stayId, o, { unitId: unitQ, ruleSet: ruleSetQ });

  it("lists open, acknowledged and escalated flags oldest first, with waiting minutes against the target, and filters by state, severity and bed (source: GLOSSARY 'Review queue'; issue 6 item 1)", async () => {
    const a = await insertQ(stays[0]!.stayId, { raisedAt: new Date(NOW.getTime() - 42 * MIN) }); // 42 min: 12 over a 30-min target
    const b = await insertQ(stays[1]!.stayId, { raisedAt: new Date(NOW.getTime() - 10 * MIN), rule: ALPHA_RULE }); // within
    const resolved = await insertQ(stays[0]!.stayId, { raisedAt: new Date(NOW.getTime() - 90 * MIN), state: "resolved", conditionTo: new Date(NOW.getTime() - 60 * MIN) });
    const c = await insertQ(stays[1]!.stayId, { raisedAt: new Date(NOW.getTime() - 60 * MIN), state: "acknowledged" });

    const q = (await reviewQueue(unitQ, queueFiltersSchema.parse({}), NOW, db))!;
    expect(q.unit).toMatchObject({ name: "Queue test unit", timeZone: DEMO_TIME_ZONE, ackTargetMinutes: 30 });
    expect(q.flags.map((f) => f.id)).toEqual([c.id, a.id, b.id]);
    expect(q.flags.map((f) => f.id)).not.toContain(resolved.id);
    const byId = new Map(q.flags.map((f) => [f.id, f]));
    expect(byId.get(a.id)).toMatchObject({ waitingMinutes: 42, overTarget: true, waitingStopped: false, bedLabel: stays[0]!.bedLabel, ruleLabel: SDNN_RULE.label, severity: "watch", displayName: "Test, Synthetic" });
    expect(byId.get(b.id)).toMatchObject({ waitingMinutes: 10, overTarget: false, severity: "review", index: "dfa_alpha1" });

    const only = async (filters: Record<string, string>) => (await reviewQueue(unitQ, queueFiltersSchema.parse(filters), NOW, db))!.flags.map((f) => f.id);
    expect(await only({ state: "acknowledged" })).toEqual([c.id]);
    expect(await only({ severity: "review" })).toEqual([b.id]);
    expect(await only({ bed: stays[0]!.bedLabel.toLowerCase() })).toEqual([a.id]);
    expect(await only({ state: "open", severity: "watch" })).toEqual([a.id]);
    expect(queueFiltersSchema.safeParse({ state: "resolved" }).success).toBe(false);
  });

  it("stops the waiting time at the first decision and shows the last transition (source: DOMAIN §1 time to acknowledge)", async () => {
    const raised = new Date(Date.now() - 50 * MIN);
    const f = await insertQ(stays[0]!.stayId, { raisedAt: raised });
    expect((await ack(nurse, f.id, 1, "reviewed_no_action")).ok).toBe(true);
    const at = (await db("flag_events").where({ flag_id: f.id }).first("at"))!.at as Date;
    const later = new Date(Date.now() + 5 * HOUR);
    const dto = (await reviewQueue(unitQ, queueFiltersSchema.parse({ state: "acknowledged" }), later, db))!.flags.find((x) => x.id === f.id)!;
    expect(dto).toMatchObject({ waitingStopped: true, waitingMinutes: Math.floor((at.getTime() - raised.getTime()) / MIN), overTarget: true, version: 2 });
    expect(dto.lastTransition).toMatchObject({ from: "open", to: "acknowledged", actorName: nurse.name, reason: "reviewed_no_action", note: null });
  });

  it("charts the rule's index over the flag's span ± 30 min, unusable windows as gaps, against the baseline (source: DOMAIN §5.7; issue 6 item 1)", async () => {
    const stayId = stays[1]!.stayId;
    const from = new Date(NOW.getTime() - 3 * HOUR);
    const f = await insertQ(stayId, { raisedAt: new Date(from.getTime() + 15 * MIN), conditionFrom: from, conditionTo: new Date(from.getTime() + 20 * MIN), state: "acknowledged" });
    // Windows every minute from 40 min before the condition to 60 min after its start; one unusable.
    const rows: IndexWindowInsert[] = [];
    for (let m = -40; m <= 60; m++) {
      const start = new Date(from.getTime() + m * MIN);
      rows.push({
        stay_id: stayId, kind: "short", window_start: start, window_end: new Date(start.getTime() + 5 * MIN), algorithm_version: ALGORITHM_VERSION,
        params_hash: "chosen-by-test", grade: m === 5 ? "unusable" : "good", quality: { coverage: 1 }, values: { sdnn: 40 + m }, reasons: {}, mse: null, baseline_delta: null, compute_run_id: null,
      });
    }
    await db("index_windows").insert(rows);
    await db("baselines").insert({ stay_id: stayId, index_key: "sdnn", algorithm_version: ALGORITHM_VERSION, median: 44, spread: 6, n_windows: 60, from_at: new Date(from.getTime() - 20 * HOUR), to_at: new Date(from.getTime() - 19 * HOUR) });

    const chart = (await reviewQueue(unitQ, queueFiltersSchema.parse({}), NOW, db))!.flags.find((x) => x.id === f.id)!.chart;
    // Span: condition_from − 30 min to condition_to + 30 min = [−30, +50] min; windows lying wholly inside start at
    // −30 … +45 min (76 windows), plotted at their ends.
    expect(chart.from).toBe(from.getTime() / 1000 - 30 * 60);
    expect(chart.to).toBe(from.getTime() / 1000 + 50 * 60);
    expect(chart.t).toHaveLength(76);
    expect(chart.t[0]).toBe(from.getTime() / 1000 - 25 * 60);
    expect(chart.v[0]).toBe(10);
    expect(chart.v[35]).toBeNull(); // the unusable window (m = 5) shows no value
    expect(chart.v[36]).toBe(46);
    expect(chart).toMatchObject({ key: "sdnn", baseline: { median: 44, spread: 6 }, threshold: 20, truncated: false });
  });

  it("shows a recurrence after `resolved` as a new flag linked to the old one (source: GLOSSARY flag vocabulary; DOMAIN §1 flag life cycle)", async () => {
    const stay = await makeTestStay(db, unitQ, new Date("2026-11-20T00:00:00Z"), new Date("2026-11-21T00:00:00Z"));
    const rs = await db.transaction((trx) => saveRuleSetVersion(trx, {
      unitId: unitQ, name: "Heart-rate test", document: {
        rules: [{ id: "hr-high", kind: "index", label: "Heart rate above 100/min for 10 minutes", index: "hr", comparison: { type: "above_value", value: 100 }, minDuration: { unit: "minutes", value: 10 }, severity: "watch", hysteresis: { margin: 5, clearWindows: 3 } }],
        maxFlagsPerNight: 6, nightStartsAt: "12:00",
      }, audit: { actor: { userId: null, email: null, role: "system" }, requestId: "t", clientAddress: null },
    }));
    const at = (m: number) => new Date(Date.parse("2026-11-20T06:00:00Z") + m * MIN);
    const put = async (fromMin: number, hr: number[]) => {
      await db("index_windows").insert(hr.map((v, i) => ({
        stay_id: stay.stayId, kind: "short" as const, window_start: at(fromMin + i), window_end: at(fromMin + i + 5), algorithm_version: ALGORITHM_VERSION,
        params_hash: "chosen-by-test", grade: "good" as const, quality: { coverage: 1 }, values: { hr: v }, reasons: {}, mse: null, baseline_delta: null, compute_run_id: null,
      })));
      return db.transaction((trx) => evaluateStayFlags(trx, {
        stayId: stay.stayId, unitId: unitQ, timeZone: DEMO_TIME_ZONE, algorithmVersion: ALGORITHM_VERSION, ruleSet: rs,
        newFrom: { short: at(fromMin), long: null }, judgedUpTo: { short: null, long: null },
      }));
    };
    const episode = [...Array(8).fill(110), ...Array(4).fill(90)] as number[];
    const first = await put(0, episode);
    expect(first.raised).toHaveLength(1);
    const old = first.raised[0]!;
    expect((await ack(nurse, old, 1)).ok).toBe(true);
    expect((await resolve(nurse, old, 2)).ok).toBe(true);
    const again = await put(30, episode);
    expect(again.raised).toHaveLength(1);
    const q = (await reviewQueue(unitQ, queueFiltersSchema.parse({ bed: (await db("beds as b").join("stays as s", "s.bed_id", "b.id").where("s.id", stay.stayId).first("b.label"))!.label }), NOW, db))!;
    expect(q.flags.map((f) => f.id)).toEqual([again.raised[0]]);
    expect(q.flags[0]!.previous).toMatchObject({ id: old, state: "resolved" });
  });
});
