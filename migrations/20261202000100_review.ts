import type { Knex } from "knex";

// Clinician review: each unit's review night (local start and end times), clinical event annotations drawn on the
// Night review, and the clinician's note on a patient's Handoff summary for a night.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable("units", (t) => {
    // Local wall-clock times in the unit's zone; a night runs from start on one date to end on the next, so a DST
    // change makes it an hour shorter or longer (DOMAIN W5: 22:00 → 06:00 is 7 h or 9 h on those nights).
    t.text("night_starts_at").notNullable().defaultTo("22:00");
    t.text("night_ends_at").notNullable().defaultTo("06:00");
  });
  await knex.raw(`ALTER TABLE units ADD CONSTRAINT units_night_times_check
    CHECK (night_starts_at ~ '^([01][0-9]|2[0-3]):[0-5][0-9]$' AND night_ends_at ~ '^([01][0-9]|2[0-3]):[0-5][0-9]$')`);

  await knex.schema.createTable("clinical_annotations", (t) => {
    t.uuid("id").primary().defaultTo(knex.raw("gen_random_uuid()"));
    t.uuid("stay_id").notNullable().references("id").inTable("stays").onDelete("RESTRICT");
    t.timestamp("occurred_at", { useTz: true }).notNullable();
    t.text("kind").notNullable().checkIn(["medication", "procedure", "repositioning", "other"], "clinical_annotations_kind_check");
    t.text("note").notNullable();
    t.uuid("created_by").notNullable().references("id").inTable("users").onDelete("RESTRICT");
    t.timestamp("created_at", { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.uuid("updated_by").references("id").inTable("users").onDelete("RESTRICT");
    t.timestamp("updated_at", { useTz: true });
    /** Bumped by each edit; an edit names the version it changes, so two people editing at once cannot overwrite. */
    t.integer("version").notNullable().defaultTo(1);
    t.index(["stay_id", "occurred_at"]);
  });
  await knex.raw(`ALTER TABLE clinical_annotations ADD CONSTRAINT clinical_annotations_note_check CHECK (char_length(note) BETWEEN 1 AND 500)`);

  await knex.schema.createTable("handoff_notes", (t) => {
    t.uuid("id").primary().defaultTo(knex.raw("gen_random_uuid()"));
    t.uuid("stay_id").notNullable().references("id").inTable("stays").onDelete("RESTRICT");
    /** The local calendar date of the evening the night starts. */
    t.date("night").notNullable();
    t.text("note").notNullable();
    t.uuid("updated_by").notNullable().references("id").inTable("users").onDelete("RESTRICT");
    t.timestamp("updated_at", { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.integer("version").notNullable().defaultTo(1);
    t.unique(["stay_id", "night"]);
  });
  await knex.raw(`ALTER TABLE handoff_notes ADD CONSTRAINT handoff_notes_note_check CHECK (char_length(note) <= 2000)`);
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("handoff_notes");
  await knex.schema.dropTable("clinical_annotations");
  await knex.raw(`ALTER TABLE units DROP CONSTRAINT units_night_times_check`);
  await knex.schema.alterTable("units", (t) => {
    t.dropColumn("night_ends_at");
    t.dropColumn("night_starts_at");
  });
}
