// The maintenance log on real PostgreSQL: entries with PDF and PNG attachments stored byte for byte (SHA-256 checked
// against node:crypto), a firmware update changing the device's firmware, bad uploads refused with the file's name
// and nothing written, dates checked in the unit's time zone, the due buckets at their bounds, downloads only through
// the device the attachment belongs to, and the demo seed (idempotent, one attachment per unit).
//
// Magic numbers the files below rely on: PDF header "%PDF-" (ISO 32000-1 §7.5.2) and "%%EOF" (§7.5.5); PNG signature
// 89 50 4E 47 0D 0A 1A 0A and chunk layout (PNG spec, ISO/IEC 15948, §5.2, §5.3, §11.2); JPEG SOI FF D8, SOS FF DA,
// EOI FF D9 (ITU-T T.81, Table B.1); Windows programs start with "MZ" (Microsoft PE format, "MS-DOS stub").
import { createHash, randomBytes } from "node:crypto";
import { deflateSync, crc32 } from "node:zlib";
import type { Knex } from "knex";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Actor } from "@/lib/auth/guard";
import { MAX_ATTACHMENT_BYTES, safeFileName } from "@/lib/devices/attachments";
import { addMaintenanceEntry, attachmentForDownload, dueList, maintenanceLog } from "@/lib/devices/maintenance";
import { maintenanceEntrySchema } from "@/lib/devices/maintenance.validation";
import { verifyAuditChain } from "@/lib/audit/verify";
import { seed } from "@/seeds/01_demo";
import { seedDeviceMaintenance, serviceReportPdf } from "@/seeds/03_device_maintenance";
import { DEMO_UNITS, demoPerson } from "@/seeds/demo-data";
import { scratchDatabase } from "@/tests/support/db";

let db: Knex;
let cleanup: () => Promise<void>;
let unit4W: string;
let unit2E: string;
let biomed: Actor;

// ---- files built from their specifications ----

/** A 1×1 RGB PNG: signature, IHDR, IDAT (zlib stream of one filtered scanline), IEND, each chunk with its CRC-32;
 *  `paddingBytes` adds a private ancillary chunk "prVt" of that size (§5.4: readers skip unknown ancillary chunks). */
function onePixelPng(paddingBytes = 0): Buffer {
  const chunk = (type: string, data: Buffer) => {
    const len = Buffer.alloc(4);
    len.writeUInt32BE(data.length);
    const body = Buffer.concat([Buffer.from(type, "latin1"), data]);
    const crc = Buffer.alloc(4);
    crc.writeUInt32BE(crc32(body));
    return Buffer.concat([len, body, crc]);
  };
  const ihdr = Buffer.alloc(13);
  ihdr.writeUInt32BE(1, 0); // width
  ihdr.writeUInt32BE(1, 4); // height
  ihdr[8] = 8; // bit depth
  ihdr[9] = 2; // colour type: truecolour
  return Buffer.concat([
    Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]),
    chunk("IHDR", ihdr),
    ...(paddingBytes ? [chunk("prVt", Buffer.alloc(paddingBytes))] : []),
    chunk("IDAT", deflateSync(Buffer.from([0, 0x86, 0xc5, 0xd8]))),
    chunk("IEND", Buffer.alloc(0)),
  ]);
}

/** An 8×8 greyscale JPEG written by Ghostscript 10.00.0 (jpeggray device) from a one-page PDF, its ICC APP2 segment
 *  removed (332 bytes; `file` reads it as "JPEG image data, JFIF standard 1.01 … baseline, 8x8"). */
const TINY_JPEG = Buffer.from(
  "/9j/4AAQSkZJRgABAQEACQAJAAD/2wBDABALDA4MChAODQ4SERATGCgaGBYWGDEjJR0oOjM9PDkzODdASFxOQERXRTc4UG1RV19iZ2hnPk1xeXBkeFxlZ2P/wAALCAAIAAgBAREA/8QAHwAAAQUBAQEBAQEAAAAAAAAAAAECAwQFBgcICQoL/8QAtRAAAgEDAwIEAwUFBAQAAAF9AQIDAAQRBRIhMUEGE1FhByJxFDKBkaEII0KxwRVS0fAkM2JyggkKFhcYGRolJicoKSo0NTY3ODk6Q0RFRkdISUpTVFVWV1hZWmNkZWZnaGlqc3R1dnd4eXqDhIWGh4iJipKTlJWWl5iZmqKjpKWmp6ipqrKztLW2t7i5usLDxMXGx8jJytLT1NXW19jZ2uHi4+Tl5ufo6erx8vP09fb3+Pn6/9oACAEBAAA/APQK/9k=",
  "base64",
);

const PDF = serviceReportPdf(["Service report (fictional)", "Test device", "Invented for a test."]);
const PNG = onePixelPng();
const file = (bytes: Buffer | string, name: string) => new File([typeof bytes === "string" ? bytes : new Uint8Array(bytes)], name);
const sha256 = (b: Buffer) => createHash("sha256").update(b).digest("hex");

// ---- fixtures ----

async function makeUnit(timeZone: string) {
  const code = `T${randomBytes(3).toString("hex")}`;
  const [u] = await db("units").insert({ code, name: `Test unit ${code} (fictional)`, kind: "adult", time_zone: timeZone }).returning("id");
  return u!.id as string;
}

async function makeDevice(unitId: string, o: { status?: "active" | "maintenance" | "decommissioned"; firmware?: string } = {}) {
  const serial = `TST-${randomBytes(4).toString("hex").toUpperCase()}`;
  const [d] = await db("devices")
    .insert({
      serial, model: "Test monitor (fictional)", firmware: o.firmware ?? "1.0.0", unit_id: unitId, timestamp_resolution_ms: 1,
      stream_url: `http://127.0.0.1:1/devices/${serial}/stream`, status: o.status ?? "active",
    })
    .returning(["id", "serial"]);
  return d!;
}

/** The form as guardedAction hands it to the schema (strings, and the chosen files). */
const form = (deviceId: string, o: Record<string, unknown> = {}, unitId = unit4W) => ({
  unitId, deviceId, kind: "preventive", performedOn: "2026-11-20", performedBy: "Test Technician (fictional)", note: "", ...o,
});

const add = (deviceId: string, o: Record<string, unknown> = {}, unitId = unit4W, now?: Date) =>
  addMaintenanceEntry(biomed, maintenanceEntrySchema.parse(form(deviceId, o, unitId)), db, now);

async function counts() {
  const n = async (q: Knex.QueryBuilder) => Number((await q.count<{ n: string }[]>("* as n"))[0]!.n);
  return {
    entries: await n(db("device_maintenance")),
    attachments: await n(db("device_attachments")),
    audits: await n(db("audit_events").where({ action: "device.maintenance.add" })),
    firmware: (await db("devices").orderBy("id").select("id", "firmware")).map((d) => `${d.id}:${d.firmware}`).join(","),
  };
}

beforeAll(async () => {
  ({ db, cleanup } = await scratchDatabase());
  await seed(db);
  unit4W = (await db("units").where({ code: "4W" }).first("id"))!.id;
  unit2E = (await db("units").where({ code: "2E" }).first("id"))!.id;
  const u = (await db("users").where({ email: demoPerson("biomed").email }).first("id", "email", "name"))!;
  biomed = {
    userId: u.id, email: u.email, name: u.name, requestId: "req-maintenance-test", clientAddress: null,
    grants: [{ unitId: unit4W, role: "biomed" }, { unitId: unit2E, role: "biomed" }],
  };
});
afterAll(async () => {
  await cleanup?.();
});

describe("the demo maintenance seed", () => {
  it("runs after the demo seed, inserts once, and a second run inserts nothing", async () => {
    const first = await seedDeviceMaintenance(db);
    expect(first.inserted.entries).toBeGreaterThan(0);
    expect(first.inserted.attachments).toBe(DEMO_UNITS.length);
    const before = await counts();
    const second = await seedDeviceMaintenance(db);
    expect(second.inserted).toEqual({ entries: 0, attachments: 0 });
    expect(await counts()).toEqual(before);
    expect((await verifyAuditChain({}, db)).ok).toBe(true);
  });

  it("gives every unit a device with a downloadable PDF, and some devices overdue and some due soon", async () => {
    for (const u of DEMO_UNITS) {
      const unitId = (await db("units").where({ code: u.code }).first("id"))!.id;
      const f = await db("device_attachments as f").join("device_maintenance as m", "m.id", "f.maintenance_id").join("devices as d", "d.id", "m.device_id")
        .where("d.unit_id", unitId).first("f.id", "m.device_id");
      expect(f, `an attachment in ${u.code}`).toBeDefined();
      const download = (await attachmentForDownload(unitId, f!.device_id, f!.id, db))!;
      expect(download.contentType).toBe("application/pdf");
      expect(download.content.subarray(0, 5).toString("latin1")).toBe("%PDF-"); // ISO 32000-1 §7.5.2
      expect(download.content.subarray(-6).toString("latin1")).toBe("%%EOF\n"); // ISO 32000-1 §7.5.5
      expect(download.sha256).toBe(sha256(download.content));
      const due = (await dueList(unitId, new Date(), db))!;
      expect(due.overdue.length, `overdue in ${u.code}`).toBeGreaterThan(0);
      expect(due.dueSoon.length, `due soon in ${u.code}`).toBeGreaterThan(0);
      expect(due.noMaintenance.length, `never maintained in ${u.code}`).toBeGreaterThan(0);
    }
  });
});

describe("recording maintenance", () => {
  it("stores a PDF and a PNG byte for byte, with types from the content and SHA-256 as node:crypto computes it", async () => {
    const d = await makeDevice(unit4W);
    // The PNG is named .pdf: its content decides its type, and its stored name gets the matching extension.
    const r = await add(d.id, { note: "Checked and cleaned.", nextDueOn: "2027-05-20", files: [file(PDF, "report.pdf"), file(PNG, "photo of label.pdf")] });
    expect(r).toMatchObject({ ok: true });
    const stored = await db("device_attachments as f").join("device_maintenance as m", "m.id", "f.maintenance_id")
      .where("m.device_id", d.id).orderBy("f.file_name").select("f.*");
    expect(stored.map((s) => [s.file_name, s.content_type, s.size_bytes])).toEqual([
      ["photo of label.png", "image/png", PNG.length],
      ["report.pdf", "application/pdf", PDF.length],
    ]);
    expect(Buffer.compare(stored[0]!.content, PNG)).toBe(0);
    expect(Buffer.compare(stored[1]!.content, PDF)).toBe(0);
    expect(stored[0]!.sha256).toBe(sha256(PNG));
    expect(stored[1]!.sha256).toBe(sha256(PDF));

    const log = (await maintenanceLog(d.id, db))!;
    expect(log.nextDueOn).toBe("2027-05-20");
    expect(log.entries[0]!.attachments.map((a) => Object.keys(a).sort())).toEqual([["id", "name", "sizeBytes", "type"], ["id", "name", "sizeBytes", "type"]]);

    const audit = (await db("audit_events").where({ action: "device.maintenance.add", target_id: d.id }).first())!;
    expect(audit.detail).toMatchObject({ kind: "preventive", performedOn: "2026-11-20", nextDueOn: "2027-05-20", noteLength: 20, attachmentCount: 2 });
    expect(JSON.stringify(audit.detail)).not.toContain("Checked and cleaned");
    expect((audit.detail.attachments as { sha256: string }[]).map((a) => a.sha256).sort()).toEqual([sha256(PDF), sha256(PNG)].sort());
  });

  it("accepts a JPEG and reads one file chosen alone the same as a list", async () => {
    const d = await makeDevice(unit4W);
    expect(await add(d.id, { files: file(TINY_JPEG, "label.jpeg") })).toMatchObject({ ok: true });
    const f = (await db("device_attachments as f").join("device_maintenance as m", "m.id", "f.maintenance_id").where("m.device_id", d.id).first("f.*"))!;
    expect([f.content_type, f.file_name, Buffer.compare(f.content, TINY_JPEG)]).toEqual(["image/jpeg", "label.jpeg", 0]);
  });

  it("a firmware update records the version it replaced and changes the device's firmware", async () => {
    const d = await makeDevice(unit4W, { firmware: "3.1.0" });
    expect(await add(d.id, { kind: "firmware_update", firmwareAfter: "3.2.0" })).toMatchObject({ ok: true });
    expect((await db("devices").where({ id: d.id }).first("firmware"))!.firmware).toBe("3.2.0");
    const e = (await maintenanceLog(d.id, db))!.entries[0]!;
    expect([e.kind, e.firmwareBefore, e.firmwareAfter]).toEqual(["firmware_update", "3.1.0", "3.2.0"]);
    // Other kinds carry no firmware version, whatever the form sent, and leave the device's as it is.
    expect(await add(d.id, { kind: "repair", firmwareAfter: "9.9.9" })).toMatchObject({ ok: true });
    expect((await db("devices").where({ id: d.id }).first("firmware"))!.firmware).toBe("3.2.0");
  });

  it("lists entries newest first; the next due date is the latest entry's that set one", async () => {
    const d = await makeDevice(unit4W);
    await add(d.id, { performedOn: "2026-01-10", nextDueOn: "2026-07-10" });
    await add(d.id, { performedOn: "2026-08-01", nextDueOn: "2027-02-01" });
    await add(d.id, { kind: "repair", performedOn: "2026-10-05" });
    const log = (await maintenanceLog(d.id, db))!;
    expect(log.entries.map((e) => e.performedOn)).toEqual(["2026-10-05", "2026-08-01", "2026-01-10"]);
    expect(log.nextDueOn).toBe("2027-02-01");
  });
});

describe("refusals change nothing", () => {
  const refused = async (o: Record<string, unknown>, field: string, pattern: RegExp) => {
    const d = await makeDevice(unit4W);
    const before = await counts();
    const parsed = maintenanceEntrySchema.safeParse(form(d.id, o));
    if (!parsed.success) {
      const messages = parsed.error.issues.filter((i) => i.path[0] === field).map((i) => i.message);
      expect(messages.join(" ")).toMatch(pattern);
    } else {
      const r = await addMaintenanceEntry(biomed, parsed.data, db);
      expect(r.ok).toBe(false);
      expect(r.ok ? [] : r.fieldErrors?.[field] ?? []).toEqual(expect.arrayContaining([expect.stringMatching(pattern)]));
    }
    expect(await counts()).toEqual(before);
  };

  it("a text file named report.pdf, said to be plain text", () =>
    refused({ files: [file("Service report\nAll fine.\n", "report.pdf")] }, "files", /^"report\.pdf" is plain text by its content, not a PDF, PNG or JPEG/));

  it("a Windows program renamed .pdf, said to be one", () =>
    refused({ files: [file(Buffer.concat([Buffer.from("MZ"), Buffer.alloc(510)]), "setup.pdf")] }, "files", /^"setup\.pdf" is a Windows program \(application\/x-msdownload\)/));

  it("a GIF renamed .png, named as a GIF", () =>
    refused({ files: [file(Buffer.concat([Buffer.from("GIF89a"), Buffer.alloc(40)]), "scan.png")] }, "files", /^"scan\.png" is a GIF image \(image\/gif\)/));

  it("a PNG cut short after its signature", () =>
    refused({ files: [file(PNG.subarray(0, 8), "photo.png")] }, "files", /^"photo\.png" starts like a PNG image but is cut short/));

  it("a PNG cut short inside its image data (no IEND)", () =>
    refused({ files: [file(PNG.subarray(0, PNG.length - 14), "photo.png")] }, "files", /^"photo\.png" starts like a PNG image but is cut short/));

  it("a PDF without its end-of-file marker", () =>
    refused({ files: [file(PDF.subarray(0, PDF.length - 40), "report.pdf")] }, "files", /^"report\.pdf" starts like a PDF but is cut short/));

  it("a JPEG cut off inside its scan (no EOI)", () =>
    refused({ files: [file(TINY_JPEG.subarray(0, TINY_JPEG.length - 2), "label.jpg")] }, "files", /^"label\.jpg" starts like a JPEG image but is cut short/));

  it("a file of 8 MB + 1 byte", () =>
    refused({ files: [file(Buffer.concat([PDF, Buffer.alloc(MAX_ATTACHMENT_BYTES + 1 - PDF.length)]), "big.pdf")] }, "files", /^"big\.pdf" is larger than the 8 MB limit per file \(8,388,609 bytes\)/));

  it("an empty file", () => refused({ files: [file("", "empty.pdf")] }, "files", /^"empty\.pdf" is empty/));

  it("six files", () => refused({ files: Array.from({ length: 6 }, (_, i) => file(PDF, `r${i}.pdf`)) }, "files", /at most 5 files.*6 were chosen/));

  it("files over 8 MB together, though each is under it", () =>
    refused({ files: [0, 1].map((i) => file(onePixelPng(5 * 1024 * 1024), `r${i}.png`)) }, "files", /These 2 files come to 10 MB; one entry takes at most 8 MB/));

  it("one bad file among good ones: the whole entry, naming the bad file", () =>
    refused({ files: [file(PDF, "good.pdf"), file("just text", "notes.pdf"), file(PNG, "good.png")] }, "files", /^"notes\.pdf" is plain text/));

  it("a next due date on or before the day of the work", async () => {
    await refused({ performedOn: "2026-11-20", nextDueOn: "2026-11-19" }, "nextDueOn", /must be after the date of the work \(2026-11-20\)/);
    await refused({ performedOn: "2026-11-20", nextDueOn: "2026-11-20" }, "nextDueOn", /must be after/);
  });

  it("a date that is not in the calendar", () => refused({ performedOn: "2026-02-30" }, "performedOn", /not a calendar date/));

  it("a firmware update without the new version", () => refused({ kind: "firmware_update", firmwareAfter: " " }, "firmwareAfter", /Enter the firmware version/));

  it("work dated after today in the unit's time zone", async () => {
    const d = await makeDevice(unit4W);
    // 2026-03-10 03:30 UTC is 2026-03-09 23:30 in New York (EDT, UTC−4, since 8 March 2026; IANA tz database).
    const now = new Date("2026-03-10T03:30:00Z");
    const before = await counts();
    const r = await add(d.id, { performedOn: "2026-03-10" }, unit4W, now);
    expect(r).toMatchObject({ ok: false, code: "invalid_input", fieldErrors: { performedOn: [expect.stringMatching(/today is 2026-03-09/)] } });
    expect(await counts()).toEqual(before);
    expect(await add(d.id, { performedOn: "2026-03-09" }, unit4W, now)).toMatchObject({ ok: true });
  });

  it("a decommissioned device, and a device of another unit", async () => {
    const gone = await makeDevice(unit4W, { status: "decommissioned" });
    const elsewhere = await makeDevice(unit2E);
    const before = await counts();
    expect(await add(gone.id)).toMatchObject({ ok: false, code: "conflict" });
    expect(await add(elsewhere.id, {}, unit4W)).toMatchObject({ ok: false, code: "not_found" });
    expect(await counts()).toEqual(before);
  });
});

describe("the due list", () => {
  it("sorts devices at the bucket bounds by today in the unit's time zone", async () => {
    const unitId = await makeUnit("America/New_York");
    // 2027-01-15 03:00 UTC is 2027-01-14 22:00 in New York (EST, UTC−5; IANA tz database): today is the 14th there,
    // while the UTC date is already the 15th. Due soon runs to today + 30 days = 2027-02-13 (calendar arithmetic).
    const now = new Date("2027-01-15T03:00:00Z");
    const entry = async (deviceId: string, performedOn: string, nextDueOn?: string) =>
      expect(await add(deviceId, { performedOn, nextDueOn }, unitId, now)).toMatchObject({ ok: true });
    const dev = async (label: string, o?: Parameters<typeof makeDevice>[1]) => ({ label, ...(await makeDevice(unitId, o)) });

    const yesterday = await dev("due yesterday");
    await entry(yesterday.id, "2026-07-14", "2027-01-13");
    const today = await dev("due today");
    await entry(today.id, "2026-07-14", "2027-01-14");
    const day30 = await dev("due in 30 days");
    await entry(day30.id, "2026-08-13", "2027-02-13");
    const day31 = await dev("due in 31 days");
    await entry(day31.id, "2026-08-14", "2027-02-14");
    const never = await dev("no maintenance");
    const noDate = await dev("no next due date");
    await entry(noDate.id, "2026-12-01");
    const stillOverdue = await dev("repair since, no new date");
    await entry(stillOverdue.id, "2026-01-01", "2027-01-01");
    await entry(stillOverdue.id, "2027-01-10");
    const rescheduled = await dev("earlier overdue date replaced by a later one");
    await entry(rescheduled.id, "2026-01-01", "2027-01-01");
    await entry(rescheduled.id, "2027-01-12", "2027-07-12");
    const decommissioned = await dev("decommissioned", { status: "decommissioned" });
    await db("device_maintenance").insert({ device_id: decommissioned.id, kind: "preventive", performed_on: "2026-01-01", performed_by_name: "x", next_due_on: "2026-06-01", recorded_by: null });

    const due = (await dueList(unitId, now, db))!;
    const ids = (xs: { id: string }[]) => xs.map((x) => x.id);
    expect(due.today).toBe("2027-01-14");
    expect(ids(due.overdue)).toEqual([stillOverdue.id, yesterday.id]); // most overdue first
    expect(due.overdue.map((d) => d.daysUntilDue)).toEqual([-13, -1]);
    expect(ids(due.dueSoon)).toEqual([today.id, day30.id]);
    expect(due.dueSoon.map((d) => d.daysUntilDue)).toEqual([0, 30]);
    expect(ids(due.later)).toEqual([day31.id, rescheduled.id]);
    expect(due.later.map((d) => d.daysUntilDue)).toEqual([31, 179]);
    expect(ids(due.noDueDate)).toEqual([noDate.id]);
    expect(ids(due.noMaintenance)).toEqual([never.id]);
    const all = [...due.overdue, ...due.dueSoon, ...due.later, ...due.noDueDate, ...due.noMaintenance];
    expect(all.map((d) => d.id)).not.toContain(decommissioned.id);
    expect(all).toHaveLength(8);

    // One day later in New York the device due "today" is overdue.
    const tomorrow = (await dueList(unitId, new Date("2027-01-15T05:00:00Z"), db))!;
    expect(tomorrow.today).toBe("2027-01-15");
    expect(ids(tomorrow.overdue)).toContain(today.id);
  });

  it("is null for an unknown unit", async () => {
    expect(await dueList("00000000-0000-4000-8000-000000000000", new Date(), db)).toBeNull();
  });
});

describe("downloads", () => {
  it("finds an attachment only through its own device and unit", async () => {
    const owner = await makeDevice(unit4W);
    const other = await makeDevice(unit4W);
    expect(await add(owner.id, { files: [file(PDF, "r.pdf")] })).toMatchObject({ ok: true });
    const id = (await db("device_attachments as f").join("device_maintenance as m", "m.id", "f.maintenance_id").where("m.device_id", owner.id).first("f.id"))!.id;
    const got = (await attachmentForDownload(unit4W, owner.id, id, db))!;
    expect([got.fileName, got.contentType, got.sizeBytes, Buffer.compare(got.content, PDF)]).toEqual(["r.pdf", "application/pdf", PDF.length, 0]);
    expect(await attachmentForDownload(unit4W, other.id, id, db)).toBeNull();
    expect(await attachmentForDownload(unit2E, owner.id, id, db)).toBeNull();
  });
});

describe("safe display file names", () => {
  it("strips folders, control and bidi characters, keeps names short and the extension true to the content", () => {
    expect(safeFileName("C:\\Users\\tech\\report.pdf", "application/pdf")).toBe("report.pdf");
    expect(safeFileName("../../etc/passwd", "application/pdf")).toBe("passwd.pdf");
    // U+202E RIGHT-TO-LEFT OVERRIDE would show "report\u202Efdp.exe" as "reportexe.pdf".
    expect(safeFileName("report\u202Efdp.exe", "image/png")).toBe("reportfdp.exe.png");
    expect(safeFileName("line\r\nbreak\u0000.jpg", "image/jpeg")).toBe("linebreak.jpg");
    expect(safeFileName("scan.JPEG", "image/jpeg")).toBe("scan.JPEG");
    expect(safeFileName("   ", "application/pdf")).toBe("attachment.pdf");
    expect(safeFileName(".pdf", "application/pdf")).toBe("pdf.pdf");
    const long = safeFileName(`${"a".repeat(300)}.pdf`, "application/pdf");
    expect(Array.from(long)).toHaveLength(120);
    expect(long.endsWith("….pdf")).toBe(true);
  });
});
