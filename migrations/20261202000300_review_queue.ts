import type { Knex } from "knex";

// The review queue and its e-mail: each unit's response targets, a version on every flag for optimistic
// concurrency, the history of flag transitions (who, when, from → to, reason, note, recipient), an outbox of
// messages with retry state (so a mail outage loses none), and the local SMTP sink's received messages (demo mode).
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable("units", (t) => {
    /** Minutes a flag may wait for acknowledgement (local policy, DOMAIN §1: e.g. ≤ 60). */
    t.integer("ack_target_minutes").notNullable().defaultTo(30);
    /** Past this a reminder goes to the charge nurses on duty; past the second, the unit's clinicians are told. */
    t.integer("remind_after_minutes").notNullable().defaultTo(30);
    t.integer("escalate_after_minutes").notNullable().defaultTo(60);
  });
  await knex.raw(`ALTER TABLE units ADD CONSTRAINT units_queue_minutes_check CHECK (
    ack_target_minutes BETWEEN 1 AND 1440 AND remind_after_minutes BETWEEN 1 AND 1440
    AND escalate_after_minutes BETWEEN remind_after_minutes AND 2880)`);

  await knex.schema.alterTable("flags", (t) => {
    /** Bumped by every transition; a transition names the version it saw, so of two people acting at once one wins. */
    t.integer("version").notNullable().defaultTo(1);
  });

  await knex.schema.createTable("flag_events", (t) => {
    t.bigIncrements("id").primary();
    t.uuid("flag_id").notNullable().references("id").inTable("flags").onDelete("RESTRICT");
    t.text("from_state").notNullable();
    t.text("to_state").notNullable().checkIn(["open", "acknowledged", "escalated", "resolved"], "flag_events_to_state_check");
    /** Acknowledge reason (GLOSSARY): artifact_or_poor_signal, known_rhythm, expected_clinical_context, reviewed_no_action. */
    t.text("reason").checkIn(["artifact_or_poor_signal", "known_rhythm", "expected_clinical_context", "reviewed_no_action"], "flag_events_reason_check");
    t.text("note");
    /** The clinician an escalation went to. */
    t.uuid("recipient_id").references("id").inTable("users").onDelete("RESTRICT");
    /** null for the system (a reminder job's automatic escalation). */
    t.uuid("actor_id").references("id").inTable("users").onDelete("RESTRICT");
    t.timestamp("at", { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.index(["flag_id", "at"]);
  });
  await knex.raw(`ALTER TABLE flag_events ADD CONSTRAINT flag_events_note_check CHECK (note IS NULL OR char_length(note) <= 500)`);

  await knex.schema.createTable("mail_outbox", (t) => {
    t.bigIncrements("id").primary();
    /** escalation | reminder | reminder_escalation */
    t.text("kind").notNullable();
    t.text("to_address").notNullable();
    t.text("subject").notNullable();
    t.text("body_text").notNullable();
    /** One message per purpose (e.g. "reminder:<flag id>:1"): a second enqueue of the same key is ignored. */
    t.text("dedupe_key").notNullable().unique();
    t.uuid("flag_id").references("id").inTable("flags").onDelete("RESTRICT");
    t.text("status").notNullable().defaultTo("queued").checkIn(["queued", "sent", "failed"], "mail_outbox_status_check");
    t.integer("attempts").notNullable().defaultTo(0);
    t.timestamp("next_attempt_at", { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.text("last_error");
    t.timestamp("created_at", { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp("sent_at", { useTz: true });
    t.index(["status", "next_attempt_at"]);
  });

  await knex.schema.createTable("mail_received", (t) => {
    t.bigIncrements("id").primary();
    t.timestamp("received_at", { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.text("envelope_from");
    t.specificType("envelope_to", "text[]").notNullable();
    t.text("subject");
    t.text("body_text");
    t.text("message_id");
    /** The message as received (RFC 5322 source). */
    t.text("raw").notNullable();
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("mail_received");
  await knex.schema.dropTable("mail_outbox");
  await knex.schema.dropTable("flag_events");
  await knex.schema.alterTable("flags", (t) => t.dropColumn("version"));
  await knex.raw(`ALTER TABLE units DROP CONSTRAINT units_queue_minutes_check`);
  await knex.schema.alterTable("units", (t) => {
    t.dropColumn("escalate_after_minutes");
    t.dropColumn("remind_after_minutes");
    t.dropColumn("ack_target_minutes");
  });
}
