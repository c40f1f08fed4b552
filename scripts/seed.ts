// Seeds the invented demo into DATABASE_URL (idempotent). Used by npm start and npm test.
import { db } from "@/lib/db/knex";
import { seed } from "@/seeds/01_demo";
import { seedRuleSets } from "@/seeds/02_rule_sets";
import { seedDeviceMaintenance } from "@/seeds/03_device_maintenance";
import { seedQualityHistory } from "@/seeds/04_quality_history";

try {
  const { inserted } = await seed(db);
  // Each unit's DEFAULT rule set, for local protocol to review (idempotent too).
  await seedRuleSets(db);
  // Invented maintenance history of the demo devices (idempotent; needs 01's devices).
  await seedDeviceMaintenance(db);
  // A week of invented, resolved flags with their acknowledgements, so Quality metrics has figures at once.
  await seedQualityHistory(db);
  const total = Object.values(inserted).reduce((a, b) => a + b, 0);
  console.log(total ? `demo seeded: ${JSON.stringify(inserted)}` : "demo already present: nothing inserted");
} finally {
  await db.destroy();
}
