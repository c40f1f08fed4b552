import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Knex } from "knex";
import { seed } from "@/seeds/01_demo";
import { BEDS_PER_UNIT, DEMO_PEOPLE, DEMO_STAYS, DEMO_UNITS } from "@/seeds/demo-data";
import { scratchDatabase } from "@/tests/support/db";
import { censusOf, listUnits } from "@/lib/units/repository";
import { verifyAuditChain } from "@/lib/audit/verify";

let db: Knex;
let cleanup: () => Promise<void>;
beforeAll(async () => {
  ({ db, cleanup } = await scratchDatabase());
});
afterAll(async () => {
  await cleanup?.();
});

describe("demo seed", () => {
  it("creates the invented scenario once; a second run inserts nothing", async () => {
    const first = await seed(db);
    expect(first.inserted).toEqual({
      units: DEMO_UNITS.length,
      beds: DEMO_UNITS.length * BEDS_PER_UNIT,
      patients: DEMO_STAYS.length,
      stays: DEMO_STAYS.length,
      users: DEMO_PEOPLE.length,
      grants: DEMO_PEOPLE.reduce((n, p) => n + p.grants.length, 0),
      devices: DEMO_UNITS.length * BEDS_PER_UNIT,
    });
    const second = await seed(db);
    expect(Object.values(second.inserted).every((n) => n === 0)).toBe(true);
    expect(await db("audit_events").where({ action: "demo.seed" }).count({ n: "*" }).first()).toEqual({ n: "1" });
    expect((await verifyAuditChain({}, db)).ok).toBe(true);
  });

  it("has two units in America/New_York, 12 beds each and about 16 current stays", async () => {
    const units = await listUnits(db);
    expect(units.map((u) => [u.name, u.kind, u.timeZone])).toEqual([
      ["2 East Neonatal", "neonatal", "America/New_York"],
      ["4 West Step-Down", "adult", "America/New_York"],
    ]);
    let occupied = 0;
    for (const u of units) {
      const census = (await censusOf(u.id, db))!;
      expect(census.beds).toHaveLength(12);
      occupied += census.occupied;
    }
    expect(occupied).toBe(DEMO_STAYS.filter((s) => s.dischargedHoursAgo === undefined).length);
    expect(occupied).toBe(16);
  });
});
