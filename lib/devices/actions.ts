"use server";
// The device registry's writes (biomedical engineers, "devices.manage" in the unit named by the form): register,
// edit, decommission; issue, rotate and revoke the stream token; assign to a bed and unassign. Each looks the device
// up in that unit (a device of another unit is not found), writes in one transaction with its audit event, and tells
// the ingest (registry-events) so a change reaches the stream readers within seconds. A new token is returned in the
// action's answer exactly once and is in no log or audit detail.
import { revalidatePath } from "next/cache";
import type { Knex } from "knex";
import { auditAs, guardedAction, type Actor } from "@/lib/auth/guard";
import type { ActionResult } from "@/lib/auth/action-result";
import { db } from "@/lib/db";
import type { DeviceRow } from "@/lib/db/tables";
import { insertDevice, VERSION_SQL } from "@/lib/devices/registry";
import { notifyDeviceRegistryChanged } from "@/lib/devices/registry-events";
import {
  assignDeviceSchema,
  assignmentInstant,
  BACKDATE_LIMIT_MS,
  decommissionDeviceSchema,
  deviceTokenSchema,
  registerDeviceSchema,
  rotateTokenSchema,
  unassignDeviceSchema,
  updateDeviceSchema,
} from "@/lib/devices/registry.validation";
import { simulatorCommand } from "@/lib/devices/simulator-command";
import { issueToken, revokedColumns, revokeToken, rotateToken, type TokenRefusal } from "@/lib/devices/tokens";
import { formatLocal } from "@/lib/time";

const MANAGE = "devices.manage" as const;
const unitScope = { unitIdsOf: (i: { unitId: string }) => [i.unitId] };

const NOT_FOUND: ActionResult<never> = { ok: false, code: "not_found", message: "This device is not in this unit's registry. Reload the page." };
const DECOMMISSIONED: ActionResult<never> = { ok: false, code: "conflict", message: "This device is decommissioned: it can no longer be edited, assigned or given a token." };

/** Every refusal is found before the first write of its transaction, so answering with it writes nothing. */
const inTransaction = <R>(work: (trx: Knex.Transaction) => Promise<ActionResult<R>>): Promise<ActionResult<R>> => db.transaction(work);

type LockedDevice = Pick<DeviceRow, "id" | "serial" | "unit_id" | "status" | "stream_url"> & { time_zone: string; version: string };

/** The device in the unit, row-locked until the transaction ends (assignments and token changes serialise on it). */
async function lockDevice(trx: Knex.Transaction, unitId: string, deviceId: string): Promise<LockedDevice | null> {
  const row = await trx("devices as d")
    .join("units as u", "u.id", "d.unit_id")
    .where({ "d.id": deviceId, "d.unit_id": unitId })
    .forUpdate("d")
    .first("d.id", "d.serial", "d.unit_id", "d.status", "d.stream_url", "u.time_zone", trx.raw(`${VERSION_SQL} AS version`));
  return (row as LockedDevice | undefined) ?? null;
}

function refreshPages(unitId: string) {
  // The whole registry subtree: the list, the device page and its header (layout) all show what changed.
  revalidatePath(`/units/${unitId}/devices`, "layout");
}

/**
 * A write to one device of the unit: `work` runs in one transaction with the device row-locked (a device of another
 * unit is not found, and nothing is written); the registry pages are refreshed after a success.
 */
async function withLockedDevice<R = undefined>(
  input: { unitId: string; deviceId: string },
  work: (trx: Knex.Transaction, device: LockedDevice) => Promise<ActionResult<R>>,
): Promise<ActionResult<R>> {
  const result = await inTransaction<R>(async (trx) => {
    const device = await lockDevice(trx, input.unitId, input.deviceId);
    return device ? work(trx, device) : NOT_FOUND;
  });
  if (result.ok) refreshPages(input.unitId);
  return result;
}

const target = (deviceId: string) => ({ type: "device", id: deviceId });

async function audited(actor: Actor, trx: Knex.Transaction, unitId: string, deviceId: string, action: string, detail: Record<string, unknown>) {
  await auditAs(actor, { action, permission: MANAGE, unitId, target: target(deviceId), detail }, trx);
  await notifyDeviceRegistryChanged(trx, deviceId);
}

export const registerDevice = guardedAction(
  "registerDevice",
  registerDeviceSchema,
  async (input, actor) => {
    const { unitId, ...fields } = input;
    const unit = await db("units").where({ id: unitId }).first("id");
    if (!unit) return { ok: false, code: "not_found", message: "That unit no longer exists." };
    const result = await inTransaction<{ deviceId: string }>(async (trx) => {
      const added = await insertDevice(trx, unitId, fields, actor.userId);
      if (!added.ok) {
        return { ok: false, code: "conflict", message: "Check the highlighted fields.", fieldErrors: { serial: [`Serial ${fields.serial} is already registered.`] } };
      }
      await audited(actor, trx, unitId, added.id, "device.register", {
        serial: fields.serial,
        model: fields.model,
        manufacturer: fields.manufacturer,
        firmware: fields.firmware,
        timestamp_resolution_ms: fields.timestampResolutionMs,
        stream_url: fields.streamUrl,
        notes_length: fields.notes.length,
      });
      return { ok: true, message: `Registered ${fields.serial}. Issue its stream token next.`, data: { deviceId: added.id } };
    });
    if (result.ok) refreshPages(unitId);
    return result;
  },
  unitScope,
);

export const updateDevice = guardedAction(
  "updateDevice",
  updateDeviceSchema,
  async (input, actor) => {
    return withLockedDevice(input, async (trx, device) => {
      if (device.status === "decommissioned") return DECOMMISSIONED;
      if (Number(device.version) !== input.version) {
        return { ok: false, code: "conflict", message: "Someone changed this device while you were editing. Reload the page to edit what is saved now; nothing was saved." };
      }
      const before = await trx("devices")
        .where({ id: device.id })
        .first("model", "manufacturer", "firmware", "timestamp_resolution_ms", "stream_url", "notes", "status");
      const after = {
        model: input.model,
        manufacturer: input.manufacturer,
        firmware: input.firmware,
        timestamp_resolution_ms: input.timestampResolutionMs,
        stream_url: input.streamUrl,
        notes: input.notes,
        status: input.status,
      };
      const changed = (Object.keys(after) as (keyof typeof after)[]).filter((k) => before![k] !== after[k]);
      if (changed.length === 0) return { ok: true, message: "Nothing changed." };
      await trx("devices").where({ id: device.id }).update({ ...after, updated_at: new Date() });
      // Values of the short identifying fields; only the length of the free-text notes.
      const detail: Record<string, unknown> = { changed };
      for (const k of changed) {
        if (k === "notes") detail.notes_length = after.notes.length;
        else detail[k] = { from: before![k], to: after[k] };
      }
      await audited(actor, trx, input.unitId, device.id, "device.update", detail);
      const statusNote = changed.includes("status")
        ? input.status === "maintenance"
          ? " It is in maintenance: Corvane stops reading its stream."
          : " It is back in service."
        : "";
      return { ok: true, message: `Saved the changes to ${device.serial}.${statusNote}` };
    });
  },
  unitScope,
);

export const decommissionDevice = guardedAction(
  "decommissionDevice",
  decommissionDeviceSchema,
  async (input, actor) => {
    return withLockedDevice(input, async (trx, device) => {
      if (device.status === "decommissioned") return { ok: false, code: "conflict", message: "This device is already decommissioned." };
      const open = await trx("device_assignments as a").join("beds as b", "b.id", "a.bed_id").where("a.device_id", device.id).whereNull("a.assigned_to").first("b.label");
      if (open) {
        return { ok: false, code: "conflict", message: `${device.serial} is still on bed ${open.label}. Unassign it from the bed first, then decommission it.` };
      }
      const tokens = await trx("devices").where({ id: device.id }).first("stream_token_hash", "previous_token_hash");
      const hadTokens = !!(tokens?.stream_token_hash || tokens?.previous_token_hash);
      const now = new Date();
      await trx("devices")
        .where({ id: device.id })
        .update({
          // A device that never had a token is not shown as "revoked".
          ...(hadTokens ? revokedColumns(now) : { updated_at: now }),
          status: "decommissioned",
          decommissioned_at: now,
          decommissioned_by: actor.userId,
          decommission_reason: input.reason,
        });
      await audited(actor, trx, input.unitId, device.id, "device.decommission", {
        previous_status: device.status,
        tokens_revoked: hadTokens,
        reason_length: input.reason.length,
      });
      return { ok: true, message: `${device.serial} is decommissioned. Its tokens are revoked; its record and history are kept.` };
    });
  },
  unitScope,
);

const TOKEN_REFUSALS: Record<TokenRefusal, ActionResult<never>> = {
  not_found: NOT_FOUND,
  decommissioned: DECOMMISSIONED,
  token_current: { ok: false, code: "conflict", message: "This device already has a current token. Rotate it to get a new one." },
  no_token: { ok: false, code: "conflict", message: "This device has no current token. Issue one instead." },
};

/** What the one-time token panel shows: the token and, for a simulator address, the command that uses it. */
export type NewTokenData = { token: string; command: string | null; previousValidUntil: string | null };

export const issueStreamToken = guardedAction(
  "issueStreamToken",
  deviceTokenSchema,
  async (input, actor) => {
    return withLockedDevice<NewTokenData>(input, async (trx, device) => {
      const issued = await issueToken(trx, device.id, new Date());
      if (!issued.ok) return TOKEN_REFUSALS[issued.reason];
      await audited(actor, trx, input.unitId, device.id, "device.token.issue", { issued_at: issued.issuedAt.toISOString() });
      return {
        ok: true,
        message: `Issued a stream token for ${device.serial}.`,
        data: { token: issued.token, command: simulatorCommand({ serial: device.serial, streamUrl: device.stream_url }, issued.token), previousValidUntil: null },
      };
    });
  },
  unitScope,
);

export const rotateStreamToken = guardedAction(
  "rotateStreamToken",
  rotateTokenSchema,
  async (input, actor) => {
    return withLockedDevice<NewTokenData>(input, async (trx, device) => {
      const rotated = await rotateToken(trx, device.id, input.graceMinutes, new Date());
      if (!rotated.ok) return TOKEN_REFUSALS[rotated.reason];
      const until = rotated.previousValidUntil?.toISOString() ?? null;
      await audited(actor, trx, input.unitId, device.id, "device.token.rotate", { issued_at: rotated.issuedAt.toISOString(), grace_minutes: input.graceMinutes, previous_valid_until: until });
      return {
        ok: true,
        message: until
          ? `Rotated the stream token of ${device.serial}. The old token keeps working until ${formatLocal(until, device.time_zone)}.`
          : `Rotated the stream token of ${device.serial}. The old token no longer works.`,
        data: { token: rotated.token, command: simulatorCommand({ serial: device.serial, streamUrl: device.stream_url }, rotated.token), previousValidUntil: until },
      };
    });
  },
  unitScope,
);

export const revokeStreamToken = guardedAction(
  "revokeStreamToken",
  deviceTokenSchema,
  async (input, actor) => {
    return withLockedDevice(input, async (trx, device) => {
      const revoked = await revokeToken(trx, device.id, new Date());
      if (!revoked.ok) return revoked.reason === "no_token" ? { ok: false, code: "conflict", message: "This device has no valid token to revoke." } : TOKEN_REFUSALS[revoked.reason];
      await audited(actor, trx, input.unitId, device.id, "device.token.revoke", { previous_in_grace_revoked: revoked.hadPrevious });
      return { ok: true, message: `Revoked the stream tokens of ${device.serial}. Corvane stops reading its stream; issue a new token to resume.` };
    });
  },
  unitScope,
);

/** A field error for the time inputs of the assign and unassign forms. */
const timeError = (field: string, message: string): ActionResult<never> => ({ ok: false, code: "invalid_input", message: "Check the highlighted fields.", fieldErrors: { [field]: [message] } });

export const assignDevice = guardedAction(
  "assignDevice",
  assignDeviceSchema,
  async (input, actor) => {
    // Lock order everywhere: device, then bed.
    return withLockedDevice(input, async (trx, device) => {
      if (device.status === "decommissioned") return DECOMMISSIONED;
      const bed = await trx("beds").where({ id: input.bedId, unit_id: device.unit_id }).forUpdate().first("id", "label", "active");
      if (!bed || !bed.active) return { ok: false, code: "invalid_input", message: "Check the highlighted fields.", fieldErrors: { bedId: ["Choose a bed of this unit that is in service."] } };
      const now = new Date();
      const when = assignmentInstant(input.from, input.occurrence, device.time_zone, now, { at: new Date(now.getTime() - BACKDATE_LIMIT_MS), why: "an assignment can start at most 24 hours back" });
      if (!when.ok) return timeError(when.field === "time" ? "from" : "occurrence", when.message);
      const from = when.at;

      const openOfDevice = await trx("device_assignments as a").join("beds as b", "b.id", "a.bed_id").where("a.device_id", device.id).whereNull("a.assigned_to").first("b.label");
      if (openOfDevice) {
        return { ok: false, code: "conflict", message: `${device.serial} is already on bed ${openOfDevice.label}. Unassign it there first; a device is on one bed at a time.` };
      }
      const openOfBed = await trx("device_assignments as a").join("devices as d", "d.id", "a.device_id").where("a.bed_id", bed.id).whereNull("a.assigned_to").first("d.serial");
      if (openOfBed) {
        return { ok: false, code: "conflict", message: "Check the highlighted fields.", fieldErrors: { bedId: [`Bed ${bed.label} already has device ${openOfBed.serial}. Unassign that device first, or choose a free bed.`] } };
      }
      // History cannot overlap: the new assignment starts after every earlier one of this device and of this bed ended.
      const overlap = await trx("device_assignments as a")
        .join("beds as b", "b.id", "a.bed_id")
        .join("devices as d", "d.id", "a.device_id")
        .where((w) => w.where("a.device_id", device.id).orWhere("a.bed_id", bed.id))
        .where("a.assigned_to", ">", from)
        .orderBy("a.assigned_to", "desc")
        .first("a.device_id", "a.assigned_to", "b.label", "d.serial");
      if (overlap) {
        const whose = overlap.device_id === device.id ? `this device was on bed ${overlap.label}` : `bed ${bed.label} had device ${overlap.serial}`;
        return timeError("from", `Until ${formatLocal(overlap.assigned_to!, device.time_zone)} ${whose}: start the assignment after that.`);
      }
      try {
        // A savepoint, so a unique-index refusal (a race the locks should already prevent) leaves the transaction usable.
        await trx.transaction((sp) => sp("device_assignments").insert({ device_id: device.id, bed_id: bed.id, assigned_from: from, assigned_to: null, assigned_by: actor.userId }));
      } catch (err) {
        if ((err as { code?: string }).code === "23505") return { ok: false, code: "conflict", message: "The device or the bed was assigned by someone else just now. Reload the page." };
        throw err;
      }
      await audited(actor, trx, input.unitId, device.id, "device.assign", { bed_id: bed.id, bed_label: bed.label, from: from.toISOString(), backdated: input.from !== undefined });
      const streams = device.status === "active" ? "" : " It is in maintenance, so Corvane reads its stream once it is back in service.";
      return { ok: true, message: `${device.serial} is on bed ${bed.label} from ${formatLocal(from, device.time_zone)}.${streams}` };
    });
  },
  unitScope,
);

export const unassignDevice = guardedAction(
  "unassignDevice",
  unassignDeviceSchema,
  async (input, actor) => {
    return withLockedDevice(input, async (trx, device) => {
      const open = await trx("device_assignments as a")
        .join("beds as b", "b.id", "a.bed_id")
        .where("a.device_id", device.id)
        .whereNull("a.assigned_to")
        .forUpdate("a")
        .first("a.id", "a.bed_id", "a.assigned_from", "b.label");
      if (!open) return { ok: false, code: "conflict", message: `${device.serial} is not on a bed.` };
      const now = new Date();
      const limit = now.getTime() - BACKDATE_LIMIT_MS;
      const notBefore =
        open.assigned_from.getTime() >= limit
          ? { at: new Date(open.assigned_from.getTime() + 1), why: "when the device was put on the bed" }
          : { at: new Date(limit), why: "an assignment can end at most 24 hours back" };
      const when = assignmentInstant(input.at, input.occurrence, device.time_zone, now, notBefore);
      if (!when.ok) return timeError(when.field === "time" ? "at" : "occurrence", when.message);
      await trx("device_assignments").where({ id: open.id }).update({ assigned_to: when.at, unassigned_by: actor.userId });
      await audited(actor, trx, input.unitId, device.id, "device.unassign", { bed_id: open.bed_id, bed_label: open.label, at: when.at.toISOString(), backdated: input.at !== undefined });
      return { ok: true, message: `${device.serial} is off bed ${open.label} from ${formatLocal(when.at, device.time_zone)}. Corvane stops reading its stream.` };
    });
  },
  unitScope,
);
