// CSV import of devices on real PostgreSQL, through the guarded server actions (only Next's request plumbing is
// replaced: the session, the request headers, cache revalidation; the app's one Knex instance is a scratch
// database). Sources of the rules checked:
// - RFC 4180 ("Common Format and MIME Type for CSV Files", section 2): records end with a line break (rule 1; LF
//   alone is accepted too, as is common practice); the first record may be a header (rule 3); every record has the
//   same number of fields (rule 4); a field containing a line break, a double quote or a comma is enclosed in
//   double quotes (rule 6); a double quote inside such a field is written twice (rule 7).
// - The UTF-8 byte order mark EF BB BF (Unicode Standard, section 23.8) at the start of a file: not part of RFC 4180,
//   but spreadsheet programs write it for "CSV UTF-8" (common practice), so it is skipped, not read as a column name.
// - Issue 7 item 5 and 7: a dry run shows every row's outcome by line; nothing is written unless confirmed; a failed
//   row never leaves a half-imported batch; bad uploads get a clear message and change nothing.
import { createHash } from "node:crypto";
import type { Knex } from "knex";
import { afterAll, beforeAll, beforeEach, describe, expect, it, vi } from "vitest";
import { scratchDatabase } from "@/tests/support/db";

const session = vi.hoisted(() => ({ current: null as null | { user: { id: string } } }));
vi.mock("next-auth", async (orig) => ({ ...(await orig<object>()), getServerSession: async () => session.current }));
vi.mock("next/headers", () => ({ headers: async () => new Headers({ "x-request-id": "req-device-import-test", "x-forwarded-for": "192.0.2.31" }) }));
vi.mock("next/cache", () => ({ revalidatePath: () => undefined }));

const scratch = await scratchDatabase();
const db: Knex = scratch.db;
(globalThis as unknown as { corvaneDb?: Knex }).corvaneDb = db;
const { previewDeviceImport, confirmDeviceImport } = await import("@/lib/devices/import-actions");
type ActionResult<R = unknown> = import("@/lib/auth/action-result").ActionResult<R>;
type Role = import("@/lib/auth/roles").Role;
type ImportPreviewDTO = import("@/lib/devices/import").ImportPreviewDTO;
const { IMPORT_COLUMN_GUIDE, IMPORT_TEMPLATE_CSV } = await import("@/components/devices/import/template");

const HEADER = "serial,manufacturer,model,firmware,rr_resolution_ms,stream_url,notes";
const MAKER = "Quillfeather Instruments (fictional)";
const row = (serial: string, notes = "") => `${serial},${MAKER},QF-9 bedside ECG (fictional),1.0.3,7.8125,http://127.0.0.1:3200/devices/${serial}/stream,${notes}`;

let unit: string;
let otherUnit: string;
let biomed: string;
let biomedOther: string;
let clinician: string;

const as = (userId: string | null) => {
  session.current = userId ? { user: { id: userId } } : null;
};
const bytesOf = (text: string) => new TextEncoder().encode(text);
const upload = (content: Uint8Array<ArrayBuffer> | string, unitId = unit, name = "devices.csv") => {
  const fd = new FormData();
  fd.append("unitId", unitId);
  fd.append("file", new File([typeof content === "string" ? bytesOf(content) : content], name, { type: "text/csv" }));
  return previewDeviceImport(null, fd) as Promise<ActionResult<ImportPreviewDTO>>;
};
const confirm = (batchId: string, unitId = unit) => {
  const fd = new FormData();
  fd.append("unitId", unitId);
  fd.append("batchId", batchId);
  return confirmDeviceImport(null, fd);
};
const previewed = (r: ActionResult<ImportPreviewDTO>): ImportPreviewDTO => {
  if (!r.ok) throw new Error(`preview refused: ${r.message}`);
  return r.data!;
};
const count = async (table: string) => Number((await db(table).count<{ n: string }[]>("* as n"))[0]!.n);
/** Devices and import batches: what a refused upload or confirmation must leave unchanged. */
const written = async () => ({ devices: await count("devices"), batches: await count("device_import_batches") });

async function addUser(email: string, name: string, grants: { unitId: string; role: Role }[]) {
  const [u] = await db("users").insert({ email, name, password_hash: "not-a-real-hash" }).returning("id");
  for (const g of grants) await db("user_unit_roles").insert({ user_id: u!.id, unit_id: g.unitId, role: g.role, granted_by: null });
  return u!.id as string;
}

beforeAll(async () => {
  const [u] = await db("units").insert({ code: "DI", name: "Device import test unit (fictional)", kind: "adult", time_zone: "America/New_York" }).returning("id");
  const [o] = await db("units").insert({ code: "DO", name: "Other unit (fictional)", kind: "adult", time_zone: "America/New_York" }).returning("id");
  unit = u!.id;
  otherUnit = o!.id;
  biomed = await addUser("biomed.import@example.invalid", "Rowan Biomed", [{ unitId: unit, role: "biomed" }]);
  biomedOther = await addUser("biomed.other@example.invalid", "Sasha Biomed", [{ unitId: otherUnit, role: "biomed" }]);
  clinician = await addUser("clinician.import@example.invalid", "Avery Clinician", [{ unitId: unit, role: "clinician" }]);
});
beforeEach(() => as(biomed));
afterAll(async () => {
  await scratch.cleanup();
});

describe("a good file", () => {
  // RFC 4180 rules 6 and 7: comma, doubled quote and a CRLF line break inside one quoted field.
  const NOTES = 'Loaned to 2E, returned "as is"\r\nsee service log';
  const QUOTED_NOTES = '"Loaned to 2E, returned ""as is""\r\nsee service log"';

  it("previews every row as will-be-added, writes no device, then imports all with the notes stored exactly", async () => {
    // A BOM, CRLF record ends (RFC 4180 rule 1), header names in another order and case.
    const text =
      "\uFEFF" +
      ["Notes,SERIAL,Manufacturer,model,firmware,RR_Resolution_ms,stream_url", `${QUOTED_NOTES},good-1,${MAKER},QF-9 (fictional),1.0.3,7.8125,http://127.0.0.1:3200/a`, `,good-2,${MAKER},QF-9 (fictional),2.1,4,https://devices.example.invalid/b`].join("\r\n") +
      "\r\n";
    const content = bytesOf(text);
    const before = await written();
    const preview = previewed(await upload(content));
    expect(preview).toMatchObject({ total: 2, toAdd: 2, withErrors: 0, fileName: "devices.csv" });
    // The quoted field spans lines 2 and 3, so the second record starts on line 4.
    expect(preview.rows.map((r) => [r.line, r.serial, r.outcome])).toEqual([[2, "GOOD-1", "add"], [4, "GOOD-2", "add"]]);
    expect(await written()).toEqual({ devices: before.devices, batches: before.batches + 1 });
    const batch = (await db("device_import_batches").where({ id: preview.batchId }).first())!;
    expect(batch).toMatchObject({ unit_id: unit, status: "previewed", created_by: biomed, sha256: createHash("sha256").update(content).digest("hex") });

    const done = await confirm(preview.batchId);
    expect(done).toMatchObject({ ok: true, data: { imported: 2 } });
    const devices = await db("devices").whereIn("serial", ["GOOD-1", "GOOD-2"]).orderBy("serial");
    expect(devices.map((d) => d.serial)).toEqual(["GOOD-1", "GOOD-2"]);
    expect(devices[0]).toMatchObject({ notes: NOTES, manufacturer: MAKER, unit_id: unit, registered_by: biomed, timestamp_resolution_ms: 7.8125 });
    expect(devices[1]).toMatchObject({ notes: "", firmware: "2.1", stream_url: "https://devices.example.invalid/b" });
    // Imported devices have no stream token; tokens are issued per device.
    expect(devices.every((d) => d.stream_token_hash === null && d.stream_token_enc === null)).toBe(true);
    expect((await db("device_import_batches").where({ id: preview.batchId }).first())!.status).toBe("imported");
    const importAudit = await db("audit_events").where({ action: "device.import", target_id: preview.batchId }).first();
    expect(importAudit).toMatchObject({ outcome: "success", actor_user_id: biomed, actor_role: "biomed", unit_id: unit });
    expect(importAudit!.detail).toEqual({ count: 2, batch_id: preview.batchId, sha256: batch.sha256 });
    const registerAudits = await db("audit_events").where({ action: "device.register" }).whereIn("target_id", devices.map((d) => d.id));
    expect(registerAudits).toHaveLength(2);
    expect(registerAudits.every((a) => a.detail.batch_id === preview.batchId)).toBe(true);
  });

  it("accepts the downloadable template as it is offered, with its example values", async () => {
    const preview = previewed(await upload(IMPORT_TEMPLATE_CSV, unit, "corvane-device-import-template.csv"));
    expect(preview.rows.map((r) => [r.line, r.serial, r.outcome])).toEqual([[2, IMPORT_COLUMN_GUIDE.serial.example, "add"], [3, IMPORT_COLUMN_GUIDE.serial.second, "add"]]);
  });

  it("refuses a second confirmation of the same batch and writes nothing more", async () => {
    const preview = previewed(await upload([HEADER, row("twice-1")].join("\n")));
    expect(await confirm(preview.batchId)).toMatchObject({ ok: true });
    const before = await written();
    const again = await confirm(preview.batchId);
    expect(again).toMatchObject({ ok: false, code: "conflict" });
    expect(again.message).toMatch(/already confirmed/);
    expect(await written()).toEqual(before);
  });
});

describe("line numbers", () => {
  it("stay right after a multi-line quoted field, with LF, with CRLF, and across a blank line", async () => {
    for (const nl of ["\n", "\r\n"]) {
      const tag = nl === "\n" ? "lf" : "crlf";
      const text = [
        HEADER, // line 1
        row(`${tag}-1`, `"three${nl}line${nl}note"`), // lines 2–4
        "", // line 5, empty (skipped)
        row(`${tag}-2`).replace("7.8125", "slow"), // line 6: not a number
        row(`${tag}-3`), // line 7
      ].join(nl);
      const preview = previewed(await upload(text));
      expect(preview.rows.map((r) => [r.line, r.outcome])).toEqual([[2, "add"], [6, "error"], [7, "add"]]);
      expect(preview.rows[1]!.errors).toEqual([{ column: "rr_resolution_ms", messages: ["Enter the RR resolution in milliseconds."] }]);
      expect(preview.withErrors).toBe(1);
    }
  });

  it("name the line of an unclosed quote (RFC 4180 rule 6) and write nothing", async () => {
    const before = await written();
    const text = [HEADER, row("uq-1", '"two\nlines"'), row("uq-2", '"never closed'), row("uq-3")].join("\n");
    const r = await upload(text);
    expect(r).toMatchObject({ ok: false, code: "invalid_input" });
    // Line 2–3 hold the first record, so the record with the open quote starts on line 4.
    expect(r.message).toMatch(/^Line 4: a quoted field that starts on this row is never closed/);
    expect(r.ok ? null : r.fieldErrors?.file).toEqual([r.message]);
    expect(await written()).toEqual(before);
  });

  it("name the line with a different number of fields (RFC 4180 rule 4)", async () => {
    const before = await written();
    const r = await upload([HEADER, row("fc-1"), row("fc-2", "a, b")].join("\n"));
    expect(r).toMatchObject({ ok: false, code: "invalid_input" });
    expect(r.message).toBe("Line 3 has 8 values; the header has 7. A value containing a comma must be in double quotes.");
    expect(await written()).toEqual(before);
  });

  it("name the line that is not UTF-8, and refuse binary content", async () => {
    const before = await written();
    const latin1 = bytesOf([HEADER, row("enc-1"), row("enc-2", "Caf?")].join("\n"));
    latin1[latin1.lastIndexOf("?".charCodeAt(0))] = 0xe9; // "é" in ISO-8859-1: a lone continuation-less lead byte in UTF-8
    expect((await upload(latin1)).message).toMatch(/^Line 3 is not UTF-8 text/);
    const nul = bytesOf([HEADER, row("bin-1"), "\u0000\u0001\u0002"].join("\n"));
    expect((await upload(nul)).message).toMatch(/^Line 3 holds control characters/);
    // A PNG's signature (PNG specification, section 5.2), recognised from the content, not the ".csv" name.
    const png = new Uint8Array([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13, 0x49, 0x48, 0x44, 0x52, 0, 0, 0, 1, 0, 0, 0, 1, 8, 2, 0, 0, 0]);
    expect((await upload(png)).message).toMatch(/^This is a PNG file \(recognised from its content\), not CSV text/);
    expect(await written()).toEqual(before);
  });
});

describe("rows with errors", () => {
  it("marks every row of a serial that appears twice in the file (any case) and cannot be confirmed", async () => {
    const before = await written();
    const preview = previewed(await upload([HEADER, row("dup-1"), row("ok-1"), row("Dup-1")].join("\n")));
    expect(preview.rows.map((r) => [r.line, r.outcome])).toEqual([[2, "error"], [3, "add"], [4, "error"]]);
    expect(preview.rows[0]!.errors).toEqual([{ column: "serial", messages: ["The same serial is also on line 4 of this file."] }]);
    expect(preview.rows[2]!.errors).toEqual([{ column: "serial", messages: ["The same serial is also on line 2 of this file."] }]);
    const r = await confirm(preview.batchId);
    expect(r).toMatchObject({ ok: false, code: "conflict" });
    expect(await count("devices")).toBe(before.devices);
  });

  it("marks a serial already registered, in this unit or another, and each field's own error", async () => {
    await db("devices").insert({ serial: "TAKEN-HERE", unit_id: unit, model: "m", firmware: "1", timestamp_resolution_ms: 1, stream_url: "http://x.invalid/" });
    await db("devices").insert({ serial: "TAKEN-ELSEWHERE", unit_id: otherUnit, model: "m", firmware: "1", timestamp_resolution_ms: 1, stream_url: "http://x.invalid/" });
    const bad = row("field-1").replace("7.8125", "25").replace("http://127.0.0.1:3200/devices/field-1/stream", "ftp://device.invalid/");
    const preview = previewed(await upload([HEADER, row("taken-here"), row("Taken-Elsewhere"), bad].join("\n")));
    expect(preview.rows.map((r) => [r.serial, r.errors])).toEqual([
      // Rows with errors show the serial as written in the file.
      ["taken-here", [{ column: "serial", messages: ["A device with this serial is already registered in this unit."] }]],
      ["Taken-Elsewhere", [{ column: "serial", messages: ["A device with this serial is already registered in another unit."] }]],
      [
        "field-1",
        [
          { column: "rr_resolution_ms", messages: ["The RR resolution is at most 20 ms; coarser clocks are not usable for variability."] },
          { column: "stream_url", messages: ["Enter the device's stream address, starting with http:// or https://."] },
        ],
      ],
    ]);
  });

  it("fails a confirmation whose serial was registered after the preview: no device written, batch failed with the reason", async () => {
    const preview = previewed(await upload([HEADER, row("late-1"), row("late-2"), row("late-3")].join("\n")));
    expect(preview.toAdd).toBe(3);
    await db("devices").insert({ serial: "LATE-2", unit_id: otherUnit, model: "m", firmware: "1", timestamp_resolution_ms: 1, stream_url: "http://x.invalid/" });
    const before = await count("devices");
    const r = await confirm(preview.batchId);
    expect(r).toMatchObject({ ok: false, code: "conflict", fieldErrors: { "line.3.serial": ["A device with this serial is already registered in another unit."] } });
    expect(r.message).toMatch(/^No device was imported: 1 row would now fail \(line 3\)/);
    expect(await count("devices")).toBe(before);
    expect(await db("devices").whereIn("serial", ["LATE-1", "LATE-3"])).toHaveLength(0);
    const batch = (await db("device_import_batches").where({ id: preview.batchId }).first())!;
    expect(batch.status).toBe("failed");
    expect((batch.rows as { line: number; outcome: string }[]).map((x) => [x.line, x.outcome])).toEqual([[2, "add"], [3, "error"], [4, "add"]]);
    expect(await db("audit_events").where({ action: "device.import", target_id: preview.batchId }).first()).toMatchObject({ outcome: "failure" });
    // A failed batch stays failed.
    expect(await confirm(preview.batchId)).toMatchObject({ ok: false, code: "conflict" });
    expect(await count("devices")).toBe(before);
  });

  it("refuses a preview older than an hour", async () => {
    const preview = previewed(await upload([HEADER, row("old-1")].join("\n")));
    await db.raw("UPDATE device_import_batches SET created_at = now() - interval '61 minutes' WHERE id = ?", [preview.batchId]);
    const r = await confirm(preview.batchId);
    expect(r).toMatchObject({ ok: false, code: "conflict" });
    expect(r.message).toMatch(/more than an hour old/);
    expect(await db("devices").where({ serial: "OLD-1" })).toHaveLength(0);
  });
});

describe("files that are refused whole", () => {
  it("an empty file, a header-only file and a file of blank lines", async () => {
    const before = await written();
    expect((await upload("")).message).toMatch(/^The file is empty/);
    expect((await upload(`${HEADER}\r\n`)).message).toBe("The file has a header row but no device rows. Add one row per device below the header.");
    expect((await upload("\uFEFF\r\n\r\n")).message).toMatch(/^The file has no rows/);
    expect(await written()).toEqual(before);
  });

  it("a header with an extra, a missing, a repeated or a misspelt column", async () => {
    const before = await written();
    const extra = await upload([`${HEADER},colour`, `${row("x-1")},blue`].join("\n"));
    expect(extra.message).toMatch(/^Line 1, the header row: unknown column colour\./);
    const missing = await upload(["serial,manufacturer,model,firmware,stream_url", `x-1,${MAKER},m,1,http://a.invalid/`].join("\n"));
    expect(missing.message).toMatch(/^Line 1, the header row: missing column rr_resolution_ms\./);
    const repeated = await upload([`${HEADER},Serial`, `${row("x-1")},x-1`].join("\n"));
    expect(repeated.message).toMatch(/serial appears more than once/);
    const noHeader = await upload([row("x-1"), row("x-2")].join("\n"));
    expect(noHeader).toMatchObject({ ok: false, code: "invalid_input" });
    expect(noHeader.message).toMatch(/^Line 1, the header row: .*unknown columns .*missing columns serial, manufacturer, model, firmware, rr_resolution_ms, stream_url/);
    // notes may be left out of the header.
    expect(previewed(await upload(["serial,manufacturer,model,firmware,rr_resolution_ms,stream_url", `no-notes-1,${MAKER},m,1,2,http://a.invalid/`].join("\n"))).toAdd).toBe(1);
    expect(await written()).toEqual({ devices: before.devices, batches: before.batches + 1 });
  });

  it("more than 1,000 rows or more than 1 MB", async () => {
    const before = await written();
    const many = [HEADER, ...Array.from({ length: 1001 }, (_, i) => row(`many-${i}`))].join("\n");
    expect((await upload(many)).message).toMatch(/^The file has 1,001 device rows; one import takes at most 1,000/);
    const big = await upload(`${HEADER}\n${row("big-1", `"${"x".repeat(1024 * 1024)}"`)}`);
    expect(big).toMatchObject({ ok: false, code: "invalid_input", fieldErrors: { file: ["The file is larger than 1 MB. Split it into smaller files."] } });
    expect(await written()).toEqual(before);
  });
});

describe("who may import", () => {
  it("refuses a person without devices.manage in the unit, writing nothing but the refusal's audit", async () => {
    const text = [HEADER, row("who-1")].join("\n");
    const before = await written();
    as(clinician);
    expect(await upload(text)).toMatchObject({ ok: false, code: "forbidden" });
    as(biomedOther);
    expect(await upload(text)).toMatchObject({ ok: false, code: "forbidden" });
    expect(await written()).toEqual(before);
    expect(await db("audit_events").where({ action: "access.denied", actor_user_id: biomedOther }).first()).toMatchObject({ outcome: "denied", unit_id: unit });

    as(biomed);
    const preview = previewed(await upload(text));
    const afterPreview = await written();
    as(clinician);
    expect(await confirm(preview.batchId)).toMatchObject({ ok: false, code: "forbidden" });
    as(biomedOther);
    expect(await confirm(preview.batchId)).toMatchObject({ ok: false, code: "forbidden" });
    // Named with their own unit, the batch of another unit is simply not found.
    expect(await confirm(preview.batchId, otherUnit)).toMatchObject({ ok: false, code: "not_found" });
    as(null);
    expect(await confirm(preview.batchId)).toMatchObject({ ok: false, code: "unauthorized" });
    expect(await written()).toEqual(afterPreview);
    expect((await db("device_import_batches").where({ id: preview.batchId }).first())!.status).toBe("previewed");
  });
});
