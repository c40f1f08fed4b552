// Stream health on real PostgreSQL: the writer's minute samples (device_health_minutes), the unit table and the
// device series read back from them and from the beats, the states at their bounds, clock drift against an exact
// line, the longest gap, the trouble order, a query count that does not grow with the number of devices, and the
// retention of the minute samples.
import type { Knex } from "knex";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { runCompute } from "@/lib/compute/run";
import { deleteExpiredHealthMinutes } from "@/lib/compute/retention";
import { deviceHealthSeries, DRIFT_MIN_SPAN_MS, HEALTH_MINUTES, healthWindowFrom, LONGEST_GAP_REUSE_MS, MANY_EVENTS_24H, unitStreamHealth } from "@/lib/devices/health";
import { LIVE_WITHIN_MS, OFFLINE_AFTER_MS } from "@/lib/devices/stream-state";
import { BeatWriter, type DeviceCounters } from "@/lib/ingest/beat-writer";
import type { BeatRecord } from "@/lib/streaming/protocol";
import { scratchDatabase } from "@/tests/support/db";

const MIN = 60_000;
const HOUR = 3_600_000;
const DAY = 86_400_000;
/** 30 s into a minute, so minute boundaries and "now" differ. */
const NOW = new Date("2025-06-10T12:00:30.000Z");
/** Least-squares on points that lie exactly on a line returns that line; what remains is floating-point rounding of
 *  sums over 1,440 points (PostgreSQL's regr_* accumulate in double precision). */
const FIT_TOLERANCE = 1e-9;

let db: Knex;
let cleanup: () => Promise<void>;
let unitId: string;
let beds = 0;

async function addUnit(code: string) {
  const [u] = await db("units").insert({ code, name: `Stream health ${code} (fictional)`, kind: "adult", time_zone: "Europe/Berlin" }).returning("id");
  return u!.id as string;
}

/** A device of the unit; assigned to a new bed unless `assigned` is false. */
async function addDevice(unit: string, serial: string, o: { assigned?: boolean; status?: "active" | "maintenance" | "decommissioned"; token?: boolean } = {}) {
  const [d] = await db("devices")
    .insert({
      serial, unit_id: unit, model: "test monitor", firmware: "0", timestamp_resolution_ms: 1, stream_url: "http://127.0.0.1:9/unused",
      status: o.status ?? "active",
      ...(o.token !== false && { stream_token_hash: `hash-${serial}`, stream_token_enc: `enc-${serial}` }),
    })
    .returning("id");
  if (o.assigned !== false) {
    beds += 1;
    const [bed] = await db("beds").insert({ unit_id: unit, label: `SH-${beds}`, sort_order: beds, active: true }).returning("id");
    await db("device_assignments").insert({ device_id: d!.id, bed_id: bed!.id, assigned_from: new Date(NOW.getTime() - 2 * DAY), assigned_to: null, assigned_by: null });
  }
  return d!.id as string;
}

const setStatus = (deviceId: string, lastBeatAt: Date | null, connected = false, extra: Record<string, unknown> = {}) =>
  db("device_stream_status").insert({ device_id: deviceId, connected, last_beat_at: lastBeatAt, updated_at: NOW, ...extra }).onConflict("device_id").merge();

async function insertBeats(deviceId: string, times: number[]) {
  const days = new Set(times.map((t) => new Date(t).toISOString().slice(0, 10)));
  for (const day of days) await db.raw("SELECT ensure_beats_partition(?::date)", [day]);
  const rows = times.map((t, k) => ({ device_id: deviceId, seq: k + 1, beat_at: new Date(t), device_time: new Date(t), rr_ms: 800, beat_type: "N" as const, quality: 1, lead_off: false }));
  for (let i = 0; i < rows.length; i += 5000) await db("beats").insert(rows.slice(i, i + 5000));
}

const counters = (): DeviceCounters => ({
  lastSeq: 0, lastSeenAt: null, lastBeatAt: null, gaps: 0, missingSeqs: 0, duplicates: 0, malformed: 0,
  malformedByKind: {}, reconnects: 0, clockOffsetMs: null, connected: true, leadOff: false, lastError: null,
});

const beat = (seq: number, t: number): BeatRecord => ({ kind: "beat", seq, tDevice: t, rr: 800, type: "N", quality: 0.98, leadOff: false });

beforeAll(async () => {
  ({ db, cleanup } = await scratchDatabase());
  unitId = await addUnit("SH");
}, 120_000);

afterAll(async () => {
  await cleanup?.();
});

describe("the writer's minute samples", () => {
  it("adds several flushes of one minute into one row, starts a new row in the next minute, and counts stored beats only once", async () => {
    const unit = await addUnit("SHW");
    const a = await addDevice(unit, "SHW-A");
    const b = await addDevice(unit, "SHW-B");
    const map = new Map<string, DeviceCounters>([[a, counters()], [b, counters()]]);
    let clock = Date.parse("2025-06-10T11:58:05Z");
    const writer = new BeatWriter(db, map, { batchSize: 10_000, flushIntervalMs: 3_600_000, maxBuffered: 100_000 }, undefined, () => clock);
    const ca = map.get(a)!;
    const cb = map.get(b)!;
    const add = (deviceId: string, seq: number) => {
      const t = Date.parse("2025-06-10T11:00:00Z") + seq * 800;
      writer.add({ deviceId, record: beat(seq, t), beatAt: t, receivedAt: clock });
    };
    let statements: string[] = [];
    const onQuery = (q: { sql: string }) => void statements.push(q.sql);
    db.on("query", onQuery);

    // 11:58:05 — a: 3 beats, a gap of 4 missing records, 2 duplicates, 1 malformed, 1 reconnect; b: 2 beats.
    for (const s of [1, 2, 3]) add(a, s);
    Object.assign(ca, { gaps: 1, missingSeqs: 4, duplicates: 2, malformed: 1, malformedByKind: { bad_json: 1 }, reconnects: 1, clockOffsetMs: 120 });
    for (const s of [1, 2]) add(b, s);
    cb.clockOffsetMs = -40;
    await writer.flush();
    // 11:58:40 — a: 2 more beats, one more gap and duplicate, a new offset; b: nothing changed, so not written.
    clock = Date.parse("2025-06-10T11:58:40Z");
    for (const s of [4, 5]) add(a, s);
    Object.assign(ca, { gaps: 2, duplicates: 3, clockOffsetMs: 125 });
    statements = [];
    await writer.flush();
    const perFlush = statements.filter((s) => /device_health_minutes/.test(s)).length;
    // 11:59:10 — a: one beat, two reconnects, disconnected at the end of the minute; b: the record seq 2 replayed.
    clock = Date.parse("2025-06-10T11:59:10Z");
    add(a, 6);
    Object.assign(ca, { reconnects: 3, clockOffsetMs: 130, connected: false });
    add(b, 2);
    await writer.flush();
    db.off("query", onQuery);

    // Source: the brief — one small batched upsert per flush, not one per device or beat.
    expect(perFlush).toBe(1);
    const rows = await db("device_health_minutes").whereIn("device_id", [a, b]).orderBy(["device_id", "minute"]).select();
    const of = (d: string) => rows.filter((r) => r.device_id === d).map((r) => ({ ...r, device_id: undefined, minute: r.minute.toISOString(), missing_seqs: Number(r.missing_seqs) }));
    expect(of(a)).toEqual([
      { device_id: undefined, minute: "2025-06-10T11:58:00.000Z", beats: 5, gaps: 2, missing_seqs: 4, duplicates: 3, malformed: 1, reconnects: 1, clock_offset_ms: 125, connected: true },
      { device_id: undefined, minute: "2025-06-10T11:59:00.000Z", beats: 1, gaps: 0, missing_seqs: 0, duplicates: 0, malformed: 0, reconnects: 2, clock_offset_ms: 130, connected: false },
    ]);
    // b's replayed beat hit ON CONFLICT: no beat stored in 11:59.
    expect(of(b)).toEqual([
      { device_id: undefined, minute: "2025-06-10T11:58:00.000Z", beats: 2, gaps: 0, missing_seqs: 0, duplicates: 0, malformed: 0, reconnects: 0, clock_offset_ms: -40, connected: true },
      { device_id: undefined, minute: "2025-06-10T11:59:00.000Z", beats: 0, gaps: 0, missing_seqs: 0, duplicates: 0, malformed: 0, reconnects: 0, clock_offset_ms: -40, connected: true },
    ]);
    // The minutes add up to the cumulative status the writer keeps beside them.
    const status = await db("device_stream_status").where({ device_id: a }).first();
    expect(status).toMatchObject({ gaps: 2, duplicates: 3, malformed: 1, reconnects: 3, clock_offset_ms: 130, connected: false, last_seq: "6", malformed_by_kind: { bad_json: 1 } });

    // A writer restarted over counters read back from the status row adds nothing it has not seen grow.
    const restarted = new Map<string, DeviceCounters>([[a, { ...counters(), gaps: 2, missingSeqs: 4, duplicates: 3, malformed: 1, reconnects: 3, clockOffsetMs: 130, lastSeq: 6 }]]);
    const writer2 = new BeatWriter(db, restarted, { batchSize: 10_000, flushIntervalMs: 3_600_000, maxBuffered: 100_000 }, undefined, () => Date.parse("2025-06-10T11:59:50Z"));
    writer2.touch(a);
    await writer2.flush();
    const after = await db("device_health_minutes").where({ device_id: a, minute: new Date("2025-06-10T11:59:00Z") }).first();
    expect(after).toMatchObject({ beats: 1, gaps: 0, duplicates: 0, malformed: 0, reconnects: 2, connected: true });
  });
});

describe("the unit table", () => {
  const ids: Record<string, string> = {};
  beforeAll(async () => {
    // States at their bounds (lib/devices/stream-state.ts: live ≤ LIVE_WITHIN_MS, stale ≤ OFFLINE_AFTER_MS or connected).
    ids.liveEdge = await addDevice(unitId, "B-LIVE-EDGE");
    await setStatus(ids.liveEdge, new Date(NOW.getTime() - LIVE_WITHIN_MS));
    ids.staleEdge = await addDevice(unitId, "B-STALE-EDGE");
    await setStatus(ids.staleEdge, new Date(NOW.getTime() - LIVE_WITHIN_MS - 1));
    ids.staleLast = await addDevice(unitId, "B-STALE-LAST");
    await setStatus(ids.staleLast, new Date(NOW.getTime() - OFFLINE_AFTER_MS));
    ids.offlineEdge = await addDevice(unitId, "B-OFFLINE-EDGE");
    await setStatus(ids.offlineEdge, new Date(NOW.getTime() - OFFLINE_AFTER_MS - 1));
    ids.connectedOld = await addDevice(unitId, "B-CONNECTED-OLD");
    await setStatus(ids.connectedOld, new Date(NOW.getTime() - OFFLINE_AFTER_MS - 1), true);
    ids.never = await addDevice(unitId, "B-NEVER");
    ids.maintenance = await addDevice(unitId, "B-MAINT", { status: "maintenance" });
    await setStatus(ids.maintenance, new Date(NOW.getTime() - 1000));
    ids.noBed = await addDevice(unitId, "B-NO-BED", { assigned: false });
    ids.noToken = await addDevice(unitId, "B-NO-TOKEN", { token: false });
    await addDevice(unitId, "B-DECOMMISSIONED", { status: "decommissioned", assigned: false });

    // A live, clean device with 300 beats in the last 5 min (one a second), and 101 earlier beats ending 38.5 s before
    // the first of those; one beat 25 h ago, outside the window, would otherwise make a 24-h gap.
    ids.clean = await addDevice(unitId, "A-CLEAN");
    const t0 = NOW.getTime();
    const recent = Array.from({ length: 300 }, (_, k) => t0 - (299 - k) * 1000);
    const earlier = Array.from({ length: 101 }, (_, j) => t0 - 337_500 - (100 - j) * 1000);
    await insertBeats(ids.clean, [t0 - 25 * HOUR, ...earlier, ...recent]);
    await setStatus(ids.clean, new Date(t0), true, { clock_offset_ms: 12.5, malformed_by_kind: {} });

    // A live device with MANY_EVENTS_24H events in 24 h and clock offsets exactly on a line over the whole window.
    ids.troubled = await addDevice(unitId, "A-TROUBLED");
    await setStatus(ids.troubled, new Date(t0 - 5000), true, { clock_offset_ms: 40, malformed_by_kind: { bad_json: 2, oversized: 1 } });
    const from = healthWindowFrom(NOW).getTime();
    await db("device_health_minutes").insert(
      Array.from({ length: HEALTH_MINUTES }, (_, k) => ({
        device_id: ids.troubled!, minute: new Date(from + k * MIN), beats: 60, connected: true,
        clock_offset_ms: 250 - 3.2 * (k / 60),
        gaps: k === 10 ? 2 : 0, missing_seqs: k === 10 ? "7" : "0", malformed: k === 20 ? 2 : 0, reconnects: k === 30 ? 1 : 0, duplicates: k === 40 ? 4 : 0,
      })),
    );
    // A sample a minute before the window: not counted.
    await db("device_health_minutes").insert({ device_id: ids.troubled, minute: new Date(from - MIN), reconnects: 50, clock_offset_ms: 1e6 });

    // A monitor on an empty bed: connected, its last status record (20 s ago) says lead-off, no beat for 5 min.
    ids.leadsOff = await addDevice(unitId, "A-LEADS-OFF");
    await setStatus(ids.leadsOff, new Date(t0 - 5 * MIN), true, { lead_off: true, last_seen_at: new Date(t0 - 20_000) });
  });

  it("gives each device its state at the bounds of live, stale and offline, leads off, and not streaming with its reason (source: lib/devices/stream-state.ts)", async () => {
    const o = (await unitStreamHealth(unitId, NOW, db))!;
    const by = (id: string) => o.rows.find((r) => r.deviceId === id)!;
    expect(by(ids.liveEdge!).state).toBe("live");
    expect(by(ids.staleEdge!).state).toBe("stale");
    expect(by(ids.staleLast!).state).toBe("stale");
    expect(by(ids.offlineEdge!).state).toBe("offline");
    expect(by(ids.connectedOld!).state).toBe("stale");
    expect(by(ids.never!).state).toBe("offline");
    // Read from the status row's connected, lead_off and last_seen_at (DOMAIN §6.7: lead-off status with no beats).
    expect(by(ids.leadsOff!)).toMatchObject({ state: "leads_off", connected: true, lastBeatAt: new Date(NOW.getTime() - 5 * MIN).toISOString() });
    expect(by(ids.maintenance!)).toMatchObject({ state: "not_streaming", notStreamingBecause: "in maintenance" });
    expect(by(ids.noBed!)).toMatchObject({ state: "not_streaming", notStreamingBecause: "not assigned to a bed", bedLabel: null });
    expect(by(ids.noToken!)).toMatchObject({ state: "not_streaming", notStreamingBecause: "no stream token" });
    expect(o.rows.some((r) => r.serial === "B-DECOMMISSIONED")).toBe(false);
    expect(o.rows.map((r) => r.serial)).toEqual([...o.rows.map((r) => r.serial)].sort());
    expect(o.counts).toEqual({
      live: o.rows.filter((r) => r.state === "live").length,
      leads_off: 1, stale: 3, offline: 2, not_streaming: 3,
    });
    expect(o.counts.live).toBe(3);
    expect(o.unit).toEqual({ id: unitId, name: "Stream health SH (fictional)", timeZone: "Europe/Berlin" });
  });

  it("counts beats received per minute over the last 5 min and the longest gap between stored beats in the window", async () => {
    const o = (await unitStreamHealth(unitId, NOW, db))!;
    const clean = o.rows.find((r) => r.deviceId === ids.clean)!;
    expect(clean.beatsPerMinute).toBe(60); // 300 beats in (now − 5 min, now]
    expect(clean.longestGapS).toBe(38.5); // (now − 299 s) − (now − 337.5 s)
    expect(o.rows.find((r) => r.deviceId === ids.never)!).toMatchObject({ beatsPerMinute: 0, longestGapS: null });
  });

  it("sums the window's minute samples and fits the clock drift: offset = a + b·t exactly gives slope b (least squares recovers an exact line)", async () => {
    const o = (await unitStreamHealth(unitId, NOW, db))!;
    const t = o.rows.find((r) => r.deviceId === ids.troubled)!;
    expect(t).toMatchObject({ gaps: 2, missingRecords: 7, malformed: 2, reconnects: 1, duplicates: 4, clockOffsetMs: 40, malformedByKind: { bad_json: 2, oversized: 1 } });
    expect(t.drift.samples).toBe(HEALTH_MINUTES);
    expect(t.drift.spanMinutes).toBe(HEALTH_MINUTES - 1);
    expect(Math.abs(t.drift.msPerHour! - -3.2)).toBeLessThan(FIT_TOLERANCE * 250);
    expect(Math.abs(t.drift.interceptMs! - 250)).toBeLessThan(FIT_TOLERANCE * 250);
    expect(t.drift.reason).toBeNull();
    expect(o.rows.find((r) => r.deviceId === ids.never)!.drift).toMatchObject({ msPerHour: null, samples: 0, reason: expect.stringMatching(/No clock offset/) });
  });

  it("gives no drift under 2 h of offsets, and a drift from exactly 2 h (bound DRIFT_MIN_SPAN_MS)", async () => {
    const unit = await addUnit("SHD");
    const short = await addDevice(unit, "D-SHORT");
    const enough = await addDevice(unit, "D-ENOUGH");
    const from = healthWindowFrom(NOW).getTime();
    const span = DRIFT_MIN_SPAN_MS / MIN;
    const line = (device: string, n: number) =>
      Array.from({ length: n }, (_, k) => ({ device_id: device, minute: new Date(from + 60 * MIN + k * MIN), clock_offset_ms: -80 + 1.5 * (k / 60) }));
    await db("device_health_minutes").insert([...line(short, span), ...line(enough, span + 1)]);
    const o = (await unitStreamHealth(unit, NOW, db))!;
    const s = o.rows.find((r) => r.deviceId === short)!.drift;
    const e = o.rows.find((r) => r.deviceId === enough)!.drift;
    expect(s).toMatchObject({ msPerHour: null, samples: span, spanMinutes: span - 1, reason: expect.stringMatching(/only 119 min.*at least 2 h/) });
    expect(e).toMatchObject({ samples: span + 1, spanMinutes: span, reason: null });
    expect(Math.abs(e.msPerHour! - 1.5)).toBeLessThan(FIT_TOLERANCE * 100);
  });

  it("ranks most trouble first: offline (longest silence first) > stale > live with many events > leads off > live and clean > not streaming", async () => {
    const o = (await unitStreamHealth(unitId, NOW, db))!;
    const order = [...o.rows].sort((x, y) => y.trouble.rank - x.trouble.rank || x.serial.localeCompare(y.serial));
    expect(order.map((r) => r.trouble.tier)).toEqual([
      "offline", "offline", "stale", "stale", "stale", "troubled", "leads_off", "clean", "clean", "not_streaming", "not_streaming", "not_streaming",
    ]);
    expect(order.slice(0, 2).map((r) => r.serial)).toEqual(["B-NEVER", "B-OFFLINE-EDGE"]);
    // Stale: the longer silence first; the connected device has been silent longest.
    expect(order.slice(2, 5).map((r) => r.serial)).toEqual(["B-CONNECTED-OLD", "B-STALE-LAST", "B-STALE-EDGE"]);
    const troubled = order[5]!;
    expect(troubled.serial).toBe("A-TROUBLED");
    expect(troubled.gaps + troubled.malformed + troubled.reconnects).toBe(MANY_EVENTS_24H);
    expect(order[6]!.serial).toBe("A-LEADS-OFF");
  });

  it("reuses a longest gap for LONGEST_GAP_REUSE_MS and then reads the beats again", async () => {
    const unit = await addUnit("SHG");
    const d = await addDevice(unit, "G-1");
    const t0 = NOW.getTime();
    await insertBeats(d, [t0 - 50_000, t0 - 40_000]);
    const longest = async (at: number) => (await unitStreamHealth(unit, new Date(at), db))!.rows[0]!.longestGapS;
    expect(await longest(t0)).toBe(10);
    await db.raw("UPDATE beats SET beat_at = ? WHERE device_id = ? AND seq = 1", [new Date(t0 - 70_000), d]);
    expect(await longest(t0 + LONGEST_GAP_REUSE_MS - 1)).toBe(10);
    expect(await longest(t0 + LONGEST_GAP_REUSE_MS)).toBe(30);
    // Never a value computed for a later instant.
    expect(await longest(t0)).toBe(30);
  });

  it("takes the same four queries for 25 devices as for a handful (source: the brief, no query per device)", async () => {
    const count = async (unit: string) => {
      let n = 0;
      const onQuery = () => void n++;
      db.on("query", onQuery);
      try {
        const o = await unitStreamHealth(unit, NOW, db);
        return { n, o: o! };
      } finally {
        db.off("query", onQuery);
      }
    };
    const small = await count(unitId);
    const big = await addUnit("SH25");
    const from = healthWindowFrom(NOW).getTime();
    for (let i = 0; i < 25; i++) {
      const d = await addDevice(big, `BIG-${String(i).padStart(2, "0")}`);
      await setStatus(d, new Date(NOW.getTime() - 2000), true, { clock_offset_ms: i });
      await db("device_health_minutes").insert(Array.from({ length: 180 }, (_, k) => ({ device_id: d, minute: new Date(from + k * MIN), beats: 60, clock_offset_ms: i + k / 100 })));
      await insertBeats(d, Array.from({ length: 400 }, (_, k) => NOW.getTime() - k * 900));
    }
    const large = await count(big);
    expect(large.o.rows).toHaveLength(25);
    expect(large.o.rows.every((r) => r.state === "live" && r.drift.msPerHour !== null)).toBe(true);
    expect(small.n).toBe(4);
    expect(large.n).toBe(small.n);
    expect(await unitStreamHealth("00000000-0000-4000-8000-000000000000", NOW, db)).toBeNull();
  });
});

describe("the device series", () => {
  it("gives 24 h of minutes: beats received by beat time from the beats table, events and offsets from the minute samples", async () => {
    const unit = await addUnit("SHS");
    const d = await addDevice(unit, "S-1");
    const from = healthWindowFrom(NOW);
    // 30 beats in the window's first minute, 45 in the minute holding NOW, 7 just before the window.
    const t0 = from.getTime();
    const nowMinute = t0 + (HEALTH_MINUTES - 1) * MIN;
    await insertBeats(d, [
      ...Array.from({ length: 7 }, (_, k) => t0 - 10_000 + k * 1000),
      ...Array.from({ length: 30 }, (_, k) => t0 + k * 2000),
      ...Array.from({ length: 45 }, (_, k) => nowMinute + k * 500 + 1),
    ]);
    await db("device_health_minutes").insert([
      { device_id: d, minute: new Date(t0 + 5 * MIN), gaps: 1, missing_seqs: "3", duplicates: 2, malformed: 1, reconnects: 1, clock_offset_ms: 17 },
      { device_id: d, minute: new Date(nowMinute), reconnects: 3, clock_offset_ms: 19 },
    ]);
    const s = (await deviceHealthSeries(d, NOW, db))!;
    expect(s.t).toHaveLength(HEALTH_MINUTES);
    expect(s.t[0]).toBe(t0 / 1000);
    expect(s.t.at(-1)).toBe(nowMinute / 1000);
    expect(s.from).toBe("2025-06-09T12:01:00.000Z");
    expect(s.beats[0]).toBe(30);
    expect(s.beats.at(-1)).toBe(45);
    expect(s.beats.reduce((a, b) => a + b, 0)).toBe(75);
    expect([s.gaps[5], s.duplicates[5], s.malformed[5], s.reconnects[5], s.clockOffsetMs[5]]).toEqual([1, 2, 1, 1, 17]);
    expect([s.reconnects.at(-1), s.clockOffsetMs.at(-1), s.clockOffsetMs[6]]).toEqual([3, 19, null]);
    // The totals beside the series are the series summed.
    expect(s.latest).toMatchObject({ deviceId: d, gaps: 1, reconnects: 4, duplicates: 2, malformed: 1, missingRecords: 3 });
    expect(s.timeZone).toBe("Europe/Berlin");
    expect(await deviceHealthSeries("00000000-0000-4000-8000-000000000000", NOW, db)).toBeNull();
  });
});

describe("retention", () => {
  it("deletes the minute samples older than the beats' retention and keeps the rest (source: CORVANE_BEAT_RETENTION_DAYS, lib/compute/config.ts)", async () => {
    const unit = await addUnit("SHR");
    const d = await addDevice(unit, "R-1");
    const days = 30;
    const cutoff = NOW.getTime() - days * DAY;
    await db("device_health_minutes").insert([
      { device_id: d, minute: new Date(cutoff - MIN) },
      { device_id: d, minute: new Date(cutoff) },
      { device_id: d, minute: new Date(cutoff + MIN) },
    ]);
    const before = await db("device_health_minutes").whereNot({ device_id: d }).count<{ n: string }[]>({ n: "*" });
    expect(await deleteExpiredHealthMinutes(db, days, NOW)).toBe(1);
    const left = await db("device_health_minutes").where({ device_id: d }).orderBy("minute").pluck("minute");
    expect(left.map((m: Date) => m.getTime())).toEqual([cutoff, cutoff + MIN]);
    expect(await db("device_health_minutes").whereNot({ device_id: d }).count<{ n: string }[]>({ n: "*" })).toEqual(before);
    await expect(deleteExpiredHealthMinutes(db, 0, NOW)).rejects.toThrow(RangeError);
  });

  it("is run by the scheduled computation with the beats' retention setting", async () => {
    const d = (await db("devices").where({ serial: "R-1" }).first("id"))!.id;
    const now = new Date("2025-08-01T00:00:00Z");
    await db("device_health_minutes").insert([{ device_id: d, minute: new Date(now.getTime() - 31 * DAY) }, { device_id: d, minute: new Date(now.getTime() - 29 * DAY) }]);
    const run = await runCompute({ trigger: "test", db, now });
    expect(run.status).toBe("done");
    const left = await db("device_health_minutes").where({ device_id: d }).pluck("minute");
    // Default CORVANE_BEAT_RETENTION_DAYS is 30: everything before 2 July is gone.
    expect(left.map((m: Date) => m.toISOString())).toEqual([new Date(now.getTime() - 29 * DAY).toISOString()]);
  });
});
