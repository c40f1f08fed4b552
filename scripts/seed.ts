// Seeds the invented demo into DATABASE_URL (idempotent). Used by npm start and npm test.
import { db } from "@/lib/db/knex";
import { seed } from "@/seeds/01_demo";

try {
  const { inserted } = await seed(db);
  const total = Object.values(inserted).reduce((a, b) => a + b, 0);
  console.log(total ? `demo seeded: ${JSON.stringify(inserted)}` : "demo already present: nothing inserted");
} finally {
  await db.destroy();
}
