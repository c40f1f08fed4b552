// Reads one device's Server-Sent Events stream (eventsource 4.1.1), validates every event, and hands accepted
// records to the writer in order. It resumes from the last record it accepted — not from the last `id:` the
// library saw, which a hostile or broken event could set — by sending its own Last-Event-ID on every connection.
// Token rotation: it presents the current token; when the device refuses it (401) and the token before the rotation
// is still in its grace period, it presents that one, so a device not yet given the new token keeps streaming.
import { EventSource } from "eventsource";
import { logger } from "@/lib/log";
import { parseStreamEvent, type MalformedKind } from "@/lib/streaming/protocol";
import type { BeatWriter, DeviceCounters } from "./beat-writer";

export interface ReaderDevice {
  id: string;
  serial: string;
  streamUrl: string;
  /** The current stream token. */
  token: string;
  /** The token before the last rotation, while its grace lasts (validUntil: epoch ms). */
  previous?: { token: string; validUntil: number } | null;
  unitId: string;
}

/** What changed when the registry's view of a device is applied to its running reader. */
export type ReaderUpdate = "unchanged" | "moved" | "credentials" | "restarted";

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
  /** The last connection was ended by this reader (a pause, new credentials or address), not lost: the next open is
   *  not counted as a reconnect, which Stream health reports as trouble on the link. */
  private closedByUs = false;
  private loggedKinds = new Set<MalformedKind | "unknown_event">();
  /** The token the open (or opening) connection presents. */
  private presented: string | null = null;
  /** Closes a connection made with the previous token when its grace ends. */
  private graceTimer: NodeJS.Timeout | null = null;
  /** The current token for which "device still has the old token" was logged (once per rotation). */
  private fallbackLoggedFor: string | null = null;
  /** Highest seq accepted (handed to the writer); resumes from here. */
  lastAccepted: number;

  constructor(
    public device: ReaderDevice,
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
    this.closedByUs = this.opens > 0;
    this.close();
  }

  resume(): void {
    if (!this.paused || this.stopped) return;
    this.paused = false;
    this.connect();
  }

  /**
   * Applies the registry's current view of the device. A move to another bed changes nothing on the wire; new
   * tokens keep an open connection whose token is still accepted (a rotation must not drop the stream) and otherwise
   * reconnect at once, without waiting out a backoff; a new stream address reconnects.
   */
  update(next: ReaderDevice): ReaderUpdate {
    const before = this.device;
    this.device = next;
    if (next.streamUrl !== before.streamUrl) {
      this.reconnectNow();
      return "restarted";
    }
    const sameCredentials = next.token === before.token && next.previous?.token === before.previous?.token && next.previous?.validUntil === before.previous?.validUntil;
    if (sameCredentials) return next.unitId === before.unitId ? "unchanged" : "moved";
    const stillAccepted = this.presented !== null && (this.presented === next.token || this.presented === this.validPrevious());
    if (stillAccepted && this.counters.connected) this.armGraceTimer();
    else this.reconnectNow();
    return "credentials";
  }

  /** The previous token while its grace lasts, else null. */
  private validPrevious(): string | null {
    const p = this.device.previous;
    return p && p.validUntil > this.now() ? p.token : null;
  }

  private reconnectNow(): void {
    if (this.stopped) return;
    this.close();
    this.closedByUs = this.opens > 0;
    this.backoffMs = READER_DEFAULTS.backoffMinMs;
    if (this.counters.connected) {
      this.counters.connected = false;
      this.writer.touch(this.device.id);
      this.onConnection(false);
    }
    this.connect();
  }

  /** While the open connection presents the previous token, ends it when the grace does, to go on with the current. */
  private armGraceTimer(): void {
    if (this.graceTimer) clearTimeout(this.graceTimer);
    this.graceTimer = null;
    const p = this.device.previous;
    if (!p || this.presented !== p.token || this.presented === this.device.token) return;
    this.graceTimer = setTimeout(() => {
      this.graceTimer = null;
      logger.info({ device: this.device.serial }, "grace period of the previous stream token ended; presenting only the current token");
      this.reconnectNow();
    }, Math.max(0, p.validUntil - this.now()));
  }

  private close(): void {
    if (this.retryTimer) clearTimeout(this.retryTimer);
    this.retryTimer = null;
    if (this.graceTimer) clearTimeout(this.graceTimer);
    this.graceTimer = null;
    this.es?.close();
    this.es = null;
    this.presented = null;
  }

  private connect(which: "current" | "previous" = "current"): void {
    if (this.stopped || this.paused) return;
    const first = which === "current" ? this.device.token : this.validPrevious();
    if (first === null) return this.scheduleReconnect();
    let requests = 0;
    const es = new EventSource(this.device.streamUrl, {
      fetch: (input, init) => {
        // The library's own reconnects (after a cut) present the current token again, so a device that has since
        // been given the new token is read with it; a refusal then comes back here as a 401 (below).
        const token = requests++ === 0 ? first : this.device.token;
        this.presented = token;
        return fetch(input, {
          ...init,
          headers: {
            ...(init?.headers as Record<string, string>),
            Authorization: `Bearer ${token}`,
            "Last-Event-ID": String(this.lastAccepted),
          },
        });
      },
    });
    this.es = es;
    es.addEventListener("open", () => {
      if (this.es !== es) return;
      this.opens += 1;
      if (this.opens > 1 && !this.closedByUs) this.counters.reconnects += 1;
      this.closedByUs = false;
      this.counters.connected = true;
      this.counters.lastError = null;
      this.backoffMs = READER_DEFAULTS.backoffMinMs;
      this.writer.touch(this.device.id);
      this.onConnection(true);
      this.armGraceTimer();
    });
    const onEvent = (e: MessageEvent<string>) => this.handle(e.data, e.lastEventId);
    es.addEventListener("beat", onEvent);
    es.addEventListener("status", onEvent);
    es.addEventListener("message", () => this.malformed("unknown_event", "event without a known type"));
    es.addEventListener("error", (err) => {
      if (this.es !== es) return;
      const wasConnected = this.counters.connected;
      this.counters.connected = false;
      this.counters.lastError = (err as { message?: string }).message ?? "stream error";
      this.writer.touch(this.device.id);
      if (wasConnected) this.onConnection(false);
      // The library retries transient failures itself; a closed source (e.g. 401, 404) is ours to retry.
      if (es.readyState !== EventSource.CLOSED) return;
      const refusedCurrent = (err as { code?: number }).code === 401 && this.presented === this.device.token;
      if (refusedCurrent && this.validPrevious() !== null) {
        if (this.fallbackLoggedFor !== this.device.token) {
          this.fallbackLoggedFor = this.device.token;
          logger.info({ device: this.device.serial }, "device refused the current stream token: it has not yet been given the new token; presenting the previous one during its grace period");
        }
        this.close();
        return this.connect("previous");
      }
      this.scheduleReconnect();
    });
  }

  private scheduleReconnect(): void {
    if (this.stopped || this.paused || this.retryTimer) return;
    this.es?.close();
    this.es = null;
    this.presented = null;
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
