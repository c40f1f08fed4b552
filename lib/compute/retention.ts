// Beat retention: beats are kept in one partition per UTC day (`beats_YYYYMMDD`, made by ensure_beats_partition),
// so old beats leave by dropping whole partitions — no row-by-row DELETE, no bloat. Computed windows, baselines and
// flags are kept; only the raw beats go.
import type { Knex } from "knex";
import { logger } from "@/lib/log";

const DAY_MS = 86_400_000;
const PARTITION_NAME = /^beats_(\d{4})(\d{2})(\d{2})$/;

/**
 * Drops every day partition whose whole day ended at least `retentionDays` days before `now`. The default partition
 * (rows outside any day partition) is never dropped. Dropping a partition briefly locks the beats table, so each drop
 * waits at most 5 s for its lock and is otherwise left for a later run. Returns the partitions dropped.
 */
export async function dropExpiredBeatPartitions(db: Knex, retentionDays: number, now: Date): Promise<string[]> {
  if (!(Number.isInteger(retentionDays) && retentionDays >= 1)) throw new RangeError(`retention must be a whole number of days ≥ 1, got ${retentionDays}`);
  const cutoff = now.getTime() - retentionDays * DAY_MS;
  const { rows } = await db.raw<{ rows: { name: string }[] }>(
    `SELECT c.relname AS name FROM pg_inherits i JOIN pg_class c ON c.oid = i.inhrelid WHERE i.inhparent = 'beats'::regclass`,
  );
  const expired = rows
    .map((r) => ({ name: r.name, m: PARTITION_NAME.exec(r.name) }))
    .filter((r): r is { name: string; m: RegExpExecArray } => r.m !== null)
    .filter(({ m }) => Date.UTC(Number(m[1]), Number(m[2]) - 1, Number(m[3]) + 1) <= cutoff)
    .map((r) => r.name)
    .sort();
  const dropped: string[] = [];
  for (const name of expired) {
    try {
      await db.transaction(async (trx) => {
        await trx.raw("SET LOCAL lock_timeout = '5s'");
        await trx.raw("DROP TABLE ??", [name]);
      });
      dropped.push(name);
    } catch (err) {
      logger.warn({ err, partition: name }, "could not drop an expired beats partition; a later run tries again");
    }
  }
  return dropped;
}

/**
 * Deletes the stream-health minute samples (device_health_minutes) older than `retentionDays` days before `now`: the
 * same retention as the beats, so the health charts never outlive the beats they describe. Returns the rows deleted.
 */
export async function deleteExpiredHealthMinutes(db: Knex, retentionDays: number, now: Date): Promise<number> {
  if (!(Number.isInteger(retentionDays) && retentionDays >= 1)) throw new RangeError(`retention must be a whole number of days ≥ 1, got ${retentionDays}`);
  const cutoff = new Date(now.getTime() - retentionDays * DAY_MS);
  // Per device through the primary key (device_id, minute): a range scan each, rather than reading the whole table.
  const { rowCount } = await db.raw<{ rowCount: number | null }>(
    `DELETE FROM device_health_minutes m USING devices d WHERE m.device_id = d.id AND m.minute < ?`,
    [cutoff],
  );
  return rowCount ?? 0;
}
