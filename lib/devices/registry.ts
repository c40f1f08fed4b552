// The device registry's reads (DTOs for the registry list and the device page) and the one insert shared by the
// registration form and the CSV import. No token material ever leaves this file: only whether a token exists.
import "server-only";
import { formatInTimeZone } from "date-fns-tz";
import type { Knex } from "knex";
import { db } from "@/lib/db";
import type { DeviceStatus } from "@/lib/db/tables";
import type { DeviceFields } from "@/lib/devices/device-fields.validation";
import type { RegistryFilter } from "@/lib/devices/registry.validation";
import { streamStateOf, type StreamState } from "@/lib/devices/stream-state";

export type InsertDeviceResult = { ok: true; id: string } | { ok: false; reason: "serial_taken" };

/**
 * Registers a device in `unitId` without a token (the token is issued apart, so it can be shown once). Serials are
 * unique across Corvane, compared case-insensitively; a taken serial is a value, not an exception, and leaves the
 * transaction usable (ON CONFLICT DO NOTHING rather than a failed INSERT), so an import can carry on row by row.
 */
export async function insertDevice(
  trx: Knex.Transaction,
  unitId: string,
  fields: DeviceFields,
  actorUserId: string | null,
): Promise<InsertDeviceResult> {
  const serial = fields.serial.toUpperCase();
  // Serials registered before the form upper-cased them would slip past the unique index.
  const clash = await trx("devices").whereRaw("upper(serial) = ?", [serial]).first("id");
  if (clash) return { ok: false, reason: "serial_taken" };
  const [row] = await trx("devices")
    .insert({
      unit_id: unitId,
      serial,
      model: fields.model,
      manufacturer: fields.manufacturer,
      firmware: fields.firmware,
      timestamp_resolution_ms: fields.timestampResolutionMs,
      stream_url: fields.streamUrl,
      notes: fields.notes,
      registered_by: actorUserId,
      status: "active",
    })
    .onConflict("serial")
    .ignore()
    .returning("id");
  return row ? { ok: true, id: row.id } : { ok: false, reason: "serial_taken" };
}

// ---- reads ----

export type TokenState = "none" | "issued" | "rotating" | "revoked";

export interface TokenDTO {
  state: TokenState;
  /** When the current token was issued (first issue or last rotation); null without a current token. */
  issuedAt: string | null;
  /** While rotating: until when the token before the rotation still works. */
  previousValidUntil: string | null;
  /** When the tokens were last revoked, while no token is current. */
  revokedAt: string | null;
}

type TokenColumns = {
  stream_token_hash: string | null;
  token_rotated_at: Date | null;
  previous_token_hash: string | null;
  previous_token_valid_until: Date | null;
  token_revoked_at: Date | null;
};

const TOKEN_COLUMNS = ["d.stream_token_hash", "d.token_rotated_at", "d.previous_token_hash", "d.previous_token_valid_until", "d.token_revoked_at"];

/** Only whether and since when a token exists: the hashes stay here. */
function tokenOf(r: TokenColumns, now: Date): TokenDTO {
  if (!r.stream_token_hash) {
    return { state: r.token_revoked_at ? "revoked" : "none", issuedAt: null, previousValidUntil: null, revokedAt: r.token_revoked_at?.toISOString() ?? null };
  }
  const rotating = !!r.previous_token_hash && !!r.previous_token_valid_until && r.previous_token_valid_until > now;
  return {
    state: rotating ? "rotating" : "issued",
    issuedAt: r.token_rotated_at?.toISOString() ?? null,
    previousValidUntil: rotating ? r.previous_token_valid_until!.toISOString() : null,
    revokedAt: null,
  };
}

export interface DeviceListItemDTO {
  id: string;
  serial: string;
  model: string;
  manufacturer: string;
  firmware: string;
  status: DeviceStatus;
  bedLabel: string | null;
  token: TokenDTO;
  stream: StreamState;
  lastBeatAt: string | null;
  /** "YYYY-MM-DD" in the unit's calendar, or null when no maintenance entry set one. */
  nextMaintenanceDue: string | null;
  maintenanceOverdue: boolean;
  decommissionedAt: string | null;
}

export interface DeviceRegistryDTO {
  unit: { id: string; name: string; timeZone: string };
  asOf: string;
  /** In service and in maintenance, by serial. */
  devices: DeviceListItemDTO[];
  /** Kept with their history, listed apart. */
  decommissioned: DeviceListItemDTO[];
}

/** The unit's day `now` falls on, "YYYY-MM-DD" (maintenance due dates are calendar days). */
const todayIn = (timeZone: string, now: Date) => formatInTimeZone(now, timeZone, "yyyy-MM-dd");

/** Whether Corvane reads the device's stream now: in service, on a bed, with a token (lib/ingest/ingest-service.ts). */
const streamedOf = (r: { status: DeviceStatus; stream_token_hash: string | null; bed_label: string | null }) =>
  r.status === "active" && !!r.stream_token_hash && r.bed_label !== null;

/** The stream status columns streamStateOf reads (left-joined: null when the ingest has never written the device). */
const streamStatusOf = (r: { connected: boolean | null; last_seen_at: Date | null; last_beat_at: Date | null; lead_off: boolean | null }) => ({
  connected: r.connected ?? false,
  lastSeenAt: r.last_seen_at ?? null,
  lastBeatAt: r.last_beat_at ?? null,
  leadOff: r.lead_off ?? false,
});

/** The unit's devices for the registry list, or null when the unit does not exist. */
export async function devicesOfUnit(
  unitId: string,
  now: Date,
  filter: RegistryFilter = { status: "all", q: "" },
  knex: Knex = db,
): Promise<DeviceRegistryDTO | null> {
  const unit = await knex("units").where({ id: unitId }).first("id", "name", "time_zone");
  if (!unit) return null;
  const q = knex("devices as d")
    .leftJoin("device_assignments as a", (j) => j.on("a.device_id", "d.id").andOnNull("a.assigned_to"))
    .leftJoin("beds as b", "b.id", "a.bed_id")
    .leftJoin("device_stream_status as s", "s.device_id", "d.id")
    .where("d.unit_id", unitId)
    .select(
      "d.id", "d.serial", "d.model", "d.manufacturer", "d.firmware", "d.status", "d.decommissioned_at", ...TOKEN_COLUMNS,
      "b.label as bed_label", "s.connected", "s.last_seen_at", "s.last_beat_at", "s.lead_off",
      knex.raw("(SELECT max(m.next_due_on) FROM device_maintenance m WHERE m.device_id = d.id) AS next_due_on"),
    )
    .orderBy("d.serial");
  if (filter.status !== "all") q.where("d.status", filter.status);
  const text = filter.q.trim();
  if (text) {
    // Literal text: % and _ typed in the search box match themselves.
    const like = `%${text.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
    q.where((w) => w.whereILike("d.serial", like).orWhereILike("d.model", like));
  }
  const today = todayIn(unit.time_zone, now);
  const items: DeviceListItemDTO[] = (await q).map((r) => ({
    id: r.id,
    serial: r.serial,
    model: r.model,
    manufacturer: r.manufacturer,
    firmware: r.firmware,
    status: r.status,
    bedLabel: r.bed_label ?? null,
    token: tokenOf(r, now),
    stream: streamStateOf({ streamed: streamedOf(r), ...streamStatusOf(r) }, now),
    lastBeatAt: r.last_beat_at?.toISOString() ?? null,
    nextMaintenanceDue: r.next_due_on ?? null,
    maintenanceOverdue: r.status !== "decommissioned" && r.next_due_on !== null && r.next_due_on < today,
    decommissionedAt: r.decommissioned_at?.toISOString() ?? null,
  }));
  return {
    unit: { id: unit.id, name: unit.name, timeZone: unit.time_zone },
    asOf: now.toISOString(),
    devices: items.filter((d) => d.status !== "decommissioned"),
    decommissioned: items.filter((d) => d.status === "decommissioned"),
  };
}

export interface AssignmentDTO {
  id: string;
  bedId: string;
  bedLabel: string;
  from: string;
  /** null while the device is on the bed. */
  to: string | null;
  assignedBy: string | null;
  unassignedBy: string | null;
}

export interface BedChoiceDTO {
  id: string;
  label: string;
  /** No device is on the bed now. */
  free: boolean;
}

export interface DeviceDetailDTO {
  id: string;
  unit: { id: string; name: string; timeZone: string };
  serial: string;
  model: string;
  manufacturer: string;
  firmware: string;
  timestampResolutionMs: number;
  streamUrl: string;
  notes: string;
  status: DeviceStatus;
  registeredAt: string;
  registeredBy: string | null;
  /** The record's last change, ms since the epoch: the edit form sends it back so a stale edit is refused. */
  version: number;
  decommissioned: { at: string; by: string | null; reason: string } | null;
  token: TokenDTO;
  stream: StreamState;
  lastBeatAt: string | null;
  nextMaintenanceDue: string | null;
  maintenanceOverdue: boolean;
  /** The open assignment, if any. */
  current: AssignmentDTO | null;
  /** Newest first. */
  history: AssignmentDTO[];
  /** The unit's beds in service, in ward order. */
  beds: BedChoiceDTO[];
}

/** Milliseconds since the epoch of a timestamptz, computed in SQL so the edit form and the update compare the same number. */
export const VERSION_SQL = "floor(extract(epoch from d.updated_at) * 1000)::bigint";

export async function deviceDetail(unitId: string, deviceId: string, now: Date = new Date(), knex: Knex = db): Promise<DeviceDetailDTO | null> {
  const r = await knex("devices as d")
    .join("units as u", "u.id", "d.unit_id")
    .leftJoin("users as reg", "reg.id", "d.registered_by")
    .leftJoin("users as dec", "dec.id", "d.decommissioned_by")
    .leftJoin("device_stream_status as s", "s.device_id", "d.id")
    .where({ "d.id": deviceId, "d.unit_id": unitId })
    .first(
      "d.id", "d.serial", "d.model", "d.manufacturer", "d.firmware", "d.timestamp_resolution_ms", "d.stream_url", "d.notes", "d.status",
      "d.created_at", "d.decommissioned_at", "d.decommission_reason", ...TOKEN_COLUMNS,
      "u.id as unit_id", "u.name as unit_name", "u.time_zone",
      "reg.name as registered_by_name", "dec.name as decommissioned_by_name", "s.connected", "s.last_seen_at", "s.last_beat_at", "s.lead_off",
      knex.raw(`${VERSION_SQL} AS version`),
      knex.raw("(SELECT max(m.next_due_on) FROM device_maintenance m WHERE m.device_id = d.id) AS next_due_on"),
    );
  if (!r) return null;
  const history: AssignmentDTO[] = (
    await knex("device_assignments as a")
      .join("beds as b", "b.id", "a.bed_id")
      .leftJoin("users as ab", "ab.id", "a.assigned_by")
      .leftJoin("users as ub", "ub.id", "a.unassigned_by")
      .where("a.device_id", deviceId)
      .orderBy("a.assigned_from", "desc")
      .select("a.id", "a.bed_id", "b.label", "a.assigned_from", "a.assigned_to", "ab.name as assigned_by", "ub.name as unassigned_by")
  ).map((a) => ({
    id: a.id,
    bedId: a.bed_id,
    bedLabel: a.label,
    from: a.assigned_from.toISOString(),
    to: a.assigned_to?.toISOString() ?? null,
    assignedBy: a.assigned_by ?? null,
    unassignedBy: a.unassigned_by ?? null,
  }));
  const beds: BedChoiceDTO[] = (
    await knex("beds as b")
      .leftJoin("device_assignments as a", (j) => j.on("a.bed_id", "b.id").andOnNull("a.assigned_to"))
      .where({ "b.unit_id": unitId, "b.active": true })
      .orderBy([{ column: "b.sort_order" }, { column: "b.label" }])
      .select("b.id", "b.label", "a.id as open_assignment")
  ).map((b) => ({ id: b.id, label: b.label, free: b.open_assignment === null }));
  const current = history.find((a) => a.to === null) ?? null;
  const nextDue: string | null = r.next_due_on ?? null;
  return {
    id: r.id,
    unit: { id: r.unit_id, name: r.unit_name, timeZone: r.time_zone },
    serial: r.serial,
    model: r.model,
    manufacturer: r.manufacturer,
    firmware: r.firmware,
    timestampResolutionMs: r.timestamp_resolution_ms,
    streamUrl: r.stream_url,
    notes: r.notes,
    status: r.status,
    registeredAt: r.created_at.toISOString(),
    registeredBy: r.registered_by_name ?? null,
    version: Number(r.version),
    decommissioned: r.decommissioned_at
      ? { at: r.decommissioned_at.toISOString(), by: r.decommissioned_by_name ?? null, reason: r.decommission_reason ?? "" }
      : null,
    token: tokenOf(r, now),
    stream: streamStateOf({ streamed: streamedOf({ ...r, bed_label: current?.bedLabel ?? null }), ...streamStatusOf(r) }, now),
    lastBeatAt: r.last_beat_at?.toISOString() ?? null,
    nextMaintenanceDue: nextDue,
    maintenanceOverdue: r.status !== "decommissioned" && nextDue !== null && nextDue < todayIn(r.time_zone, now),
    current,
    history,
    beds,
  };
}
