// The stay a review page or route is about, with the unit that scopes it. Stay-addressed routes look the stay up
// first, then call the one guard with the stay's unit, so a person sees a patient only in units they hold a role in.
import "server-only";
import type { Knex } from "knex";
import { z } from "zod";
import { db as defaultDb } from "@/lib/db/knex";
import type { ActiveStay } from "@/lib/compute/beats";
import type { Population } from "@/lib/engine/clean/range-gate";
import type { NightTimes } from "./night";

export const stayIdSchema = z.uuid("not a stay id");

export interface StayScopeDTO {
  stayId: string;
  unitId: string;
  unitName: string;
  unitCode: string;
  bedId: string;
  bedLabel: string;
  patientId: string;
  displayName: string;
  recordNumber: string;
  population: Population;
  admittedAt: string;
  dischargedAt: string | null;
  night: NightTimes;
}

export async function stayScope(stayId: string, knex: Knex = defaultDb): Promise<StayScopeDTO | null> {
  const r = await knex("stays as s")
    .join("beds as b", "b.id", "s.bed_id")
    .join("units as u", "u.id", "b.unit_id")
    .join("patients as p", "p.id", "s.patient_id")
    .where("s.id", stayId)
    .first<{
      id: string; unit_id: string; unit_name: string; unit_code: string; bed_id: string; bed_label: string; patient_id: string;
      display_name: string; record_number: string; kind: string; admitted_at: Date; discharged_at: Date | null;
      time_zone: string; night_starts_at: string; night_ends_at: string;
    } | undefined>(
      "s.id", "u.id as unit_id", "u.name as unit_name", "u.code as unit_code", "b.id as bed_id", "b.label as bed_label",
      "p.id as patient_id", "p.display_name", "p.record_number", "u.kind", "s.admitted_at", "s.discharged_at",
      "u.time_zone", "u.night_starts_at", "u.night_ends_at",
    );
  if (!r) return null;
  return {
    stayId: r.id,
    unitId: r.unit_id,
    unitName: r.unit_name,
    unitCode: r.unit_code,
    bedId: r.bed_id,
    bedLabel: r.bed_label,
    patientId: r.patient_id,
    displayName: r.display_name,
    recordNumber: r.record_number,
    population: r.kind === "neonatal" ? "neonatal" : "adult",
    admittedAt: r.admitted_at.toISOString(),
    dischargedAt: r.discharged_at?.toISOString() ?? null,
    night: { timeZone: r.time_zone, startsAt: r.night_starts_at, endsAt: r.night_ends_at },
  };
}

/** The stay as the compute job's beat readers take it (lib/compute/beats.ts). */
export const asActiveStay = (s: StayScopeDTO): ActiveStay => ({
  stayId: s.stayId,
  bedId: s.bedId,
  unitId: s.unitId,
  timeZone: s.night.timeZone,
  population: s.population,
  admittedAt: new Date(s.admittedAt),
  dischargedAt: s.dischargedAt ? new Date(s.dischargedAt) : null,
});
