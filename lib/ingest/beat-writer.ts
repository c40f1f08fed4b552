// Writes accepted stream records to PostgreSQL in batches, idempotently on (device, seq): a beat stored twice is
// impossible because the same record always carries the same device time (the partitioned table's key), and the
// readers skip seqs they have already accepted. The stream status of each device (last seq, counters, clock
// offset) is written in the same transaction, so "last stored seq" is always true after a crash.
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

export class BeatWriter {
  private buffer: PendingRecord[] = [];
  /** Highest seq per device whose record (and every earlier one) is durably handled. */
  readonly storedSeq = new Map<string, number>();
  private knownPartitions = new Set<number>();
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
        await trx.raw(
          `INSERT INTO beats (device_id, seq, beat_at, device_time, received_at, rr_ms, beat_type, quality, lead_off)
           SELECT * FROM unnest(?::uuid[], ?::bigint[], ?::timestamptz[], ?::timestamptz[], ?::timestamptz[],
                                ?::float8[], ?::bpchar[], ?::real[], ?::bool[])
           ON CONFLICT DO NOTHING`,
          [
            batch.map((b) => b.deviceId),
            batch.map((b) => b.record.seq),
            batch.map((b) => new Date(b.beatAt).toISOString()),
            batch.map((b) => new Date(b.record.tDevice).toISOString()),
            batch.map((b) => new Date(b.receivedAt).toISOString()),
            batch.map((b) => b.record.rr),
            batch.map((b) => b.record.type),
            batch.map((b) => b.record.quality),
            batch.map((b) => b.record.leadOff),
          ],
        );
      }
      for (const p of taken) stored.set(p.deviceId, Math.max(stored.get(p.deviceId) ?? this.storedSeq.get(p.deviceId) ?? 0, p.record.seq));
      for (const deviceId of devices) {
        const c = this.counters.get(deviceId);
        if (!c) continue;
        const row = {
          device_id: deviceId,
          connected: c.connected,
          last_seq: String(stored.get(deviceId) ?? this.storedSeq.get(deviceId) ?? c.lastSeq),
          last_seen_at: c.lastSeenAt === null ? null : new Date(c.lastSeenAt),
          last_beat_at: c.lastBeatAt === null ? null : new Date(c.lastBeatAt),
          gaps: c.gaps,
          missing_seqs: String(c.missingSeqs),
          duplicates: c.duplicates,
          malformed: c.malformed,
          malformed_by_kind: c.malformedByKind,
          reconnects: c.reconnects,
          clock_offset_ms: c.clockOffsetMs,
          lead_off: c.leadOff,
          last_error: c.lastError,
          updated_at: new Date(),
        };
        await trx("device_stream_status").insert(row).onConflict("device_id").merge();
      }
    });
    this.buffer.splice(0, taken.length);
    for (const [d, s] of stored) this.storedSeq.set(d, s);
    for (const d of devices) this.dirtyStatus.delete(d);
    if (this.buffer.length) for (const b of this.buffer) this.dirtyStatus.add(b.deviceId);
    this.failures = 0;
    if (stored.size) this.onStored(stored);
    if (this.buffer.length >= this.options.batchSize) void Promise.resolve().then(() => this.flush());
  }
}
