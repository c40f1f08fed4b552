// Seeds the invented demo idempotently: a second run inserts nothing and changes nothing.
import type { Knex } from "knex";
import { hashPassword } from "@/lib/auth/password";
import { encryptStreamToken, generateStreamToken, hashStreamToken } from "@/lib/devices/stream-token";
import {
  BEDS_PER_UNIT, bedLabel, DEFAULT_SIMULATOR_PORT, DEMO_ASSIGNED_HOURS_AGO, DEMO_DEVICE_FIRMWARE, DEMO_DEVICE_MANUFACTURER, DEMO_DEVICE_MODEL,
  DEMO_PASSWORD, DEMO_PEOPLE, DEMO_STAYS, DEMO_TIME_ZONE, DEMO_UNITS, demoDeviceSerial, simulatorStreamUrl,
} from "./demo-data";
import { auditSeed } from "./seed-audit";

const HOUR = 3_600_000;

export async function seed(knex: Knex): Promise<{ inserted: Record<string, number> }> {
  const inserted = { units: 0, beds: 0, patients: 0, stays: 0, users: 0, grants: 0, devices: 0 };
  const simulatorPort = Number(process.env.CORVANE_SIM_PORT ?? DEFAULT_SIMULATOR_PORT);
  const now = Date.now();
  await knex.transaction(async (trx) => {
    const unitIds = new Map<string, string>();
    for (const u of DEMO_UNITS) {
      const rows = await trx("units")
        .insert({ code: u.code, name: u.name, kind: u.kind, time_zone: DEMO_TIME_ZONE })
        .onConflict("code")
        .ignore()
        .returning("id");
      inserted.units += rows.length;
      const unit = await trx("units").where({ code: u.code }).first("id");
      unitIds.set(u.code, unit!.id);
      for (let n = 1; n <= BEDS_PER_UNIT; n++) {
        const beds = await trx("beds")
          .insert({ unit_id: unit!.id, label: bedLabel(u.bedPrefix, n), sort_order: n, active: true })
          .onConflict(["unit_id", "label"])
          .ignore()
          .returning("id");
        inserted.beds += beds.length;
      }
    }

    for (const s of DEMO_STAYS) {
      const added = await trx("patients")
        .insert({ record_number: s.recordNumber, display_name: s.displayName, birth_date: s.birthDate })
        .onConflict("record_number")
        .ignore()
        .returning("id");
      inserted.patients += added.length;
      const patient = await trx("patients").where({ record_number: s.recordNumber }).first("id");
      const existing = await trx("stays").where({ patient_id: patient!.id }).first("id");
      if (existing) continue;
      const unit = DEMO_UNITS.find((u) => u.code === s.unitCode)!;
      const bed = await trx("beds")
        .where({ unit_id: unitIds.get(s.unitCode)!, label: bedLabel(unit.bedPrefix, s.bed) })
        .first("id");
      await trx("stays").insert({
        patient_id: patient!.id,
        bed_id: bed!.id,
        admitted_at: new Date(now - s.admittedHoursAgo * HOUR),
        discharged_at: s.dischargedHoursAgo === undefined ? null : new Date(now - s.dischargedHoursAgo * HOUR),
      });
      inserted.stays += 1;
    }

    const passwordHash = await hashPassword(DEMO_PASSWORD);
    for (const p of DEMO_PEOPLE) {
      const added = await trx("users")
        .insert({ email: p.email, name: p.name, password_hash: passwordHash })
        .onConflict(knex.raw("(lower(email))"))
        .ignore()
        .returning("id");
      inserted.users += added.length;
      // Roles are given only with the account: an administrator's later changes to a demo person stay.
      if (!added.length) continue;
      const user = added[0] as { id: string };
      for (const g of p.grants) {
        const rows = await trx("user_unit_roles")
          .insert({ user_id: user.id, unit_id: unitIds.get(g.unitCode)!, role: g.role, granted_by: null })
          .onConflict(["user_id", "unit_id", "role"])
          .ignore()
          .returning("user_id");
        inserted.grants += rows.length;
      }
    }

    // One simulated monitor per bed, assigned to it; its token exists only sealed in the database.
    for (const u of DEMO_UNITS) {
      for (let n = 1; n <= BEDS_PER_UNIT; n++) {
        const label = bedLabel(u.bedPrefix, n);
        const serial = demoDeviceSerial(label);
        const token = generateStreamToken();
        const added = await trx("devices")
          .insert({
            serial,
            model: DEMO_DEVICE_MODEL,
            manufacturer: DEMO_DEVICE_MANUFACTURER,
            firmware: DEMO_DEVICE_FIRMWARE,
            unit_id: unitIds.get(u.code)!,
            timestamp_resolution_ms: u.kind === "neonatal" ? 1 : 1000 / 128,
            stream_url: simulatorStreamUrl(simulatorPort, serial),
            stream_token_hash: hashStreamToken(token),
            stream_token_enc: encryptStreamToken(token),
          })
          .onConflict("serial")
          .ignore()
          .returning("id");
        if (!added.length) continue;
        inserted.devices += 1;
        const bed = await trx("beds").where({ unit_id: unitIds.get(u.code)!, label }).first("id");
        await trx("device_assignments").insert({
          device_id: (added[0] as { id: string }).id,
          bed_id: bed!.id,
          assigned_from: new Date(now - DEMO_ASSIGNED_HOURS_AGO * HOUR),
          assigned_to: null,
          assigned_by: null,
        });
      }
    }

    if (Object.values(inserted).some((n) => n > 0)) {
      await auditSeed(trx, "demo.seed", { inserted });
    }
  });
  return { inserted };
}
