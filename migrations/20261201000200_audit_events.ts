import type { Knex } from "knex";

// The audit trail: append-only (a trigger rejects UPDATE, DELETE and TRUNCATE) and hash-chained by the app
// (lib/audit/record.ts), so a change made around the trigger, e.g. by a superuser, breaks the chain.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("audit_events", (t) => {
    t.bigInteger("seq").primary();
    t.timestamp("occurred_at", { useTz: true, precision: 3 }).notNullable();
    t.uuid("actor_user_id");
    t.text("actor_email");
    t.text("actor_role");
    t.text("action").notNullable();
    t.text("target_type");
    t.text("target_id");
    t.uuid("unit_id");
    t.text("outcome").notNullable().checkIn(["success", "failure", "denied"], "audit_events_outcome_check");
    t.jsonb("detail").notNullable().defaultTo("{}");
    t.text("request_id");
    t.text("client_address");
    t.specificType("prev_hash", "char(64)").notNullable();
    t.specificType("hash", "char(64)").notNullable().unique();
    t.index(["occurred_at"]);
    t.index(["action", "outcome", "occurred_at"]);
    t.index(["actor_user_id", "occurred_at"]);
    t.index(["unit_id", "occurred_at"]);
    t.index(["target_type", "target_id"]);
  });
  await knex.raw(`
    CREATE FUNCTION audit_events_append_only() RETURNS trigger LANGUAGE plpgsql AS $$
    BEGIN
      RAISE EXCEPTION 'audit_events is append-only: % is not allowed', TG_OP
        USING ERRCODE = 'insufficient_privilege';
    END $$`);
  await knex.raw(`CREATE TRIGGER audit_events_no_update_delete BEFORE UPDATE OR DELETE ON audit_events
    FOR EACH ROW EXECUTE FUNCTION audit_events_append_only()`);
  await knex.raw(`CREATE TRIGGER audit_events_no_truncate BEFORE TRUNCATE ON audit_events
    FOR EACH STATEMENT EXECUTE FUNCTION audit_events_append_only()`);
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("audit_events");
  await knex.raw("DROP FUNCTION audit_events_append_only()");
}
