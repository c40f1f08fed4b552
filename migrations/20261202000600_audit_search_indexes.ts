import type { Knex } from "knex";

// Indexes for the audit trail search (lib/audit/repository.ts), so each filter is served by an index:
// - person by e-mail, matched case-insensitively (failed sign-ins carry an e-mail but no user id);
// - action by prefix ("device."): LIKE 'prefix%' can use a btree only with text_pattern_ops unless the database's
//   collation is exactly C, which Corvane does not assume;
// - patient, stay or device named in the detail (flag and annotation entries carry {"stayId": …}, ward views
//   {"stayIds": […]}): one GIN index (jsonb_path_ops, the smaller of the two jsonb operator classes) serves every
//   `detail @> …` containment test.
// Time, user id, unit, outcome and target already have indexes (20261201000200_audit_events.ts).
export async function up(knex: Knex): Promise<void> {
  await knex.raw("CREATE INDEX audit_events_actor_email_lower_index ON audit_events (lower(actor_email), seq)");
  await knex.raw("CREATE INDEX audit_events_action_pattern_index ON audit_events (action text_pattern_ops)");
  await knex.raw("CREATE INDEX audit_events_detail_gin_index ON audit_events USING gin (detail jsonb_path_ops)");
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw("DROP INDEX audit_events_detail_gin_index");
  await knex.raw("DROP INDEX audit_events_action_pattern_index");
  await knex.raw("DROP INDEX audit_events_actor_email_lower_index");
}
