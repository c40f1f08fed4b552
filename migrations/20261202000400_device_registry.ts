import type { Knex } from "knex";

// The device registry of biomedical engineers: each device belongs to a home unit; its stream token has a life
// cycle (none → issued → rotated with a grace period → revoked); decommissioned devices keep their history.
// Stream health keeps one sample per device and minute for the 24-h charts; the maintenance log keeps entries and
// their attachments (service reports, stored in PostgreSQL so they share its backups and access control); a CSV
// import is stored as previewed, so the confirmation writes exactly the rows the person saw.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable("devices", (t) => {
    t.text("manufacturer").notNullable().defaultTo("");
    t.text("notes").notNullable().defaultTo("");
    /** The unit whose biomedical engineers look after the device (beds it may be assigned to). */
    t.uuid("unit_id").references("id").inTable("units").onDelete("RESTRICT");
    t.uuid("registered_by").references("id").inTable("users").onDelete("SET NULL");
    /** The token before the last rotation: the ingest may still present it until previous_token_valid_until. */
    t.text("previous_token_hash");
    t.text("previous_token_enc");
    t.timestamp("previous_token_valid_until", { useTz: true });
    t.timestamp("token_revoked_at", { useTz: true });
    t.timestamp("decommissioned_at", { useTz: true });
    t.uuid("decommissioned_by").references("id").inTable("users").onDelete("SET NULL");
    t.text("decommission_reason");
  });
  // Home unit of existing devices: the unit of the bed they are (or were last) assigned to, else the first unit.
  await knex.raw(`
    UPDATE devices d SET unit_id = COALESCE(
      (SELECT b.unit_id FROM device_assignments a JOIN beds b ON b.id = a.bed_id
        WHERE a.device_id = d.id ORDER BY a.assigned_to IS NULL DESC, a.assigned_from DESC LIMIT 1),
      (SELECT id FROM units ORDER BY code LIMIT 1))`);
  await knex.raw(`ALTER TABLE devices ALTER COLUMN unit_id SET NOT NULL`);
  await knex.raw(`CREATE INDEX devices_unit ON devices (unit_id, serial)`);
  // A device may be registered before a token is issued, and a revoked token leaves none.
  await knex.raw(`ALTER TABLE devices ALTER COLUMN stream_token_hash DROP NOT NULL, ALTER COLUMN stream_token_enc DROP NOT NULL`);
  await knex.raw(`ALTER TABLE devices ADD CONSTRAINT devices_token_pair_check
    CHECK ((stream_token_hash IS NULL) = (stream_token_enc IS NULL))`);
  await knex.raw(`ALTER TABLE devices ALTER COLUMN token_rotated_at DROP NOT NULL`);
  await knex.raw(`ALTER TABLE devices DROP CONSTRAINT devices_status_check`);
  await knex.raw(`UPDATE devices SET status = 'decommissioned', decommissioned_at = COALESCE(decommissioned_at, updated_at) WHERE status = 'retired'`);
  await knex.raw(`ALTER TABLE devices ADD CONSTRAINT devices_status_check CHECK (status IN ('active', 'maintenance', 'decommissioned'))`);

  await knex.schema.alterTable("device_assignments", (t) => {
    t.uuid("unassigned_by").references("id").inTable("users").onDelete("SET NULL");
  });

  await knex.schema.createTable("device_health_minutes", (t) => {
    t.uuid("device_id").notNullable().references("id").inTable("devices").onDelete("CASCADE");
    t.timestamp("minute", { useTz: true }).notNullable();
    t.integer("beats").notNullable().defaultTo(0);
    t.integer("gaps").notNullable().defaultTo(0);
    t.bigInteger("missing_seqs").notNullable().defaultTo(0);
    t.integer("duplicates").notNullable().defaultTo(0);
    t.integer("malformed").notNullable().defaultTo(0);
    t.integer("reconnects").notNullable().defaultTo(0);
    /** Device clock minus server clock, ms, as last measured in the minute. */
    t.double("clock_offset_ms");
    t.boolean("connected").notNullable().defaultTo(false);
    t.primary(["device_id", "minute"]);
  });

  await knex.schema.createTable("device_maintenance", (t) => {
    t.uuid("id").primary().defaultTo(knex.raw("gen_random_uuid()"));
    t.uuid("device_id").notNullable().references("id").inTable("devices").onDelete("RESTRICT");
    t.text("kind").notNullable().checkIn(["preventive", "repair", "firmware_update"], "device_maintenance_kind_check");
    t.date("performed_on").notNullable();
    /** Who did the work (may be a service technician without a Corvane account). */
    t.text("performed_by_name").notNullable();
    t.text("note").notNullable().defaultTo("");
    t.text("firmware_before");
    t.text("firmware_after");
    /** When the next maintenance of this device is due, as set by this entry. */
    t.date("next_due_on");
    t.uuid("recorded_by").references("id").inTable("users").onDelete("SET NULL");
    t.timestamp("recorded_at", { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.index(["device_id", "performed_on"]);
  });

  await knex.schema.createTable("device_attachments", (t) => {
    t.uuid("id").primary().defaultTo(knex.raw("gen_random_uuid()"));
    t.uuid("maintenance_id").notNullable().references("id").inTable("device_maintenance").onDelete("RESTRICT");
    /** The name the file was uploaded with, for display and the download's file name only. */
    t.text("file_name").notNullable();
    /** Detected from the content, never from the name or the browser's claim. */
    t.text("content_type").notNullable().checkIn(["application/pdf", "image/png", "image/jpeg"], "device_attachments_type_check");
    t.integer("size_bytes").notNullable();
    t.text("sha256").notNullable();
    t.binary("content").notNullable();
    t.uuid("uploaded_by").references("id").inTable("users").onDelete("SET NULL");
    t.timestamp("uploaded_at", { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.index(["maintenance_id"]);
  });
  await knex.raw(`ALTER TABLE device_attachments ADD CONSTRAINT device_attachments_size_check CHECK (size_bytes > 0 AND size_bytes = octet_length(content))`);

  await knex.schema.createTable("device_import_batches", (t) => {
    t.uuid("id").primary().defaultTo(knex.raw("gen_random_uuid()"));
    t.uuid("unit_id").notNullable().references("id").inTable("units").onDelete("RESTRICT");
    t.text("file_name").notNullable();
    t.text("sha256").notNullable();
    /** Every row's outcome as the dry run showed it. */
    t.jsonb("rows").notNullable();
    t.text("status").notNullable().defaultTo("previewed").checkIn(["previewed", "imported", "failed"], "device_import_batches_status_check");
    t.uuid("created_by").references("id").inTable("users").onDelete("SET NULL");
    t.timestamp("created_at", { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp("confirmed_at", { useTz: true });
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("device_import_batches");
  await knex.schema.dropTable("device_attachments");
  await knex.schema.dropTable("device_maintenance");
  await knex.schema.dropTable("device_health_minutes");
  await knex.schema.alterTable("device_assignments", (t) => t.dropColumn("unassigned_by"));
  await knex.raw(`ALTER TABLE devices DROP CONSTRAINT devices_status_check`);
  await knex.raw(`UPDATE devices SET status = 'retired' WHERE status = 'decommissioned'`);
  await knex.raw(`ALTER TABLE devices ADD CONSTRAINT devices_status_check CHECK (status IN ('active', 'maintenance', 'retired'))`);
  await knex.raw(`ALTER TABLE devices DROP CONSTRAINT devices_token_pair_check`);
  // Devices without a token cannot go back to the older schema, which required one.
  await knex.raw(`DELETE FROM devices d WHERE stream_token_hash IS NULL AND NOT EXISTS (SELECT 1 FROM beats WHERE device_id = d.id)
    AND NOT EXISTS (SELECT 1 FROM device_assignments WHERE device_id = d.id)`);
  await knex.raw(`UPDATE devices SET token_rotated_at = COALESCE(token_rotated_at, created_at)`);
  await knex.raw(`ALTER TABLE devices ALTER COLUMN token_rotated_at SET NOT NULL`);
  await knex.raw(`DROP INDEX devices_unit`);
  await knex.schema.alterTable("devices", (t) => {
    for (const c of ["manufacturer", "notes", "unit_id", "registered_by", "previous_token_hash", "previous_token_enc",
      "previous_token_valid_until", "token_revoked_at", "decommissioned_at", "decommissioned_by", "decommission_reason"]) t.dropColumn(c);
  });
  await knex.raw(`ALTER TABLE devices ALTER COLUMN stream_token_hash SET NOT NULL, ALTER COLUMN stream_token_enc SET NOT NULL`);
}
