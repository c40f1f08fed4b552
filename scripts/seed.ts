// Seeds the invented demo into DATABASE_URL (idempotent). Used by npm start and npm test.
import { db } from "@/lib/db/knex";
import { seed } from "@/seeds/01_demo";
import { seedRuleSets } from "@/seeds/02_rule_sets";

try {
  const { inserted } = await seed(db);
  // Each unit's DEFAULT rule set, for local protocol to review (idempotent too).
  await seedRuleSets(db);
  const total = Object.values(inserted).reduce((a, b) => a + b, 0);
  console.log(total ? `demo seeded: ${JSON.stringify(inserted)}` : "demo already present: nothing inserted");
} finally {
  await db.destroy();
}
