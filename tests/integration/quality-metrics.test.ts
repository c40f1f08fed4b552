// Quality metrics on real PostgreSQL: flags, their first acknowledgement or escalation, stays, short windows and mail
// written with chosen times in a fresh database, and every figure checked against values worked by hand. Medians and
// 90th percentiles are checked against R's quantile() (type 7, R's default; Hyndman & Fan 1996), whose values for
// these samples are given beside each check (R 4.2.2: quantile(c(...), c(.5, .9))). The ranges are local dates in
// America/New_York and include both DST changes of 2026 (a 23-h and a 25-h day; tz database).
import { parse } from "csv-parse/sync";
import type { Knex } from "knex";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Grant } from "@/lib/auth/roles";
import { ALGORITHM_VERSION } from "@/lib/engine/version";
import { CSV_COLUMNS, metricsCsv } from "@/lib/quality/export-csv";
import { qualityMetrics, type QualityMetricsDTO } from "@/lib/quality/metrics";
import { qualityFilterSchema } from "@/lib/quality/quality.validation";
import { verifyAuditChain } from "@/lib/audit/verify";
import { seed } from "@/seeds/01_demo";
import { seedRuleSets } from "@/seeds/02_rule_sets";
import { seedQualityHistory } from "@/seeds/04_quality_history";
import { demoPerson } from "@/seeds/demo-data";
import { scratchDatabase } from "@/tests/support/db";

const MIN = 60_000;
const HOUR = 3_600_000;
/** Figures are sums and divisions of a few numbers in float8: equal to 1e-9 or the SQL went wrong. */
const FLOAT_DIGITS = 9;

let db: Knex;
let cleanup: () => Promise<void>;
let unitA: string;
let unitB: string;
let unitX: string;
/** The quality officer: quality in A and B, not X (X holds a flag that would change every total). */
let grants: Grant[];

const at = (iso: string) => new Date(iso);
const plus = (d: Date, ms: number) => new Date(d.getTime() + ms);

let beds = 0;
async function stay(unitId: string, admitted: string, discharged: string | null): Promise<string> {
  beds += 1;
  const [bed] = await db("beds").insert({ unit_id: unitId, label: `Q-${beds}`, sort_order: beds, active: true }).returning("id");
  const [patient] = await db("patients").insert({ record_number: `QM-${beds}`, display_name: "Test, Synthetic", birth_date: null }).returning("id");
  const [s] = await db("stays").insert({ patient_id: patient!.id, bed_id: bed!.id, admitted_at: at(admitted), discharged_at: discharged ? at(discharged) : null }).returning("id");
  return s!.id;
}

async function unit(code: string, name: string, timeZone: string, ackTarget: number): Promise<string> {
  const [u] = await db("units").insert({ code, name, kind: "adult", time_zone: timeZone }).returning("id");
  await db("units").where({ id: u!.id }).update({ ack_target_minutes: ackTarget, remind_after_minutes: ackTarget, escalate_after_minutes: 2 * ackTarget });
  await db("rule_sets").insert({ unit_id: u!.id, version: 1, name: "test", rules: JSON.stringify({ rules: [] }), created_by: null });
  return u!.id;
}

/** A flag raised at `raised`; `firstMin` minutes later its first decision (acknowledge unless `escalate`), if any. */
async function flag(unitId: string, stayId: string, severity: "watch" | "review", raised: string, firstMin: number | null, escalate = false): Promise<string> {
  const rs = (await db("rule_sets").where({ unit_id: unitId }).first("id", "version"))!;
  const r = at(raised);
  const [f] = await db("flags")
    .insert({ stay_id: stayId, unit_id: unitId, rule_set_id: rs.id, rule_set_version: rs.version, rule_id: "test-rule", severity, condition_from: plus(r, -15 * MIN), condition_to: null, raised_at: r, state: firstMin === null ? "open" : escalate ? "escalated" : "acknowledged" })
    .returning("id");
  if (firstMin !== null) {
    const to = escalate ? "escalated" : "acknowledged";
    await db("flag_events").insert({ flag_id: f!.id, from_state: "open", to_state: to, reason: escalate ? null : "reviewed_no_action", note: null, recipient_id: null, actor_id: null, at: plus(r, firstMin * MIN) });
    // A later transition must not count as the first.
    await db("flag_events").insert({ flag_id: f!.id, from_state: to, to_state: "resolved", reason: null, note: null, recipient_id: null, actor_id: null, at: plus(r, (firstMin + 90) * MIN) });
  }
  return f!.id;
}

/** Short windows of a stay, one a minute from `from` for `count` minutes. */
async function windows(stayId: string, from: string, count: number, grade: "good" | "limited" | "unusable", o: { kind?: "short" | "long"; version?: string } = {}) {
  const rows = Array.from({ length: count }, (_, i) => {
    const start = plus(at(from), i * MIN);
    return {
      stay_id: stayId, kind: o.kind ?? "short", window_start: start, window_end: plus(start, o.kind === "long" ? HOUR : 5 * MIN), algorithm_version: o.version ?? ALGORITHM_VERSION,
      params_hash: "test", grade, quality: JSON.stringify({ coverage: grade === "unusable" ? 0.2 : 0.99 }), values: grade === "unusable" ? null : JSON.stringify({ sdnn: 40 }),
    };
  });
  for (let i = 0; i < rows.length; i += 1000) await db("index_windows").insert(rows.slice(i, i + 1000) as never);
}

async function mail(flagId: string, kind: "reminder" | "reminder_escalation" | "escalation", created: string, status: "queued" | "sent" | "failed") {
  await db.raw(
    `INSERT INTO mail_outbox (kind, to_address, subject, body_text, dedupe_key, flag_id, status, created_at, sent_at) VALUES (?, 'x@test.example', 's', 'b', ?, ?, ?, ?, ?)`,
    [kind, `${kind}:${flagId}:${created}:${Math.random()}`, flagId, status, at(created), status === "sent" ? plus(at(created), MIN) : null],
  );
}

const RANGE = { from: "2026-03-07", to: "2026-03-08" };
/** Long after the range: every flag has had its chance (all still waiting are past the target). */
const LATER = at("2026-03-20T12:00:00Z");
/** 23:50 EDT on the range's last day: one watch flag has waited 10 min, under the 30-min target. */
const DURING = at("2026-03-09T03:50:00Z");

const metrics = async (filter: Record<string, string | undefined>, now: Date, g: Grant[] = grants): Promise<QualityMetricsDTO> => {
  const m = await qualityMetrics(g, qualityFilterSchema.parse(filter), now, db);
  expect(m).not.toBeNull();
  return m!;
};

beforeAll(async () => {
  ({ db, cleanup } = await scratchDatabase());
  unitA = await unit("QA", "Quality A", "America/New_York", 30);
  // A name with a comma and quotes, for the CSV's quoting.
  unitB = await unit("QB", 'Quality "B", annex', "UTC", 30);
  unitX = await unit("QX", "Outside scope", "America/New_York", 30);
  grants = [{ unitId: unitA, role: "quality" }, { unitId: unitB, role: "quality" }, { unitId: unitX, role: "clinician" }];

  // Unit A, range 2026-03-07..08 in America/New_York = [2026-03-07T05:00Z, 2026-03-09T04:00Z): 24 h + 23 h (spring forward).
  const s1 = await stay(unitA, "2026-03-06T00:00:00Z", "2026-03-10T00:00:00Z"); // over both edges: 47 h (24 + 23)
  const s2 = await stay(unitA, "2026-03-08T10:00:00Z", "2026-03-08T22:00:00Z"); // 12 h on day 2
  const s3 = await stay(unitA, "2026-03-08T22:00:00Z", null); // still admitted: 6 h to the range end (5 h 50 min to DURING)

  // Review flags: first decision after 2, 4 (an escalation), 7, 11, 30 (exactly the target) and 31 min.
  const r2 = await flag(unitA, s1, "review", "2026-03-07T12:00:00Z", 4, true);
  await flag(unitA, s1, "review", "2026-03-07T10:00:00Z", 2);
  await flag(unitA, s1, "review", "2026-03-07T20:00:00Z", 7);
  await flag(unitA, s1, "review", "2026-03-08T06:00:00Z", 11); // 01:00 EST on day 2
  await flag(unitA, s2, "review", "2026-03-08T15:00:00Z", 30);
  await flag(unitA, s2, "review", "2026-03-08T16:00:00Z", 31);
  // Watch flags: 10 and 45 min; one never acknowledged (long past the target), one raised 10 min before DURING.
  await flag(unitA, s1, "watch", "2026-03-07T08:00:00Z", 10);
  await flag(unitA, s1, "watch", "2026-03-08T13:00:00Z", 45);
  const w3 = await flag(unitA, s1, "watch", "2026-03-08T18:00:00Z", null);
  const w4 = await flag(unitA, s3, "watch", "2026-03-09T03:40:00Z", null);
  // Just outside the range at both edges (half-open: 00:00 of the first day in, 00:00 after the last day out).
  const e1 = await flag(unitA, s1, "watch", "2026-03-07T04:59:59Z", 1);
  await flag(unitA, s1, "watch", "2026-03-09T04:00:00Z", 1);

  // Windows. s2: 716 expected (10:00 to 21:55 UTC, each 5-min window ending by the discharge): 360 good + 60 limited
  // usable, 60 unusable, the rest missing. s1: in range only the first and last minute; one just before the range,
  // one at its end, a long window and another algorithm version do not count.
  await windows(s2, "2026-03-08T10:00:00Z", 360, "good");
  await windows(s2, "2026-03-08T16:00:00Z", 60, "unusable");
  await windows(s2, "2026-03-08T17:00:00Z", 60, "limited");
  await windows(s1, "2026-03-07T04:59:00Z", 2, "good"); // 04:59 (out), 05:00 (in, day 1)
  await windows(s1, "2026-03-09T03:59:00Z", 2, "good"); // 03:59 (in, day 2), 04:00 (out)
  await windows(s1, "2026-03-07T06:00:00Z", 1, "good", { kind: "long" });
  await windows(s1, "2026-03-07T07:00:00Z", 1, "good", { version: "0.0.0-old" });

  // Mail for A's flags: two reminders sent and one queued (watch), a reminder escalation that failed (watch), an
  // escalation e-mail sent (review); one reminder before the range.
  await mail(w3, "reminder", "2026-03-08T18:31:00Z", "sent");
  await mail(w3, "reminder", "2026-03-08T18:31:00Z", "sent");
  await mail(w4, "reminder", "2026-03-09T03:45:00Z", "queued");
  await mail(w3, "reminder_escalation", "2026-03-08T19:01:00Z", "failed");
  await mail(r2, "escalation", "2026-03-07T12:04:00Z", "sent");
  await mail(e1, "reminder", "2026-03-06T12:00:00Z", "sent");

  // Unit B (UTC, in scope): one review flag acknowledged after 20 min, no stays.
  const sb = await stay(unitB, "2026-02-01T00:00:00Z", "2026-02-02T00:00:00Z"); // long before the range
  await flag(unitB, sb, "review", "2026-03-07T03:00:00Z", 20);

  // Unit X (outside the reader's quality scope): a stay and a slow flag that would shift every total.
  const sx = await stay(unitX, "2026-03-01T00:00:00Z", null);
  const fx = await flag(unitX, sx, "review", "2026-03-07T12:00:00Z", 1000);
  await mail(fx, "reminder", "2026-03-07T12:31:00Z", "sent");
  await windows(sx, "2026-03-07T12:00:00Z", 30, "unusable");

  // The fall-back day: 2026-11-01 in America/New_York is 25 h ([04:00Z, 05:00Z next day)).
  await stay(unitA, "2026-10-31T00:00:00Z", "2026-11-03T00:00:00Z");
});
afterAll(async () => {
  await cleanup?.();
});

describe("time to acknowledge", () => {
  it("gives count, median and 90th percentile (type 7) by unit and severity, first acknowledge or escalate only", async () => {
    const m = await metrics(RANGE, LATER);
    const a = m.units.find((u) => u.unit.id === unitA)!;
    // review waits 2, 4, 7, 11, 30, 31 → R: 9.0, 30.5 (type 6 would give 31 for the 90th: the definition matters)
    expect(a.ack.review).toMatchObject({ raised: 6, acknowledged: 6, unacknowledged: 0, withinTarget: 5, decided: 6 });
    expect(a.ack.review.medianMin).toBeCloseTo(9, FLOAT_DIGITS);
    expect(a.ack.review.p90Min).toBeCloseTo(30.5, FLOAT_DIGITS);
    // watch waits 10, 45 → R: 27.5, 41.5; two still unacknowledged, both past the target
    expect(a.ack.watch).toMatchObject({ raised: 4, acknowledged: 2, unacknowledged: 2, withinTarget: 1, decided: 4 });
    expect(a.ack.watch.medianMin).toBeCloseTo(27.5, FLOAT_DIGITS);
    expect(a.ack.watch.p90Min).toBeCloseTo(41.5, FLOAT_DIGITS);
    expect(a.ack.watch.shareWithinTarget).toBeCloseTo(1 / 4, FLOAT_DIGITS);
    // all: 2, 4, 7, 10, 11, 30, 31, 45 → R: 10.5, 35.2
    expect(a.ack.all).toMatchObject({ raised: 10, acknowledged: 8, unacknowledged: 2, withinTarget: 6, decided: 10 });
    expect(a.ack.all.medianMin).toBeCloseTo(10.5, FLOAT_DIGITS);
    expect(a.ack.all.p90Min).toBeCloseTo(35.2, FLOAT_DIGITS);
    expect(a.ack.all.shareWithinTarget).toBeCloseTo(6 / 10, FLOAT_DIGITS);
  });

  it("counts a wait of exactly the target as within it, one minute more as not (≤ target)", async () => {
    const m = await metrics(RANGE, LATER);
    const a = m.units.find((u) => u.unit.id === unitA)!;
    // 2, 4, 7, 11 and 30 are within 30 min; 31 is not.
    expect(a.ack.review.shareWithinTarget).toBeCloseTo(5 / 6, FLOAT_DIGITS);
  });

  it("leaves a flag still waiting under the target out of the share until its outcome is known", async () => {
    const m = await metrics(RANGE, DURING);
    const a = m.units.find((u) => u.unit.id === unitA)!;
    // W4 has waited 10 min of 30: undecided. W3 (5 h 50 min) has missed it.
    expect(a.ack.watch).toMatchObject({ raised: 4, acknowledged: 2, unacknowledged: 2, withinTarget: 1, decided: 3 });
    expect(a.ack.watch.shareWithinTarget).toBeCloseTo(1 / 3, FLOAT_DIGITS);
  });

  it("gives each local day its own median and 90th percentile, the 23-h DST day included", async () => {
    const m = await metrics(RANGE, LATER);
    const a = m.units.find((u) => u.unit.id === unitA)!;
    expect(a.days.map((d) => [d.date, d.hours])).toEqual([["2026-03-07", 24], ["2026-03-08", 23]]);
    const [d1, d2] = a.days;
    // day 1: 2, 4, 7, 10 → R: 5.5, 9.1; day 2: 11, 30, 31, 45 → R: 30.5, 40.8 (the flag at 01:00 EST belongs to day 2)
    expect(d1!.ack).toMatchObject({ raised: 4, acknowledged: 4 });
    expect(d1!.ack.medianMin).toBeCloseTo(5.5, FLOAT_DIGITS);
    expect(d1!.ack.p90Min).toBeCloseTo(9.1, FLOAT_DIGITS);
    expect(d2!.ack).toMatchObject({ raised: 6, acknowledged: 4 });
    expect(d2!.ack.medianMin).toBeCloseTo(30.5, FLOAT_DIGITS);
    expect(d2!.ack.p90Min).toBeCloseTo(40.8, FLOAT_DIGITS);
  });

  it("adds every unit in scope, each over its own local range, and leaves out a unit outside it", async () => {
    const m = await metrics(RANGE, LATER);
    expect(m.units.map((u) => u.unit.code).sort()).toEqual(["QA", "QB"]);
    const b = m.units.find((u) => u.unit.id === unitB)!;
    // B is in UTC: its range is [2026-03-07T00:00Z, 2026-03-09T00:00Z), so its flag at 03:00Z counts (A's would not).
    expect([b.from, b.to, b.hours]).toEqual(["2026-03-07T00:00:00.000Z", "2026-03-09T00:00:00.000Z", 48]);
    expect(b.ack.review).toMatchObject({ raised: 1, acknowledged: 1, medianMin: 20, p90Min: 20 });
    // all units: 2, 4, 7, 10, 11, 20, 30, 31, 45 → R: 11.0, 33.8; review: 2, 4, 7, 11, 20, 30, 31 → R: 11.0, 30.4
    expect(m.overall.ack.all).toMatchObject({ raised: 11, acknowledged: 9, unacknowledged: 2, withinTarget: 7, decided: 11 });
    expect(m.overall.ack.all.medianMin).toBeCloseTo(11, FLOAT_DIGITS);
    expect(m.overall.ack.all.p90Min).toBeCloseTo(33.8, FLOAT_DIGITS);
    expect(m.overall.ack.review.medianMin).toBeCloseTo(11, FLOAT_DIGITS);
    expect(m.overall.ack.review.p90Min).toBeCloseTo(30.4, FLOAT_DIGITS);
  });

  it("refuses a unit outside the reader's scope, and a reader with no metrics.view anywhere", async () => {
    expect(await qualityMetrics(grants, qualityFilterSchema.parse({ ...RANGE, unit: unitX }), LATER, db)).toBeNull();
    expect(await qualityMetrics([{ unitId: unitA, role: "admin" }], qualityFilterSchema.parse(RANGE), LATER, db)).toBeNull();
    const onlyA = await metrics({ ...RANGE, unit: unitA }, LATER);
    expect(onlyA.units.map((u) => u.unit.id)).toEqual([unitA]);
    expect(onlyA.overall.ack.all.raised).toBe(10);
  });
});

describe("flags per 100 patient-hours", () => {
  it("divides the flags raised by the stays' overlap with the range, clipped at both edges and at now", async () => {
    const m = await metrics(RANGE, LATER);
    const a = m.units.find((u) => u.unit.id === unitA)!;
    // 47 h (s1, over both edges) + 12 h (s2) + 6 h (s3, still admitted) = 65 h
    expect(a.coverage.patientHours).toBeCloseTo(65, FLOAT_DIGITS);
    expect(a.burden.all.per100PatientHours).toBeCloseTo((100 * 10) / 65, FLOAT_DIGITS);
    expect(a.burden.review.per100PatientHours).toBeCloseTo((100 * 6) / 65, FLOAT_DIGITS);
    expect(a.burden.watch.per100PatientHours).toBeCloseTo((100 * 4) / 65, FLOAT_DIGITS);
    // by day: 24 h with 4 flags; 23 + 12 + 6 = 41 h with 6
    expect(a.days[0]!.burden.per100PatientHours).toBeCloseTo((100 * 4) / 24, FLOAT_DIGITS);
    expect(a.days[1]!.coverage.patientHours).toBeCloseTo(41, FLOAT_DIGITS);
    expect(a.days[1]!.burden.per100PatientHours).toBeCloseTo((100 * 6) / 41, FLOAT_DIGITS);
    // B has no stay time in the range: no rate rather than an infinite one
    const b = m.units.find((u) => u.unit.id === unitB)!;
    expect(b.burden.all).toEqual({ flags: 1, per100PatientHours: null });
    expect(m.overall.burden.all.per100PatientHours).toBeCloseTo((100 * 11) / 65, FLOAT_DIGITS);
  });

  it("counts the patient-hours of a stay still admitted only up to now", async () => {
    const m = await metrics(RANGE, DURING);
    const a = m.units.find((u) => u.unit.id === unitA)!;
    // s1 to 03:50Z: 47 h − 10 min; s2: 12 h; s3 22:00Z → 03:50Z: 5 h 50 min
    expect(a.coverage.patientHours).toBeCloseTo(47 - 1 / 6 + 12 + 35 / 6, FLOAT_DIGITS);
  });

  it("measures the 25-h fall-back day as 25 patient-hours and 1500 expected windows a stay", async () => {
    const m = await metrics({ from: "2026-11-01", to: "2026-11-01", unit: unitA }, at("2026-12-01T00:00:00Z"));
    const a = m.units[0]!;
    expect([a.from, a.to, a.hours]).toEqual(["2026-11-01T04:00:00.000Z", "2026-11-02T05:00:00.000Z", 25]);
    // Two stays cover the whole day: the one from 31 October to 3 November, and s3 (admitted in March, still there).
    expect(a.coverage.patientHours).toBeCloseTo(2 * 25, FLOAT_DIGITS);
    expect(a.coverage.expectedWindows).toBe(2 * 25 * 60);
    expect(a.coverage.coverage).toBe(0);
  });
});

describe("data coverage and unusable windows", () => {
  it("divides usable short windows by the windows the stays' time could hold", async () => {
    const m = await metrics(RANGE, LATER);
    const a = m.units.find((u) => u.unit.id === unitA)!;
    // expected: s1 47 × 60 = 2820; s2 716 (10:00 to 21:55); s3 6 × 60 = 360 → 3896
    expect(a.coverage).toMatchObject({ expectedWindows: 3896, usableWindows: 422, unusableWindows: 60 });
    expect(a.coverage.coverage).toBeCloseTo(422 / 3896, FLOAT_DIGITS);
    expect(a.coverage.unusableShare).toBeCloseTo(60 / 482, FLOAT_DIGITS);
    expect(a.days[0]!.coverage).toMatchObject({ expectedWindows: 1440, usableWindows: 1 });
    expect(a.days[1]!.coverage).toMatchObject({ expectedWindows: 23 * 60 + 716 + 360, usableWindows: 421 });
    // Unit X's unusable windows stay out of every total.
    expect(m.overall.coverage).toMatchObject({ expectedWindows: 3896, usableWindows: 422, unusableWindows: 60 });
  });
});

describe("reminders and escalations", () => {
  it("counts mail by kind (sent, not delivered) and escalations recorded on flags, by severity", async () => {
    const m = await metrics(RANGE, LATER);
    const a = m.units.find((u) => u.unit.id === unitA)!;
    expect(a.messages.watch.mail).toEqual({ reminder: { sent: 2, notDelivered: 1 }, reminder_escalation: { sent: 0, notDelivered: 1 }, escalation: { sent: 0, notDelivered: 0 } });
    expect(a.messages.review).toEqual({ mail: { reminder: { sent: 0, notDelivered: 0 }, reminder_escalation: { sent: 0, notDelivered: 0 }, escalation: { sent: 1, notDelivered: 0 } }, escalated: 1 });
    expect(a.messages.all.mail.reminder).toEqual({ sent: 2, notDelivered: 1 });
    expect(a.messages.all.escalated).toBe(1);
    // X's reminder is not counted.
    expect(m.overall.messages.all.mail.reminder).toEqual({ sent: 2, notDelivered: 1 });
  });
});

describe("the filter", () => {
  it("defaults to the last 7 complete local days and rejects a half or reversed range", async () => {
    const m = await metrics({ unit: unitA }, at("2026-03-09T03:00:00Z")); // 22:00 EST on 8 March: today is the 8th
    expect([m.filter.from, m.filter.to, m.defaulted]).toEqual(["2026-03-01", "2026-03-07", true]);
    expect(qualityFilterSchema.safeParse({ from: "2026-03-07" }).success).toBe(false);
    expect(qualityFilterSchema.safeParse({ from: "2026-03-08", to: "2026-03-07" }).success).toBe(false);
    expect(qualityFilterSchema.safeParse({ from: "2026-02-30", to: "2026-03-07" }).success).toBe(false);
    expect(qualityFilterSchema.safeParse({ from: "2025-01-01", to: "2026-03-07" }).success).toBe(false);
    expect(qualityFilterSchema.safeParse({ unit: "not-a-uuid" }).success).toBe(false);
  });
});

describe("the CSV export", () => {
  it("parses back (csv-parse, RFC 4180) to the same figures, with a quoted unit name", async () => {
    const m = await metrics(RANGE, LATER);
    const text = metricsCsv(m);
    expect(text).toContain('"Quality ""B"", annex"');
    const rows = parse(text, { columns: true, record_delimiter: "\r\n", skip_empty_lines: true }) as Record<string, string>[];
    expect(Object.keys(rows[0]!)).toEqual([...CSV_COLUMNS]);
    const value = (unitCode: string, period: string, severity: string, metric: string, date?: string) =>
      rows.filter((r) => r.unit_code === unitCode && r.period === period && r.severity === severity && r.metric === metric && (date === undefined || r.first_local_date === date));
    expect(value("QA", "range", "review", "time_to_acknowledge_p90")).toEqual([expect.objectContaining({ value: "30.5", measure: "minutes", start_utc: "2026-03-07T05:00:00.000Z", end_utc: "2026-03-09T04:00:00.000Z", time_zone: "America/New_York" })]);
    expect(Number(value("QA", "range", "all", "coverage")[0]!.value)).toBeCloseTo(422 / 3896, 6);
    expect(value("QB", "range", "review", "flags_raised")[0]).toMatchObject({ unit_name: 'Quality "B", annex', value: "1" });
    expect(value("QB", "range", "all", "flags_per_100_patient_hours")[0]!.value).toBe("");
    expect(value("QA", "day", "all", "period_hours", "2026-03-08")[0]!.value).toBe("23");
    expect(value("ALL", "range", "all", "time_to_acknowledge_median")[0]!.value).toBe("11");
    expect(rows.some((r) => r.unit_code === "QX")).toBe(false);
  });
});

describe("the demo's invented history", () => {
  it("fills the default last 7 days of 4 West once, all resolved, and a second run adds nothing", async () => {
    await seed(db);
    await seedRuleSets(db);
    const first = await seedQualityHistory(db);
    expect(first.inserted).toBeGreaterThan(15);
    expect((await seedQualityHistory(db)).inserted).toBe(0);
    const history = await db("flags").whereRaw(`details @> '{"demo_history": true}'::jsonb`).select("state", "raised_at");
    expect(history).toHaveLength(first.inserted);
    // None open (the queue, reminders and the live evaluator never pick them up), none from the last local noon on.
    expect(history.every((f) => f.state === "resolved")).toBe(true);

    const officer = (await db("users").where({ email: demoPerson("quality").email }).first("id"))!;
    const officerGrants = (await db("user_unit_roles").where({ user_id: officer.id }).select("unit_id", "role")).map((g) => ({ unitId: g.unit_id, role: g.role }));
    const m = await metrics({}, new Date(), officerGrants);
    const west = m.units.find((u) => u.unit.code === "4W")!;
    expect(west.ack.all.raised).toBe(first.inserted);
    expect(west.ack.all.medianMin).not.toBeNull();
    expect(west.messages.all.mail.reminder.sent).toBeGreaterThan(0);
    expect((await verifyAuditChain({}, db)).ok).toBe(true);
  });
});
