// The device simulator's HTTP side: one Server-Sent Events stream per device (lib/streaming/protocol.ts), resumable
// with Last-Event-ID from the device's buffer, and — for tests only — a ground-truth side channel and a way to push
// hostile events down the real stream.
//
// Node's own http module rather than a framework: four routes, one long-lived response per reader, and the only
// thing that matters is control over each write (backpressure through res.write's return value and 'drain'), which
// a framework would only wrap. Loopback only.
import { createServer, type IncomingMessage, type Server, type ServerResponse } from "node:http";
import type { AddressInfo } from "node:net";
import { setImmediate as yieldToEventLoop } from "node:timers/promises";
import type { Logger } from "pino";
import { z } from "zod";
import { hashStreamToken, tokenMatches } from "@/lib/devices/stream-token";
import { logger as rootLogger } from "@/lib/log";
import { SimulatedDevice, type SimulatedDeviceConfig } from "./device";
import { backfillStartBlock } from "./night";
import type { SeqLedger } from "./seq-ledger";

const LOOPBACK_HOST = "127.0.0.1";
/** SSE `retry:` sent to every reader, ms. */
export const RETRY_MS = 2000;
const HEARTBEAT_MS = 15_000;
/** How often the sequence ledger is written, wall ms (and on close). */
const LEDGER_SAVE_MS = 60_000;
/** How often simulated time advances and new records go out, wall ms. */
const TICK_MS = 250;
/** Records older than this (simulated time) are dropped from the buffers: above the longest backfill (35 h, at the
 *  end of a review night ending at 06:00; a little more for a unit whose night ends later). */
const RETENTION_MS = 48 * 3_600_000;
/** A device prepares its next night when its current one ends within this much simulated time (at least; more at
 *  high speed, so that every device gets its own tick before the nights turn). */
const PREPARE_AHEAD_MS = 15 * 60_000;
/** Events per write while replaying: about 60 kB, small enough to keep each turn of the event loop short. */
const REPLAY_BATCH = 400;
/**
 * Replays go out in step across devices: a reader is not sent records more than this far (device time) ahead of
 * the furthest-behind reader that is still replaying. Without it every device gets the same share of the link, so
 * a neonatal monitor (2–3 beats a second) reaches the end of the previous night long after an adult one; in step,
 * every bed's night fills in together (our choice for the demo; a real monitor replays on its own).
 */
export const REPLAY_IN_STEP_MS = 10 * 60_000;
/** A replaying reader that has written nothing for this long (its client stopped reading) no longer holds others
 *  back. */
const REPLAY_STALL_MS = 2_000;
const REPLAY_WAIT_MS = 20;
const MAX_SPEED = 3600;
const MAX_INJECT_BYTES = 1 << 20;
/** Most ground-truth records one request may ask for. */
const MAX_TRUTH_SPAN = 200_000;

export interface SimulatorOptions {
  devices: readonly SimulatedDeviceConfig[];
  /** Simulated seconds per wall second (1 = real time). */
  speed: number;
  /** Serve the ground-truth and inject endpoints (tests only) and keep ground truth in memory. */
  truth: boolean;
  /** Start from the previous evening (default) or from now. */
  backfill?: boolean;
  /** Keeps each device's numbering across restarts (npm start: a file in .corvane/); saved every minute and on close. */
  seqLedger?: SeqLedger & { save?: () => void };
  /** Wall clock, epoch ms (Date.now by default); tests pass a fixed or hand-driven one. */
  now?: () => number;
  tickMs?: number;
  heartbeatMs?: number;
  retentionMs?: number;
  log?: Logger;
}

export interface SimulatorStats {
  devices: number;
  records: number;
  speed: number;
}

export interface SimulatorServer {
  /** Starts serving on 127.0.0.1 (port 0 = any free port) and starts the live timer. */
  listen(port: number): Promise<{ port: number }>;
  /** Ends every stream, stops the timer and closes the server. */
  close(): Promise<void>;
  /** Advances simulated time to the clock's present and sends what is new (the live timer calls this). */
  tick(): void;
  /** Simulated true time, epoch ms. */
  simulatedNow(): number;
  stats(): SimulatorStats;
  /** The simulated device, for tests and logs. */
  device(serial: string): SimulatedDevice | undefined;
  /**
   * Gives a device a new stream token, as a biomedical engineer enters a rotated token on the monitor: new
   * connections must present it; open ones go on. False for an unknown serial.
   */
  setToken(serial: string, token: string): boolean;
}

interface Reader {
  res: ServerResponse;
  /** Send only seqs above this (the Last-Event-ID presented). */
  floor: number;
  /** Next new seq to send. */
  next: number;
  pumping: boolean;
  closed: boolean;
  /** Wall time of the last write, ms (performance.now()). */
  wroteAt: number;
}

interface Entry {
  device: SimulatedDevice;
  tokenHash: string;
  readers: Set<Reader>;
}

class HttpError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly headers: Record<string, string> = {},
  ) {
    super(message);
  }
}

const seqParam = z
  .string()
  .regex(/^\d{1,15}$/, "must be a whole number ≥ 0")
  .transform(Number);
const truthQuery = z
  .object({ from: seqParam, to: seqParam })
  .refine((q) => q.from >= 1 && q.to >= q.from, "need 1 ≤ from ≤ to")
  .refine((q) => q.to - q.from < MAX_TRUTH_SPAN, `at most ${MAX_TRUTH_SPAN} records per request`);
const injectBody = z.object({ raw: z.string().min(1, "raw must not be empty") }).strict();

export function createSimulatorServer(options: SimulatorOptions): SimulatorServer {
  const speed = options.speed;
  if (!(Number.isFinite(speed) && speed > 0 && speed <= MAX_SPEED)) throw new RangeError(`speed must be in (0, ${MAX_SPEED}], got ${speed}`);
  const now = options.now ?? Date.now;
  const tickMs = options.tickMs ?? TICK_MS;
  const heartbeatMs = options.heartbeatMs ?? HEARTBEAT_MS;
  const retentionMs = options.retentionMs ?? RETENTION_MS;
  const log = (options.log ?? rootLogger).child({ component: "simulator" });
  const backfill = options.backfill ?? true;

  const wallStart = now();
  const prepareAheadMs = Math.max(PREPARE_AHEAD_MS, 2 * options.devices.length * tickMs * speed);
  const simulatedNow = () => wallStart + (now() - wallStart) * speed;

  const entries = new Map<string, Entry>();
  /** Devices numbered by an older simulator (seq-ledger.ts): they start now instead of backfilling. */
  const restartedNow: string[] = [];
  const started = performance.now();
  for (const config of options.devices) {
    if (entries.has(config.serial)) throw new RangeError(`device ${config.serial} is listed twice`);
    const device = new SimulatedDevice(config, options.truth, options.seqLedger ?? null);
    const olderRecipe = options.seqLedger?.sentUnderOlderRecipe?.(config.serial) ?? false;
    if (olderRecipe) restartedNow.push(config.serial);
    if (backfill && !olderRecipe) {
      device.begin(backfillStartBlock(wallStart, config.timeZone, config.night).startMs);
      device.advanceTo(wallStart);
    } else {
      // The first tick sends what follows now; seq 1 is the first record after the start.
      device.begin(wallStart + 1);
    }
    entries.set(config.serial, { device, tokenHash: hashStreamToken(config.token), readers: new Set() });
  }
  if (restartedNow.length) {
    log.warn(
      { devices: restartedNow },
      "sequence ledger written by an older simulator: these devices go on numbering from where they stopped and start now, without a backfill",
    );
  }
  log.info(
    { devices: entries.size, records: countRecords(), backfill, ms: Math.round(performance.now() - started) },
    backfill ? "simulator backfilled from the evening of the last night that has ended" : "simulator starts now, without backfill",
  );

  function countRecords(): number {
    let n = 0;
    for (const e of entries.values()) n += e.device.store.size;
    return n;
  }

  // ---- streaming ----

  function waitForDrain(res: ServerResponse): Promise<void> {
    return new Promise((resolve) => {
      const done = () => {
        res.off("drain", done);
        res.off("close", done);
        resolve();
      };
      res.on("drain", done);
      res.on("close", done);
    });
  }

  /** Device time of the furthest-behind other reader still replaying (REPLAY_IN_STEP_MS), or Infinity. */
  function slowestReplay(self: Reader): number {
    let slowest = Infinity;
    const stalledBefore = performance.now() - REPLAY_STALL_MS;
    for (const e of entries.values()) {
      const store = e.device.store;
      for (const o of e.readers) {
        if (o === self || o.closed || o.next > store.lastSeq || o.next < store.firstSeq || o.wroteAt < stalledBefore) continue;
        slowest = Math.min(slowest, store.deviceTime(o.next));
      }
    }
    return slowest;
  }

  /** Sends the reader everything from its cursor to the newest record, in batches, honouring backpressure. */
  async function pump(entry: Entry, r: Reader): Promise<void> {
    if (r.pumping || r.closed) return;
    r.pumping = true;
    try {
      const store = entry.device.store;
      while (!r.closed) {
        if (r.next < store.firstSeq) r.next = store.firstSeq;
        if (r.next > store.lastSeq) break;
        if (store.deviceTime(r.next) > slowestReplay(r) + REPLAY_IN_STEP_MS) {
          // Ahead of another device's replay: let it catch up (the furthest behind never waits, so all go on).
          r.wroteAt = performance.now();
          await new Promise((resolve) => setTimeout(resolve, REPLAY_WAIT_MS));
          continue;
        }
        let batch = "";
        for (let count = 0; r.next <= store.lastSeq && count < REPLAY_BATCH; count++) {
          const seq = r.next++;
          // A network resend before this record (DOMAIN §6.7): earlier records again, same seq and data.
          const again = store.resendBefore(seq);
          for (let s = Math.max(seq - again, r.floor + 1, store.firstSeq); s < seq; s++) {
            batch += store.event(s);
            count++;
          }
          batch += store.event(seq);
        }
        const flushed = r.res.write(batch);
        r.wroteAt = performance.now();
        if (!flushed) await waitForDrain(r.res);
        else await yieldToEventLoop();
        r.wroteAt = performance.now();
      }
    } finally {
      r.pumping = false;
    }
  }

  function startPump(entry: Entry, r: Reader): void {
    pump(entry, r).catch((err: unknown) => {
      log.error({ serial: entry.device.config.serial, err }, "stream write failed");
      r.res.destroy();
    });
  }

  // ---- HTTP ----

  function sendJson(res: ServerResponse, status: number, body: unknown, headers: Record<string, string> = {}): void {
    const text = JSON.stringify(body);
    res.writeHead(status, { "content-type": "application/json; charset=utf-8", "cache-control": "no-store", ...headers });
    res.end(text);
  }

  function entryFor(serial: string): Entry {
    const entry = entries.get(serial);
    if (!entry) throw new HttpError(404, "unknown_device", `no simulated device with serial "${serial.slice(0, 80)}"`);
    return entry;
  }

  function requireToken(req: IncomingMessage, entry: Entry): void {
    const m = /^Bearer\s+(\S+)\s*$/i.exec(req.headers.authorization ?? "");
    if (!m || !tokenMatches(m[1]!, entry.tokenHash)) {
      log.warn({ serial: entry.device.config.serial, presented: m ? "wrong token" : "no bearer token" }, "stream request refused");
      throw new HttpError(401, "unauthorized", "this device's bearer token is required (Authorization: Bearer <token>)", {
        "www-authenticate": 'Bearer realm="corvane-device"',
      });
    }
  }

  function parseLastEventId(req: IncomingMessage, url: URL): number {
    const raw = req.headers["last-event-id"] ?? url.searchParams.get("lastEventId") ?? undefined;
    if (raw === undefined || raw === "") return 0;
    const parsed = seqParam.safeParse(Array.isArray(raw) ? raw[0] : raw);
    if (!parsed.success) throw new HttpError(400, "bad_last_event_id", "Last-Event-ID must be a whole number ≥ 0 (a seq this device sent)");
    return parsed.data;
  }

  function openStream(req: IncomingMessage, res: ServerResponse, entry: Entry, url: URL): void {
    const lastEventId = parseLastEventId(req, url);
    const store = entry.device.store;
    if (lastEventId > store.lastSeq) {
      // The reader holds a seq this device never sent: the device has restarted and counts from 1 again.
      throw new HttpError(
        409,
        "ahead_of_device",
        `Last-Event-ID ${lastEventId} is ahead of this device's newest record (${store.lastSeq}): the device restarted and its sequence began again`,
      );
    }
    req.socket.setNoDelay(true);
    req.socket.setKeepAlive(true);
    res.writeHead(200, {
      "content-type": "text/event-stream; charset=utf-8",
      "cache-control": "no-store",
      connection: "keep-alive",
      "x-accel-buffering": "no",
    });
    res.write(`retry: ${RETRY_MS}\n\n`);
    const reader: Reader = { res, floor: lastEventId, next: lastEventId + 1, pumping: false, closed: false, wroteAt: performance.now() };
    entry.readers.add(reader);
    const serial = entry.device.config.serial;
    log.info({ serial, lastEventId, lastSeq: store.lastSeq }, "reader connected");
    if (lastEventId + 1 < store.firstSeq) {
      log.warn({ serial, lastEventId, oldestHeld: store.firstSeq }, "reader resumes before the oldest record held: the records between are gone");
    }
    res.on("close", () => {
      reader.closed = true;
      entry.readers.delete(reader);
      log.info({ serial, sentUpTo: reader.next - 1 }, "reader disconnected");
    });
    startPump(entry, reader);
  }

  function serveTruth(res: ServerResponse, entry: Entry, url: URL): void {
    const parsed = truthQuery.safeParse({ from: url.searchParams.get("from") ?? "", to: url.searchParams.get("to") ?? "" });
    if (!parsed.success) {
      throw new HttpError(400, "bad_query", `from and to: ${parsed.error.issues.map((i) => `${i.path.join(".") || "query"} ${i.message}`).join("; ")}`);
    }
    const store = entry.device.store;
    const records = [];
    for (let s = Math.max(parsed.data.from, store.firstSeq); s <= Math.min(parsed.data.to, store.lastSeq); s++) records.push(store.truth(s));
    const c = entry.device.config;
    sendJson(res, 200, { serial: c.serial, scenario: c.scenario, resolutionMs: c.resolutionMs, firstSeq: store.firstSeq, lastSeq: store.lastSeq, records });
  }

  async function readBody(req: IncomingMessage): Promise<string> {
    const chunks: Buffer[] = [];
    let size = 0;
    for await (const chunk of req as AsyncIterable<Buffer>) {
      size += chunk.length;
      if (size > MAX_INJECT_BYTES) throw new HttpError(413, "too_large", `body over ${MAX_INJECT_BYTES} bytes`);
      chunks.push(chunk);
    }
    return Buffer.concat(chunks).toString("utf8");
  }

  async function inject(req: IncomingMessage, res: ServerResponse, entry: Entry): Promise<void> {
    const text = await readBody(req);
    let json: unknown;
    try {
      json = JSON.parse(text);
    } catch {
      throw new HttpError(400, "bad_json", 'body must be JSON: {"raw": "<SSE text>"}');
    }
    const parsed = injectBody.safeParse(json);
    if (!parsed.success) throw new HttpError(400, "bad_body", 'body must be {"raw": "<SSE text>"} with a non-empty string');
    let written = 0;
    for (const r of entry.readers) {
      if (r.closed) continue;
      r.res.write(parsed.data.raw);
      written++;
    }
    log.info({ serial: entry.device.config.serial, bytes: Buffer.byteLength(parsed.data.raw), readers: written }, "hostile event injected");
    sendJson(res, 200, { readers: written });
  }

  async function route(req: IncomingMessage, res: ServerResponse): Promise<void> {
    const url = new URL(req.url ?? "/", `http://${LOOPBACK_HOST}`);
    const method = req.method ?? "GET";
    const allow = (methods: string) => {
      if (!methods.split(", ").includes(method)) throw new HttpError(405, "method_not_allowed", `use ${methods}`, { allow: methods });
    };
    if (url.pathname === "/health") {
      allow("GET");
      sendJson(res, 200, stats());
      return;
    }
    const m = /^\/devices\/([^/]+)\/(stream|truth|inject)$/.exec(url.pathname);
    if (!m || (!options.truth && m[2] !== "stream")) throw new HttpError(404, "not_found", "no such endpoint");
    let serial: string;
    try {
      serial = decodeURIComponent(m[1]!);
    } catch {
      throw new HttpError(400, "bad_serial", "the serial in the path is not valid percent-encoding");
    }
    const entry = entryFor(serial);
    if (m[2] === "inject") allow("POST");
    else allow("GET");
    requireToken(req, entry);
    if (m[2] === "stream") openStream(req, res, entry, url);
    else if (m[2] === "truth") serveTruth(res, entry, url);
    else await inject(req, res, entry);
  }

  const server: Server = createServer((req, res) => {
    route(req, res).catch((err: unknown) => {
      if (err instanceof HttpError) {
        if (!res.headersSent) sendJson(res, err.status, { error: err.code, message: err.message }, err.headers);
        else res.end();
        return;
      }
      log.error({ err, path: req.url?.split("?")[0] }, "simulator request failed");
      if (!res.headersSent) sendJson(res, 500, { error: "internal", message: "the simulator failed on this request" });
      else res.destroy();
    });
  });

  // ---- live ----

  function tick(): void {
    const t = simulatedNow();
    for (const entry of entries.values()) {
      const sent = entry.device.advanceTo(t);
      if (sent > 0) for (const r of entry.readers) startPump(entry, r);
      entry.device.store.trimBefore(t - retentionMs);
    }
    // At most one night prepared per tick, so devices whose nights end together do not stall the loop together.
    for (const entry of entries.values()) {
      if (!entry.device.hasUpcoming && entry.device.nightEndsAt - t <= prepareAheadMs) {
        entry.device.prepareAhead();
        break;
      }
    }
  }

  function heartbeat(): void {
    for (const entry of entries.values()) {
      for (const r of entry.readers) if (!r.pumping && !r.closed) r.res.write(": heartbeat\n\n");
    }
  }

  function stats(): SimulatorStats {
    return { devices: entries.size, records: countRecords(), speed };
  }

  let tickTimer: NodeJS.Timeout | null = null;
  let heartbeatTimer: NodeJS.Timeout | null = null;
  let ledgerTimer: NodeJS.Timeout | null = null;

  /** Writes where every device's numbering stands (a failed write is logged; the next one tries again). */
  function saveLedger(): void {
    const ledger = options.seqLedger;
    if (!ledger) return;
    for (const [serial, entry] of entries) ledger.noteSent(serial, entry.device.store.lastSeq);
    try {
      ledger.save?.();
    } catch (err) {
      log.error({ err }, "could not save the simulator's sequence ledger");
    }
  }
  saveLedger();

  return {
    async listen(port) {
      if (!(Number.isInteger(port) && port >= 0 && port <= 65535)) throw new RangeError(`port must be 0–65535, got ${port}`);
      await new Promise<void>((resolve, reject) => {
        server.once("error", reject);
        server.listen(port, LOOPBACK_HOST, () => {
          server.off("error", reject);
          resolve();
        });
      });
      tickTimer = setInterval(() => {
        try {
          tick();
        } catch (err) {
          log.error({ err }, "simulator tick failed");
        }
      }, tickMs);
      heartbeatTimer = setInterval(heartbeat, heartbeatMs);
      if (options.seqLedger) ledgerTimer = setInterval(saveLedger, LEDGER_SAVE_MS);
      const bound = (server.address() as AddressInfo).port;
      log.info({ host: LOOPBACK_HOST, port: bound, devices: entries.size, speed, truth: options.truth }, "simulator listening");
      return { port: bound };
    },
    async close() {
      if (tickTimer) clearInterval(tickTimer);
      if (heartbeatTimer) clearInterval(heartbeatTimer);
      if (ledgerTimer) clearInterval(ledgerTimer);
      saveLedger();
      for (const entry of entries.values()) {
        for (const r of entry.readers) {
          r.closed = true;
          r.res.end();
        }
        entry.readers.clear();
      }
      if (!server.listening) return;
      await new Promise<void>((resolve, reject) => {
        server.close((err) => (err ? reject(err) : resolve()));
        server.closeAllConnections();
      });
      log.info("simulator closed");
    },
    tick,
    simulatedNow,
    stats,
    device: (serial) => entries.get(serial)?.device,
    setToken(serial, token) {
      const entry = entries.get(serial);
      if (!entry) return false;
      if (!token) throw new RangeError(`device ${serial}: empty stream token`);
      entry.tokenHash = hashStreamToken(token);
      return true;
    },
  };
}
