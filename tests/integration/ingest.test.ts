// The ingest against real PostgreSQL and a real SSE stream (tests/support/fake-device.ts speaks the wire format of
// lib/streaming/protocol.ts): every beat is stored exactly once through cuts, hostile events and a database outage.
import { createServer, Socket, type Server } from "node:net";
import type { Knex } from "knex";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { encryptStreamToken, hashStreamToken } from "@/lib/devices/stream-token";
import { IngestService } from "@/lib/ingest/ingest-service";
import { createRng } from "@/lib/engine/random";
import { connect, scratchDatabase } from "@/tests/support/db";
import { beatRecords, startFakeDevice, type FakeDevice } from "@/tests/support/fake-device";

let db: Knex;
let superuser: Knex;
let cleanup: () => Promise<void>;
let dbUrl: string;
let bedId: string;
const devices: FakeDevice[] = [];

beforeAll(async () => {
  ({ db, superuser, cleanup, url: dbUrl } = await scratchDatabase());
  const [unit] = await db("units").insert({ code: "TST", name: "Test unit (fictional)", kind: "adult", time_zone: "America/New_York" }).returning("id");
  const [bed] = await db("beds").insert({ unit_id: unit!.id, label: "T-01", sort_order: 1, active: true }).returning("id");
  bedId = bed!.id;
});
afterAll(async () => {
  for (const d of devices) await d.close();
  await cleanup?.();
});

/** Registers a fake device in the database, assigned to a fresh bed, and returns its id. */
async function register(device: FakeDevice, serial: string): Promise<string> {
  const unit = await db("units").first("id");
  const [bed] = await db("beds").insert({ unit_id: unit!.id, label: serial, sort_order: 2, active: true }).returning("id");
  const [row] = await db("devices")
    .insert({
      serial,
      unit_id: unit!.id,
      model: "test double",
      firmware: "0",
      timestamp_resolution_ms: 1,
      stream_url: device.url,
      stream_token_hash: hashStreamToken(device.token),
      stream_token_enc: encryptStreamToken(device.token),
    })
    .returning("id");
  await db("device_assignments").insert({ device_id: row!.id, bed_id: bed!.id ?? bedId, assigned_from: new Date(0), assigned_to: null, assigned_by: null });
  return row!.id;
}

async function waitFor(check: () => Promise<boolean>, timeoutMs: number, what: string): Promise<void> {
  const until = Date.now() + timeoutMs;
  while (Date.now() < until) {
    if (await check()) return;
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error(`timed out waiting for ${what}`);
}

const storedCount = async (deviceId: string) =>
  Number((await db("beats").where({ device_id: deviceId }).count({ n: "*" }).first())!.n);

function nightRr(n: number, seed: number): number[] {
  const rng = createRng(seed);
  return Array.from({ length: n }, () => 850 + 60 * rng.normal());
}

describe("ingest", () => {
  it("stores every beat exactly once when the stream is cut at 50 random points", async () => {
    const records = beatRecords(nightRr(3000, 1), Date.UTC(2026, 10, 30, 23, 0));
    const device = await startFakeDevice(records);
    devices.push(device);
    const rng = createRng(99);
    while (device.cutAfter.size < 50) device.cutAfter.add(1 + rng.int(2999));
    const id = await register(device, "CUT-1");
    const ingest = new IngestService(db, { refreshMs: 60_000 });
    await ingest.start();
    try {
      await waitFor(async () => (await storedCount(id)) >= 3000, 60_000, "3000 beats");
      await ingest.writer.flush();
      const seqs = (await db("beats").where({ device_id: id }).orderBy("seq").pluck("seq")).map(Number);
      expect(seqs).toEqual(Array.from({ length: 3000 }, (_, i) => i + 1));
      expect(device.connections).toBeGreaterThanOrEqual(51);
      const status = await db("device_stream_status").where({ device_id: id }).first();
      expect(Number(status!.last_seq)).toBe(3000);
      expect(status!.reconnects).toBeGreaterThanOrEqual(50);
      expect(status!.gaps).toBe(0);
    } finally {
      await ingest.stop();
    }
  });

  it("counts 200+ malformed or hostile events, stores none of them, and keeps going", async () => {
    const start = Date.UTC(2026, 10, 30, 23, 0);
    const records = beatRecords(nightRr(200, 2), start);
    const device = await startFakeDevice(records);
    devices.push(device);
    const id = await register(device, "HOSTILE-1");
    const ingest = new IngestService(db, { refreshMs: 60_000 });
    await ingest.start();
    try {
      await waitFor(async () => (await storedCount(id)) >= 200, 20_000, "first 200 beats");
      const valid = (seq: number, rr: unknown = 800) => JSON.stringify({ kind: "beat", seq, tDevice: start + seq * 800, rr, type: "N", quality: 1, leadOff: false });
      const hostile: string[] = [];
      for (let i = 0; i < 40; i++) hostile.push(`id: ${201 + i}\nevent: beat\ndata: {"kind":"beat","seq":${201 + i},"rr":\n\n`); // bad JSON
      for (let i = 0; i < 40; i++) hostile.push(`id: 201\nevent: beat\ndata: ${valid(201, "eight hundred")}\n\n`); // wrong type
      for (let i = 0; i < 20; i++) hostile.push(`id: 201\nevent: beat\ndata: ${valid(201, -800)}\n\n`); // negative
      for (let i = 0; i < 20; i++) hostile.push(`id: 201\nevent: beat\ndata: ${valid(201, 1e9)}\n\n`); // huge
      for (let i = 0; i < 40; i++) hostile.push(`id: ${1 + i}\nevent: beat\ndata: ${valid(1 + i)}\n\n`); // replayed seq
      for (let i = 0; i < 10; i++) hostile.push(`id: 999999999\nevent: beat\ndata: ${valid(201)}\n\n`); // id ≠ seq
      // No id of its own (eventsource 4 reports such an event's lastEventId as empty):
      for (let i = 0; i < 20; i++) hostile.push(`event: beat\ndata: ${valid(201)}\n\n`);
      for (let i = 0; i < 20; i++) hostile.push(`id: 201\nevent: beat\ndata: ${JSON.stringify({ pad: "x".repeat(5000) })}\n\n`); // oversized
      for (let i = 0; i < 20; i++) hostile.push(`id: 201\ndata: ${valid(201)}\n\n`); // no event type
      for (let i = 0; i < 10; i++) hostile.push(`id: 201\nevent: beat\ndata: ${valid(201).replace('"leadOff":false', '"leadOff":false,"extra":1')}\n\n`); // unknown field
      expect(hostile.length).toBeGreaterThanOrEqual(200);
      device.inject(hostile.join(""));
      // Then the stream goes on with valid beats.
      device.records.push(...beatRecords(nightRr(100, 3), start + 200 * 900, 201));
      device.publish();
      await waitFor(async () => (await storedCount(id)) >= 300, 20_000, "the next 100 beats");
      await ingest.writer.flush();
      const status = (await db("device_stream_status").where({ device_id: id }).first())!;
      expect(status.duplicates).toBe(40);
      expect(status.malformed).toBe(hostile.length - 40);
      expect(status.malformed_by_kind).toEqual({ bad_json: 40, invalid_fields: 90, oversized: 20, unknown_event: 20, missing_id: 20, id_mismatch: 10 });
      expect(await storedCount(id)).toBe(300);
      const bad = await db("beats").where({ device_id: id }).andWhere((w) => w.where("rr_ms", "<=", 0).orWhere("rr_ms", ">", 10_000)).count({ n: "*" }).first();
      expect(Number(bad!.n)).toBe(0);
    } finally {
      await ingest.stop();
    }
  });

  it("loses nothing when PostgreSQL is unreachable for 20 s during streaming", async () => {
    // The ingest reaches PostgreSQL through a TCP relay that is shut for 20 s: to the ingest this is the database
    // going away and coming back, while the other tests keep their own connections.
    const target = new URL(dbUrl);
    let open = true;
    const sockets = new Set<Socket>();
    const relay: Server = createServer((client) => {
      if (!open) return client.destroy();
      const upstream = new Socket();
      upstream.connect(Number(target.port), target.hostname);
      client.pipe(upstream).pipe(client);
      const drop = () => {
        client.destroy();
        upstream.destroy();
      };
      client.on("error", drop);
      upstream.on("error", drop);
      sockets.add(client).add(upstream);
    });
    await new Promise<void>((r) => relay.listen(0, "127.0.0.1", r));
    const relayUrl = new URL(dbUrl);
    relayUrl.port = String((relay.address() as { port: number }).port);
    const ingestDb = connect(relayUrl.toString());
    (ingestDb.client.config as { acquireConnectionTimeout: number }).acquireConnectionTimeout = 3000;

    const start = Date.UTC(2026, 11, 1, 1, 0);
    const all = beatRecords(nightRr(1600, 4), start);
    const device = await startFakeDevice(all.slice(0, 400));
    devices.push(device);
    const id = await register(device, "OUTAGE-1");
    // A small buffer, so the outage also exercises pausing the readers and resuming from the device's replay.
    const ingest = new IngestService(ingestDb, { refreshMs: 60_000, writer: { maxBuffered: 300, batchSize: 100 } });
    await ingest.start();
    try {
      await waitFor(async () => (await storedCount(id)) >= 400, 20_000, "beats before the outage");
      open = false;
      for (const s of sockets) s.destroy();
      const outageEnds = Date.now() + 20_000;
      // Beats keep coming during the outage.
      let next = 400;
      while (Date.now() < outageEnds) {
        device.records.push(...all.slice(next, next + 60));
        next += 60;
        device.publish();
        await new Promise((r) => setTimeout(r, 1000));
      }
      expect(await storedCount(id)).toBe(400); // nothing could be written meanwhile
      open = true;
      device.records.push(...all.slice(next));
      device.publish();
      await waitFor(async () => (await storedCount(id)) >= 1600, 60_000, "every beat after the outage");
      await ingest.writer.flush();
      const seqs = (await db("beats").where({ device_id: id }).orderBy("seq").pluck("seq")).map(Number);
      expect(seqs).toEqual(Array.from({ length: 1600 }, (_, i) => i + 1));
      // The full buffer paused the reader and it opened the stream again (more than one connection to the device),
      // yet the link to the device never failed: Stream health must not report those as reconnects.
      expect(device.connections).toBeGreaterThan(1);
      expect(ingest.counters.get(id)!.reconnects).toBe(0);
    } finally {
      await ingest.stop();
      await ingestDb.destroy();
      relay.close();
      for (const s of sockets) s.destroy();
    }
  }, 120_000);
});
