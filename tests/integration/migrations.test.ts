import type { Knex } from "knex";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { connect, requireEnv } from "@/tests/support/db";

// Every migration's `down` undoes its `up` exactly: up → down to zero → up leaves the same schema.
let db: Knex;

async function schemaSnapshot(k: Knex) {
  const tables = await k.raw(`SELECT table_name FROM information_schema.tables WHERE table_schema = 'public'
    AND table_name NOT LIKE 'knex_migrations%' ORDER BY 1`);
  const columns = await k.raw(`SELECT table_name, column_name, data_type, is_nullable, column_default
    FROM information_schema.columns WHERE table_schema = 'public' AND table_name NOT LIKE 'knex_migrations%' ORDER BY 1, 2`);
  const indexes = await k.raw(`SELECT indexname, indexdef FROM pg_indexes WHERE schemaname = 'public'
    AND tablename NOT LIKE 'knex_migrations%' ORDER BY 1`);
  const triggers = await k.raw(`SELECT tgname FROM pg_trigger WHERE NOT tgisinternal ORDER BY 1`);
  const functions = await k.raw(`SELECT proname FROM pg_proc p JOIN pg_namespace n ON n.oid = p.pronamespace
    WHERE nspname = 'public' ORDER BY 1`);
  return { tables: tables.rows, columns: columns.rows, indexes: indexes.rows, triggers: triggers.rows, functions: functions.rows };
}

beforeAll(() => {
  db = connect(requireEnv("CORVANE_TEST_MIGRATIONS_URL"));
});
afterAll(async () => {
  await db.destroy();
});

describe("migrations", () => {
  it("go up, down to zero and up again, leaving the same schema", async () => {
    await db.migrate.latest();
    const first = await schemaSnapshot(db);
    expect(first.tables.map((t: { table_name: string }) => t.table_name)).toEqual(
      [
        "audit_checkpoints", "audit_events", "audit_exports", "baselines", "beats", "beats_default", "beds", "clinical_annotations", "computation_params",
        "compute_runs", "device_assignments", "device_attachments", "device_health_minutes", "device_import_batches",
        "device_maintenance", "device_stream_status", "devices", "flag_events", "flags", "handoff_notes",
        "index_windows", "mail_outbox", "mail_received", "patients", "rule_sets", "stays", "units", "user_unit_roles", "users",
      ],
    );
    expect(first.triggers.map((t: { tgname: string }) => t.tgname)).toEqual([
      "audit_checkpoints_no_truncate", "audit_checkpoints_no_update_delete", "audit_events_no_truncate", "audit_events_no_update_delete",
    ]);

    await db.migrate.rollback({}, true);
    const empty = await schemaSnapshot(db);
    expect(empty).toEqual({ tables: [], columns: [], indexes: [], triggers: [], functions: [] });
    const [, pending] = (await db.migrate.list()) as [unknown[], unknown[]];
    expect(pending.length).toBeGreaterThan(0);

    await db.migrate.latest();
    expect(await schemaSnapshot(db)).toEqual(first);
  });
});
