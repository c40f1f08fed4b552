// The one Knex instance of a process. Scripts and tests import this file; server code imports lib/db.
import knex, { type Knex } from "knex";
import pg from "pg";
import config from "@/knexfile";
import "./tables";

// A PostgreSQL `date` is a calendar day, not an instant: keep it as "YYYY-MM-DD" text rather than pg's default of a
// Date at local midnight, which would shift with the server's time zone.
pg.types.setTypeParser(pg.types.builtins.DATE, (v: string) => v);

const globalForDb = globalThis as unknown as { corvaneDb?: Knex };

// Reused across hot reloads in `next dev`, which would otherwise open a new pool per edit.
export const db: Knex = globalForDb.corvaneDb ?? knex(config);
if (process.env.NODE_ENV !== "production") globalForDb.corvaneDb = db;
