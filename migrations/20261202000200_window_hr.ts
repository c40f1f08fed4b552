import type { Knex } from "knex";

// Heart rate of each window as its own column, generated from the stored values, and a covering index over the
// short-window grid: the Ward overview draws a night's heart rate for every bed of a unit from the index alone
// (an index-only scan), without reading each window's whole value document.
export async function up(knex: Knex): Promise<void> {
  await knex.raw(`ALTER TABLE index_windows ADD COLUMN hr double precision
    GENERATED ALWAYS AS (CASE WHEN jsonb_typeof("values"->'hr') = 'number' THEN ("values"->>'hr')::float8 END) STORED`);
  await knex.raw(`CREATE INDEX index_windows_hr_grid ON index_windows (stay_id, kind, algorithm_version, window_start)
    INCLUDE (hr, grade, window_end)`);
}

export async function down(knex: Knex): Promise<void> {
  await knex.raw(`DROP INDEX index_windows_hr_grid`);
  await knex.raw(`ALTER TABLE index_windows DROP COLUMN hr`);
}
