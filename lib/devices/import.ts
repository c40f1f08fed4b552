// CSV import of devices: a dry run that reads the whole file, checks every row and stores the batch exactly as
// previewed; and a confirmation that writes every row of that batch or none. The CSV dialect is RFC 4180 (comma,
// double quotes, "" for a quote inside a quoted field, line breaks allowed inside quoted fields) read by csv-parse;
// the header row names the columns (any order, any case).
import "server-only";
import { createHash } from "node:crypto";
import { CsvError, parse } from "csv-parse/sync";
import { fileTypeFromBuffer } from "file-type";
import type { Knex } from "knex";
import { z } from "zod";
import type { ActionResult } from "@/lib/auth/action-result";
import { auditAs, type Actor } from "@/lib/auth/guard";
import { db as defaultDb } from "@/lib/db/knex";
import { deviceFieldsSchema, type DeviceFields } from "./device-fields.validation";
import { IMPORT_COLUMNS, MAX_IMPORT_BYTES, MAX_IMPORT_ROWS, REQUIRED_IMPORT_COLUMNS, type ImportColumn } from "./import.validation";
import { insertDevice } from "./registry";

/** How long a preview may be confirmed: long enough to read it, short enough that it still describes the registry. */
const CONFIRM_WITHIN = "1 hour";

/** A data row of the file with the physical line its record starts on (1-based, header = its own line). */
interface CsvDeviceRow {
  line: number;
  cells: Record<ImportColumn, string>;
}

type CsvReadResult = { ok: true; rows: CsvDeviceRow[] } | { ok: false; message: string };

/** The schema field each column fills. */
const FIELD_OF: Record<ImportColumn, keyof DeviceFields> = {
  serial: "serial",
  manufacturer: "manufacturer",
  model: "model",
  firmware: "firmware",
  rr_resolution_ms: "timestampResolutionMs",
  stream_url: "streamUrl",
  notes: "notes",
};
const columnOf = (field: PropertyKey | undefined): ImportColumn => IMPORT_COLUMNS.find((c) => FIELD_OF[c] === field) ?? "serial";

const CR = 0x0d;
const LF = 0x0a;
const UTF8_BOM = [0xef, 0xbb, 0xbf];
const SAVE_AS = 'Save the sheet as "CSV UTF-8 (comma delimited)" and upload that file.';
const list = (xs: readonly string[]) => xs.join(", ");

/**
 * Offsets where each physical line starts. A line ends at CRLF, LF or a lone CR (one break each), wherever it is —
 * also inside a quoted field, so a record's line is the one an editor shows. csv-parse's own `info.lines` counts a
 * CRLF inside quotes twice, hence this count.
 */
function lineStarts(bytes: Uint8Array): number[] {
  const starts = [0];
  for (let i = 0; i < bytes.length; i++) {
    if (bytes[i] === CR && bytes[i + 1] === LF) i++;
    if (bytes[i] === CR || bytes[i] === LF) starts.push(i + 1);
  }
  return starts;
}

/** The 1-based line holding byte `offset`. */
function lineAt(starts: number[], offset: number): number {
  let lo = 0;
  let hi = starts.length - 1;
  while (lo < hi) {
    const mid = (lo + hi + 1) >> 1;
    if (starts[mid]! <= offset) lo = mid;
    else hi = mid - 1;
  }
  return lo + 1;
}

/** The first offset at or after `from` that is not a line break (csv-parse skips empty lines between records). */
function skipBreaks(bytes: Uint8Array, from: number): number {
  let i = from;
  while (i < bytes.length && (bytes[i] === CR || bytes[i] === LF)) i++;
  return i;
}

/** The first line that is not UTF-8 text or holds control characters (binary content), or null. */
function badTextLine(bytes: Uint8Array, starts: number[]): { line: number; why: "encoding" | "binary" } | null {
  const decoder = new TextDecoder("utf-8", { fatal: true });
  for (let n = 0; n < starts.length; n++) {
    // A line break byte is never part of a multi-byte UTF-8 sequence, so each line decodes on its own.
    const line = bytes.subarray(starts[n], n + 1 < starts.length ? starts[n + 1] : bytes.length);
    let text: string;
    try {
      text = decoder.decode(line);
    } catch {
      return { line: n + 1, why: "encoding" };
    }
    // Tab, CR and LF are text; every other C0 control (NUL above all) and DEL is not found in a typed sheet.
    if (/[\u0000-\u0008\u000b\u000c\u000e-\u001f\u007f]/.test(text)) return { line: n + 1, why: "binary" };
  }
  return null;
}

function csvErrorMessage(err: CsvError, line: number, headerLength: number): string {
  switch (err.code) {
    case "CSV_QUOTE_NOT_CLOSED":
      return `Line ${line}: a quoted field that starts on this row is never closed. Each value that opens with a double quote must end with one (RFC 4180); a double quote inside a value is written twice ("").`;
    case "CSV_INVALID_CLOSING_QUOTE":
      return `Line ${line}: a quoted value is followed by more characters before the next comma. Write a double quote inside a quoted value twice ("").`;
    case "INVALID_OPENING_QUOTE":
      return `Line ${line}: a double quote appears inside a value that is not quoted. Put the whole value in double quotes and write the quote twice ("").`;
    case "CSV_RECORD_INCONSISTENT_FIELDS_LENGTH": {
      const got = Array.isArray(err.record) ? err.record.length : null;
      return `Line ${line} has ${got ?? "a different number of"} value${got === 1 ? "" : "s"}; the header has ${headerLength}. A value containing a comma must be in double quotes.`;
    }
    default:
      return `Line ${line} could not be read as CSV (${err.code}). ${SAVE_AS}`;
  }
}

/**
 * Reads an uploaded file into device rows, or says what is wrong with it (and on which line). Checks, in order:
 * size, binary formats recognised by their content (a spreadsheet workbook, a PDF …), UTF-8, control characters,
 * CSV syntax, the header, and that there is at least one and at most MAX_IMPORT_ROWS data rows.
 */
async function readDeviceCsv(upload: Uint8Array): Promise<CsvReadResult> {
  if (upload.length === 0) return { ok: false, message: "The file is empty. Upload a CSV file with a header row and one row per device." };
  if (upload.length > MAX_IMPORT_BYTES) return { ok: false, message: "The file is larger than 1 MB. Split it into smaller files." };
  const kind = await fileTypeFromBuffer(upload);
  if (kind) return { ok: false, message: `This is a ${kind.ext.toUpperCase()} file (recognised from its content), not CSV text. ${SAVE_AS}` };

  const hasBom = UTF8_BOM.every((b, i) => upload[i] === b);
  const bytes = hasBom ? upload.subarray(UTF8_BOM.length) : upload;
  const starts = lineStarts(bytes);
  const bad = badTextLine(bytes, starts);
  if (bad?.why === "encoding") return { ok: false, message: `Line ${bad.line} is not UTF-8 text. ${SAVE_AS}` };
  if (bad) return { ok: false, message: `Line ${bad.line} holds control characters: this looks like binary content, not CSV text. ${SAVE_AS}` };
  if (skipBreaks(bytes, 0) === bytes.length) return { ok: false, message: "The file has no rows. Upload a CSV file with a header row and one row per device." };

  // Where each record ends (byte offset after its record delimiter), kept as records arrive, so an error can name
  // the line of the record that failed: it starts after the last record that was read.
  const ends: number[] = [];
  let headerLength = 0;
  let records: string[][];
  try {
    records = parse(bytes, {
      delimiter: ",",
      quote: '"',
      escape: '"',
      skip_empty_lines: true,
      on_record: (record: string[], info) => {
        if (ends.length === 0) headerLength = record.length;
        ends.push(info.bytes);
        return record;
      },
    });
  } catch (err) {
    if (!(err instanceof CsvError)) throw err;
    const line = lineAt(starts, skipBreaks(bytes, ends.at(-1) ?? 0));
    return { ok: false, message: csvErrorMessage(err, line, headerLength) };
  }
  const recordLine = (i: number) => lineAt(starts, skipBreaks(bytes, i === 0 ? 0 : ends[i - 1]!));

  const [header, ...data] = records;
  const headerLine = recordLine(0);
  const names = header!.map((h) => h.trim().toLowerCase());
  const problems: string[] = [];
  const blank = names.flatMap((n, i) => (n === "" ? [String(i + 1)] : []));
  if (blank.length) problems.push(`column${blank.length > 1 ? "s" : ""} ${list(blank)} ${blank.length > 1 ? "have" : "has"} no name`);
  const twice = [...new Set(names.filter((n, i) => n !== "" && names.indexOf(n) !== i))];
  if (twice.length) problems.push(`${list(twice)} ${twice.length > 1 ? "appear" : "appears"} more than once`);
  // Cut, so a data row mistaken for the header cannot flood the message.
  const unknown = names.filter((n) => n !== "" && !(IMPORT_COLUMNS as readonly string[]).includes(n)).map((n) => (n.length > 40 ? `${n.slice(0, 40)}…` : n));
  if (unknown.length) problems.push(`unknown column${unknown.length > 1 ? "s" : ""} ${list(unknown)}`);
  const missing = REQUIRED_IMPORT_COLUMNS.filter((c) => !names.includes(c));
  if (missing.length) problems.push(`missing column${missing.length > 1 ? "s" : ""} ${list(missing)}`);
  if (problems.length) {
    return {
      ok: false,
      message: `Line ${headerLine}, the header row: ${problems.join("; ")}. The first row must name the columns ${list(IMPORT_COLUMNS)} (notes may be left out), in any order.`,
    };
  }
  if (data.length === 0) return { ok: false, message: "The file has a header row but no device rows. Add one row per device below the header." };
  if (data.length > MAX_IMPORT_ROWS) return { ok: false, message: `The file has ${data.length.toLocaleString("en")} device rows; one import takes at most ${MAX_IMPORT_ROWS.toLocaleString("en")}. Split it into smaller files.` };

  const index = Object.fromEntries(IMPORT_COLUMNS.map((c) => [c, names.indexOf(c)])) as Record<ImportColumn, number>;
  return {
    ok: true,
    rows: data.map((record, i) => ({
      line: recordLine(i + 1),
      cells: Object.fromEntries(IMPORT_COLUMNS.map((c) => [c, index[c] >= 0 ? record[index[c]]! : ""])) as Record<ImportColumn, string>,
    })),
  };
}

// ---- checking rows against the schema, each other and the registry ----

export type ImportOutcome = "add" | "error";
type RowErrors = Partial<Record<ImportColumn, string[]>>;

/** One row as the batch stores it: the cells as written, the parsed values (when valid) and the outcome. */
interface AssessedRow {
  line: number;
  cells: Record<ImportColumn, string>;
  fields: DeviceFields | null;
  outcome: ImportOutcome;
  errors: RowErrors;
}

const storedRowsSchema = z.array(
  z.object({
    line: z.number().int().positive(),
    cells: z.record(z.enum(IMPORT_COLUMNS), z.string()),
    outcome: z.enum(["add", "error"]),
  }),
);

const serialKey = (cell: string) => cell.trim().toUpperCase();

/** The row's cells as the schema's input: a blank resolution is "not entered" rather than zero. */
function fieldInput(cells: Record<ImportColumn, string>) {
  return {
    serial: cells.serial,
    manufacturer: cells.manufacturer,
    model: cells.model,
    firmware: cells.firmware,
    timestampResolutionMs: cells.rr_resolution_ms.trim() === "" ? undefined : cells.rr_resolution_ms,
    streamUrl: cells.stream_url,
    notes: cells.notes,
  };
}

/** Which of these serials (upper case) are registered already, and whether in this unit or another. */
async function registeredSerials(knex: Knex | Knex.Transaction, unitId: string, serials: string[]): Promise<Map<string, "here" | "elsewhere">> {
  if (!serials.length) return new Map();
  // Serials registered before the registry upper-cased them are compared case-insensitively too.
  const found = await knex("devices").whereRaw("upper(serial) = ANY(?::text[])", [serials]).select("serial", "unit_id");
  return new Map(found.map((d) => [d.serial.toUpperCase(), d.unit_id === unitId ? "here" : "elsewhere"]));
}

/** Every row checked with deviceFieldsSchema, against the other rows of the file and against the registry. */
async function assess(rows: CsvDeviceRow[], unitId: string, knex: Knex | Knex.Transaction): Promise<AssessedRow[]> {
  const linesOf = new Map<string, number[]>();
  for (const r of rows) {
    const key = serialKey(r.cells.serial);
    if (key) linesOf.set(key, [...(linesOf.get(key) ?? []), r.line]);
  }
  const registered = await registeredSerials(knex, unitId, [...linesOf.keys()]);
  return rows.map((r) => {
    const errors: RowErrors = {};
    const add = (column: ImportColumn, message: string) => {
      const messages = (errors[column] ??= []);
      if (!messages.includes(message)) messages.push(message);
    };
    const parsed = deviceFieldsSchema.safeParse(fieldInput(r.cells));
    if (!parsed.success) for (const issue of parsed.error.issues) add(columnOf(issue.path[0]), issue.message);
    const key = serialKey(r.cells.serial);
    const others = (linesOf.get(key) ?? []).filter((l) => l !== r.line);
    if (others.length) add("serial", `The same serial is also on line${others.length > 1 ? "s" : ""} ${list(others.map(String))} of this file.`);
    const where = registered.get(key);
    if (where) add("serial", `A device with this serial is already registered ${where === "here" ? "in this unit" : "in another unit"}.`);
    const ok = parsed.success && Object.keys(errors).length === 0;
    return { line: r.line, cells: r.cells, fields: ok ? parsed.data : null, outcome: ok ? "add" : "error", errors };
  });
}

// ---- the dry run ----

/** One row of the dry-run table: no cell but the serial leaves the server. */
export interface ImportRowDTO {
  line: number;
  serial: string;
  outcome: ImportOutcome;
  errors: { column: ImportColumn; messages: string[] }[];
}

export interface ImportPreviewDTO {
  batchId: string;
  fileName: string;
  total: number;
  toAdd: number;
  withErrors: number;
  rows: ImportRowDTO[];
}

/** Serials longer than the schema allows are shown cut, so one bad cell cannot flood the table. */
const SHOWN_SERIAL_CHARS = 80;

const toRowDTO = (r: AssessedRow): ImportRowDTO => {
  const serial = r.fields?.serial ?? r.cells.serial.trim();
  return {
    line: r.line,
    serial: serial.length > SHOWN_SERIAL_CHARS ? `${serial.slice(0, SHOWN_SERIAL_CHARS)}…` : serial,
    outcome: r.outcome,
    errors: IMPORT_COLUMNS.flatMap((column) => (r.errors[column] ? [{ column, messages: r.errors[column] }] : [])),
  };
};

/**
 * The dry run: reads and checks the file, stores the batch (every row with its parsed values and outcome) and returns
 * what the table shows. Writes no device. A file that cannot be read is refused with the reason and writes nothing.
 */
export async function previewDeviceImportFile(
  input: { unitId: string; fileName: string; content: Uint8Array },
  actor: Actor,
  knex: Knex = defaultDb,
): Promise<ActionResult<ImportPreviewDTO>> {
  const read = await readDeviceCsv(input.content);
  if (!read.ok) return { ok: false, code: "invalid_input", message: read.message, fieldErrors: { file: [read.message] } };
  const rows = await assess(read.rows, input.unitId, knex);
  const sha256 = createHash("sha256").update(input.content).digest("hex");
  const toAdd = rows.filter((r) => r.outcome === "add").length;
  const batchId = await knex.transaction(async (trx) => {
    const [batch] = await trx("device_import_batches")
      .insert({ unit_id: input.unitId, file_name: input.fileName, sha256, rows: JSON.stringify(rows), created_by: actor.userId })
      .returning("id");
    await auditAs(
      actor,
      {
        action: "device.import_preview",
        permission: "devices.manage",
        unitId: input.unitId,
        target: { type: "device_import_batch", id: batch!.id },
        detail: { sha256, bytes: input.content.length, rows: rows.length, to_add: toAdd, with_errors: rows.length - toAdd },
      },
      trx,
    );
    return batch!.id;
  });
  return {
    ok: true,
    message: toAdd === rows.length
      ? `${rows.length} row${rows.length === 1 ? "" : "s"} checked: all will be added when you confirm.`
      : `${rows.length} row${rows.length === 1 ? "" : "s"} checked: ${rows.length - toAdd} ${rows.length - toAdd === 1 ? "has" : "have"} errors. Nothing was imported.`,
    data: { batchId, fileName: input.fileName, total: rows.length, toAdd, withErrors: rows.length - toAdd, rows: rows.map(toRowDTO) },
  };
}

// ---- the confirmation ----

interface ImportConfirmDTO {
  batchId: string;
  imported: number;
}

/** Raised inside the savepoint when a serial is taken between the re-check and the insert, to undo every insert. */
class SerialTakenMeanwhile extends Error {
  constructor(readonly line: number) {
    super(`serial of line ${line} taken during the import`);
  }
}

/** Failure reasons per row as field errors named "line.<n>.<column>", so the dry-run table shows each in its row. */
function reasonsByLine(rows: AssessedRow[]): Record<string, string[]> {
  const out: Record<string, string[]> = {};
  for (const r of rows) for (const [column, messages] of Object.entries(r.errors)) if (messages?.length) out[`line.${r.line}.${column}`] = messages;
  return out;
}

/**
 * Confirms a previewed batch of the unit: within an hour of the preview, once. In one transaction it re-checks every
 * row (a serial may have been registered since the preview); if any row would fail, no device is written and the
 * batch is marked failed with the reasons. Otherwise every row is inserted and audited, and the batch is marked
 * imported. Imported devices have no stream token: tokens are issued per device.
 */
export async function confirmDeviceImportBatch(
  input: { unitId: string; batchId: string },
  actor: Actor,
  knex: Knex = defaultDb,
): Promise<ActionResult<ImportConfirmDTO>> {
  return knex.transaction(async (trx): Promise<ActionResult<ImportConfirmDTO>> => {
    // Locked, so two confirmations of one batch cannot both pass the status check.
    const batch = await trx("device_import_batches")
      .where({ id: input.batchId, unit_id: input.unitId })
      .forUpdate()
      .first("id", "status", "sha256", "rows", "created_at");
    if (!batch) return { ok: false, code: "not_found", message: "There is no such import for this unit. Upload the file again." };
    if (batch.status === "imported") return { ok: false, code: "conflict", message: "This import was already confirmed; its devices are in the registry." };
    if (batch.status === "failed") return { ok: false, code: "conflict", message: "This import already failed and wrote no device. Fix the file and upload it again." };
    const fresh = await trx.raw<{ rows: { fresh: boolean }[] }>("SELECT ?::timestamptz > now() - ?::interval AS fresh", [batch.created_at, CONFIRM_WITHIN]);
    if (!fresh.rows[0]?.fresh) return { ok: false, code: "conflict", message: "This preview is more than an hour old. Upload the file again to check it against the registry as it is now." };
    const stored = storedRowsSchema.parse(batch.rows);
    if (stored.some((r) => r.outcome !== "add")) return { ok: false, code: "conflict", message: "This preview has rows with errors, so it cannot be imported. Fix the file and upload it again." };

    /** The batch's one "device.import" entry: a failure when no device was written, else a success. */
    const auditImport = (outcome: "success" | "failure", detail: Record<string, unknown>) =>
      auditAs(
        actor,
        { action: "device.import", permission: "devices.manage", unitId: input.unitId, target: { type: "device_import_batch", id: batch.id }, outcome, detail },
        trx,
      );

    const markFailed = async (rows: AssessedRow[]) => {
      const failed = rows.filter((r) => r.outcome === "error");
      // The stored rows take the outcomes of the re-check, so the batch keeps why it failed.
      await trx.raw("UPDATE device_import_batches SET status = 'failed', confirmed_at = now(), rows = ?::jsonb WHERE id = ?", [JSON.stringify(rows), batch.id]);
      await auditImport("failure", { batch_id: batch.id, sha256: batch.sha256, rows: rows.length, failed_lines: failed.map((r) => r.line) });
      const lines = failed.map((r) => r.line);
      return {
        ok: false as const,
        code: "conflict" as const,
        message: `No device was imported: ${failed.length} row${failed.length === 1 ? "" : "s"} would now fail (line${lines.length === 1 ? "" : "s"} ${list(lines.slice(0, 10).map(String))}${lines.length > 10 ? " …" : ""}), most likely because ${failed.length === 1 ? "its serial was" : "their serials were"} registered after the preview. Fix the file and upload it again.`,
        fieldErrors: reasonsByLine(failed),
      };
    };

    const rows = await assess(stored.map((r) => ({ line: r.line, cells: r.cells })), input.unitId, trx);
    if (rows.some((r) => r.outcome === "error")) return markFailed(rows);
    try {
      // A savepoint: a serial taken by a concurrent registration after the re-check undoes every insert of the batch.
      await trx.transaction(async (sp) => {
        for (const r of rows) {
          const inserted = await insertDevice(sp, input.unitId, r.fields!, actor.userId);
          if (!inserted.ok) throw new SerialTakenMeanwhile(r.line);
          await auditAs(
            actor,
            {
              action: "device.register",
              permission: "devices.manage",
              unitId: input.unitId,
              target: { type: "device", id: inserted.id },
              detail: { serial: r.fields!.serial, via: "csv_import", batch_id: batch.id },
            },
            sp,
          );
        }
      });
    } catch (err) {
      if (!(err instanceof SerialTakenMeanwhile)) throw err;
      return markFailed(
        rows.map((r) =>
          r.line === err.line ? { ...r, fields: null, outcome: "error", errors: { serial: ["A device with this serial was registered while the import ran."] } } : r,
        ),
      );
    }
    await auditImport("success", { count: rows.length, batch_id: batch.id, sha256: batch.sha256 });
    await trx("device_import_batches").where({ id: batch.id }).update({ status: "imported", confirmed_at: new Date() });
    return {
      ok: true,
      message: `Imported ${rows.length} device${rows.length === 1 ? "" : "s"}. Issue each device's stream token from its page in the registry.`,
      data: { batchId: batch.id, imported: rows.length },
    };
  });
}
