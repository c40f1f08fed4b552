import type { Knex } from "knex";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { seed } from "@/seeds/01_demo";
import { scratchDatabase } from "@/tests/support/db";

// SAFETY.md hazard "wrong patient shown in a bed": the schema itself refuses overlapping current stays.
let db: Knex;
let cleanup: () => Promise<void>;
beforeAll(async () => {
  ({ db, cleanup } = await scratchDatabase());
  await seed(db);
});
afterAll(async () => {
  await cleanup?.();
});

describe("stays", () => {
  it("allow one current stay per bed and per patient, and discharge only after admission", async () => {
    const current = await db("stays").whereNull("discharged_at").first("bed_id", "patient_id");
    const other = await db("patients").insert({ record_number: "DEMO-TEST-1", display_name: "Test, Only", birth_date: null }).returning("id");
    const emptyBed = await db("beds")
      .whereNotIn("id", db("stays").whereNull("discharged_at").select("bed_id"))
      .first("id");
    const now = new Date();
    await expect(db("stays").insert({ patient_id: other[0]!.id, bed_id: current!.bed_id, admitted_at: now, discharged_at: null }))
      .rejects.toThrow(/stays_one_current_per_bed/);
    await expect(db("stays").insert({ patient_id: current!.patient_id, bed_id: emptyBed!.id, admitted_at: now, discharged_at: null }))
      .rejects.toThrow(/stays_one_current_per_patient/);
    await expect(db("stays").insert({ patient_id: other[0]!.id, bed_id: emptyBed!.id, admitted_at: now, discharged_at: new Date(now.getTime() - 1000) }))
      .rejects.toThrow(/stays_interval_check/);
    // A finished stay in the same bed is fine.
    await db("stays").insert({ patient_id: other[0]!.id, bed_id: emptyBed!.id, admitted_at: new Date(now.getTime() - 7200e3), discharged_at: new Date(now.getTime() - 3600e3) });
  });
});
