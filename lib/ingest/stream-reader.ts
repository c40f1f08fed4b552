// Reads one device's Server-Sent Events stream (eventsource 4.1.1), validates every event, and hands accepted
// records to the writer in order. It resumes from the last record it accepted — not from the last `id:` the
// library saw, which a hostile or broken event could set — by sending its own Last-Event-ID on every connection.
import { EventSource } from "eventsource";
import { logger } from "@/lib/log";
import { parseStreamEvent, type MalformedKind } from "@/lib/streaming/protocol";
import type { BeatWriter, DeviceCounters } from "./beat-writer";

export interface ReaderDevice {
  id: string;
  serial: string;
  streamUrl: string;
  token: string;
  unitId: string;
}

export const READER_DEFAULTS = {
  /** Reconnect backoff after a failed connection: doubles from min to max. */
  backoffMinMs: 500,
  backoffMaxMs: 30_000,
  /** Records whose device time is within this of the server clock count as live, for the clock offset. */
  liveWindowMs: 120_000,
} as const;

export class StreamReader {
  private es: EventSource | null = null;
  private backoffMs: number = READER_DEFAULTS.backoffMinMs;
  private retryTimer: NodeJS.Timeout | null = null;
  private stopped = false;
  private paused = false;
  private opens = 0;
  private loggedKinds = new Set<MalformedKind | "unknown_event">();
  /** Highest seq accepted (handed to the writer); resumes from here. */
  lastAccepted: number;

  constructor(
    readonly device: ReaderDevice,
    private readonly counters: DeviceCounters,
    private readonly writer: BeatWriter,
    private readonly now: () => number = Date.now,
    /** Called when the stream opens or fails (for live status). */
    private readonly onConnection: (connected: boolean) => void = () => undefined,
  ) {
    this.lastAccepted = counters.lastSeq;
  }

  start(): void {
    this.stopped = false;
    this.connect();
  }

  stop(): void {
    this.stopped = true;
    this.close();
    this.counters.connected = false;
    this.writer.touch(this.device.id);
  }

  /** Stops reading while the writer cannot store (the device keeps its buffer; we resume from lastAccepted). */
  pause(): void {
    if (this.paused) return;
    this.paused = true;
    this.close();
  }

  resume(): void {
    if (!this.paused || this.stopped) return;
    this.paused = false;
    this.connect();
  }

  private close(): void {
    if (this.retryTimer) clearTimeout(this.retryTimer);
    this.retryTimer = null;
    this.es?.close();
    this.es = null;
  }

  private connect(): void {
    if (this.stopped || this.paused) return;
    const { token } = this.device;
    const es = new EventSource(this.device.streamUrl, {
      fetch: (input, init) =>
        fetch(input, {
          ...init,
          headers: {
            ...(init?.headers as Record<string, string>),
            Authorization: `Bearer ${token}`,
            "Last-Event-ID": String(this.lastAccepted),
          },
        }),
    });
    this.es = es;
    es.addEventListener("open", () => {
      this.opens += 1;
      if (this.opens > 1) this.counters.reconnects += 1;
      this.counters.connected = true;
      this.counters.lastError = null;
      this.backoffMs = READER_DEFAULTS.backoffMinMs;
      this.writer.touch(this.device.id);
      this.onConnection(true);
    });
    const onEvent = (e: MessageEvent<string>) => this.handle(e.data, e.lastEventId);
    es.addEventListener("beat", onEvent);
    es.addEventListener("status", onEvent);
    es.addEventListener("message", () => this.malformed("unknown_event", "event without a known type"));
    es.addEventListener("error", (err) => {
      const wasConnected = this.counters.connected;
      this.counters.connected = false;
      this.counters.lastError = (err as { message?: string }).message ?? "stream error";
      this.writer.touch(this.device.id);
      if (wasConnected) this.onConnection(false);
      // The library retries transient failures itself; a closed source (e.g. 401, 404) is ours to retry.
      if (es.readyState === EventSource.CLOSED) this.scheduleReconnect();
    });
  }

  private scheduleReconnect(): void {
    if (this.stopped || this.paused || this.retryTimer) return;
    this.es?.close();
    this.es = null;
    const delay = this.backoffMs;
    this.backoffMs = Math.min(this.backoffMs * 2, READER_DEFAULTS.backoffMaxMs);
    this.retryTimer = setTimeout(() => {
      this.retryTimer = null;
      this.connect();
    }, delay);
  }

  private malformed(kind: MalformedKind | "unknown_event", detail: string): void {
    this.counters.malformed += 1;
    this.counters.malformedByKind[kind] = (this.counters.malformedByKind[kind] ?? 0) + 1;
    this.writer.touch(this.device.id);
    if (!this.loggedKinds.has(kind)) {
      this.loggedKinds.add(kind);
      logger.warn({ device: this.device.serial, kind, detail }, "malformed stream event (logged once per kind and device)");
    }
  }

  /** Exposed for tests: processes one event as it arrived. */
  handle(data: string, lastEventId: string | undefined): void {
    if (this.paused || this.stopped) return;
    const receivedAt = this.now();
    const parsed = parseStreamEvent(data, lastEventId);
    if (!parsed.ok) return this.malformed(parsed.kind, parsed.detail);
    const r = parsed.record;
    const c = this.counters;
    c.lastSeenAt = receivedAt;
    if (r.seq <= this.lastAccepted) {
      c.duplicates += 1;
      this.writer.touch(this.device.id);
      return;
    }
    if (r.seq > this.lastAccepted + 1 && this.lastAccepted > 0) {
      c.gaps += 1;
      c.missingSeqs += r.seq - this.lastAccepted - 1;
    }
    this.lastAccepted = r.seq;
    c.lastSeq = r.seq;
    // Clock offset (device − server): for live records tDevice − receivedAt = offset − network delay, so the
    // largest value seen is the best estimate; records replayed from the past say nothing about it.
    const lag = r.tDevice - receivedAt;
    if (Math.abs(lag) < READER_DEFAULTS.liveWindowMs) {
      c.clockOffsetMs = c.clockOffsetMs === null ? lag : Math.max(lag, c.clockOffsetMs - 1);
    }
    const offset = c.clockOffsetMs ?? 0;
    if (r.kind === "status") c.leadOff = r.leadOff;
    else {
      c.lastBeatAt = r.tDevice - offset;
      c.leadOff = r.leadOff;
    }
    this.writer.add({ deviceId: this.device.id, record: r, beatAt: r.tDevice - offset, receivedAt });
  }
}
