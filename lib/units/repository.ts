// Units, beds and the census (who is in which bed now). DTOs with ISO 8601 UTC instants.
import type { Knex } from "knex";
import { db as defaultDb } from "@/lib/db/knex";
import type { UnitKind } from "@/lib/db/tables";

export interface UnitDTO {
  id: string;
  code: string;
  name: string;
  kind: UnitKind;
  timeZone: string;
}

export interface CensusBedDTO {
  bedId: string;
  bedLabel: string;
  stay: null | {
    stayId: string;
    patientId: string;
    displayName: string;
    recordNumber: string;
    admittedAt: string;
  };
}

export interface CensusDTO {
  unit: UnitDTO;
  beds: CensusBedDTO[];
  occupied: number;
  /** The server's instant when the census was read. */
  asOf: string;
}

const UNIT_COLUMNS = ["id", "code", "name", "kind", "time_zone"] as const;
type UnitPick = { id: string; code: string; name: string; kind: UnitKind; time_zone: string };
const toUnit = (u: UnitPick): UnitDTO => ({ id: u.id, code: u.code, name: u.name, kind: u.kind, timeZone: u.time_zone });

export async function listUnits(knex: Knex = defaultDb): Promise<UnitDTO[]> {
  return (await knex("units").orderBy("name").select(...UNIT_COLUMNS)).map(toUnit);
}

export async function getUnit(id: string, knex: Knex = defaultDb): Promise<UnitDTO | null> {
  const u = await knex("units").where({ id }).first(...UNIT_COLUMNS);
  return u ? toUnit(u) : null;
}

export async function censusOf(unitId: string, knex: Knex = defaultDb): Promise<CensusDTO | null> {
  const unit = await getUnit(unitId, knex);
  if (!unit) return null;
  const rows = await knex("beds")
    .leftJoin("stays", (j) => j.on("stays.bed_id", "beds.id").andOnNull("stays.discharged_at"))
    .leftJoin("patients", "patients.id", "stays.patient_id")
    .where("beds.unit_id", unitId)
    .andWhere("beds.active", true)
    .orderBy([{ column: "beds.sort_order" }, { column: "beds.label" }])
    .select(
      "beds.id as bed_id",
      "beds.label as bed_label",
      "stays.id as stay_id",
      "stays.admitted_at",
      "patients.id as patient_id",
      "patients.display_name",
      "patients.record_number",
    );
  const beds: CensusBedDTO[] = rows.map((r) => ({
    bedId: r.bed_id,
    bedLabel: r.bed_label,
    stay: r.stay_id
      ? {
          stayId: r.stay_id,
          patientId: r.patient_id,
          displayName: r.display_name,
          recordNumber: r.record_number,
          admittedAt: (r.admitted_at as Date).toISOString(),
        }
      : null,
  }));
  return { unit, beds, occupied: beds.filter((b) => b.stay).length, asOf: new Date().toISOString() };
}
