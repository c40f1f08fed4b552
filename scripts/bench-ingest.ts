// npm run bench:ingest — (1) bulk: 1,000,000 beats through the ingest path (SSE event text → validation → batched
// idempotent insert) beside a raw COPY of the same rows into the same table, in the same run, with the ratio
// (goal ≥ 0.5); (2) live: 200 simulated devices at real pace for 2 minutes: ingest lag, CPU and peak RSS.
// Runs against DATABASE_URL (scripts/bench.sh starts a private PostgreSQL for it). All data are synthetic.
import { fork } from "node:child_process";
import { createServer, type ServerResponse } from "node:http";
import type { AddressInfo } from "node:net";
import { Readable } from "node:stream";
import { pipeline } from "node:stream/promises";
import { from as copyFrom } from "pg-copy-streams";
import type { PoolClient } from "pg";
import { db } from "@/lib/db/knex";
import { encryptStreamToken, hashStreamToken } from "@/lib/devices/stream-token";
import { BeatWriter, type DeviceCounters } from "@/lib/ingest/beat-writer";
import { IngestService } from "@/lib/ingest/ingest-service";
import { StreamReader } from "@/lib/ingest/stream-reader";
import { formatStreamEvent, type BeatRecord } from "@/lib/streaming/protocol";

const BULK_DEVICES = 100;
const BULK_PER_DEVICE = 10_000;
const LIVE_DEVICES = Number(process.env.BENCH_LIVE_DEVICES ?? 200);
const LIVE_SECONDS = Number(process.env.BENCH_LIVE_SECONDS ?? 120);
const START = Date.UTC(2026, 10, 30, 23, 0);

const counters = (): DeviceCounters => ({
  lastSeq: 0, lastSeenAt: null, lastBeatAt: null, gaps: 0, missingSeqs: 0, duplicates: 0, malformed: 0,
  malformedByKind: {}, reconnects: 0, clockOffsetMs: 0, connected: true, leadOff: false, lastError: null,
});

function beat(seq: number, t: number, rr: number): BeatRecord {
  return { kind: "beat", seq, tDevice: t, rr, type: "N", quality: 0.98, leadOff: false };
}

async function makeDevices(n: number, prefix: string, url: (i: number) => string): Promise<{ id: string; token: string }[]> {
  const unit = await db("units").insert({ code: `BENCH-${prefix}`, name: `Bench unit ${prefix} (synthetic)`, kind: "adult", time_zone: "UTC" }).returning("id");
  const out: { id: string; token: string }[] = [];
  for (let i = 0; i < n; i++) {
    const token = `bench-token-${prefix}-${i}`;
    const [bed] = await db("beds").insert({ unit_id: unit[0]!.id, label: `${prefix}-${i}`, sort_order: i, active: true }).returning("id");
    const [dev] = await db("devices")
      .insert({
        serial: `BENCH-${prefix}-${i}`, unit_id: unit[0]!.id, model: "synthetic", firmware: "0", timestamp_resolution_ms: 1, stream_url: url(i),
        stream_token_hash: hashStreamToken(token), stream_token_enc: encryptStreamToken(token),
      })
      .returning("id");
    await db("device_assignments").insert({ device_id: dev!.id, bed_id: bed!.id, assigned_from: new Date(0), assigned_to: null, assigned_by: null });
    out.push({ id: dev!.id, token });
  }
  return out;
}

async function bulk() {
  const devices = await makeDevices(BULK_DEVICES, "B", () => "http://127.0.0.1:9/unused");
  const rows: { deviceId: string; r: BeatRecord }[] = [];
  for (const d of devices) {
    let t = START;
    for (let s = 1; s <= BULK_PER_DEVICE; s++) {
      const rr = 800 + ((s * 7919) % 200);
      t += rr;
      rows.push({ deviceId: d.id, r: beat(s, t, rr) });
    }
  }
  for (let day = 0; day < 3; day++) await db.raw("SELECT ensure_beats_partition(?::date)", [new Date(START + day * 86_400_000).toISOString().slice(0, 10)]);

  // Raw COPY of the same rows (text format), into the same table.
  const client = (await db.client.acquireConnection()) as PoolClient;
  const copyStart = performance.now();
  const received = new Date().toISOString();
  const lines = function* () {
    let chunk = "";
    for (const { deviceId, r } of rows) {
      const t = new Date(r.tDevice).toISOString();
      chunk += `${deviceId}\t${r.seq}\t${t}\t${t}\t${received}\t${r.rr}\t${r.type}\t${r.quality}\t${r.leadOff ? "t" : "f"}\n`;
      if (chunk.length > 1 << 16) {
        yield chunk;
        chunk = "";
      }
    }
    if (chunk) yield chunk;
  };
  await pipeline(Readable.from(lines()), client.query(copyFrom("COPY beats (device_id, seq, beat_at, device_time, received_at, rr_ms, beat_type, quality, lead_off) FROM STDIN")));
  const copyMs = performance.now() - copyStart;
  await db.client.releaseConnection(client);
  const copied = Number((await db("beats").count({ n: "*" }).first())!.n);
  await db.raw("TRUNCATE beats");

  // The ingest path: each record as SSE event text through the reader's validation into the batched writer.
  const map = new Map<string, DeviceCounters>();
  const writer = new BeatWriter(db, map, { batchSize: 5000, flushIntervalMs: 50, maxBuffered: 2_000_000 });
  const readers = new Map(devices.map((d) => {
    const c = counters();
    map.set(d.id, c);
    return [d.id, new StreamReader({ id: d.id, serial: d.id, streamUrl: "", token: "", unitId: d.id }, c, writer)] as const;
  }));
  const texts = rows.map(({ deviceId, r }) => [deviceId, JSON.stringify(r), String(r.seq)] as const);
  const ingestStart = performance.now();
  writer.start();
  // As in the running ingest, events are validated while earlier batches are being written: yield to the event
  // loop every 2,000 events so the database (another process, another core) works alongside.
  let k = 0;
  for (const [deviceId, data, id] of texts) {
    readers.get(deviceId)!.handle(data, id);
    if (++k % 2000 === 0) {
      await new Promise((r) => setImmediate(r));
      while (writer.buffered > 200_000) await writer.flush();
    }
  }
  await writer.stop();
  while (writer.buffered > 0) await writer.flush();
  const ingestMs = performance.now() - ingestStart;
  const stored = Number((await db("beats").count({ n: "*" }).first())!.n);
  const copyRate = copied / (copyMs / 1000);
  const ingestRate = stored / (ingestMs / 1000);
  console.log(`Bulk, ${rows.length.toLocaleString("en")} beats from ${BULK_DEVICES} devices:`);
  console.log(`  raw COPY          ${copied.toLocaleString("en")} rows in ${(copyMs / 1000).toFixed(2)} s = ${Math.round(copyRate).toLocaleString("en")} beats/s`);
  console.log(`  ingest path       ${stored.toLocaleString("en")} rows in ${(ingestMs / 1000).toFixed(2)} s = ${Math.round(ingestRate).toLocaleString("en")} beats/s (validation + idempotent batched insert)`);
  console.log(`  ratio             ${(ingestRate / copyRate).toFixed(2)} (goal ≥ 0.5) — ${ingestRate / copyRate >= 0.5 ? "met" : "NOT met"}`);
  await db.raw("TRUNCATE beats");
}

// ---- live: a fleet of devices in a child process, each sending about one beat per second ----
async function fleet() {
  const n = Number(process.argv[3]);
  const clients = new Map<number, Set<ServerResponse>>();
  const seqs = new Array<number>(n).fill(0);
  const server = createServer((req, res) => {
    const i = Number(/\/d\/(\d+)/.exec(req.url ?? "")?.[1] ?? -1);
    if (!(i >= 0 && i < n) || req.headers.authorization !== `Bearer bench-token-L-${i}`) return void res.writeHead(401).end();
    res.writeHead(200, { "content-type": "text/event-stream" });
    res.write("retry: 500\n\n");
    const set = clients.get(i) ?? new Set();
    set.add(res);
    clients.set(i, set);
    req.on("close", () => set.delete(res));
  });
  await new Promise<void>((r) => server.listen(0, "127.0.0.1", r));
  process.send!({ port: (server.address() as AddressInfo).port });
  // Each device beats every 800–1000 ms, staggered; tDevice is the send time, so lag = stored − tDevice.
  for (let i = 0; i < n; i++) {
    const tick = () => {
      const rr = 800 + Math.floor(Math.random() * 200);
      seqs[i]! += 1;
      const text = formatStreamEvent(beat(seqs[i]!, Date.now(), rr));
      for (const res of clients.get(i) ?? []) res.write(text);
      setTimeout(tick, rr);
    };
    setTimeout(tick, Math.floor(Math.random() * 1000));
  }
}

async function live() {
  const child = fork(process.argv[1]!, ["fleet", String(LIVE_DEVICES)], { execArgv: ["--import", "tsx"] });
  const port = await new Promise<number>((resolve) => child.once("message", (m: { port: number }) => resolve(m.port)));
  await makeDevices(LIVE_DEVICES, "L", (i) => `http://127.0.0.1:${port}/d/${i}`);
  const ingest = new IngestService(db, { refreshMs: 600_000 });
  const cpu0 = process.cpuUsage();
  const t0 = performance.now();
  await ingest.start();
  await new Promise((r) => setTimeout(r, LIVE_SECONDS * 1000));
  await ingest.stop();
  const wallS = (performance.now() - t0) / 1000;
  const cpu = process.cpuUsage(cpu0);
  child.kill("SIGTERM");
  const lag = await db.raw(`SELECT count(*) AS n,
      percentile_cont(0.5) WITHIN GROUP (ORDER BY extract(epoch FROM received_at - device_time) * 1000) AS p50,
      percentile_cont(0.95) WITHIN GROUP (ORDER BY extract(epoch FROM received_at - device_time) * 1000) AS p95,
      max(extract(epoch FROM received_at - device_time) * 1000) AS max
    FROM beats b JOIN devices d ON d.id = b.device_id WHERE d.serial LIKE 'BENCH-L-%'`);
  const row = lag.rows[0] as Record<string, string | number | null>;
  const r = { n: Number(row.n), p50: Number(row.p50), p95: Number(row.p95), max: Number(row.max) };
  console.log(`\nLive, ${LIVE_DEVICES} devices at real pace for ${LIVE_SECONDS} s:`);
  console.log(`  beats stored      ${Number(r.n).toLocaleString("en")} (${(Number(r.n) / wallS).toFixed(0)} beats/s)`);
  console.log(`  arrival lag       median ${r.p50.toFixed(1)} ms, 95th percentile ${r.p95.toFixed(1)} ms, max ${r.max.toFixed(1)} ms (beat sent → event validated; the row is written with the next batch, at most 250 ms later)`);
  console.log(`  CPU (ingest)      ${(((cpu.user + cpu.system) / 1e6 / wallS) * 100).toFixed(1)} % of one core`);
  console.log(`  peak RSS          ${(process.resourceUsage().maxRSS / 1024).toFixed(0)} MiB (this process: ingest + benchmark data)`);
}

if (process.argv[2] === "fleet") {
  await fleet();
} else {
  console.log(`Corvane ingest benchmark — Node ${process.version}, PostgreSQL at ${new URL(process.env.DATABASE_URL!).host}`);
  try {
    await bulk();
    await live();
  } finally {
    await db.destroy();
  }
}
