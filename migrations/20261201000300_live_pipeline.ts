import type { Knex } from "knex";

// The live pipeline: devices and their bed assignments, beats (range-partitioned by day), per-device stream
// status, computed windows, personal baselines, versioned rule sets, review flags and compute runs.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("devices", (t) => {
    t.uuid("id").primary().defaultTo(knex.raw("gen_random_uuid()"));
    t.text("serial").notNullable().unique();
    t.text("model").notNullable();
    t.text("firmware").notNullable();
    /** Resolution of the device's beat timestamps, ms (1, 7.8125 = 1/128 s, …). */
    t.double("timestamp_resolution_ms").notNullable().defaultTo(1);
    /** Where the device serves its Server-Sent Events stream. */
    t.text("stream_url").notNullable();
    /** SHA-256 of the bearer token (hex), to recognise it; the token itself is kept encrypted for the reader. */
    t.text("stream_token_hash").notNullable();
    t.text("stream_token_enc").notNullable();
    t.timestamp("token_rotated_at", { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.text("status").notNullable().defaultTo("active").checkIn(["active", "maintenance", "retired"], "devices_status_check");
    t.timestamp("created_at", { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp("updated_at", { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });

  await knex.schema.createTable("device_assignments", (t) => {
    t.uuid("id").primary().defaultTo(knex.raw("gen_random_uuid()"));
    t.uuid("device_id").notNullable().references("id").inTable("devices").onDelete("RESTRICT");
    t.uuid("bed_id").notNullable().references("id").inTable("beds").onDelete("RESTRICT");
    t.timestamp("assigned_from", { useTz: true }).notNullable();
    t.timestamp("assigned_to", { useTz: true });
    t.uuid("assigned_by").references("id").inTable("users").onDelete("SET NULL");
    t.index(["bed_id", "assigned_from"]);
    t.index(["device_id", "assigned_from"]);
  });
  await knex.raw(`ALTER TABLE device_assignments ADD CONSTRAINT device_assignments_interval_check
    CHECK (assigned_to IS NULL OR assigned_to > assigned_from)`);
  await knex.raw(`CREATE UNIQUE INDEX device_assignments_one_open_per_device ON device_assignments (device_id) WHERE assigned_to IS NULL`);
  await knex.raw(`CREATE UNIQUE INDEX device_assignments_one_open_per_bed ON device_assignments (bed_id) WHERE assigned_to IS NULL`);

  // (In the SQL below, \\? is a literal question mark: knex.raw reads a bare ? as a binding.)
  // Beats, partitioned by the day of the device's own timestamp. The key includes device_time because a
  // partitioned table's unique keys must include its partition key; a resent record repeats its device time
  // exactly, so (device, seq) stays unique, and the ingest also skips seqs it has stored. beat_at is the beat on
  // the server's clock (device time minus the measured clock offset), used to place beats in windows.
  await knex.raw(`
    CREATE TABLE beats (
      device_id uuid NOT NULL REFERENCES devices (id) ON DELETE RESTRICT,
      seq bigint NOT NULL,
      beat_at timestamptz(3) NOT NULL,
      device_time timestamptz(3) NOT NULL,
      received_at timestamptz(3) NOT NULL DEFAULT now(),
      rr_ms double precision NOT NULL CHECK (rr_ms > 0 AND rr_ms <= 10000),
      beat_type char(1) NOT NULL CHECK (beat_type IN ('N', 'V', 'S', 'P', '\\?')),
      quality real NOT NULL CHECK (quality >= 0 AND quality <= 1),
      lead_off boolean NOT NULL,
      PRIMARY KEY (device_id, device_time, seq)
    ) PARTITION BY RANGE (device_time)`);
  await knex.raw(`CREATE TABLE beats_default PARTITION OF beats DEFAULT`);
  await knex.raw(`CREATE INDEX beats_device_seq ON beats (device_id, seq)`);
  await knex.raw(`CREATE INDEX beats_device_beat_at ON beats (device_id, beat_at)`);
  // Creates the day partition holding `day` if it is missing (called by the ingest before writing a new day).
  await knex.raw(`
    CREATE FUNCTION ensure_beats_partition(day date) RETURNS void LANGUAGE plpgsql AS $$
    DECLARE
      name text := 'beats_' || to_char(day, 'YYYYMMDD');
    BEGIN
      IF to_regclass(name) IS NULL THEN
        EXECUTE format('CREATE TABLE %I PARTITION OF beats FOR VALUES FROM (%L) TO (%L)',
          name, (day::timestamp AT TIME ZONE 'UTC'), ((day + 1)::timestamp AT TIME ZONE 'UTC'));
      END IF;
    END $$`);

  await knex.schema.createTable("device_stream_status", (t) => {
    t.uuid("device_id").primary().references("id").inTable("devices").onDelete("CASCADE");
    t.boolean("connected").notNullable().defaultTo(false);
    t.bigInteger("last_seq");
    t.timestamp("last_seen_at", { useTz: true });
    t.timestamp("last_beat_at", { useTz: true });
    t.integer("gaps").notNullable().defaultTo(0);
    t.bigInteger("missing_seqs").notNullable().defaultTo(0);
    t.integer("duplicates").notNullable().defaultTo(0);
    t.integer("malformed").notNullable().defaultTo(0);
    t.jsonb("malformed_by_kind").notNullable().defaultTo("{}");
    t.integer("reconnects").notNullable().defaultTo(0);
    /** Device clock minus server clock at the last connection, ms. */
    t.double("clock_offset_ms");
    t.boolean("lead_off").notNullable().defaultTo(false);
    t.text("last_error");
    t.timestamp("updated_at", { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });

  await knex.schema.createTable("compute_runs", (t) => {
    t.bigIncrements("id").primary();
    t.timestamp("started_at", { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp("finished_at", { useTz: true });
    t.text("algorithm_version").notNullable();
    t.text("trigger").notNullable().checkIn(["scheduler", "admin", "test"], "compute_runs_trigger_check");
    t.text("status").notNullable().defaultTo("running").checkIn(["running", "done", "failed", "skipped"], "compute_runs_status_check");
    t.integer("stays").notNullable().defaultTo(0);
    t.integer("windows").notNullable().defaultTo(0);
    t.integer("flags_raised").notNullable().defaultTo(0);
    t.integer("duration_ms");
    t.text("error");
  });

  await knex.schema.createTable("index_windows", (t) => {
    t.bigIncrements("id").primary();
    t.uuid("stay_id").notNullable().references("id").inTable("stays").onDelete("RESTRICT");
    t.text("kind").notNullable().checkIn(["short", "long"], "index_windows_kind_check");
    t.timestamp("window_start", { useTz: true }).notNullable();
    t.timestamp("window_end", { useTz: true }).notNullable();
    t.text("algorithm_version").notNullable();
    /** SHA-256 of the canonical JSON of every parameter that produced the values. */
    t.text("params_hash").notNullable();
    t.text("grade").notNullable().checkIn(["good", "limited", "unusable"], "index_windows_grade_check");
    t.jsonb("quality").notNullable();
    /** Index key → value (null where undefined); null when the window is unusable. */
    t.jsonb("values");
    t.jsonb("reasons").notNullable().defaultTo("{}");
    /** MSE curve for long windows. */
    t.jsonb("mse");
    /** Index key → change from the stay's baseline (value − baseline median). */
    t.jsonb("baseline_delta");
    t.bigInteger("compute_run_id").references("id").inTable("compute_runs").onDelete("SET NULL");
    t.timestamp("computed_at", { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.unique(["stay_id", "kind", "window_start", "algorithm_version"]);
    t.index(["stay_id", "kind", "window_start"]);
  });

  await knex.schema.createTable("computation_params", (t) => {
    t.text("params_hash").primary();
    t.text("algorithm_version").notNullable();
    t.jsonb("params").notNullable();
    t.timestamp("first_used_at", { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });

  await knex.schema.createTable("baselines", (t) => {
    t.uuid("stay_id").notNullable().references("id").inTable("stays").onDelete("RESTRICT");
    t.text("index_key").notNullable();
    t.text("algorithm_version").notNullable();
    t.double("median");
    /** Robust spread: median absolute deviation × 1.4826 (consistent with the SD under normality). */
    t.double("spread");
    t.integer("n_windows").notNullable();
    t.timestamp("from_at", { useTz: true }).notNullable();
    t.timestamp("to_at", { useTz: true }).notNullable();
    t.timestamp("computed_at", { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.primary(["stay_id", "index_key", "algorithm_version"]);
  });

  await knex.schema.createTable("rule_sets", (t) => {
    t.uuid("id").primary().defaultTo(knex.raw("gen_random_uuid()"));
    t.uuid("unit_id").notNullable().references("id").inTable("units").onDelete("RESTRICT");
    t.integer("version").notNullable();
    t.text("name").notNullable();
    /** Rules as validated by lib/flags/rules.validation.ts. */
    t.jsonb("rules").notNullable();
    /** True for the seeded default, which local protocol is expected to review and replace. */
    t.boolean("is_default").notNullable().defaultTo(false);
    t.text("note");
    t.uuid("created_by").references("id").inTable("users").onDelete("SET NULL");
    t.timestamp("created_at", { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.unique(["unit_id", "version"]);
  });

  await knex.schema.createTable("flags", (t) => {
    t.uuid("id").primary().defaultTo(knex.raw("gen_random_uuid()"));
    t.uuid("stay_id").notNullable().references("id").inTable("stays").onDelete("RESTRICT");
    t.uuid("unit_id").notNullable().references("id").inTable("units").onDelete("RESTRICT");
    t.uuid("rule_set_id").notNullable().references("id").inTable("rule_sets").onDelete("RESTRICT");
    t.integer("rule_set_version").notNullable();
    t.text("rule_id").notNullable();
    t.text("severity").notNullable().checkIn(["watch", "review"], "flags_severity_check");
    t.text("state").notNullable().defaultTo("open").checkIn(["open", "acknowledged", "escalated", "resolved"], "flags_state_check");
    /** The condition's period: from the first window that met it to the end of the last (null while it lasts). */
    t.timestamp("condition_from", { useTz: true }).notNullable();
    t.timestamp("condition_to", { useTz: true });
    t.timestamp("raised_at", { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.uuid("previous_flag_id").references("id").inTable("flags").onDelete("SET NULL");
    t.jsonb("details").notNullable().defaultTo("{}");
    t.index(["unit_id", "state", "raised_at"]);
    t.index(["stay_id", "rule_id", "condition_from"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("flags");
  await knex.schema.dropTable("rule_sets");
  await knex.schema.dropTable("baselines");
  await knex.schema.dropTable("computation_params");
  await knex.schema.dropTable("index_windows");
  await knex.schema.dropTable("compute_runs");
  await knex.schema.dropTable("device_stream_status");
  await knex.raw("DROP TABLE beats"); // drops every partition with it
  await knex.raw("DROP FUNCTION ensure_beats_partition(date)");
  await knex.schema.dropTable("device_assignments");
  await knex.schema.dropTable("devices");
}
