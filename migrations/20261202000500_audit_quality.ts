import type { Knex } from "knex";

// Audit trail checkpoints and exports for quality officers. A checkpoint records, at a moment, the newest sequence
// number and hash of the chain, signed with a server key (HMAC-SHA-256): a later check that finds fewer rows, or a
// different hash at that sequence number, has found a truncation or a rewrite even of the newest rows, which the
// chain alone cannot show. Each export keeps its manifest (filter, rows, first and last hash, SHA-256 of the file).
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("audit_checkpoints", (t) => {
    t.bigIncrements("id").primary();
    t.timestamp("created_at", { useTz: true, precision: 3 }).notNullable();
    /** Newest audit_events.seq covered, and its hash. */
    t.bigInteger("seq").notNullable();
    t.specificType("hash", "char(64)").notNullable();
    /** Which server key signed it (key id, so keys can be rotated). */
    t.text("key_id").notNullable();
    /** HMAC-SHA-256 over the canonical JSON of (id-less) created_at, seq, hash, key_id; hex. */
    t.specificType("signature", "char(64)").notNullable();
    t.index(["seq"]);
  });
  await knex.raw(`CREATE TRIGGER audit_checkpoints_no_update_delete BEFORE UPDATE OR DELETE ON audit_checkpoints
    FOR EACH ROW EXECUTE FUNCTION audit_events_append_only()`);
  await knex.raw(`CREATE TRIGGER audit_checkpoints_no_truncate BEFORE TRUNCATE ON audit_checkpoints
    FOR EACH STATEMENT EXECUTE FUNCTION audit_events_append_only()`);

  await knex.schema.createTable("audit_exports", (t) => {
    t.uuid("id").primary().defaultTo(knex.raw("gen_random_uuid()"));
    t.uuid("created_by").references("id").inTable("users").onDelete("SET NULL");
    t.timestamp("started_at", { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp("finished_at", { useTz: true });
    t.text("format").notNullable().checkIn(["csv", "fhir-ndjson"], "audit_exports_format_check");
    /** The filter as the person chose it (validated), so the export can be reproduced. */
    t.jsonb("filter").notNullable();
    t.text("status").notNullable().defaultTo("running").checkIn(["running", "done", "failed"], "audit_exports_status_check");
    t.bigInteger("rows");
    t.bigInteger("bytes");
    t.specificType("first_hash", "char(64)");
    t.specificType("last_hash", "char(64)");
    t.specificType("sha256", "char(64)");
    t.text("file_name").notNullable();
    t.index(["created_by", "started_at"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("audit_exports");
  await knex.schema.dropTable("audit_checkpoints");
}
