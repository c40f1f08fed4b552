// Audit trail search and exports on real PostgreSQL: CSV as RFC 4180 (parsed back with csv-parse, and every row's hash
// recomputed from the parsed fields as an outside verifier would), FHIR R4 AuditEvent elements and codes, the
// manifest against node:crypto over the bytes received, the export's own audit entry, the filters (a time range across
// both US daylight-saving changes in America/New_York, action prefix, device, stay and patient, scope) and keyset
// pagination while entries are appended. Entries are written through the one writer (lib/audit/record.ts) with the
// clock set to chosen instants.
import { createHash } from "node:crypto";
import type { Knex } from "knex";
import { parse } from "csv-parse/sync";
import type { AuditEvent } from "fhir/r4";
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { auditFilterSchema, type AuditFilter } from "@/lib/audit/audit.validation";
import { chainHash, type ChainedFields } from "@/lib/audit/chain";
import { CSV_COLUMNS } from "@/lib/audit/export/csv";
import { ACTION_CODE_SYSTEM } from "@/lib/audit/export/fhir";
import { listOwnExports } from "@/lib/audit/export/manifest";
import { BATCH_ROWS, startAuditExport, type ExportActor } from "@/lib/audit/export/run";
import { recordAudit, type AuditEntry } from "@/lib/audit/record";
import { auditEventDetail, resolveAuditFilter, searchAuditEvents, type AuditScope } from "@/lib/audit/repository";
import { scratchDatabase } from "@/tests/support/db";

const NY = "America/New_York";
let db: Knex;
let cleanup: () => Promise<void>;
let unitA: string;
let unitB: string;
let reader: ExportActor;
let scope: AuditScope;
let stay1: string;
let stay2: string;
let otherStay: string;
let deviceId: string;
let otherDeviceId: string;

const entry = (action: string, extra: Partial<AuditEntry> = {}): AuditEntry => ({
  actor: { userId: null, email: "charge@larkspur.example", role: "charge_nurse" },
  action,
  outcome: "success",
  detail: {},
  requestId: "req-export-test",
  clientAddress: "127.0.0.1",
  ...extra,
});

/** Appends through the one writer; with `at`, the server clock reads that instant while the entry is written. */
async function append(e: AuditEntry, at?: string) {
  if (at) {
    vi.useFakeTimers({ toFake: ["Date"] });
    vi.setSystemTime(new Date(at));
  }
  try {
    return await db.transaction((trx) => recordAudit(e, trx));
  } finally {
    if (at) vi.useRealTimers();
  }
}

const filter = (f: Partial<AuditFilter>): AuditFilter => auditFilterSchema.parse(f);

async function exportAll(format: "csv" | "fhir-ndjson", f: Partial<AuditFilter>) {
  const res = await startAuditExport({ format, filter: filter(f), actor: reader, scope }, db);
  if (!res.ok) throw new Error(res.message);
  const bytes = Buffer.from(await new Response(res.started.body).arrayBuffer());
  const manifest = await db("audit_exports").where({ id: res.started.exportId }).first();
  return { ...res.started, bytes, manifest };
}

/** Every seq a filter finds, through the search (pages of 100). */
async function searchSeqs(f: Partial<AuditFilter>): Promise<number[]> {
  const resolved = await resolveAuditFilter(filter(f), db);
  if (!resolved.ok) throw new Error(resolved.message);
  const out: number[] = [];
  let before: string | undefined;
  for (;;) {
    const page = await searchAuditEvents(resolved, scope, { before, size: 100 }, db);
    out.push(...page.events.map((e) => Number(e.seq)));
    if (!page.older) return out;
    before = page.older;
  }
}

beforeAll(async () => {
  ({ db, cleanup } = await scratchDatabase());
  [unitA, unitB] = (
    await db("units")
      .insert([
        { code: "EXA", name: "Export unit A (fictional)", kind: "adult", time_zone: NY },
        { code: "EXB", name: "Export unit B (fictional)", kind: "adult", time_zone: NY },
      ])
      .returning("id")
  ).map((r) => r.id) as [string, string];
  const [user] = await db("users").insert({ email: "quality.export@larkspur.example", name: "Quality Export", password_hash: "unused" }).returning("id");
  reader = { userId: user!.id, email: "quality.export@larkspur.example", grants: [{ unitId: unitA, role: "quality" }], requestId: "req-reader", clientAddress: "127.0.0.1" };
  scope = { unitIds: [unitA] };
  const [bed] = await db("beds").insert({ unit_id: unitA, label: "EX-1", sort_order: 1, active: true }).returning("id");
  const [p1, p2] = await db("patients")
    .insert([
      { record_number: "EXP-0001", display_name: "Test Patient One (fictional)", birth_date: null },
      { record_number: "EXP-0002", display_name: "Test Patient Two (fictional)", birth_date: null },
    ])
    .returning("id");
  [stay1, stay2, otherStay] = (
    await db("stays")
      .insert([
        { patient_id: p1!.id, bed_id: bed!.id, admitted_at: new Date("2026-10-01T00:00:00Z"), discharged_at: new Date("2026-10-05T00:00:00Z") },
        { patient_id: p1!.id, bed_id: bed!.id, admitted_at: new Date("2026-10-20T00:00:00Z"), discharged_at: new Date("2026-10-25T00:00:00Z") },
        { patient_id: p2!.id, bed_id: bed!.id, admitted_at: new Date("2026-10-26T00:00:00Z"), discharged_at: null },
      ])
      .returning("id")
  ).map((r) => r.id) as [string, string, string];
  [deviceId, otherDeviceId] = (
    await db("devices")
      .insert([
        { serial: "EXP-DEV-1", unit_id: unitA, model: "Test model (fictional)", firmware: "1", timestamp_resolution_ms: 1, stream_url: "http://127.0.0.1:9/none" },
        { serial: "EXP-DEV-2", unit_id: unitA, model: "Test model (fictional)", firmware: "1", timestamp_resolution_ms: 1, stream_url: "http://127.0.0.1:9/none" },
      ])
      .returning("id")
  ).map((r) => r.id) as [string, string];
});
afterAll(async () => {
  vi.useRealTimers();
  await cleanup?.();
});

describe("CSV export", () => {
  // A note-like value with every character RFC 4180 treats specially: comma, double quote, CR, LF, CRLF. In the detail
  // it travels as JSON (where line breaks are escapes); a failed sign-in's account is the text as typed, raw.
  const NOTE = 'Said "stop, please",\r\nthen slept\nfrom 02:10; line "3"\r';
  const ACCOUNT = 'night "owl", ward 4\r\nfloor\n2@larkspur.example';

  it("quotes and doubles as RFC 4180 requires, and parses back (csv-parse 7.0.3) to the same values and hashes", async () => {
    await append(entry("test.csv.note", { unitId: unitA, target: { type: "stay", id: stay1 }, detail: { note: NOTE, noteLength: NOTE.length } }));
    await append(entry("test.csv.plain", { actor: { userId: null, email: null, role: null }, clientAddress: null, target: { type: "account", id: ACCOUNT }, detail: { empty: "" } }));
    const out = await exportAll("csv", { action: "test.csv." });
    const text = out.bytes.toString("utf8");

    // RFC 4180 §2: CRLF line ends (rule 1), a header line (rule 3), fields with CR, LF, quote or comma quoted (rule 6),
    // quotes inside doubled (rule 7).
    expect(text.startsWith(`${CSV_COLUMNS.join(",")}\r\n`)).toBe(true);
    expect(text.endsWith("\r\n")).toBe(true);
    expect(text).toContain(',"{""note"":""Said \\""stop, please\\"",\\r\\nthen slept');
    expect(text).toContain(',account,"night ""owl"", ward 4\r\nfloor\n2@larkspur.example",');

    // csv-parse with strict CRLF records: a bare LF or CR inside a field only parses if it was quoted. A null is an
    // unquoted empty field, an empty string a quoted one.
    const records = parse(text, {
      record_delimiter: "\r\n",
      cast: (value, ctx) => (ctx.header || ctx.quoting || value !== "" ? value : null),
    }) as (string | null)[][];
    expect(records[0]).toEqual([...CSV_COLUMNS]);
    const rows = records.slice(1).map((r) => Object.fromEntries(CSV_COLUMNS.map((c, i) => [c, r[i]])) as Record<(typeof CSV_COLUMNS)[number], string | null>);
    expect(rows.map((r) => r.action)).toEqual(["test.csv.note", "test.csv.plain"]);
    expect(JSON.parse(rows[0]!.detail!)).toEqual({ note: NOTE, noteLength: NOTE.length });
    expect(rows[1]!.actor_email).toBeNull();
    expect(rows[1]!.target_id).toBe(ACCOUNT);
    expect(JSON.parse(rows[1]!.detail!)).toEqual({ empty: "" });

    // The outside verifier's check: hash = SHA-256(prev_hash ‖ canonical JSON of the fields), from the file alone.
    for (const r of rows) {
      const fields: ChainedFields = {
        seq: r.seq!, occurred_at: r.occurred_at!, actor_user_id: r.actor_user_id, actor_email: r.actor_email, actor_role: r.actor_role,
        action: r.action!, target_type: r.target_type, target_id: r.target_id, unit_id: r.unit_id, outcome: r.outcome!,
        detail: JSON.parse(r.detail!) as Record<string, unknown>, request_id: r.request_id, client_address: r.client_address,
      };
      expect(chainHash(r.prev_hash!, fields)).toBe(r.hash);
    }
  });

  it("writes a manifest whose SHA-256, byte count, rows and first/last hash match what was received", async () => {
    for (let i = 0; i < BATCH_ROWS + 5; i++) await append(entry("test.bulk.row", { detail: { i } }));
    const out = await exportAll("csv", { action: "test.bulk." });
    const stored = await db("audit_events").where({ action: "test.bulk.row" }).orderBy("seq").select("hash");
    expect(out.expectedRows).toBe(BATCH_ROWS + 5);
    expect(out.manifest).toMatchObject({
      status: "done",
      format: "csv",
      rows: String(BATCH_ROWS + 5),
      bytes: String(out.bytes.byteLength),
      sha256: createHash("sha256").update(out.bytes).digest("hex"),
      first_hash: stored[0]!.hash,
      last_hash: stored.at(-1)!.hash,
      file_name: out.fileName,
      created_by: reader.userId,
    });
    expect(out.manifest.finished_at).not.toBeNull();
    // Rows in the file, counted by a CSV parser rather than by line breaks.
    expect((parse(out.bytes.toString("utf8"), { record_delimiter: "\r\n" }) as unknown[]).length).toBe(BATCH_ROWS + 5 + 1);

    const listed = await listOwnExports(reader.userId, { size: 50 }, db);
    expect(listed.exports[0]).toMatchObject({ exportId: out.exportId, sha256: out.manifest.sha256, rows: BATCH_ROWS + 5, filter: { action: "test.bulk." } });
  });

  it("audits the export (audit.export with its id and filter) without putting that entry in the file", async () => {
    const out = await exportAll("csv", {});
    const audit = await db("audit_events").where({ action: "audit.export", target_id: out.exportId }).first();
    expect(audit).toMatchObject({ actor_user_id: reader.userId, actor_role: "quality", target_type: "audit_export", outcome: "success" });
    expect(audit!.detail).toMatchObject({ exportId: out.exportId, format: "csv", filter: { zone: "UTC" }, expectedRows: out.expectedRows });
    const seqs = (parse(out.bytes.toString("utf8"), { record_delimiter: "\r\n", from_line: 2 }) as string[][]).map((r) => r[0]);
    expect(seqs).not.toContain(String(audit!.seq));
    expect(Number(seqs.at(-1))).toBe(Number(audit!.seq) - 1);
    expect((audit!.detail as { filter: { upToSeq: string } }).filter.upToSeq).toBe(seqs.at(-1));
  });

  it("marks an export cancelled by the reader as failed, with no SHA-256", async () => {
    const res = await startAuditExport({ format: "csv", filter: filter({ action: "test.bulk." }), actor: reader, scope }, db);
    if (!res.ok) throw new Error(res.message);
    const rd = res.started.body.getReader();
    await rd.read();
    await rd.cancel();
    expect(await db("audit_exports").where({ id: res.started.exportId }).first("status", "sha256")).toEqual({ status: "failed", sha256: null });
  });

  it("refuses a filter naming an unknown patient or device and starts nothing", async () => {
    const before = await db("audit_exports").count<{ n: string }[]>({ n: "*" });
    const res = await startAuditExport({ format: "csv", filter: filter({ patient: "NO-SUCH-MRN" }), actor: reader, scope }, db);
    expect(res).toMatchObject({ ok: false, field: "patient" });
    const dev = await startAuditExport({ format: "csv", filter: filter({ device: "NO-SUCH-SERIAL" }), actor: reader, scope }, db);
    expect(dev).toMatchObject({ ok: false, field: "device" });
    expect(await db("audit_exports").count<{ n: string }[]>({ n: "*" })).toEqual(before);
  });
});

describe("FHIR R4 NDJSON export", () => {
  // FHIR R4 (4.0.1) specification, AuditEvent resource §6.4, Resource Content: the elements with cardinality 1..1 (or 1..*).
  const REQUIRED = { AuditEvent: ["type", "recorded", "agent", "source"], "AuditEvent.agent": ["requestor"], "AuditEvent.source": ["observer"], "AuditEvent.entity.detail": ["type"] };
  // FHIR R4 specification, Datatypes: the regex of the `instant` type.
  const INSTANT = /^([0-9]([0-9]([0-9][1-9]|[1-9]0)|[1-9]00)|[1-9]000)-(0[1-9]|1[0-2])-(0[1-9]|[1-2][0-9]|3[0-1])T([01][0-9]|2[0-3]):[0-5][0-9]:([0-5][0-9]|60)(\.[0-9]+)?(Z|(\+|-)((0[0-9]|1[0-3]):[0-5][0-9]|14:00))$/;

  it("writes one AuditEvent per line with every element R4 requires, and the documented codes", async () => {
    await append(entry("auth.sign_in", { actor: { userId: null, email: "someone@larkspur.example", role: null }, outcome: "failure", detail: { reason: "bad_password" } }));
    await append(entry("night.view", { unitId: unitA, target: { type: "stay", id: stay1 }, detail: { night: "2026-10-02" } }));
    await append(entry("access.denied", { outcome: "denied", detail: { what: "page /rules" } }));
    await append(entry("compute.run", { actor: { userId: null, email: null, role: null }, clientAddress: null }));
    const out = await exportAll("fhir-ndjson", { from: "2000-01-01T00:00" });
    const lines = out.bytes.toString("utf8").split("\n");
    expect(lines.at(-1)).toBe(""); // every line ends in LF (NDJSON)
    const events = lines.slice(0, -1).map((l) => JSON.parse(l) as AuditEvent);
    expect(events.length).toBe(out.expectedRows);
    expect(out.manifest.sha256).toBe(createHash("sha256").update(out.bytes).digest("hex"));

    for (const ev of events) {
      expect(ev.resourceType).toBe("AuditEvent");
      for (const k of REQUIRED.AuditEvent) expect(ev, `AuditEvent.${k} of ${ev.id}`).toHaveProperty(k);
      expect(ev.agent.length).toBeGreaterThanOrEqual(1);
      for (const a of ev.agent) {
        for (const k of REQUIRED["AuditEvent.agent"]) expect(a).toHaveProperty(k);
        expect(a.requestor).toBe(true);
        expect(a.who?.identifier?.value ?? a.who?.display).toBeTruthy();
      }
      for (const k of REQUIRED["AuditEvent.source"]) expect(ev.source).toHaveProperty(k);
      expect(ev.source.observer.display).toBe("Corvane");
      for (const en of ev.entity ?? []) for (const d of en.detail ?? []) {
        for (const k of REQUIRED["AuditEvent.entity.detail"]) expect(d).toHaveProperty(k);
        expect(d.valueString ?? d.valueBase64Binary).toBeDefined(); // value[x] 1..1
      }
      expect(ev.recorded).toMatch(INSTANT);
      expect(ev.type.system && ev.type.code).toBeTruthy();
      // Value sets (R4): AuditEventAction (C R U D E), AuditEventOutcome (0 4 8 12).
      expect(["C", "R", "U", "D", "E"]).toContain(ev.action);
      expect(["0", "4", "8", "12"]).toContain(ev.outcome);
      expect(ev.subtype).toContainEqual({ system: ACTION_CODE_SYSTEM, code: expect.any(String) });
      // The entry's hash, recomputed from the resource alone.
      const record = ev.entity!.at(-1)!.detail!;
      const value = (t: string) => record.find((d) => d.type === t)?.valueString;
      expect(createHash("sha256").update(value("prev_hash")!).update(value("chained-fields")!).digest("hex")).toBe(value("hash"));
    }

    const byAction = (a: string) => events.find((e) => e.subtype!.some((s) => s.code === a))!;
    const signIn = byAction("auth.sign_in");
    expect(signIn.type).toEqual({ system: "http://dicom.nema.org/resources/ontology/DCM", code: "110114", display: "User Authentication" });
    expect(signIn.subtype).toContainEqual({ system: "http://dicom.nema.org/resources/ontology/DCM", code: "110122", display: "Login" });
    expect(signIn.outcome).toBe("8");
    expect(signIn.agent[0]!.who).toEqual({ display: "someone@larkspur.example" });
    const night = byAction("night.view");
    expect(night).toMatchObject({ type: { system: "http://terminology.hl7.org/CodeSystem/audit-event-type", code: "rest" }, action: "R", outcome: "0" });
    expect(night.agent[0]!.network).toEqual({ address: "127.0.0.1", type: "2" });
    expect(night.entity![0]!.what!.identifier!.value).toBe(stay1);
    const denied = byAction("access.denied");
    expect(denied).toMatchObject({ type: { code: "110113" }, outcome: "4", action: "E" });
    const job = byAction("compute.run");
    expect(job).toMatchObject({ type: { code: "110100" }, agent: [{ who: { display: "Corvane (automatic job)" }, requestor: true }] });
    expect(job.id).toMatch(/^[0-9]+$/);
  });
});

describe("search filters", () => {
  it("reads a time range on the unit's clock across the autumn and spring changes (America/New_York, 2026)", async () => {
    // 1 Nov 2026: 02:00 EDT → 01:00 EST (the hour 01:00–02:00 happens twice). 8 Mar 2026: 02:00 EST → 03:00 EDT.
    const autumn = ["2026-11-01T03:30:00Z", "2026-11-01T05:30:00Z", "2026-11-01T06:30:00Z", "2026-11-01T07:30:00Z", "2026-11-01T08:30:00Z"];
    const spring = ["2026-03-08T05:50:00Z", "2026-03-08T06:30:00Z", "2026-03-08T07:10:00Z", "2026-03-08T07:50:00Z", "2026-03-08T08:10:00Z"];
    const seq: Record<string, number> = {};
    for (const at of [...autumn, ...spring]) seq[at] = Number((await append(entry("test.dst.tick"), at)).seq);
    const find = async (from: string, to: string) => (await searchSeqs({ action: "test.dst.", zone: NY, from, to })).sort((a, b) => a - b);

    // 00:00 EDT (04:00Z) to 03:00 EST (08:00Z): four hours of clock time that reads three, both 01:30s included.
    expect(await find("2026-11-01T00:00", "2026-11-01T03:00")).toEqual([seq[autumn[1]!], seq[autumn[2]!], seq[autumn[3]!]]);
    // A repeated time means its first occurrence where the range starts: from 01:30 takes in 01:30 EDT and both
    // passes after it; and its second where the range ends: up to 01:30 takes in the whole first pass and the second
    // up to 01:30 EST (06:30Z, itself excluded: ranges are half-open).
    expect(await find("2026-11-01T01:30", "2026-11-01T02:00")).toEqual([seq[autumn[1]!], seq[autumn[2]!]]);
    expect(await find("2026-11-01T00:00", "2026-11-01T01:30")).toEqual([seq[autumn[1]!]]);
    expect(await find("2026-11-01T00:00", "2026-11-01T01:31")).toEqual([seq[autumn[1]!], seq[autumn[2]!]]);
    // 01:00 EST (06:00Z) to 04:00 EDT (08:00Z): two hours.
    expect(await find("2026-03-08T01:00", "2026-03-08T04:00")).toEqual([seq[spring[1]!], seq[spring[2]!], seq[spring[3]!]]);
    // 02:30 does not exist that day: it means the moment of the change, 03:00 EDT (07:00Z).
    expect(await find("2026-03-08T02:30", "2026-03-08T04:00")).toEqual([seq[spring[2]!], seq[spring[3]!]]);
    // The export reads the same range.
    const out = await exportAll("csv", { action: "test.dst.", zone: NY, from: "2026-11-01T00:00", to: "2026-11-01T03:00" });
    expect(out.expectedRows).toBe(3);
  });

  it("matches an action prefix literally (_ and % are not wildcards)", async () => {
    const a = Number((await append(entry("test.prefix.a_b"))).seq);
    const b = Number((await append(entry("test.prefix.aXb"))).seq);
    const c = Number((await append(entry("test.prefix.a_b.more"))).seq);
    const d = Number((await append(entry("test.prefixes.a_b"))).seq);
    expect(await searchSeqs({ action: "test.prefix." })).toEqual([c, b, a]);
    expect(await searchSeqs({ action: "test.prefix.a_" })).toEqual([c, a]);
    expect(await searchSeqs({ action: "test.prefix.a_b" })).toEqual([c, a]);
    expect(await searchSeqs({ action: "test.prefixes." })).toEqual([d]);
  });

  it("finds a device by serial or id, as the target or named in the detail", async () => {
    const t = Number((await append(entry("test.device.update", { unitId: unitA, target: { type: "device", id: deviceId } }))).seq);
    const named = Number((await append(entry("test.device.health", { unitId: unitA, detail: { deviceId } }))).seq);
    await append(entry("test.device.update", { unitId: unitA, target: { type: "device", id: otherDeviceId } }));
    // The same id under another target type is not the device.
    await append(entry("test.device.other", { unitId: unitA, target: { type: "stay", id: deviceId } }));
    expect(await searchSeqs({ action: "test.device.", device: "EXP-DEV-1" })).toEqual([named, t]);
    expect(await searchSeqs({ action: "test.device.", device: deviceId })).toEqual([named, t]);
  });

  it("finds a stay, or every stay of a patient by record number, as target or in the detail", async () => {
    const viewed = Number((await append(entry("test.stay.view", { unitId: unitA, target: { type: "stay", id: stay1 } }))).seq);
    const flag = Number((await append(entry("test.stay.flag", { unitId: unitA, target: { type: "flag", id: "00000000-0000-4000-8000-000000000001" }, detail: { stayId: stay2 } }))).seq);
    const ward = Number((await append(entry("test.stay.ward", { unitId: unitA, target: { type: "unit", id: unitA }, detail: { stayIds: [otherStay, stay1] } }))).seq);
    const other = Number((await append(entry("test.stay.view", { unitId: unitA, target: { type: "stay", id: otherStay } }))).seq);
    expect(await searchSeqs({ action: "test.stay.", patient: stay1 })).toEqual([ward, viewed]);
    expect(await searchSeqs({ action: "test.stay.", patient: "EXP-0001" })).toEqual([ward, flag, viewed]);
    expect(await searchSeqs({ action: "test.stay.", patient: "EXP-0002" })).toEqual([other, ward]);
    expect(await resolveAuditFilter(filter({ patient: "EXP-9999" }), db)).toMatchObject({ ok: false, field: "patient" });
  });

  it("keeps to the reader's units plus unit-less entries; person by e-mail in any case; outcome", async () => {
    const own = Number((await append(entry("test.scope.x", { unitId: unitA }))).seq);
    const none = Number((await append(entry("test.scope.x", { unitId: null, outcome: "denied" }))).seq);
    const other = Number((await append(entry("test.scope.x", { unitId: unitB }))).seq);
    expect(await searchSeqs({ action: "test.scope." })).toEqual([none, own]);
    expect(await auditEventDetail(String(other), scope, db)).toBeNull();
    expect(await auditEventDetail(String(own), scope, db)).toMatchObject({ seq: String(own), hashMatches: true });
    expect(await searchSeqs({ action: "test.scope.", person: "Charge@Larkspur.EXAMPLE" })).toEqual([none, own]);
    expect(await searchSeqs({ action: "test.scope.", outcome: "denied" })).toEqual([none]);
  });

  it("shows before and after values side by side in the detail", async () => {
    const { seq } = await append(entry("test.detail.update", { detail: { stayId: stay1, before: { state: "open", version: 1 }, after: { state: "acknowledged", version: 2, reason: "known_rhythm" } } }));
    const d = await auditEventDetail(seq, scope, db);
    expect(d!.changes).toEqual([
      { field: "state", before: "open", after: "acknowledged", changed: true },
      { field: "version", before: "1", after: "2", changed: true },
      { field: "reason", before: "—", after: "known_rhythm", changed: true },
    ]);
  });
});

describe("keyset pagination", () => {
  it("never repeats or skips an entry while new ones are appended between pages", async () => {
    const original: number[] = [];
    for (let i = 0; i < 30; i++) original.push(Number((await append(entry("test.page.row"))).seq));
    const resolved = await resolveAuditFilter(filter({ action: "test.page." }), db);
    if (!resolved.ok) throw new Error(resolved.message);
    const seen: number[] = [];
    const appended: number[] = [];
    let page = await searchAuditEvents(resolved, scope, { size: 7 }, db);
    expect(page.newer).toBeNull();
    for (;;) {
      seen.push(...page.events.map((e) => Number(e.seq)));
      appended.push(Number((await append(entry("test.page.row"))).seq));
      if (!page.older) break;
      page = await searchAuditEvents(resolved, scope, { before: page.older, size: 7 }, db);
    }
    expect(new Set(seen).size).toBe(seen.length);
    expect(seen).toEqual([...original].reverse());

    // Walking back up from the oldest page with "Newer" reaches every entry, the appended ones too.
    const up = new Set(page.events.map((e) => Number(e.seq)));
    while (page.newer) {
      page = await searchAuditEvents(resolved, scope, { after: page.newer, size: 7 }, db);
      for (const e of page.events) up.add(Number(e.seq));
    }
    expect([...up].sort((a, b) => b - a)).toEqual([...original, ...appended].sort((a, b) => b - a));
  });
});

