// The ingest follows the device registry (issue 7 items 1–2): it hears registry changes through PostgreSQL
// LISTEN/NOTIFY and starts, moves or stops readers within seconds, and it rides a token rotation through its grace
// period. Real PostgreSQL (a scratch database) and real SSE (tests/support/fake-device.ts, which accepts exactly one
// bearer token, like a device configured with it). The periodic refresh is set to 10 minutes, so anything seen here
// within seconds came from the NOTIFY.
import { spawn } from "node:child_process";
import { mkdtempSync, rmSync } from "node:fs";
import { createServer } from "node:net";
import { tmpdir } from "node:os";
import { join } from "node:path";
import type { Knex } from "knex";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { notifyDeviceRegistryChanged } from "@/lib/devices/registry-events";
import { simulatorCommand } from "@/lib/devices/simulator-command";
import { encryptStreamToken, hashStreamToken } from "@/lib/devices/stream-token";
import { IngestService } from "@/lib/ingest/ingest-service";
import { scratchDatabase } from "@/tests/support/db";
import { beatRecords, startFakeDevice, type FakeDevice } from "@/tests/support/fake-device";

/** The issue asks for "within seconds"; 5 s leaves room for a loaded test machine (measured: well under 1 s). */
const PICKUP_LIMIT_MS = 5_000;
/** Far longer than any wait here, so the periodic refresh cannot be what makes a test pass. */
const REFRESH_MS = 600_000;
/** How long a stopped reader is given to (wrongly) store beats published after it stopped: many writer flushes (250 ms). */
const QUIET_MS = 1_500;
const RR_MS = 800;

let db: Knex;
let cleanup: () => Promise<void>;
let unitId: string;
let otherUnitId: string;
let ingest: IngestService;
const devices: FakeDevice[] = [];
const timings: Record<string, number> = {};

beforeAll(async () => {
  ({ db, cleanup } = await scratchDatabase());
  const [unit] = await db("units").insert({ code: "TST", name: "Test unit (fictional)", kind: "adult", time_zone: "America/New_York" }).returning("id");
  const [other] = await db("units").insert({ code: "TS2", name: "Second test unit (fictional)", kind: "adult", time_zone: "America/New_York" }).returning("id");
  unitId = unit!.id;
  otherUnitId = other!.id;
  ingest = new IngestService(db, { refreshMs: REFRESH_MS });
  await ingest.start();
});
afterAll(async () => {
  await ingest?.stop();
  for (const d of devices) await d.close();
  // Measured on this run, for the report (not asserted beyond the limits above).
  console.info("ingest-registry timings (ms):", timings);
  await cleanup?.();
});

let bedNo = 0;
async function newBed(unit = unitId): Promise<string> {
  bedNo += 1;
  const [bed] = await db("beds").insert({ unit_id: unit, label: `T-${bedNo}`, sort_order: bedNo, active: true }).returning("id");
  return bed!.id;
}

/** A fake device that accepts only `token`, already holding a few minutes of beats. */
async function fakeDevice(token: string): Promise<FakeDevice> {
  const d = await startFakeDevice(beatRecords(Array(100).fill(RR_MS), Date.now() - 10 * 60_000), token);
  devices.push(d);
  return d;
}

/** Appends `n` beats after the device's last record and sends them to open connections. */
function publishMore(d: FakeDevice, n: number): void {
  const last = d.records.at(-1)!;
  d.records.push(...beatRecords(Array(n).fill(RR_MS), last.tDevice, last.seq + 1));
  d.publish();
}

/** One registry change and its notification in one transaction, as the registry's actions do it. */
async function change(deviceId: string, write: (trx: Knex.Transaction) => Promise<unknown>): Promise<number> {
  await db.transaction(async (trx) => {
    await write(trx);
    await notifyDeviceRegistryChanged(trx, deviceId);
  });
  return Date.now();
}

async function registerDevice(serial: string, d: FakeDevice): Promise<string> {
  const [row] = await db("devices")
    .insert({ serial, unit_id: unitId, model: "test double", manufacturer: "Test (fictional)", firmware: "0", timestamp_resolution_ms: 1, stream_url: d.url })
    .returning("id");
  await notifyDeviceRegistryChanged(db, row!.id);
  return row!.id;
}

const issueToken = (trx: Knex.Transaction, id: string, token: string) =>
  trx("devices").where({ id }).update({ stream_token_hash: hashStreamToken(token), stream_token_enc: encryptStreamToken(token), token_rotated_at: new Date() });

const assign = (trx: Knex.Transaction, id: string, bedId: string) =>
  trx("device_assignments").insert({ device_id: id, bed_id: bedId, assigned_from: new Date(), assigned_to: null, assigned_by: null });

const storedCount = async (id: string) => Number((await db("beats").where({ device_id: id }).count({ n: "*" }).first())!.n);

async function waitFor(check: () => boolean | Promise<boolean>, timeoutMs: number, what: string): Promise<number> {
  const started = Date.now();
  while (Date.now() - started < timeoutMs) {
    if (await check()) return Date.now() - started;
    await new Promise((r) => setTimeout(r, 20));
  }
  throw new Error(`timed out after ${timeoutMs} ms waiting for ${what}`);
}

/** Publishes beats and checks, after QUIET_MS, that none of them was stored. */
async function expectNothingStored(id: string, d: FakeDevice): Promise<void> {
  await ingest.writer.flush();
  const before = await storedCount(id);
  publishMore(d, 20);
  await new Promise((r) => setTimeout(r, QUIET_MS));
  await ingest.writer.flush();
  expect(await storedCount(id)).toBe(before);
}

describe("ingest follows the device registry", () => {
  it("starts reading a device once it is registered, assigned and given a token, driven by the notification", async () => {
    const d = await fakeDevice("token-new-1");
    const id = await registerDevice("REG-NEW-1", d);
    // Assigned but without a token: not read (a device that has no token cannot be asked for its stream).
    const bed = await newBed();
    await change(id, (trx) => assign(trx, id, bed));
    await new Promise((r) => setTimeout(r, QUIET_MS));
    expect(ingest.readers.has(id)).toBe(false);
    expect(d.connections).toBe(0);

    const notified = await change(id, (trx) => issueToken(trx, id, "token-new-1"));
    timings.notifyToReaderStarted = await waitFor(() => ingest.readers.has(id), PICKUP_LIMIT_MS, "a reader for the new device");
    await waitFor(async () => (await storedCount(id)) > 0, PICKUP_LIMIT_MS, "the first stored beat");
    timings.notifyToFirstStoredBeat = Date.now() - notified;
    expect(ingest.lastNotificationAt).toBeGreaterThanOrEqual(notified - 1_000);
    await waitFor(async () => (await storedCount(id)) === 100, PICKUP_LIMIT_MS, "all 100 beats");
  });

  it("keeps a moved device streaming on the same connection, and stops reading an unassigned one", async () => {
    const d = await fakeDevice("token-move");
    const id = await registerDevice("REG-MOVE-1", d);
    const bed = await newBed();
    await change(id, async (trx) => {
      await assign(trx, id, bed);
      await issueToken(trx, id, "token-move");
    });
    await waitFor(async () => (await storedCount(id)) === 100, PICKUP_LIMIT_MS, "the first 100 beats");
    const reader = ingest.readers.get(id)!;
    const connections = d.connections;

    // Move to a bed of another unit: close the open assignment and open one on the new bed.
    const otherBed = await newBed(otherUnitId);
    await change(id, async (trx) => {
      await trx("device_assignments").where({ device_id: id }).whereNull("assigned_to").update({ assigned_to: new Date() });
      await assign(trx, id, otherBed);
    });
    await waitFor(() => reader.device.unitId === otherUnitId, PICKUP_LIMIT_MS, "the reader to learn the new unit");
    expect(ingest.readers.get(id)).toBe(reader);
    publishMore(d, 20);
    await waitFor(async () => (await storedCount(id)) === 120, PICKUP_LIMIT_MS, "beats after the move");
    expect(d.connections).toBe(connections); // never reconnected

    const unassigned = await change(id, (trx) => trx("device_assignments").where({ device_id: id }).whereNull("assigned_to").update({ assigned_to: new Date() }));
    await waitFor(() => !ingest.readers.has(id), PICKUP_LIMIT_MS, "the reader to stop");
    timings.notifyToReaderStoppedOnUnassign = Date.now() - unassigned;
    await expectNothingStored(id, d);
  });

  it("rides a token rotation through the grace period while the device still has the old token, then stops after it", async () => {
    // The device is configured with the old token only, and never given the new one.
    const d = await fakeDevice("token-old");
    const id = await registerDevice("REG-ROT-1", d);
    const bed = await newBed();
    await change(id, async (trx) => {
      await assign(trx, id, bed);
      await issueToken(trx, id, "token-old");
    });
    await waitFor(async () => (await storedCount(id)) === 100, PICKUP_LIMIT_MS, "the first 100 beats");
    const connections = d.connections;

    // Rotate with a one-hour grace, as the registry's rotate action does.
    await change(id, (trx) =>
      trx("devices").where({ id }).update({
        stream_token_hash: hashStreamToken("token-new"),
        stream_token_enc: encryptStreamToken("token-new"),
        previous_token_hash: hashStreamToken("token-old"),
        previous_token_enc: encryptStreamToken("token-old"),
        previous_token_valid_until: new Date(Date.now() + 3_600_000),
        token_rotated_at: new Date(),
      }),
    );
    await waitFor(() => ingest.readers.get(id)!.device.token === "token-new", PICKUP_LIMIT_MS, "the reader to learn the new token");
    publishMore(d, 20);
    await waitFor(async () => (await storedCount(id)) === 120, PICKUP_LIMIT_MS, "beats after the rotation");
    expect(d.connections).toBe(connections); // the open connection was kept

    // A cut during the grace: the reconnect presents the new token, is refused, and goes on with the old one.
    d.cutAfter.add(140);
    publishMore(d, 20);
    await waitFor(() => d.connections > connections, PICKUP_LIMIT_MS, "the reconnect after the cut");
    publishMore(d, 20);
    await waitFor(async () => (await storedCount(id)) === 160, PICKUP_LIMIT_MS, "beats after the reconnect");

    // Grace over: only the new token, which this device refuses.
    await change(id, (trx) => trx("devices").where({ id }).update({ previous_token_valid_until: new Date(Date.now() - 1_000) }));
    const counters = ingest.counters.get(id)!;
    await waitFor(() => counters.lastError === "Non-200 status code (401)" && !counters.connected, PICKUP_LIMIT_MS, "the device to refuse the ingest");
    expect(ingest.readers.has(id)).toBe(true); // still trying: giving the device the new token brings it back
    await expectNothingStored(id, d);
  });

  it("stops presenting the previous token when its grace ends, without a notification", async () => {
    const GRACE_MS = 2_000;
    const d = await fakeDevice("token-old-2");
    const id = await registerDevice("REG-ROT-2", d);
    const bed = await newBed();
    await change(id, async (trx) => {
      await assign(trx, id, bed);
      await trx("devices").where({ id }).update({
        stream_token_hash: hashStreamToken("token-new-2"),
        stream_token_enc: encryptStreamToken("token-new-2"),
        previous_token_hash: hashStreamToken("token-old-2"),
        previous_token_enc: encryptStreamToken("token-old-2"),
        previous_token_valid_until: new Date(Date.now() + GRACE_MS),
        token_rotated_at: new Date(),
      });
    });
    await waitFor(async () => (await storedCount(id)) === 100, PICKUP_LIMIT_MS, "beats on the previous token");
    const counters = ingest.counters.get(id)!;
    await waitFor(() => counters.lastError === "Non-200 status code (401)" && !counters.connected, GRACE_MS + PICKUP_LIMIT_MS, "the grace to end");
    await expectNothingStored(id, d);
  });

  it("stops reading a device whose token is revoked", async () => {
    const d = await fakeDevice("token-rev");
    const id = await registerDevice("REG-REV-1", d);
    const bed = await newBed();
    await change(id, async (trx) => {
      await assign(trx, id, bed);
      await issueToken(trx, id, "token-rev");
    });
    await waitFor(async () => (await storedCount(id)) === 100, PICKUP_LIMIT_MS, "the first 100 beats");
    const revoked = await change(id, (trx) =>
      trx("devices").where({ id }).update({ stream_token_hash: null, stream_token_enc: null, token_revoked_at: new Date() }),
    );
    await waitFor(() => !ingest.readers.has(id), PICKUP_LIMIT_MS, "the reader to stop");
    timings.notifyToReaderStoppedOnRevoke = Date.now() - revoked;
    await expectNothingStored(id, d);
  });

  it("stops reading a device put into maintenance or decommissioned", async () => {
    for (const status of ["maintenance", "decommissioned"] as const) {
      const d = await fakeDevice(`token-${status}`);
      const id = await registerDevice(`REG-${status.toUpperCase()}`, d);
      const bed = await newBed();
      await change(id, async (trx) => {
        await assign(trx, id, bed);
        await issueToken(trx, id, `token-${status}`);
      });
      await waitFor(async () => (await storedCount(id)) === 100, PICKUP_LIMIT_MS, "the first 100 beats");
      await change(id, (trx) => trx("devices").where({ id }).update({ status }));
      await waitFor(() => !ingest.readers.has(id), PICKUP_LIMIT_MS, `the reader to stop (${status})`);
      await expectNothingStored(id, d);
    }
  });

  it("hears notifications again after its listening connection is cut", async () => {
    // The server ends the LISTEN session (as a restart or a network drop would); the ingest reconnects.
    const cut = await db.raw(`SELECT pg_terminate_backend(pid) FROM pg_stat_activity WHERE datname = current_database() AND query = 'LISTEN corvane_devices' AND pid <> pg_backend_pid()`);
    expect(cut.rows).toHaveLength(1);
    const d = await fakeDevice("token-after-cut");
    const id = await registerDevice("REG-RELISTEN", d);
    const bed = await newBed();
    // The listener retries after 2 s; a change committed meanwhile is read by the refresh that follows the reconnect.
    await change(id, async (trx) => {
      await assign(trx, id, bed);
      await issueToken(trx, id, "token-after-cut");
    });
    await waitFor(async () => (await storedCount(id)) === 100, PICKUP_LIMIT_MS, "beats of a device registered across the cut");
  });

  it("reads a device that the simulator's one-device mode serves, started with the command its page shows", async () => {
    const ledgerDir = mkdtempSync(join(tmpdir(), "corvane-sim-"));
    const port = await new Promise<number>((resolve) => {
      const s = createServer().listen(0, "127.0.0.1", () => {
        const p = (s.address() as { port: number }).port;
        s.close(() => resolve(p));
      });
    });
    const serial = "REG-SIM-1";
    // Real tokens are base64url; this one also checks the command's quoting (a leading dash, a quote, a $).
    const token = "-starts-with-a-dash_it's$HOME";
    const streamUrl = `http://127.0.0.1:${port}/devices/${serial}/stream`;
    const command = simulatorCommand({ serial, streamUrl }, token)!;
    // As shown on the page, with the sequence ledger in a scratch folder instead of the project's .corvane/.
    const child = spawn("sh", ["-c", `${command} --seq-ledger ${join(ledgerDir, "seq.json")}`], {
      env: { ...process.env, LOG_LEVEL: "info" },
      detached: true,
      stdio: ["ignore", "pipe", "pipe"],
    });
    let out = "";
    child.stdout!.on("data", (d: Buffer) => (out += d.toString()));
    child.stderr!.on("data", (d: Buffer) => (out += d.toString()));
    const exited = new Promise<void>((resolve) => child.once("exit", () => resolve()));
    try {
      await waitFor(() => out.includes('"msg":"simulating one device"') || child.exitCode !== null, 60_000, "the simulator to start");
      if (child.exitCode !== null) throw new Error(`the simulator exited (${child.exitCode}):\n${out.slice(-2000)}`);
      expect(out).toContain('"scenario":"healthy_sleep"');
      const [row] = await db("devices")
        .insert({ serial, unit_id: unitId, model: "simulated", manufacturer: "Test (fictional)", firmware: "0", timestamp_resolution_ms: 1000 / 128, stream_url: streamUrl })
        .returning("id");
      const id = row!.id;
      const bed = await newBed();
      const notified = await change(id, async (trx) => {
        await assign(trx, id, bed);
        await issueToken(trx, id, token);
      });
      // The simulator starts at now without backfill: a beat about every second.
      await waitFor(async () => (await storedCount(id)) >= 3, 15_000, "beats from the simulator");
      timings.notifyToThirdSimulatorBeat = Date.now() - notified;
      const status = (await db("device_stream_status").where({ device_id: id }).first())!;
      expect(Date.now() - status.last_beat_at!.getTime()).toBeLessThan(PICKUP_LIMIT_MS);
    } finally {
      if (child.exitCode === null) {
        process.kill(-child.pid!, "SIGTERM");
        await exited;
      }
      // sh exits before the simulator it started, which writes its ledger on the way out: wait for the whole
      // process group to be gone before removing the folder.
      await waitFor(() => {
        try {
          process.kill(-child.pid!, 0);
          return false;
        } catch {
          return true;
        }
      }, 15_000, "the simulator's process group to exit");
      rmSync(ledgerDir, { recursive: true, force: true, maxRetries: 5 });
    }
  }, 90_000);

  it("refuses a one-device simulator command without a token", async () => {
    const child = spawn("node_modules/.bin/tsx", ["scripts/simulator.ts", "--device", "REG-SIM-2", "--token", "<token>"], { stdio: ["ignore", "pipe", "pipe"] });
    let err = "";
    child.stderr!.on("data", (d: Buffer) => (err += d.toString()));
    const code = await new Promise<number | null>((resolve) => child.on("close", resolve));
    expect(code).toBe(2);
    expect(err).toMatch(/--device needs --token TOKEN/);
  }, 60_000);
});
