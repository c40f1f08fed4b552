import type { Knex } from "knex";

// Units, beds, patients, stays, people and their unit-scoped roles.
export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable("units", (t) => {
    t.uuid("id").primary().defaultTo(knex.raw("gen_random_uuid()"));
    t.text("code").notNullable().unique();
    t.text("name").notNullable();
    t.text("kind").notNullable().checkIn(["adult", "neonatal"], "units_kind_check");
    t.text("time_zone").notNullable();
    t.timestamp("created_at", { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });

  await knex.schema.createTable("beds", (t) => {
    t.uuid("id").primary().defaultTo(knex.raw("gen_random_uuid()"));
    t.uuid("unit_id").notNullable().references("id").inTable("units").onDelete("RESTRICT");
    t.text("label").notNullable();
    t.integer("sort_order").notNullable().defaultTo(0);
    t.boolean("active").notNullable().defaultTo(true);
    t.unique(["unit_id", "label"]);
  });

  await knex.schema.createTable("patients", (t) => {
    t.uuid("id").primary().defaultTo(knex.raw("gen_random_uuid()"));
    t.text("record_number").notNullable().unique();
    t.text("display_name").notNullable();
    t.date("birth_date");
    t.timestamp("created_at", { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });

  await knex.schema.createTable("stays", (t) => {
    t.uuid("id").primary().defaultTo(knex.raw("gen_random_uuid()"));
    t.uuid("patient_id").notNullable().references("id").inTable("patients").onDelete("RESTRICT");
    t.uuid("bed_id").notNullable().references("id").inTable("beds").onDelete("RESTRICT");
    t.timestamp("admitted_at", { useTz: true }).notNullable();
    t.timestamp("discharged_at", { useTz: true });
    t.index(["bed_id", "admitted_at"]);
    t.index(["patient_id"]);
  });
  await knex.raw(`ALTER TABLE stays ADD CONSTRAINT stays_interval_check
    CHECK (discharged_at IS NULL OR discharged_at > admitted_at)`);
  // One current stay per bed and per patient: [admitted, discharged) intervals never overlap.
  await knex.raw(`CREATE UNIQUE INDEX stays_one_current_per_bed ON stays (bed_id) WHERE discharged_at IS NULL`);
  await knex.raw(`CREATE UNIQUE INDEX stays_one_current_per_patient ON stays (patient_id) WHERE discharged_at IS NULL`);

  await knex.schema.createTable("users", (t) => {
    t.uuid("id").primary().defaultTo(knex.raw("gen_random_uuid()"));
    t.text("email").notNullable();
    t.text("name").notNullable();
    t.text("password_hash").notNullable();
    t.boolean("active").notNullable().defaultTo(true);
    t.timestamp("last_sign_in_at", { useTz: true });
    t.timestamp("created_at", { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.timestamp("updated_at", { useTz: true }).notNullable().defaultTo(knex.fn.now());
  });
  await knex.raw(`CREATE UNIQUE INDEX users_email_lower ON users (lower(email))`);

  await knex.schema.createTable("user_unit_roles", (t) => {
    t.uuid("user_id").notNullable().references("id").inTable("users").onDelete("CASCADE");
    t.uuid("unit_id").notNullable().references("id").inTable("units").onDelete("CASCADE");
    t.text("role")
      .notNullable()
      .checkIn(["clinician", "charge_nurse", "biomed", "quality", "admin"], "user_unit_roles_role_check");
    t.timestamp("granted_at", { useTz: true }).notNullable().defaultTo(knex.fn.now());
    t.uuid("granted_by").references("id").inTable("users").onDelete("SET NULL");
    t.primary(["user_id", "unit_id", "role"]);
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.dropTable("user_unit_roles");
  await knex.schema.dropTable("users");
  await knex.schema.dropTable("stays");
  await knex.schema.dropTable("patients");
  await knex.schema.dropTable("beds");
  await knex.schema.dropTable("units");
}
