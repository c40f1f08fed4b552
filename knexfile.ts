import type { Knex } from "knex";

// One configuration for the CLI, the app and the tests; DATABASE_URL picks the database.
const config: Knex.Config = {
  client: "pg",
  connection: process.env.DATABASE_URL ?? "postgres://corvane@127.0.0.1:55432/corvane",
  pool: { min: 0, max: 10 },
  migrations: {
    directory: "./migrations",
    extension: "ts",
    loadExtensions: [".ts"],
    tableName: "knex_migrations",
  },
};

export default config;
