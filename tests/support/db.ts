// Test databases on the test cluster started by scripts/test.sh (real PostgreSQL, never a mock).
import knex, { type Knex } from "knex";
import { randomBytes } from "node:crypto";
import { readdir } from "node:fs/promises";
import { fileURLToPath } from "node:url";
import config from "@/knexfile";

const MIGRATIONS_DIR = fileURLToPath(new URL("../../migrations", import.meta.url));

/**
 * The migrations folder, loaded through Vitest's module runner (Knex's own loader uses Node's import(), which
 * cannot read .ts). Names are the file names, as the Knex CLI records them.
 */
export const migrations: Knex.MigratorConfig = {
  tableName: config.migrations!.tableName,
  migrationSource: {
    getMigrations: async () => (await readdir(MIGRATIONS_DIR)).filter((f) => f.endsWith(".ts")).sort(),
    getMigrationName: (name: string) => name,
    getMigration: (name: string) => import(/* @vite-ignore */ `${MIGRATIONS_DIR}/${name}`),
  },
};

export function requireEnv(name: string): string {
  const v = process.env[name];
  if (!v) throw new Error(`${name} is not set: run the tests through "npm test", which starts PostgreSQL`);
  return v;
}

export const connect = (url: string): Knex =>
  knex({ client: config.client, connection: url, pool: { min: 0, max: 5 }, migrations });

/** A fresh, migrated database owned by the app role, dropped by the returned cleanup. */
export async function scratchDatabase(): Promise<{ db: Knex; superuser: Knex; url: string; cleanup: () => Promise<void> }> {
  const superUrl = new URL(requireEnv("CORVANE_TEST_SUPERUSER_URL"));
  const name = `corvane_scratch_${randomBytes(4).toString("hex")}`;
  const admin = connect(superUrl.toString());
  await admin.raw(`CREATE DATABASE ${name} OWNER corvane`);
  const appUrl = new URL(requireEnv("DATABASE_URL"));
  appUrl.pathname = `/${name}`;
  superUrl.pathname = `/${name}`;
  const db = connect(appUrl.toString());
  const superuser = connect(superUrl.toString());
  await db.migrate.latest();
  return {
    db,
    superuser,
    url: appUrl.toString(),
    cleanup: async () => {
      await db.destroy();
      await superuser.destroy();
      await admin.raw(`DROP DATABASE ${name} WITH (FORCE)`);
      await admin.destroy();
    },
  };
}
