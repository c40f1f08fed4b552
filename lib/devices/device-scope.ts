// The device a registry page or route is about, checked against the unit in its address. Device-addressed routes
// call the one guard with the unit, then look the device up *in that unit*: a device of another unit is simply not
// found, so ids cannot be probed across units.
import "server-only";
import { notFound } from "next/navigation";
import type { Knex } from "knex";
import { z } from "zod";
import { guardApi, guardPage, type Actor } from "@/lib/auth/guard";
import type { Permission } from "@/lib/auth/roles";
import { db as defaultDb } from "@/lib/db/knex";
import type { DeviceStatus } from "@/lib/db/tables";
import { unitIdSchema } from "@/lib/units/unit-id.validation";

export const deviceIdSchema = z.uuid({ error: "Not a device id." });

/** What every device page shows in its header. No token material. */
export interface DeviceHeaderDTO {
  id: string;
  unitId: string;
  unitName: string;
  timeZone: string;
  serial: string;
  model: string;
  manufacturer: string;
  status: DeviceStatus;
  /** Label of the bed of the open assignment, if any. */
  bedLabel: string | null;
}

export async function deviceInUnit(unitId: string, deviceId: string, knex: Knex = defaultDb): Promise<DeviceHeaderDTO | null> {
  const r = await knex("devices as d")
    .join("units as u", "u.id", "d.unit_id")
    .leftJoin("device_assignments as a", (j) => j.on("a.device_id", "d.id").andOnNull("a.assigned_to"))
    .leftJoin("beds as b", "b.id", "a.bed_id")
    .where({ "d.id": deviceId, "d.unit_id": unitId })
    .first("d.id", "d.unit_id", "u.name as unit_name", "u.time_zone", "d.serial", "d.model", "d.manufacturer", "d.status", "b.label as bed_label");
  if (!r) return null;
  return {
    id: r.id,
    unitId: r.unit_id,
    unitName: r.unit_name,
    timeZone: r.time_zone,
    serial: r.serial,
    model: r.model,
    manufacturer: r.manufacturer,
    status: r.status,
    bedLabel: r.bed_label ?? null,
  };
}

/** For device pages: guard (role and unit), then the device in that unit or not-found. */
export async function guardDevicePage(
  permission: Permission,
  params: { unitId: string; deviceId: string },
): Promise<{ actor: Actor; device: DeviceHeaderDTO }> {
  const unitId = unitIdSchema.safeParse(params.unitId);
  const deviceId = deviceIdSchema.safeParse(params.deviceId);
  if (!unitId.success || !deviceId.success) notFound();
  const actor = await guardPage(permission, unitId.data);
  const device = await deviceInUnit(unitId.data, deviceId.data);
  if (!device) notFound();
  return { actor, device };
}

const json = (status: number, body: unknown) => Response.json(body, { status, headers: { "Cache-Control": "no-store" } });

/** For device route handlers: 400 on a malformed id, 401/403 from the guard, 404 when the device is not the unit's. */
export async function guardDeviceApi(
  permission: Permission,
  params: { unitId: string; deviceId: string },
): Promise<{ ok: true; actor: Actor; device: DeviceHeaderDTO } | { ok: false; response: Response }> {
  const unitId = unitIdSchema.safeParse(params.unitId);
  const deviceId = deviceIdSchema.safeParse(params.deviceId);
  if (!unitId.success || !deviceId.success) {
    const g = await guardApi(permission);
    return g.ok ? { ok: false, response: json(400, { error: "bad_request", message: "Not a unit or device id." }) } : g;
  }
  const g = await guardApi(permission, unitId.data);
  if (!g.ok) return g;
  const device = await deviceInUnit(unitId.data, deviceId.data);
  if (!device) return { ok: false, response: json(404, { error: "not_found", message: "No such device in this unit." }) };
  return { ok: true, actor: g.actor, device };
}
