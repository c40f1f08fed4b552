// The device registry's writes on real PostgreSQL, through the guarded server actions (only Next's request plumbing
// is replaced: the session, the request headers, cache revalidation; the app's one Knex instance is a scratch
// database). Source of the rules checked: issue 7 items 1, 2 and 7 — register with a unique serial, a stream token
// shown once and stored hashed, rotation with a grace period, revocation, decommissioning with history kept; one
// device per bed and one bed per device, history without overlaps; every action audited, a refused caller writing
// nothing but the refusal's audit.
import { createHash } from "node:crypto";
import type { Knex } from "knex";
import { afterAll, beforeAll, beforeEach, describe, expect, it, vi } from "vitest";
import { scratchDatabase } from "@/tests/support/db";

const session = vi.hoisted(() => ({ current: null as null | { user: { id: string } } }));
vi.mock("next-auth", async (orig) => ({ ...(await orig<object>()), getServerSession: async () => session.current }));
vi.mock("next/headers", () => ({ headers: async () => new Headers({ "x-request-id": "req-devices-test", "x-forwarded-for": "192.0.2.17" }) }));
vi.mock("next/cache", () => ({ revalidatePath: () => undefined }));

const scratch = await scratchDatabase();
const db: Knex = scratch.db;
(globalThis as unknown as { corvaneDb?: Knex }).corvaneDb = db;
const actions = await import("@/lib/devices/actions");
const { deviceDetail, devicesOfUnit } = await import("@/lib/devices/registry");
const { decryptStreamToken } = await import("@/lib/devices/stream-token");
const { formatInTimeZone } = await import("date-fns-tz");
const { assignmentInstant } = await import("@/lib/devices/registry.validation");
type ActionResult<R = unknown> = import("@/lib/auth/action-result").ActionResult<R>;
type NewTokenData = import("@/lib/devices/actions").NewTokenData;
type Role = import("@/lib/auth/roles").Role;

const TZ = "America/New_York";
const HOUR = 3_600_000;
const MINUTE = 60_000;

let unit: string;
let otherUnit: string;
let beds: string[];
let otherBed: string;
let biomed: string;
let clinician: string;

const form = (fields: Record<string, string>) => {
  const fd = new FormData();
  for (const [k, v] of Object.entries(fields)) fd.append(k, v);
  return fd;
};
const count = async (table: string, where: Record<string, unknown> = {}) => Number((await db(table).where(where).count<{ n: string }[]>("* as n"))[0]!.n);
/** Audit events of an action on a device (the chain is append-only, so counts only grow). */
const audits = (action: string, deviceId?: string) =>
  db("audit_events").where({ action, ...(deviceId ? { target_id: deviceId } : {}) }).orderBy("seq");
/** A local "YYYY-MM-DDTHH:MM" in the unit's zone, `msAgo` before now. */
const localAgo = (msAgo: number) => formatInTimeZone(Date.now() - msAgo, TZ, "yyyy-MM-dd'T'HH:mm");

const as = (userId: string | null) => {
  session.current = userId ? { user: { id: userId } } : null;
};
async function call<R>(action: (prev: ActionResult<R> | null, fd: FormData) => Promise<ActionResult<R>>, fields: Record<string, string>): Promise<ActionResult<R>> {
  return action(null, form(fields));
}

const fieldsFor = (serial: string) => ({
  unitId: unit,
  serial,
  manufacturer: "Quillfeather Instruments (fictional)",
  model: "QF-9 bedside ECG (fictional)",
  firmware: "1.0.3",
  timestampResolutionMs: "7.8125",
  streamUrl: `http://127.0.0.1:3201/devices/${serial.toUpperCase()}/stream`,
  notes: "Spare from the store room.",
});

async function register(serial: string): Promise<string> {
  as(biomed);
  const r = await call(actions.registerDevice, fieldsFor(serial));
  expect(r).toMatchObject({ ok: true });
  return (r as { data: { deviceId: string } }).data.deviceId;
}

async function addUser(email: string, name: string, grants: { unitId: string; role: Role }[]) {
  const [u] = await db("users").insert({ email, name, password_hash: "not-a-real-hash" }).returning("id");
  for (const g of grants) await db("user_unit_roles").insert({ user_id: u!.id, unit_id: g.unitId, role: g.role, granted_by: null });
  return u!.id as string;
}

beforeAll(async () => {
  const [u] = await db("units").insert({ code: "DR", name: "Device registry test unit", kind: "adult", time_zone: TZ }).returning("id");
  const [o] = await db("units").insert({ code: "OT", name: "Other unit", kind: "adult", time_zone: TZ }).returning("id");
  unit = u!.id;
  otherUnit = o!.id;
  beds = (await db("beds").insert([1, 2, 3].map((n) => ({ unit_id: unit, label: `DR-0${n}`, sort_order: n, active: true }))).returning("id")).map((b) => b.id);
  otherBed = (await db("beds").insert({ unit_id: otherUnit, label: "OT-01", sort_order: 1, active: true }).returning("id"))[0]!.id;
  biomed = await addUser("biomed.test@example.invalid", "Rowan Biomed", [{ unitId: unit, role: "biomed" }]);
  clinician = await addUser("clinician.test@example.invalid", "Avery Clinician", [{ unitId: unit, role: "clinician" }]);
});
beforeEach(() => as(null));
afterAll(async () => {
  await scratch.cleanup();
});

describe("register", () => {
  it("registers a device with the validated fields (serial upper-cased), no token yet, and audits it", async () => {
    const id = await register("qf-0001");
    const row = await db("devices").where({ id }).first();
    expect(row).toMatchObject({
      serial: "QF-0001",
      unit_id: unit,
      model: "QF-9 bedside ECG (fictional)",
      manufacturer: "Quillfeather Instruments (fictional)",
      firmware: "1.0.3",
      timestamp_resolution_ms: 7.8125,
      notes: "Spare from the store room.",
      status: "active",
      registered_by: biomed,
      stream_token_hash: null,
      stream_token_enc: null,
    });
    const [a] = await audits("device.register", id);
    expect(a).toMatchObject({ actor_user_id: biomed, outcome: "success", unit_id: unit, actor_role: "biomed" });
    // No free text in the audit detail: the notes' length only.
    expect(a!.detail).toMatchObject({ serial: "QF-0001", notes_length: "Spare from the store room.".length });
    expect(JSON.stringify(a!.detail)).not.toContain("store room");
    const detail = await deviceDetail(unit, id, new Date(), db);
    expect(detail!.token.state).toBe("none");
    expect(detail!.stream).toBe("not_streaming");
  });

  it("refuses a serial already registered (in any case) and writes nothing", async () => {
    await register("QF-0002");
    const before = { devices: await count("devices"), audits: await count("audit_events") };
    as(biomed);
    const r = await call(actions.registerDevice, fieldsFor("qf-0002"));
    expect(r).toMatchObject({ ok: false, code: "conflict", fieldErrors: { serial: ["Serial QF-0002 is already registered."] } });
    expect(await count("devices")).toBe(before.devices);
    expect(await count("audit_events")).toBe(before.audits);
  });

  it("refuses invalid fields with field errors and writes nothing", async () => {
    const before = { devices: await count("devices"), audits: await count("audit_events") };
    as(biomed);
    const r = await call(actions.registerDevice, { ...fieldsFor("QF 0003!"), timestampResolutionMs: "0", streamUrl: "ftp://x" });
    expect(r.ok).toBe(false);
    expect(Object.keys((r as { fieldErrors: object }).fieldErrors).sort()).toEqual(["serial", "streamUrl", "timestampResolutionMs"]);
    expect(await count("devices")).toBe(before.devices);
    expect(await count("audit_events")).toBe(before.audits);
  });
});

describe("stream token", () => {
  it("issues once, stores only its SHA-256 and a sealed copy, and refuses a second issue", async () => {
    const id = await register("QF-0101");
    as(biomed);
    const r = (await call(actions.issueStreamToken, { unitId: unit, deviceId: id })) as ActionResult<NewTokenData>;
    expect(r.ok).toBe(true);
    const { token, command } = (r as { data: NewTokenData }).data;
    expect(token).toMatch(/^[A-Za-z0-9_-]{43}$/);
    // The simulator command names the device, its token and the port of its stream address (lib/devices/simulator-command.ts;
    // 3201, not the 3200 of the demo simulator npm start runs, which serves its devices itself).
    expect(command).toContain("--device QF-0101");
    expect(command).toContain(token);
    expect(command).toContain("--port 3201");
    const row = await db("devices").where({ id }).first();
    // SHA-256 as computed independently here (node:crypto), hex.
    expect(row!.stream_token_hash).toBe(createHash("sha256").update(token).digest("hex"));
    expect(decryptStreamToken(row!.stream_token_enc!)).toBe(token);
    // The plaintext is in no column of the device and in no audit event.
    const devJson = (await db.raw("SELECT row_to_json(d)::text AS j FROM devices d WHERE id = ?", [id])).rows[0].j as string;
    expect(devJson).not.toContain(token);
    const auditJson = (await db.raw("SELECT coalesce(string_agg(row_to_json(a)::text, ''), '') AS j FROM audit_events a")).rows[0].j as string;
    expect(auditJson).not.toContain(token);
    expect(auditJson).not.toContain(row!.stream_token_hash!);
    expect(await audits("device.token.issue", id)).toHaveLength(1);

    const again = await call(actions.issueStreamToken, { unitId: unit, deviceId: id });
    expect(again).toMatchObject({ ok: false, code: "conflict" });
    expect((await db("devices").where({ id }).first())!.stream_token_hash).toBe(row!.stream_token_hash);
    expect(await audits("device.token.issue", id)).toHaveLength(1);
  });

  it("rotates: the new token is current, the old hash is kept as previous until issued-at + grace; revoking clears both", async () => {
    const id = await register("QF-0102");
    as(biomed);
    const first = ((await call(actions.issueStreamToken, { unitId: unit, deviceId: id })) as { data: NewTokenData }).data.token;
    const r = (await call(actions.rotateStreamToken, { unitId: unit, deviceId: id, graceMinutes: "60" })) as ActionResult<NewTokenData>;
    expect(r.ok).toBe(true);
    const second = (r as { data: NewTokenData }).data.token;
    expect(second).not.toBe(first);
    const row = (await db("devices").where({ id }).first())!;
    expect(row.stream_token_hash).toBe(createHash("sha256").update(second).digest("hex"));
    expect(row.previous_token_hash).toBe(createHash("sha256").update(first).digest("hex"));
    expect(decryptStreamToken(row.previous_token_enc!)).toBe(first);
    expect(row.previous_token_valid_until!.getTime()).toBe(row.token_rotated_at!.getTime() + 60 * MINUTE);
    const devJson = (await db.raw("SELECT row_to_json(d)::text AS j FROM devices d WHERE id = ?", [id])).rows[0].j as string;
    expect(devJson).not.toContain(first);
    expect(devJson).not.toContain(second);
    expect((await deviceDetail(unit, id, new Date(), db))!.token).toMatchObject({ state: "rotating", previousValidUntil: row.previous_token_valid_until!.toISOString() });
    const [a] = await audits("device.token.rotate", id);
    expect(a!.detail).toMatchObject({ grace_minutes: 60 });

    // Once the grace period has passed the registry shows the token as plainly issued.
    expect((await deviceDetail(unit, id, new Date(Date.now() + 61 * MINUTE), db))!.token.state).toBe("issued");

    // A grace outside the offered choices is refused and changes nothing.
    const odd = await call(actions.rotateStreamToken, { unitId: unit, deviceId: id, graceMinutes: "7" });
    expect(odd).toMatchObject({ ok: false, code: "invalid_input" });
    expect((await db("devices").where({ id }).first())!.stream_token_hash).toBe(row.stream_token_hash);

    const revoked = await call(actions.revokeStreamToken, { unitId: unit, deviceId: id });
    expect(revoked.ok).toBe(true);
    expect(await db("devices").where({ id }).first()).toMatchObject({
      stream_token_hash: null, stream_token_enc: null, previous_token_hash: null, previous_token_enc: null, previous_token_valid_until: null,
    });
    expect((await deviceDetail(unit, id, new Date(), db))!.token.state).toBe("revoked");
    expect(await audits("device.token.revoke", id)).toHaveLength(1);
    // Nothing left to revoke; a rotation needs a current token; a new issue is allowed again.
    expect(await call(actions.revokeStreamToken, { unitId: unit, deviceId: id })).toMatchObject({ ok: false, code: "conflict" });
    expect(await call(actions.rotateStreamToken, { unitId: unit, deviceId: id, graceMinutes: "60" })).toMatchObject({ ok: false, code: "conflict" });
    expect(await call(actions.issueStreamToken, { unitId: unit, deviceId: id })).toMatchObject({ ok: true });
  });

  it("rotation without grace leaves no previous token", async () => {
    const id = await register("QF-0103");
    as(biomed);
    await call(actions.issueStreamToken, { unitId: unit, deviceId: id });
    expect((await call(actions.rotateStreamToken, { unitId: unit, deviceId: id, graceMinutes: "0" })).ok).toBe(true);
    expect(await db("devices").where({ id }).first()).toMatchObject({ previous_token_hash: null, previous_token_enc: null, previous_token_valid_until: null });
  });
});

describe("bed assignment", () => {
  it("assigns to a free bed, refuses a second device on that bed and the device on a second bed, and unassigns", async () => {
    const a = await register("QF-0201");
    const b = await register("QF-0202");
    as(biomed);
    await call(actions.issueStreamToken, { unitId: unit, deviceId: a });
    expect(await call(actions.assignDevice, { unitId: unit, deviceId: a, bedId: beds[0]!, from: "" })).toMatchObject({ ok: true });
    const detail = (await deviceDetail(unit, a, new Date(), db))!;
    expect(detail.current).toMatchObject({ bedId: beds[0], to: null, assignedBy: "Rowan Biomed" });
    // Active, on a bed, with a token: Corvane reads it; no beat yet, so it counts as offline.
    expect(detail.stream).toBe("offline");
    expect(detail.beds.find((x) => x.id === beds[0])!.free).toBe(false);

    const before = await count("device_assignments");
    expect(await call(actions.assignDevice, { unitId: unit, deviceId: b, bedId: beds[0]!, from: "" })).toMatchObject({ ok: false, fieldErrors: { bedId: [expect.stringContaining("already has device QF-0201")] } });
    expect(await call(actions.assignDevice, { unitId: unit, deviceId: a, bedId: beds[1]!, from: "" })).toMatchObject({ ok: false, code: "conflict", message: expect.stringContaining("already on bed DR-01") });
    expect(await count("device_assignments")).toBe(before);
    expect(await audits("device.assign", b)).toHaveLength(0);

    expect(await call(actions.unassignDevice, { unitId: unit, deviceId: a, at: "" })).toMatchObject({ ok: true });
    const closed = (await db("device_assignments").where({ device_id: a }).first())!;
    expect(closed.assigned_to).not.toBeNull();
    expect(closed.unassigned_by).toBe(biomed);
    expect(await audits("device.assign", a)).toHaveLength(1);
    expect(await audits("device.unassign", a)).toHaveLength(1);
    expect(await call(actions.unassignDevice, { unitId: unit, deviceId: a, at: "" })).toMatchObject({ ok: false, code: "conflict" });
  });

  it("of two simultaneous assignments to one bed, or of one device to two beds, exactly one succeeds (row locks, unique indexes behind them)", async () => {
    const [bed] = await db("beds").insert({ unit_id: unit, label: "DR-09", sort_order: 9, active: true }).returning("id");
    const [bed2] = await db("beds").insert({ unit_id: unit, label: "DR-10", sort_order: 10, active: true }).returning("id");
    const a = await register("QF-0251");
    const b = await register("QF-0252");
    as(biomed);
    const sameBed = await Promise.all([
      call(actions.assignDevice, { unitId: unit, deviceId: a, bedId: bed!.id, from: "" }),
      call(actions.assignDevice, { unitId: unit, deviceId: b, bedId: bed!.id, from: "" }),
    ]);
    expect(sameBed.filter((r) => r.ok)).toHaveLength(1);
    expect(await count("device_assignments", { bed_id: bed!.id })).toBe(1);
    const onBed = sameBed[0]!.ok ? a : b;
    const free = onBed === a ? b : a;
    await call(actions.unassignDevice, { unitId: unit, deviceId: onBed, at: "" });
    const twoBeds = await Promise.all([
      call(actions.assignDevice, { unitId: unit, deviceId: free, bedId: bed!.id, from: "" }),
      call(actions.assignDevice, { unitId: unit, deviceId: free, bedId: bed2!.id, from: "" }),
    ]);
    expect(twoBeds.filter((r) => r.ok)).toHaveLength(1);
    expect(await db("device_assignments").where({ device_id: free }).whereNull("assigned_to").count<{ n: string }[]>("* as n")).toEqual([{ n: "1" }]);
    await call(actions.unassignDevice, { unitId: unit, deviceId: free, at: "" });
  });

  it("refuses a start that overlaps an earlier assignment of the device or of the bed", async () => {
    const a = await register("QF-0301");
    const b = await register("QF-0302");
    as(biomed);
    expect(await call(actions.assignDevice, { unitId: unit, deviceId: a, bedId: beds[1]!, from: localAgo(3 * HOUR) })).toMatchObject({ ok: true });
    expect(await call(actions.unassignDevice, { unitId: unit, deviceId: a, at: localAgo(1 * HOUR) })).toMatchObject({ ok: true });
    const before = await count("device_assignments");
    // The device, on another bed, from 2 h ago: it was still on DR-02 then.
    expect(await call(actions.assignDevice, { unitId: unit, deviceId: a, bedId: beds[2]!, from: localAgo(2 * HOUR) })).toMatchObject({ ok: false, fieldErrors: { from: [expect.stringContaining("this device was on bed DR-02")] } });
    // Another device on the same bed from 2 h ago: the bed still had QF-0301 then.
    expect(await call(actions.assignDevice, { unitId: unit, deviceId: b, bedId: beds[1]!, from: localAgo(2 * HOUR) })).toMatchObject({ ok: false, fieldErrors: { from: [expect.stringContaining("had device QF-0301")] } });
    expect(await count("device_assignments")).toBe(before);
    // After the earlier assignment ended, both are fine.
    expect(await call(actions.assignDevice, { unitId: unit, deviceId: b, bedId: beds[1]!, from: localAgo(30 * MINUTE) })).toMatchObject({ ok: true });
  });

  it("refuses a start more than 24 h back or in the future, and an end before the start", async () => {
    const a = await register("QF-0401");
    as(biomed);
    expect(await call(actions.assignDevice, { unitId: unit, deviceId: a, bedId: beds[2]!, from: localAgo(25 * HOUR) })).toMatchObject({ ok: false, fieldErrors: { from: [expect.stringContaining("24 hours")] } });
    expect(await call(actions.assignDevice, { unitId: unit, deviceId: a, bedId: beds[2]!, from: localAgo(-2 * HOUR) })).toMatchObject({ ok: false, fieldErrors: { from: [expect.stringContaining("future")] } });
    expect(await call(actions.assignDevice, { unitId: unit, deviceId: a, bedId: beds[2]!, from: localAgo(10 * MINUTE) })).toMatchObject({ ok: true });
    expect(await call(actions.unassignDevice, { unitId: unit, deviceId: a, at: localAgo(20 * MINUTE) })).toMatchObject({ ok: false, fieldErrors: { at: [expect.stringContaining("when the device was put on the bed")] } });
    expect(await call(actions.unassignDevice, { unitId: unit, deviceId: a, at: "" })).toMatchObject({ ok: true });
  });

  it("refuses a bed of another unit and a device of another unit (not found), writing nothing", async () => {
    const a = await register("QF-0501");
    const [foreign] = await db("devices").insert({ unit_id: otherUnit, serial: "OT-DEV-1", model: "m", firmware: "f", timestamp_resolution_ms: 1, stream_url: "http://127.0.0.1:1/x" }).returning("id");
    const before = { assignments: await count("device_assignments"), audits: await count("audit_events") };
    as(biomed);
    expect(await call(actions.assignDevice, { unitId: unit, deviceId: a, bedId: otherBed, from: "" })).toMatchObject({ ok: false, fieldErrors: { bedId: [expect.stringContaining("bed of this unit")] } });
    expect(await call(actions.assignDevice, { unitId: unit, deviceId: foreign!.id, bedId: beds[2]!, from: "" })).toMatchObject({ ok: false, code: "not_found" });
    expect(await call(actions.issueStreamToken, { unitId: unit, deviceId: foreign!.id })).toMatchObject({ ok: false, code: "not_found" });
    expect(await count("device_assignments")).toBe(before.assignments);
    expect(await count("audit_events")).toBe(before.audits);
    expect((await db("devices").where({ id: foreign!.id }).first())!.stream_token_hash).toBeNull();
  });
});

describe("assignment time in the unit's zone", () => {
  // US clocks go back from 02:00 EDT to 01:00 EST on the first Sunday of November (Energy Policy Act of 2005, §110):
  // in New York 01:30 on 1 Nov 2026 happens at 05:30Z and again at 06:30Z; 02:30 on 8 Mar 2026 does not happen.
  const now = new Date("2026-11-01T12:00:00Z");
  const dayBack = { at: new Date(now.getTime() - 24 * HOUR), why: "24 hours back" };

  it("asks which of two repeated local times is meant, and takes the one chosen", () => {
    expect(assignmentInstant("2026-11-01T01:30", undefined, TZ, now, dayBack)).toMatchObject({ ok: false, field: "occurrence" });
    expect(assignmentInstant("2026-11-01T01:30", "earlier", TZ, now, dayBack)).toEqual({ ok: true, at: new Date("2026-11-01T05:30:00Z") });
    expect(assignmentInstant("2026-11-01T01:30", "later", TZ, now, dayBack)).toEqual({ ok: true, at: new Date("2026-11-01T06:30:00Z") });
  });

  it("refuses a local time the clocks skipped, and takes empty as now", () => {
    const spring = new Date("2026-03-08T12:00:00Z");
    expect(assignmentInstant("2026-03-08T02:30", undefined, TZ, spring, { at: new Date(spring.getTime() - 24 * HOUR), why: "" })).toMatchObject({ ok: false, field: "time", message: expect.stringContaining("does not exist") });
    expect(assignmentInstant(undefined, undefined, TZ, now, dayBack)).toEqual({ ok: true, at: now });
  });
});

describe("edit", () => {
  it("saves a change with the version the form showed, refuses a stale one, and audits the changed fields", async () => {
    const id = await register("QF-0601");
    const v1 = (await deviceDetail(unit, id, new Date(), db))!.version;
    const { serial: _s, ...rest } = fieldsFor("QF-0601");
    as(biomed);
    expect(await call(actions.updateDevice, { ...rest, deviceId: id, firmware: "1.1.0", status: "maintenance", version: String(v1) })).toMatchObject({ ok: true });
    expect(await db("devices").where({ id }).first()).toMatchObject({ firmware: "1.1.0", status: "maintenance", serial: "QF-0601" });
    const [a] = await audits("device.update", id);
    expect(a!.detail).toMatchObject({ changed: ["firmware", "status"], firmware: { from: "1.0.3", to: "1.1.0" } });
    // The same (now stale) version again: refused, nothing changes.
    expect(await call(actions.updateDevice, { ...rest, deviceId: id, firmware: "9.9.9", status: "active", version: String(v1) })).toMatchObject({ ok: false, code: "conflict" });
    expect((await db("devices").where({ id }).first())!.firmware).toBe("1.1.0");
    expect(await audits("device.update", id)).toHaveLength(1);
  });
});

describe("decommission", () => {
  it("requires the device to be off its bed, revokes its tokens, keeps its history and refuses later changes", async () => {
    const id = await register("QF-0701");
    as(biomed);
    await call(actions.issueStreamToken, { unitId: unit, deviceId: id });
    expect(await call(actions.assignDevice, { unitId: unit, deviceId: id, bedId: beds[2]!, from: "" })).toMatchObject({ ok: true });
    const onBed = await call(actions.decommissionDevice, { unitId: unit, deviceId: id, reason: "Cracked housing" });
    expect(onBed).toMatchObject({ ok: false, code: "conflict", message: expect.stringContaining("Unassign it from the bed first") });
    expect((await db("devices").where({ id }).first())!.status).toBe("active");
    expect(await call(actions.decommissionDevice, { unitId: unit, deviceId: id, reason: "  " })).toMatchObject({ ok: false, fieldErrors: { reason: [expect.any(String)] } });

    await call(actions.unassignDevice, { unitId: unit, deviceId: id, at: "" });
    expect(await call(actions.decommissionDevice, { unitId: unit, deviceId: id, reason: "Cracked housing" })).toMatchObject({ ok: true });
    const row = (await db("devices").where({ id }).first())!;
    expect(row).toMatchObject({ status: "decommissioned", decommissioned_by: biomed, decommission_reason: "Cracked housing", stream_token_hash: null, stream_token_enc: null });
    expect(row.token_revoked_at).not.toBeNull();
    expect(await count("device_assignments", { device_id: id })).toBe(1);
    const [a] = await audits("device.decommission", id);
    expect(a!.detail).toMatchObject({ tokens_revoked: true, reason_length: "Cracked housing".length });

    const list = (await devicesOfUnit(unit, new Date(), { status: "all", q: "" }, db))!;
    expect(list.decommissioned.map((d) => d.serial)).toContain("QF-0701");
    expect(list.devices.map((d) => d.serial)).not.toContain("QF-0701");

    const n = await count("audit_events");
    expect(await call(actions.assignDevice, { unitId: unit, deviceId: id, bedId: beds[2]!, from: "" })).toMatchObject({ ok: false, code: "conflict", message: expect.stringContaining("decommissioned") });
    expect(await call(actions.issueStreamToken, { unitId: unit, deviceId: id })).toMatchObject({ ok: false, code: "conflict" });
    const { serial: _s, ...rest } = fieldsFor("QF-0701");
    expect(await call(actions.updateDevice, { ...rest, deviceId: id, status: "active", version: "0" })).toMatchObject({ ok: false, code: "conflict" });
    expect(await count("audit_events")).toBe(n);
  });
});

describe("access", () => {
  it("a clinician is refused every registry action; only the refusal is audited", async () => {
    const id = await register("QF-0801");
    const before = { devices: await count("devices"), assignments: await count("device_assignments"), audits: await count("audit_events") };
    const row = await db("devices").where({ id }).first();
    as(clinician);
    const { serial: _s, ...rest } = fieldsFor("QF-0801");
    const calls: [string, Promise<ActionResult<unknown>>][] = [
      ["registerDevice", call(actions.registerDevice, fieldsFor("QF-0802"))],
      ["updateDevice", call(actions.updateDevice, { ...rest, deviceId: id, status: "maintenance", version: "0" })],
      ["decommissionDevice", call(actions.decommissionDevice, { unitId: unit, deviceId: id, reason: "x" })],
      ["issueStreamToken", call(actions.issueStreamToken, { unitId: unit, deviceId: id })],
      ["rotateStreamToken", call(actions.rotateStreamToken, { unitId: unit, deviceId: id, graceMinutes: "60" })],
      ["revokeStreamToken", call(actions.revokeStreamToken, { unitId: unit, deviceId: id })],
      ["assignDevice", call(actions.assignDevice, { unitId: unit, deviceId: id, bedId: beds[0]!, from: "" })],
      ["unassignDevice", call(actions.unassignDevice, { unitId: unit, deviceId: id, at: "" })],
    ];
    for (const [, p] of calls) expect(await p).toMatchObject({ ok: false, code: "forbidden" });
    expect(await count("devices")).toBe(before.devices);
    expect(await count("device_assignments")).toBe(before.assignments);
    expect(await db("devices").where({ id }).first()).toEqual(row);
    const refusals = await db("audit_events").where("seq", ">", 0).orderBy("seq", "desc").limit(calls.length);
    expect(await count("audit_events")).toBe(before.audits + calls.length);
    expect(refusals.every((r) => r.action === "access.denied" && r.outcome === "denied" && r.actor_user_id === clinician)).toBe(true);
    expect(refusals.map((r) => (r.detail as { what: string }).what).sort()).toEqual(calls.map(([n]) => `action ${n}`).sort());
  });

  it("a biomedical engineer of another unit is refused in this one", async () => {
    const id = await register("QF-0901");
    const outsider = await addUser("biomed.other@example.invalid", "Kit Elsewhere", [{ unitId: otherUnit, role: "biomed" }]);
    as(outsider);
    expect(await call(actions.issueStreamToken, { unitId: unit, deviceId: id })).toMatchObject({ ok: false, code: "forbidden" });
    // Naming its own unit with this unit's device: the device is not found there.
    expect(await call(actions.issueStreamToken, { unitId: otherUnit, deviceId: id })).toMatchObject({ ok: false, code: "not_found" });
    expect((await db("devices").where({ id }).first())!.stream_token_hash).toBeNull();
  });

  it("every successful registry write of this file left exactly one audit event with its action", async () => {
    const writes = await db("audit_events").where("action", "like", "device.%").where({ outcome: "success" }).select("action", "actor_user_id", "target_type");
    expect(new Set(writes.map((w) => w.action))).toEqual(
      new Set(["device.register", "device.update", "device.decommission", "device.token.issue", "device.token.rotate", "device.token.revoke", "device.assign", "device.unassign"]),
    );
    expect(writes.every((w) => w.actor_user_id === biomed && w.target_type === "device")).toBe(true);
    // Each assignment row has its assign event; each closed one its unassign event.
    expect(writes.filter((w) => w.action === "device.assign")).toHaveLength(await count("device_assignments"));
    const closed = Number((await db("device_assignments").whereNotNull("assigned_to").count<{ n: string }[]>("* as n"))[0]!.n);
    expect(writes.filter((w) => w.action === "device.unassign")).toHaveLength(closed);
  });
});
