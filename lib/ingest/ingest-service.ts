// The ingest: one reader per active device assigned to a bed, one batched writer, and the device list kept current.
// The registry's actions NOTIFY on DEVICE_REGISTRY_CHANNEL; one dedicated connection LISTENs, and a burst of changes
// is folded into one refresh `debounceMs` later, so an assignment or a new token takes effect within seconds. The
// periodic refresh every `refreshMs` stays as the fallback for anything missed while that connection was down.
// When PostgreSQL is unreachable the writer holds up to `maxBuffered` records; past that every reader pauses and
// later resumes from its last accepted seq, which the device replays — so an outage loses nothing.
import type { Knex } from "knex";
import pg from "pg";
import { DEVICE_REGISTRY_CHANNEL } from "@/lib/devices/registry-events";
import { decryptStreamToken } from "@/lib/devices/stream-token";
import { publishLive } from "@/lib/live/events";
import { logger } from "@/lib/log";
import { BeatWriter, WRITER_DEFAULTS, type DeviceCounters, type WriterOptions } from "./beat-writer";
import { StreamReader, type ReaderDevice } from "./stream-reader";

export const INGEST_DEFAULTS = {
  refreshMs: 30_000,
  healthCheckMs: 1_000,
  /** Registry notifications within this window become one refresh (an import or a rotation sends several). */
  debounceMs: 250,
  /** Wait before reconnecting the LISTEN connection after it drops. */
  listenRetryMs: 2_000,
} as const;

export interface IngestOptions {
  refreshMs?: number;
  debounceMs?: number;
  /** Where to LISTEN for registry changes; by default the database of `db`. */
  listenConnection?: string | pg.ClientConfig;
  writer?: Partial<WriterOptions>;
}

interface DeviceRow {
  id: string;
  serial: string;
  stream_url: string;
  stream_token_enc: string;
  previous_token_enc: string | null;
  previous_token_valid_until: Date | null;
  previous_valid: boolean;
  unit_id: string;
}

/**
 * Active devices with an open bed assignment and a current stream token (never issued or revoked: not read), with
 * their tokens unsealed — the previous one too while its grace lasts (judged by the database clock).
 */
export async function activeDevices(db: Knex): Promise<ReaderDevice[]> {
  const rows: DeviceRow[] = await db("devices")
    .join("device_assignments", "device_assignments.device_id", "devices.id")
    .whereNull("device_assignments.assigned_to")
    .andWhere("devices.status", "active")
    .whereNotNull("devices.stream_token_enc")
    .join("beds", "beds.id", "device_assignments.bed_id")
    .select(
      "devices.id",
      "devices.serial",
      "devices.stream_url",
      "devices.stream_token_enc",
      "devices.previous_token_enc",
      "devices.previous_token_valid_until",
      db.raw("coalesce(devices.previous_token_valid_until > now(), false) AS previous_valid"),
      "beds.unit_id",
    );
  const out: ReaderDevice[] = [];
  for (const r of rows) {
    let token: string;
    try {
      token = decryptStreamToken(r.stream_token_enc);
    } catch (err) {
      logger.error({ device: r.serial, err: (err as Error).message }, "device token cannot be unsealed; device skipped");
      continue;
    }
    let previous: ReaderDevice["previous"] = null;
    if (r.previous_valid && r.previous_token_enc && r.previous_token_valid_until) {
      try {
        previous = { token: decryptStreamToken(r.previous_token_enc), validUntil: r.previous_token_valid_until.getTime() };
      } catch (err) {
        logger.error({ device: r.serial, err: (err as Error).message }, "previous device token cannot be unsealed; only the current one is presented");
      }
    }
    out.push({ id: r.id, serial: r.serial, streamUrl: r.stream_url, token, previous, unitId: r.unit_id });
  }
  return out;
}

/** pg connection settings of a Knex instance, for a connection of our own beside its pool. */
function connectionOf(db: Knex): string | pg.ClientConfig {
  const c = (db.client as { config: Knex.Config }).config.connection;
  if (typeof c === "string") return c;
  if (c && typeof c === "object") return c as pg.ClientConfig;
  return process.env.DATABASE_URL ?? "";
}

async function loadCounters(db: Knex, deviceId: string): Promise<DeviceCounters> {
  const s = await db("device_stream_status").where({ device_id: deviceId }).first();
  let lastSeq = s?.last_seq ? Number(s.last_seq) : 0;
  if (!s) {
    // No status row yet (first start, or written by an older version): the beats themselves say how far we got.
    const m = await db("beats").where({ device_id: deviceId }).max<{ max: string | null }[]>({ max: "seq" }).first();
    lastSeq = m?.max ? Number(m.max) : 0;
  }
  return {
    lastSeq,
    lastSeenAt: s?.last_seen_at?.getTime() ?? null,
    lastBeatAt: s?.last_beat_at?.getTime() ?? null,
    gaps: s?.gaps ?? 0,
    missingSeqs: s ? Number(s.missing_seqs) : 0,
    duplicates: s?.duplicates ?? 0,
    malformed: s?.malformed ?? 0,
    malformedByKind: s?.malformed_by_kind ?? {},
    reconnects: s?.reconnects ?? 0,
    clockOffsetMs: s?.clock_offset_ms ?? null,
    connected: false,
    leadOff: s?.lead_off ?? false,
    lastError: null,
  };
}

export class IngestService {
  readonly counters = new Map<string, DeviceCounters>();
  readonly readers = new Map<string, StreamReader>();
  readonly writer: BeatWriter;
  private refreshTimer: NodeJS.Timeout | null = null;
  private healthTimer: NodeJS.Timeout | null = null;
  private debounceTimer: NodeJS.Timeout | null = null;
  private listenRetryTimer: NodeJS.Timeout | null = null;
  private listener: pg.Client | null = null;
  private refreshing: Promise<void> | null = null;
  private refreshAgain = false;
  private stopping = false;
  /** When the last registry notification arrived (epoch ms), for tests and logs. */
  lastNotificationAt: number | null = null;

  constructor(private readonly db: Knex, private readonly options: IngestOptions = {}) {
    this.writer = new BeatWriter(db, this.counters, { ...WRITER_DEFAULTS, ...options.writer });
  }

  async start(): Promise<void> {
    this.stopping = false;
    // LISTEN before the first read of the device list, so no change between the two goes unheard.
    await this.listen();
    await this.refresh();
    this.writer.start();
    this.refreshTimer = setInterval(() => void this.refresh(), this.options.refreshMs ?? INGEST_DEFAULTS.refreshMs);
    // Back-pressure: a full buffer pauses every reader until the database takes the backlog.
    this.healthTimer = setInterval(() => {
      if (this.writer.full) for (const r of this.readers.values()) r.pause();
      else if (this.writer.failures === 0 && this.writer.buffered < WRITER_DEFAULTS.batchSize) for (const r of this.readers.values()) r.resume();
    }, INGEST_DEFAULTS.healthCheckMs);
  }

  /** Opens the LISTEN connection; on failure or when it drops, retries, then refreshes for what it missed. */
  private async listen(): Promise<void> {
    if (this.stopping || this.listener) return;
    const config = this.options.listenConnection ?? connectionOf(this.db);
    const client = new pg.Client(typeof config === "string" ? { connectionString: config } : config);
    let lost = false;
    const onLost = (reason: string) => {
      if (lost) return;
      lost = true;
      if (this.listener === client) this.listener = null;
      void client.end().catch(() => undefined);
      if (this.stopping) return;
      logger.warn({ reason }, "registry listener lost its connection; reconnecting (the periodic refresh covers the meantime)");
      this.retryListen();
    };
    client.on("notification", (msg) => {
      if (msg.channel !== DEVICE_REGISTRY_CHANNEL) return;
      this.lastNotificationAt = Date.now();
      this.scheduleRefresh();
    });
    client.on("error", (err) => onLost(err.message));
    client.on("end", () => onLost("connection ended"));
    try {
      await client.connect();
      await client.query(`LISTEN ${DEVICE_REGISTRY_CHANNEL}`);
    } catch (err) {
      onLost((err as Error).message);
      return;
    }
    if (this.stopping) {
      lost = true;
      await client.end().catch(() => undefined);
      return;
    }
    this.listener = client;
  }

  private retryListen(): void {
    if (this.listenRetryTimer || this.stopping) return;
    this.listenRetryTimer = setTimeout(() => {
      this.listenRetryTimer = null;
      void this.listen().then(() => {
        // Notifications sent while the connection was down are lost: read the list once it is back.
        if (this.listener) this.scheduleRefresh();
      });
    }, INGEST_DEFAULTS.listenRetryMs);
  }

  /** The first notification of a burst starts the window; the rest fold into the same refresh. */
  private scheduleRefresh(): void {
    if (this.debounceTimer || this.stopping) return;
    this.debounceTimer = setTimeout(() => {
      this.debounceTimer = null;
      void this.refresh();
    }, this.options.debounceMs ?? INGEST_DEFAULTS.debounceMs);
  }

  /** Re-reads the device list; one at a time, and a request during a refresh runs once more after it. Never throws. */
  refresh(): Promise<void> {
    if (this.refreshing) {
      this.refreshAgain = true;
      return this.refreshing;
    }
    this.refreshing = (async () => {
      try {
        do {
          this.refreshAgain = false;
          try {
            await this.sync();
          } catch (err) {
            logger.error({ err: (err as Error).message }, "device list refresh failed");
            break;
          }
        } while (this.refreshAgain && !this.stopping);
      } finally {
        this.refreshing = null;
      }
    })();
    return this.refreshing;
  }

  /** Starts readers for new devices, applies moves and token changes to running ones, stops removed ones. */
  private async sync(): Promise<void> {
    const devices = await activeDevices(this.db);
    if (this.stopping) return;
    const seen = new Set<string>();
    for (const d of devices) {
      seen.add(d.id);
      const existing = this.readers.get(d.id);
      if (existing) {
        const change = existing.update(d);
        if (change === "restarted") logger.info({ device: d.serial, fromSeq: existing.lastAccepted }, "device stream restarted (new stream address)");
        else if (change === "credentials") logger.info({ device: d.serial }, "device stream tokens changed");
        else if (change === "moved") logger.info({ device: d.serial }, "device moved to another unit's bed; stream continues");
        continue;
      }
      // Counters of a device read earlier in this process are newer than its status row (the writer may lag).
      const counters = this.counters.get(d.id) ?? (await loadCounters(this.db, d.id));
      if (this.stopping) return;
      this.counters.set(d.id, counters);
      if (!this.writer.storedSeq.has(d.id)) this.writer.storedSeq.set(d.id, counters.lastSeq);
      const reader: StreamReader = new StreamReader(d, counters, this.writer, Date.now, (connected) => {
        // Browsers showing this unit hear that the stream came or went (ids only; no patient data).
        const lastBeatAt = counters.lastBeatAt === null ? null : new Date(counters.lastBeatAt).toISOString();
        void publishLive(this.db, { type: "stream", unitId: reader.device.unitId, deviceId: d.id, connected, lastBeatAt }).catch(() => undefined);
      });
      this.readers.set(d.id, reader);
      reader.start();
      logger.info({ device: d.serial, fromSeq: reader.lastAccepted }, "device stream started");
    }
    for (const [id, reader] of this.readers) {
      if (seen.has(id)) continue;
      reader.stop();
      this.readers.delete(id);
      logger.info({ device: reader.device.serial }, "device stream stopped (unassigned, not active, or without a token)");
    }
  }

  async stop(): Promise<void> {
    this.stopping = true;
    if (this.refreshTimer) clearInterval(this.refreshTimer);
    if (this.healthTimer) clearInterval(this.healthTimer);
    if (this.debounceTimer) clearTimeout(this.debounceTimer);
    if (this.listenRetryTimer) clearTimeout(this.listenRetryTimer);
    this.debounceTimer = this.listenRetryTimer = null;
    const listener = this.listener;
    this.listener = null;
    await listener?.end().catch(() => undefined);
    await this.refreshing;
    for (const r of this.readers.values()) r.stop();
    await this.writer.stop();
  }
}
