import type { Knex } from "knex";

// Stream health's longest gap, kept by the ingest as it writes (lib/ingest/beat-writer.ts): per device and UTC minute,
// the longest interval between consecutive stored beat times among the beats stored in that minute, the interval from
// the device's previous stored beat included. The 24-h figure is the largest over the window's minute rows
// (lib/devices/health.ts), instead of a scan over every beat of the day. NULL: no beat stored in the minute after an
// earlier one (or a row written before this column existed).
export async function up(knex: Knex): Promise<void> {
  await knex.schema.alterTable("device_health_minutes", (t) => {
    t.integer("longest_gap_ms");
  });
}

export async function down(knex: Knex): Promise<void> {
  await knex.schema.alterTable("device_health_minutes", (t) => {
    t.dropColumn("longest_gap_ms");
  });
}
