// The maintenance log of devices: entries (preventive maintenance, repair, firmware update) with their service-report
// attachments, the next due date they set, and the unit's overdue / due-soon lists. A device's next due date is the
// one set by its latest entry that set one (a repair logged without a date leaves the schedule as it was).
import "server-only";
import { formatInTimeZone } from "date-fns-tz";
import type { Knex } from "knex";
import type { ActionResult } from "@/lib/auth/action-result";
import { auditAs, type Actor } from "@/lib/auth/guard";
import { db as defaultDb } from "@/lib/db/knex";
import type { AttachmentType, DeviceStatus, MaintenanceKind } from "@/lib/db/tables";
import { checkAttachments, insertAttachment } from "./attachments";
import { deviceInUnit } from "./device-scope";
import type { MaintenanceEntryInput } from "./maintenance.validation";

/** "Due soon" means due within this many days of today (inclusive), in the unit's time zone. */
export const DUE_SOON_DAYS = 30;

export interface MaintenanceAttachmentDTO {
  id: string;
  name: string;
  type: AttachmentType;
  sizeBytes: number;
}

export interface MaintenanceEntryDTO {
  id: string;
  kind: MaintenanceKind;
  /** Calendar days, "YYYY-MM-DD". */
  performedOn: string;
  performedBy: string;
  note: string;
  firmwareBefore: string | null;
  firmwareAfter: string | null;
  nextDueOn: string | null;
  recordedByName: string | null;
  /** ISO instant. */
  recordedAt: string;
  attachments: MaintenanceAttachmentDTO[];
}

export interface MaintenanceLogDTO {
  /** The device's firmware version now. */
  firmware: string;
  /** Set by the latest entry that set one; null when none did. */
  nextDueOn: string | null;
  /** Newest first. */
  entries: MaintenanceEntryDTO[];
}

/** The latest next_due_on of a device (see the file comment), as a correlated subquery on "d". */
const latestNextDue = (knex: Knex) =>
  knex("device_maintenance as lm")
    .whereRaw("lm.device_id = d.id")
    .whereNotNull("lm.next_due_on")
    .orderBy([{ column: "lm.performed_on", order: "desc" }, { column: "lm.recorded_at", order: "desc" }])
    .limit(1)
    .select("lm.next_due_on");

export async function maintenanceLog(deviceId: string, knex: Knex = defaultDb): Promise<MaintenanceLogDTO | null> {
  const device = await knex("devices").where({ id: deviceId }).first("firmware");
  if (!device) return null;
  const rows = await knex("device_maintenance as m")
    .leftJoin("users as u", "u.id", "m.recorded_by")
    .where("m.device_id", deviceId)
    .orderBy([{ column: "m.performed_on", order: "desc" }, { column: "m.recorded_at", order: "desc" }])
    .select("m.id", "m.kind", "m.performed_on", "m.performed_by_name", "m.note", "m.firmware_before", "m.firmware_after", "m.next_due_on", "m.recorded_at", "u.name as recorded_by_name");
  // The content column is never selected here: lists carry names and sizes, the download route the bytes.
  const files = rows.length
    ? await knex("device_attachments")
        .whereIn("maintenance_id", rows.map((r) => r.id))
        .orderBy([{ column: "uploaded_at" }, { column: "file_name" }])
        .select("id", "maintenance_id", "file_name", "content_type", "size_bytes")
    : [];
  const entries = rows.map((r): MaintenanceEntryDTO => ({
    id: r.id,
    kind: r.kind,
    performedOn: r.performed_on,
    performedBy: r.performed_by_name,
    note: r.note,
    firmwareBefore: r.firmware_before,
    firmwareAfter: r.firmware_after,
    nextDueOn: r.next_due_on,
    recordedByName: r.recorded_by_name ?? null,
    recordedAt: new Date(r.recorded_at).toISOString(),
    attachments: files
      .filter((f) => f.maintenance_id === r.id)
      .map((f) => ({ id: f.id, name: f.file_name, type: f.content_type, sizeBytes: f.size_bytes })),
  }));
  return { firmware: device.firmware, nextDueOn: entries.find((e) => e.nextDueOn)?.nextDueOn ?? null, entries };
}

/** Today's calendar day in a time zone, "YYYY-MM-DD". */
export const todayIn = (timeZone: string, now: Date = new Date()) => formatInTimeZone(now, timeZone, "yyyy-MM-dd");

/** Whole calendar days from `from` to `to` (both "YYYY-MM-DD"); negative when `to` is earlier. */
export const daysBetween = (from: string, to: string) => Math.round((Date.parse(`${to}T00:00:00Z`) - Date.parse(`${from}T00:00:00Z`)) / 86_400_000);

const addDays = (day: string, n: number) => new Date(Date.parse(`${day}T00:00:00Z`) + n * 86_400_000).toISOString().slice(0, 10);

const DECOMMISSIONED = {
  ok: false,
  code: "conflict",
  message: "This device is decommissioned: its maintenance log is kept as it was and takes no new entries.",
} as const;

/**
 * Records one entry for a known actor (the server action adds session, role and unit scope). Refuses, writing
 * nothing: a device not in the unit, a decommissioned device, work dated after today in the unit's time zone, and
 * any attachment that fails its checks. Otherwise one transaction writes the entry, its attachments, the device's
 * new firmware (for a firmware update) and the audit event.
 */
export async function addMaintenanceEntry(
  actor: Actor,
  input: MaintenanceEntryInput,
  knex: Knex = defaultDb,
  now: Date = new Date(),
): Promise<ActionResult<{ entryId: string }>> {
  const device = await deviceInUnit(input.unitId, input.deviceId, knex);
  if (!device) return { ok: false, code: "not_found", message: "No such device in this unit; nothing was saved." };
  if (device.status === "decommissioned") return DECOMMISSIONED;
  const today = todayIn(device.timeZone, now);
  if (input.performedOn > today) {
    return {
      ok: false,
      code: "invalid_input",
      message: "Check the highlighted fields; nothing was saved.",
      fieldErrors: { performedOn: [`The work cannot be dated in the future: today is ${today} in ${device.unitName}.`] },
    };
  }
  const checked = await checkAttachments(input.files);
  if (!checked.ok) {
    return {
      ok: false,
      code: "invalid_input",
      message: "An attachment was refused, so nothing was saved; see the files field.",
      fieldErrors: { files: checked.messages },
    };
  }

  const entryId = await knex.transaction(async (trx) => {
    // Locked, so a firmware update records the version it replaced even if two are logged at once.
    const current = (await trx("devices").where({ id: device.id }).forUpdate().first("firmware", "status"))!;
    if (current.status === "decommissioned") return null;
    const firmwareUpdate = input.kind === "firmware_update";
    const [entry] = await trx("device_maintenance")
      .insert({
        device_id: device.id,
        kind: input.kind,
        performed_on: input.performedOn,
        performed_by_name: input.performedBy,
        note: input.note,
        firmware_before: firmwareUpdate ? current.firmware : null,
        firmware_after: firmwareUpdate ? input.firmwareAfter! : null,
        next_due_on: input.nextDueOn ?? null,
        recorded_by: actor.userId,
      })
      .returning("id");
    for (const a of checked.attachments) await insertAttachment(trx, entry!.id, a, actor.userId);
    if (firmwareUpdate) {
      await trx("devices").where({ id: device.id }).update({ firmware: input.firmwareAfter!, updated_at: new Date() });
    }
    await auditAs(
      actor,
      {
        action: "device.maintenance.add",
        permission: "devices.manage",
        unitId: device.unitId,
        target: { type: "device", id: device.id },
        // No free text: the note's length, never the note; who did the work stays in the entry itself.
        detail: {
          maintenanceId: entry!.id,
          kind: input.kind,
          performedOn: input.performedOn,
          nextDueOn: input.nextDueOn ?? null,
          ...(firmwareUpdate ? { firmwareBefore: current.firmware, firmwareAfter: input.firmwareAfter } : {}),
          noteLength: input.note.length,
          attachmentCount: checked.attachments.length,
          attachments: checked.attachments.map((a) => ({ type: a.contentType, sizeBytes: a.sizeBytes, sha256: a.sha256 })),
        },
      },
      trx,
    );
    return entry!.id;
  });
  if (!entryId) return DECOMMISSIONED;
  const files = checked.attachments.length;
  return {
    ok: true,
    message: `Saved the ${input.kind === "firmware_update" ? "firmware update" : input.kind === "repair" ? "repair" : "preventive maintenance"} of ${input.performedOn}${files ? ` with ${files} attachment${files === 1 ? "" : "s"}` : ""}.`,
    data: { entryId },
  };
}

export interface DueDeviceDTO {
  id: string;
  serial: string;
  model: string;
  status: DeviceStatus;
  bedLabel: string | null;
  /** Latest entry's day of work, null when no maintenance is recorded. */
  lastPerformedOn: string | null;
  nextDueOn: string | null;
  /** Days from today to the due date (negative when overdue); null without a due date. */
  daysUntilDue: number | null;
}

export interface DueListDTO {
  unit: { id: string; name: string; timeZone: string };
  /** Today in the unit's time zone, "YYYY-MM-DD". */
  today: string;
  /** Due before today; most overdue first. */
  overdue: DueDeviceDTO[];
  /** Due today up to DUE_SOON_DAYS from today; soonest first. */
  dueSoon: DueDeviceDTO[];
  /** Due later than that. */
  later: DueDeviceDTO[];
  /** Maintenance recorded, but no entry set a next due date. */
  noDueDate: DueDeviceDTO[];
  /** No maintenance recorded at all. */
  noMaintenance: DueDeviceDTO[];
}

/** Every device of the unit that is not decommissioned, sorted into the due buckets for `now`'s day in the unit. */
export async function dueList(unitId: string, now: Date = new Date(), knex: Knex = defaultDb): Promise<DueListDTO | null> {
  const unit = await knex("units").where({ id: unitId }).first("id", "name", "time_zone");
  if (!unit) return null;
  const today = todayIn(unit.time_zone, now);
  const horizon = addDays(today, DUE_SOON_DAYS);
  const rows = await knex("devices as d")
    .leftJoin("device_assignments as a", (j) => j.on("a.device_id", "d.id").andOnNull("a.assigned_to"))
    .leftJoin("beds as b", "b.id", "a.bed_id")
    .where("d.unit_id", unitId)
    .whereNot("d.status", "decommissioned")
    .orderBy("d.serial")
    .select(
      "d.id",
      "d.serial",
      "d.model",
      "d.status",
      "b.label as bed_label",
      knex("device_maintenance as pm").whereRaw("pm.device_id = d.id").max("pm.performed_on").as("last_performed_on"),
      latestNextDue(knex).as("next_due_on"),
    );
  const out: DueListDTO = { unit: { id: unit.id, name: unit.name, timeZone: unit.time_zone }, today, overdue: [], dueSoon: [], later: [], noDueDate: [], noMaintenance: [] };
  for (const r of rows) {
    const d: DueDeviceDTO = {
      id: r.id,
      serial: r.serial,
      model: r.model,
      status: r.status,
      bedLabel: r.bed_label ?? null,
      lastPerformedOn: r.last_performed_on ?? null,
      nextDueOn: r.next_due_on ?? null,
      daysUntilDue: r.next_due_on ? daysBetween(today, r.next_due_on) : null,
    };
    if (!d.lastPerformedOn) out.noMaintenance.push(d);
    else if (!d.nextDueOn) out.noDueDate.push(d);
    else if (d.nextDueOn < today) out.overdue.push(d);
    else if (d.nextDueOn <= horizon) out.dueSoon.push(d);
    else out.later.push(d);
  }
  const byDue = (x: DueDeviceDTO, y: DueDeviceDTO) => x.nextDueOn!.localeCompare(y.nextDueOn!) || x.serial.localeCompare(y.serial);
  out.overdue.sort(byDue);
  out.dueSoon.sort(byDue);
  out.later.sort(byDue);
  return out;
}

export interface AttachmentDownload {
  id: string;
  maintenanceId: string;
  fileName: string;
  contentType: AttachmentType;
  sizeBytes: number;
  sha256: string;
  content: Buffer;
}

/** One attachment, only if it belongs to an entry of that device in that unit; null otherwise (then: not found). */
export async function attachmentForDownload(unitId: string, deviceId: string, attachmentId: string, knex: Knex = defaultDb): Promise<AttachmentDownload | null> {
  const r = await knex("device_attachments as f")
    .join("device_maintenance as m", "m.id", "f.maintenance_id")
    .join("devices as d", "d.id", "m.device_id")
    .where({ "f.id": attachmentId, "m.device_id": deviceId, "d.unit_id": unitId })
    .first("f.id", "f.maintenance_id", "f.file_name", "f.content_type", "f.size_bytes", "f.sha256", "f.content");
  if (!r) return null;
  return {
    id: r.id,
    maintenanceId: r.maintenance_id,
    fileName: r.file_name,
    contentType: r.content_type,
    sizeBytes: r.size_bytes,
    sha256: r.sha256,
    content: r.content,
  };
}
