// The ingest: one reader per active device assigned to a bed, one batched writer, and a refresh of the device list
// (new assignments, rotated tokens, retired devices) every `refreshMs`. When PostgreSQL is unreachable the writer
// holds up to `maxBuffered` records; past that every reader pauses and later resumes from its last accepted seq,
// which the device replays — so an outage loses nothing.
import type { Knex } from "knex";
import { decryptStreamToken } from "@/lib/devices/stream-token";
import { publishLive } from "@/lib/live/events";
import { logger } from "@/lib/log";
import { BeatWriter, WRITER_DEFAULTS, type DeviceCounters, type WriterOptions } from "./beat-writer";
import { StreamReader, type ReaderDevice } from "./stream-reader";

export const INGEST_DEFAULTS = { refreshMs: 30_000, healthCheckMs: 1_000 } as const;

export interface IngestOptions {
  refreshMs?: number;
  writer?: Partial<WriterOptions>;
}

/** Active devices with an open bed assignment, with their tokens unsealed. */
export async function activeDevices(db: Knex): Promise<ReaderDevice[]> {
  const rows = await db("devices")
    .join("device_assignments", "device_assignments.device_id", "devices.id")
    .whereNull("device_assignments.assigned_to")
    .andWhere("devices.status", "active")
    .join("beds", "beds.id", "device_assignments.bed_id")
    .select("devices.id", "devices.serial", "devices.stream_url", "devices.stream_token_enc", "beds.unit_id");
  const out: ReaderDevice[] = [];
  for (const r of rows) {
    try {
      out.push({ id: r.id, serial: r.serial, streamUrl: r.stream_url, token: decryptStreamToken(r.stream_token_enc), unitId: r.unit_id });
    } catch (err) {
      logger.error({ device: r.serial, err: (err as Error).message }, "device token cannot be unsealed; device skipped");
    }
  }
  return out;
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
  private tokens = new Map<string, string>();

  constructor(private readonly db: Knex, private readonly options: IngestOptions = {}) {
    this.writer = new BeatWriter(db, this.counters, { ...WRITER_DEFAULTS, ...options.writer });
  }

  async start(): Promise<void> {
    await this.refresh();
    this.writer.start();
    this.refreshTimer = setInterval(() => void this.refresh().catch((err) => logger.error({ err: (err as Error).message }, "device list refresh failed")), this.options.refreshMs ?? INGEST_DEFAULTS.refreshMs);
    // Back-pressure: a full buffer pauses every reader until the database takes the backlog.
    this.healthTimer = setInterval(() => {
      if (this.writer.full) for (const r of this.readers.values()) r.pause();
      else if (this.writer.failures === 0 && this.writer.buffered < WRITER_DEFAULTS.batchSize) for (const r of this.readers.values()) r.resume();
    }, INGEST_DEFAULTS.healthCheckMs);
  }

  /** Starts readers for new devices, restarts those whose token or URL changed, stops removed ones. */
  async refresh(): Promise<void> {
    const devices = await activeDevices(this.db);
    const seen = new Set<string>();
    for (const d of devices) {
      seen.add(d.id);
      const existing = this.readers.get(d.id);
      const fingerprint = `${d.streamUrl} ${d.token}`;
      if (existing && this.tokens.get(d.id) === fingerprint) continue;
      if (existing) existing.stop();
      const counters = existing ? this.counters.get(d.id)! : await loadCounters(this.db, d.id);
      this.counters.set(d.id, counters);
      if (!existing) this.writer.storedSeq.set(d.id, counters.lastSeq);
      const reader = new StreamReader(d, counters, this.writer, Date.now, (connected) => {
        // Browsers showing this unit hear that the stream came or went (ids only; no patient data).
        const lastBeatAt = counters.lastBeatAt === null ? null : new Date(counters.lastBeatAt).toISOString();
        void publishLive(this.db, { type: "stream", unitId: d.unitId, deviceId: d.id, connected, lastBeatAt }).catch(() => undefined);
      });
      if (existing) reader.lastAccepted = existing.lastAccepted;
      this.readers.set(d.id, reader);
      this.tokens.set(d.id, fingerprint);
      reader.start();
      logger.info({ device: d.serial, fromSeq: reader.lastAccepted }, existing ? "device stream restarted" : "device stream started");
    }
    for (const [id, reader] of this.readers) {
      if (seen.has(id)) continue;
      reader.stop();
      this.readers.delete(id);
      this.tokens.delete(id);
      logger.info({ device: reader.device.serial }, "device stream stopped (no longer assigned or active)");
    }
  }

  async stop(): Promise<void> {
    if (this.refreshTimer) clearInterval(this.refreshTimer);
    if (this.healthTimer) clearInterval(this.healthTimer);
    for (const r of this.readers.values()) r.stop();
    await this.writer.stop();
  }
}
