// Writes accepted stream records to PostgreSQL in batches, idempotently on (device, seq): a beat stored twice is
// impossible because the same record always carries the same device time (the partitioned table's key), and the
// readers skip seqs they have already accepted. The stream status of each device (last seq, counters, clock
// offset) is written in the same transaction, so "last stored seq" is always true after a crash. So is the device's
// stream-health sample of the current UTC minute (device_health_minutes): the counters' growth since the status row
// last written, added to the minute's row, so the counts of several flushes in one minute add up; and the longest
// interval between consecutive stored beat times that the flush's beats made, the larger of the minute's flushes.
import type { Knex } from "knex";
import { logger } from "@/lib/log";
import type { BeatRecord, StreamRecord } from "@/lib/streaming/protocol";

/** An accepted record waiting to be written. Status records pass through the buffer too, so the stored seq of a
 *  device only ever counts records that are durably handled, in order. */
export interface PendingRecord {
  deviceId: string;
  record: StreamRecord;
  /** Beat time on the server's clock: device time minus the device's clock offset. */
  beatAt: number;
  receivedAt: number;
}
type PendingBeat = PendingRecord & { record: BeatRecord };

export interface DeviceCounters {
  lastSeq: number;
  lastSeenAt: number | null;
  lastBeatAt: number | null;
  gaps: number;
  missingSeqs: number;
  duplicates: number;
  malformed: number;
  malformedByKind: Record<string, number>;
  reconnects: number;
  clockOffsetMs: number | null;
  connected: boolean;
  leadOff: boolean;
  lastError: string | null;
}

export interface WriterOptions {
  batchSize: number;
  flushIntervalMs: number;
  maxBuffered: number;
}

export const WRITER_DEFAULTS: Readonly<WriterOptions> = {
  /** Flush when this many beats wait, or after flushIntervalMs. */
  batchSize: 2000,
  flushIntervalMs: 250,
  /** Most records held while PostgreSQL is unreachable; past this the readers pause and rely on device replay. */
  maxBuffered: 200_000,
};

const DAY_MS = 86_400_000;
const MINUTE_MS = 60_000;
/** Largest value of the minute's longest_gap_ms (a PostgreSQL integer): a longer gap (over 24.8 days) is stored as
 *  this. */
const MAX_GAP_MS = 2_147_483_647;

/** What one flush stored for a device: the beats newly stored, the latest stored beat time (this flush's or earlier)
 *  and the longest interval the new beats made, ms (null: none, e.g. the device's first beat ever). */
interface StoredBeats {
  n: number;
  high: Date | null;
  longestGapMs: number | null;
}

export class BeatWriter {
  private buffer: PendingRecord[] = [];
  /** Highest seq per device whose record (and every earlier one) is durably handled. */
  readonly storedSeq = new Map<string, number>();
  private knownPartitions = new Set<number>();
  /** Per device, the latest beat time (beat_at, epoch ms) among its stored beats, as of the last successful flush. A
   *  device not in it yet is looked up in the beats table by the next flush, before its INSERT. */
  private readonly highBeatAt = new Map<string, number>();
  private dirtyStatus = new Set<string>();
  private flushing: Promise<void> | null = null;
  private timer: NodeJS.Timeout | null = null;
  /** Consecutive failed flushes (0 when the database answers). */
  failures = 0;

  constructor(
    private readonly db: Knex,
    private readonly counters: Map<string, DeviceCounters>,
    private readonly options: WriterOptions = WRITER_DEFAULTS,
    /** Called after each successful flush with the highest stored seq per device. */
    private readonly onStored: (stored: Map<string, number>) => void = () => undefined,
    /** The server clock; the health sample of a flush counts in the UTC minute of this time. */
    private readonly now: () => number = Date.now,
  ) {}

  get buffered(): number {
    return this.buffer.length;
  }

  get full(): boolean {
    return this.buffer.length >= this.options.maxBuffered;
  }

  add(beat: PendingRecord): void {
    this.buffer.push(beat);
    this.dirtyStatus.add(beat.deviceId);
    if (this.buffer.length >= this.options.batchSize) void this.flush();
  }

  /** Marks a device's status (counters) as changed, to be written with the next flush. */
  touch(deviceId: string): void {
    this.dirtyStatus.add(deviceId);
  }

  start(): void {
    this.timer ??= setInterval(() => void this.flush(), this.options.flushIntervalMs);
  }

  async stop(): Promise<void> {
    if (this.timer) clearInterval(this.timer);
    this.timer = null;
    await this.flush();
  }

  /** Writes everything buffered; on failure keeps it for the next attempt. Never throws. */
  flush(): Promise<void> {
    if (this.flushing) return this.flushing;
    if (this.buffer.length === 0 && this.dirtyStatus.size === 0) return Promise.resolve();
    this.flushing = this.write()
      .catch((err: unknown) => {
        this.failures += 1;
        // Once per outage, then every 40th failure: a log line per 250 ms would drown everything else.
        if (this.failures === 1 || this.failures % 40 === 0) {
          logger.error({ err: (err as Error).message, buffered: this.buffer.length, failures: this.failures }, "beat write failed; holding beats");
        }
      })
      .finally(() => {
        this.flushing = null;
      });
    return this.flushing;
  }

  private async write(): Promise<void> {
    // Up to 50,000 records per statement: large enough that round trips do not dominate a backlog.
    const taken = this.buffer.slice(0, Math.max(this.options.batchSize * 5, 50_000));
    const batch = taken.filter((p): p is PendingBeat => p.record.kind === "beat");
    const devices = [...this.dirtyStatus];
    const stored = new Map<string, number>();
    const beatsStored = new Map<string, StoredBeats>();
    await this.db.transaction(async (trx) => {
      if (batch.length) {
        const days = new Set(batch.map((b) => Math.floor(b.record.tDevice / DAY_MS)));
        for (const day of days) {
          if (this.knownPartitions.has(day)) continue;
          try {
            await trx.raw("SAVEPOINT partition");
            await trx.raw("SELECT ensure_beats_partition(?::date)", [new Date(day * DAY_MS).toISOString().slice(0, 10)]);
            await trx.raw("RELEASE SAVEPOINT partition");
          } catch (err) {
            // The day's rows already sit in the default partition (written before its partition existed): keep
            // using the default partition for that day rather than fail the batch.
            await trx.raw("ROLLBACK TO SAVEPOINT partition");
            logger.warn({ day: new Date(day * DAY_MS).toISOString().slice(0, 10), err: (err as Error).message }, "beats partition not created");
          }
          this.knownPartitions.add(day);
        }
        // The longest interval between consecutive stored beat times that this flush's beats make, per device, the
        // device's latest stored beat before the flush included: from highBeatAt, or for a device this writer has not
        // stored yet, the beats table before the INSERT below. Computed here rather than in the INSERT (a window over
        // every inserted row cost the bulk path about a fifth of its rate). Taken in beat time order: a beat at or
        // before a time already stored (its clock stepped back after a correction, or a replay) makes no interval.
        const timesOf = new Map<string, number[]>();
        for (const b of batch) {
          const ts = timesOf.get(b.deviceId);
          if (ts) ts.push(b.beatAt);
          else timesOf.set(b.deviceId, [b.beatAt]);
        }
        const unknown = [...timesOf.keys()].filter((d) => !this.highBeatAt.has(d));
        const looked = new Map<string, number | null>();
        if (unknown.length) {
          const { rows: highs } = await trx.raw<{ rows: { device_id: string; high: Date | null }[] }>(
            "SELECT u.device_id, (SELECT max(b.beat_at) FROM beats b WHERE b.device_id = u.device_id) AS high FROM unnest(?::uuid[]) AS u(device_id)",
            [unknown],
          );
          for (const r of highs) looked.set(r.device_id, r.high?.getTime() ?? null);
        }
        const gaps = new Map<string, { high: number | null; longestGapMs: number | null }>();
        for (const [deviceId, ts] of timesOf) {
          ts.sort((a, b) => a - b);
          const before = this.highBeatAt.get(deviceId) ?? looked.get(deviceId) ?? null;
          let prev = before;
          let longest: number | null = null;
          for (const t of ts) {
            if (prev !== null && t > prev && (before === null || t > before)) longest = Math.max(longest ?? 0, t - prev);
            prev = prev === null ? t : Math.max(prev, t);
          }
          gaps.set(deviceId, { high: prev, longestGapMs: longest === null ? null : Math.min(Math.round(longest), MAX_GAP_MS) });
        }
        // RETURNING: a replayed beat already stored (ON CONFLICT) does not count as stored again in the minute.
        // Times go as whole epoch milliseconds (what a JavaScript Date holds, so the same instants as before) and
        // become timestamptz in PostgreSQL: cheaper on both sides than ISO text, and exact (to_timestamp of ms / 1000
        // rounds to the microsecond, and whole ms are exact there: checked on 200,000 random instants).
        const { rows } = await trx.raw<{ rows: { device_id: string; n: number }[] }>(
          `WITH ins AS (
             INSERT INTO beats (device_id, seq, beat_at, device_time, received_at, rr_ms, beat_type, quality, lead_off)
             SELECT d, s, to_timestamp(b / 1000), to_timestamp(t / 1000), to_timestamp(r / 1000), rr, ty, q, lo
               FROM unnest(?::uuid[], ?::bigint[], ?::float8[], ?::float8[], ?::float8[], ?::float8[], ?::bpchar[], ?::real[],
                           ?::bool[]) AS u(d, s, b, t, r, rr, ty, q, lo)
             ON CONFLICT DO NOTHING
             RETURNING device_id)
           SELECT device_id, count(*)::int AS n FROM ins GROUP BY device_id`,
          [
            batch.map((b) => b.deviceId),
            batch.map((b) => b.record.seq),
            batch.map((b) => Math.trunc(b.beatAt)),
            batch.map((b) => Math.trunc(b.record.tDevice)),
            batch.map((b) => Math.trunc(b.receivedAt)),
            batch.map((b) => b.record.rr),
            batch.map((b) => b.record.type),
            batch.map((b) => b.record.quality),
            batch.map((b) => b.record.leadOff),
          ],
        );
        const inserted = new Map(rows.map((r) => [r.device_id, r.n]));
        for (const [deviceId, g] of gaps) {
          const n = inserted.get(deviceId) ?? 0;
          // Nothing new stored (every beat a replay): no interval either.
          beatsStored.set(deviceId, { n, high: g.high === null ? null : new Date(g.high), longestGapMs: n ? g.longestGapMs : null });
        }
      }
      for (const p of taken) stored.set(p.deviceId, Math.max(stored.get(p.deviceId) ?? this.storedSeq.get(p.deviceId) ?? 0, p.record.seq));
      const status = devices.flatMap((deviceId) => {
        const c = this.counters.get(deviceId);
        return c ? [{ deviceId, c, lastSeq: stored.get(deviceId) ?? this.storedSeq.get(deviceId) ?? c.lastSeq }] : [];
      });
      if (status.length) await writeStatusAndMinute(trx, status, beatsStored, this.now());
    });
    this.buffer.splice(0, taken.length);
    for (const [d, b] of beatsStored) if (b.high) this.highBeatAt.set(d, b.high.getTime());
    for (const [d, s] of stored) this.storedSeq.set(d, s);
    for (const d of devices) this.dirtyStatus.delete(d);
    if (this.buffer.length) for (const b of this.buffer) this.dirtyStatus.add(b.deviceId);
    this.failures = 0;
    if (stored.size) this.onStored(stored);
    if (this.buffer.length >= this.options.batchSize) void Promise.resolve().then(() => this.flush());
  }
}

/**
 * One statement for every device of a flush: upserts each device's stream status, and adds to the device's sample of
 * the current UTC minute the beats stored now and the growth of each counter since the status row as it was before
 * this statement (all parts of one statement see the same snapshot, so `before` is the previous flush's row). A
 * counter that went down (counters reset) adds nothing rather than a negative count. The minute keeps the last clock
 * offset measured in it, the connection state at its last flush, and the longest gap of its flushes (GREATEST skips
 * NULL: a flush that made no interval leaves the minute's value as it was).
 */
async function writeStatusAndMinute(
  trx: Knex.Transaction,
  status: { deviceId: string; c: DeviceCounters; lastSeq: number }[],
  beatsStored: ReadonlyMap<string, StoredBeats>,
  now: number,
): Promise<void> {
  const col = <T,>(f: (s: (typeof status)[number]) => T): Knex.Value => status.map(f) as Knex.Value;
  const ms = (t: number | null) => (t === null ? null : new Date(t).toISOString());
  await trx.raw(
    `WITH s AS (
       SELECT * FROM unnest(?::uuid[], ?::bool[], ?::bigint[], ?::timestamptz[], ?::timestamptz[], ?::int[], ?::bigint[],
                            ?::int[], ?::int[], ?::text[], ?::int[], ?::float8[], ?::bool[], ?::text[], ?::int[], ?::int[])
         AS s(device_id, connected, last_seq, last_seen_at, last_beat_at, gaps, missing_seqs,
              duplicates, malformed, malformed_by_kind, reconnects, clock_offset_ms, lead_off, last_error, beats,
              longest_gap_ms)
     ),
     before AS (
       SELECT st.device_id, st.gaps, st.missing_seqs, st.duplicates, st.malformed, st.reconnects
         FROM device_stream_status st JOIN s USING (device_id)
     ),
     status AS (
       INSERT INTO device_stream_status (device_id, connected, last_seq, last_seen_at, last_beat_at, gaps, missing_seqs,
                                         duplicates, malformed, malformed_by_kind, reconnects, clock_offset_ms, lead_off,
                                         last_error, updated_at)
       SELECT device_id, connected, last_seq, last_seen_at, last_beat_at, gaps, missing_seqs, duplicates, malformed,
              malformed_by_kind::jsonb, reconnects, clock_offset_ms, lead_off, last_error, ?::timestamptz
         FROM s
       ON CONFLICT (device_id) DO UPDATE SET
         connected = EXCLUDED.connected, last_seq = EXCLUDED.last_seq, last_seen_at = EXCLUDED.last_seen_at,
         last_beat_at = EXCLUDED.last_beat_at, gaps = EXCLUDED.gaps, missing_seqs = EXCLUDED.missing_seqs,
         duplicates = EXCLUDED.duplicates, malformed = EXCLUDED.malformed, malformed_by_kind = EXCLUDED.malformed_by_kind,
         reconnects = EXCLUDED.reconnects, clock_offset_ms = EXCLUDED.clock_offset_ms, lead_off = EXCLUDED.lead_off,
         last_error = EXCLUDED.last_error, updated_at = EXCLUDED.updated_at
     )
     INSERT INTO device_health_minutes AS m (device_id, minute, beats, gaps, missing_seqs, duplicates, malformed, reconnects,
                                             clock_offset_ms, connected, longest_gap_ms)
     SELECT s.device_id, ?::timestamptz, s.beats,
            GREATEST(s.gaps - COALESCE(b.gaps, 0), 0), GREATEST(s.missing_seqs - COALESCE(b.missing_seqs, 0), 0),
            GREATEST(s.duplicates - COALESCE(b.duplicates, 0), 0), GREATEST(s.malformed - COALESCE(b.malformed, 0), 0),
            GREATEST(s.reconnects - COALESCE(b.reconnects, 0), 0), s.clock_offset_ms, s.connected, s.longest_gap_ms
       FROM s LEFT JOIN before b USING (device_id)
     ON CONFLICT (device_id, minute) DO UPDATE SET
       beats = m.beats + EXCLUDED.beats, gaps = m.gaps + EXCLUDED.gaps, missing_seqs = m.missing_seqs + EXCLUDED.missing_seqs,
       duplicates = m.duplicates + EXCLUDED.duplicates, malformed = m.malformed + EXCLUDED.malformed,
       reconnects = m.reconnects + EXCLUDED.reconnects,
       clock_offset_ms = COALESCE(EXCLUDED.clock_offset_ms, m.clock_offset_ms), connected = EXCLUDED.connected,
       longest_gap_ms = GREATEST(m.longest_gap_ms, EXCLUDED.longest_gap_ms)`,
    [
      col((s) => s.deviceId),
      col((s) => s.c.connected),
      col((s) => String(s.lastSeq)),
      col((s) => ms(s.c.lastSeenAt)),
      col((s) => ms(s.c.lastBeatAt)),
      col((s) => s.c.gaps),
      col((s) => String(s.c.missingSeqs)),
      col((s) => s.c.duplicates),
      col((s) => s.c.malformed),
      col((s) => JSON.stringify(s.c.malformedByKind)),
      col((s) => s.c.reconnects),
      col((s) => s.c.clockOffsetMs),
      col((s) => s.c.leadOff),
      col((s) => s.c.lastError),
      col((s) => beatsStored.get(s.deviceId)?.n ?? 0),
      col((s) => beatsStored.get(s.deviceId)?.longestGapMs ?? null),
      new Date(now).toISOString(),
      new Date(now - (now % MINUTE_MS)).toISOString(),
    ],
  );
}
