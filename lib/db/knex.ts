// The one Knex instance of a process. Scripts and tests import this file; server code imports lib/db.
import knex, { type Knex } from "knex";
import config from "@/knexfile";
import "./tables";

const globalForDb = globalThis as unknown as { corvaneDb?: Knex };

// Reused across hot reloads in `next dev`, which would otherwise open a new pool per edit.
export const db: Knex = globalForDb.corvaneDb ?? knex(config);
if (process.env.NODE_ENV !== "production") globalForDb.corvaneDb = db;
