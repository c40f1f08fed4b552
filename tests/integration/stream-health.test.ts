// Stream health on real PostgreSQL: the writer's minute samples (device_health_minutes), the unit table and the
// device series read back from them and from the beats, the states at their bounds, clock drift against an exact
// line, the longest gap (kept by the writer per minute, checked against the stored beats), the trouble order, a query
// count that does not grow with the number of devices, and the retention of the minute samples.
import type { Knex } from "knex";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { runCompute } from "@/lib/compute/run";
import { deleteExpiredHealthMinutes } from "@/lib/compute/retention";
import { deviceHealthSeries, DRIFT_MIN_SPAN_MS, HEALTH_MINUTES, healthWindowFrom, MANY_EVENTS_24H, unitStreamHealth } from "@/lib/devices/health";
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
    /** Beats of both devices are BEAT_MS apart, so every interval a minute's beats make is BEAT_MS. */
    const BEAT_MS = 800;
    const add = (deviceId: string, seq: number) => {
      const t = Date.parse("2025-06-10T11:00:00Z") + seq * BEAT_MS;
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
      { device_id: undefined, minute: "2025-06-10T11:58:00.000Z", beats: 5, gaps: 2, missing_seqs: 4, duplicates: 3, malformed: 1, reconnects: 1, clock_offset_ms: 125, connected: true, longest_gap_ms: BEAT_MS },
      { device_id: undefined, minute: "2025-06-10T11:59:00.000Z", beats: 1, gaps: 0, missing_seqs: 0, duplicates: 0, malformed: 0, reconnects: 2, clock_offset_ms: 130, connected: false, longest_gap_ms: BEAT_MS },
    ]);
    // b's replayed beat hit ON CONFLICT: no beat stored in 11:59, so no interval either.
    expect(of(b)).toEqual([
      { device_id: undefined, minute: "2025-06-10T11:58:00.000Z", beats: 2, gaps: 0, missing_seqs: 0, duplicates: 0, malformed: 0, reconnects: 0, clock_offset_ms: -40, connected: true, longest_gap_ms: BEAT_MS },
      { device_id: undefined, minute: "2025-06-10T11:59:00.000Z", beats: 0, gaps: 0, missing_seqs: 0, duplicates: 0, malformed: 0, reconnects: 0, clock_offset_ms: -40, connected: true, longest_gap_ms: null },
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
    expect(after).toMatchObject({ beats: 1, gaps: 0, duplicates: 0, malformed: 0, reconnects: 2, connected: true, longest_gap_ms: BEAT_MS });
  });
});

describe("the longest gap the writer keeps", () => {
  /** A beat reaches the writer this long after its beat time; each flush runs at its last beat's arrival. */
  const ARRIVAL_MS = 250;
  const writerOptions = { batchSize: 100_000, flushIntervalMs: 3_600_000, maxBuffered: 1_000_000 };

  /** Beat times from `start`: the interval before beat k is `special(k, previous time)` if it gives one, else a
   *  regular 600–999 ms (heart-rate-like, deterministic). */
  function beatTimes(start: number, n: number, special: (k: number, prev: number) => number | undefined): number[] {
    const out = [start];
    for (let k = 1; k < n; k++) out.push(out[k - 1]! + (special(k, out[k - 1]!) ?? 600 + ((k * 37) % 400)));
    return out;
  }

  /** Per UTC minute of storing (the beats' received_at, which the writer sets to the flush's clock here), the largest
   *  difference between a stored beat's time and the stored beat before it in time: SQL LAG over the beats table, as
   *  Stream health computed it before the writer kept the figure. */
  async function lagByMinute(deviceId: string) {
    const { rows } = await db.raw<{ rows: { minute: Date; longest: number | null }[] }>(
      `SELECT date_trunc('minute', received_at) AS minute, max(round(extract(epoch FROM beat_at - prev) * 1000))::int AS longest
         FROM (SELECT beat_at, received_at, lag(beat_at) OVER (ORDER BY beat_at) AS prev FROM beats WHERE device_id = ?) x
        GROUP BY 1 ORDER BY 1`,
      [deviceId],
    );
    return rows.map((r) => ({ minute: r.minute.toISOString(), longest: r.longest }));
  }

  async function recorded(deviceId: string) {
    const rows = await db("device_health_minutes").where({ device_id: deviceId }).orderBy("minute").select("minute", "longest_gap_ms", "beats");
    return rows.map((r) => ({ minute: r.minute.toISOString(), longest: r.longest_gap_ms, beats: r.beats }));
  }

  const lagOverall = async (deviceId: string) =>
    (await db.raw<{ rows: { longest: number | null }[] }>(
      `SELECT max(round(extract(epoch FROM beat_at - prev) * 1000))::int AS longest
         FROM (SELECT beat_at, lag(beat_at) OVER (ORDER BY beat_at) AS prev FROM beats WHERE device_id = ?) x`,
      [deviceId],
    )).rows[0]!.longest;

  const minuteOf = (t: number) => new Date(t - (t % MIN)).toISOString();

  it("equals the largest difference between consecutive stored beat times (SQL LAG over the beats table), minute by minute, over many flushes of two devices", async () => {
    const unit = await addUnit("SHK");
    const a = await addDevice(unit, "K-A");
    const b = await addDevice(unit, "K-B");
    const map = new Map<string, DeviceCounters>([[a, counters()], [b, counters()]]);
    let clock = 0;
    const writer = new BeatWriter(db, map, writerOptions, undefined, () => clock);
    const start = Date.parse("2025-06-10T09:00:03.000Z");
    // Device a: a 5-s gap inside a flush (beat 50); a 12.3-s gap between the last beat of one flush and the first of
    // the next (beat 120), whose next beat steps 30 ms back (a clock correction) — by beat time the gap is then
    // 12.27 s; and a 22-s gap from second 50 of a minute (beat 260) to second 12 of the next (beat 261), the two beats
    // stored in two flushes. (Beat k is the (k + 1)-th, seq k + 1.)
    const ta = beatTimes(start, 400, (k, prev) => {
      if (k === 50) return 5_000;
      if (k === 120) return 12_300;
      if (k === 121) return -30;
      if (k === 260) return prev - (prev % MIN) + 50_000 - prev; // to second 50 of its minute
      if (k === 261) return MIN - 50_000 + 12_000; // to second 12 of the next
      return undefined;
    });
    // Device b: 450–649 ms beats with one 7-s gap.
    const tb = beatTimes(start + 100, 700, (k) => (k === 333 ? 7_000 : 450 + ((k * 53) % 200)));
    // Flushes end after every 40 beats of a, and before beats 120 and 261 (the gaps that span two flushes).
    const ends = [...new Set([...Array.from({ length: 10 }, (_, i) => (i + 1) * 40), 120, 261])].sort((x, y) => x - y);
    let ia = 0;
    let ib = 0;
    for (const end of ends) {
      const last = Math.max(...ta.slice(ia, end));
      clock = last + ARRIVAL_MS;
      for (; ia < end; ia++) writer.add({ deviceId: a, record: beat(ia + 1, ta[ia]!), beatAt: ta[ia]!, receivedAt: clock });
      for (; ib < tb.length && tb[ib]! <= last; ib++) writer.add({ deviceId: b, record: beat(ib + 1, tb[ib]!), beatAt: tb[ib]!, receivedAt: clock });
      await writer.flush();
      expect(writer.failures).toBe(0);
    }
    // The gaps that span flushes: beat 120 is stored in the flush after beat 119's; beats 260 and 261 (the gap from
    // second 50 to second 12) lie on either side of a minute boundary and are stored in flushes of different minutes.
    expect(ends).toEqual(expect.arrayContaining([120, 261]));
    expect(ta[260]! - ta[259]!).toBeGreaterThan(0);
    expect(ta[261]! - ta[260]!).toBe(22_000);
    const storedAt = async (k: number) =>
      minuteOf((await db.raw<{ rows: { received_at: Date }[] }>("SELECT received_at FROM beats WHERE device_id = ? AND seq = ?", [a, k + 1])).rows[0]!.received_at.getTime());
    expect(await storedAt(261)).not.toBe(await storedAt(260));

    for (const d of [a, b]) {
      const rec = await recorded(d);
      expect(rec.length).toBeGreaterThan(3);
      expect(rec.map(({ minute, longest }) => ({ minute, longest }))).toEqual(await lagByMinute(d));
      expect(Math.max(...rec.map((r) => r.longest ?? 0))).toBe(await lagOverall(d));
    }
    // The gap that spans a minute boundary is counted in the minute of the beat that closed it.
    const recA = await recorded(a);
    const closing = await storedAt(261);
    expect(recA.find((r) => r.minute === closing)!.longest).toBe(await lagOverall(a));
    expect(await lagOverall(a)).toBe(22_000);

    // The Stream health table and device tab read the same figure from the minute rows (every beat is in the window).
    const now = new Date(ta.at(-1)! + 5_000);
    const o = (await unitStreamHealth(unit, now, db))!;
    for (const d of [a, b]) expect(o.rows.find((r) => r.deviceId === d)!.longestGapS).toBe((await lagOverall(d))! / 1000);
    expect((await deviceHealthSeries(a, now, db))!.latest.longestGapS).toBe(22);
  });

  it("makes no gap of replayed beats (already stored), neither in the writer that stored them nor in a restarted one", async () => {
    const unit = await addUnit("SHP");
    const d = await addDevice(unit, "P-1");
    const map = new Map<string, DeviceCounters>([[d, counters()]]);
    let clock = 0;
    const writer = new BeatWriter(db, map, writerOptions, undefined, () => clock);
    const t = beatTimes(Date.parse("2025-06-10T09:30:00.000Z"), 300, () => undefined);
    const send = async (w: BeatWriter, ks: number[], at: number) => {
      clock = at;
      for (const k of ks) w.add({ deviceId: d, record: beat(k + 1, t[k]!), beatAt: t[k]!, receivedAt: clock });
      await w.flush();
      expect(w.failures).toBe(0);
    };
    const range = (from: number, to: number) => Array.from({ length: to - from }, (_, i) => from + i);
    await send(writer, range(0, 100), t[99]! + ARRIVAL_MS);
    const before = await lagOverall(d);

    // Only replays, a minute later: nothing stored, no interval.
    const replayMinute = Date.parse("2025-06-10T09:40:05.000Z");
    await send(writer, range(10, 30), replayMinute);
    expect((await recorded(d)).find((r) => r.minute === minuteOf(replayMinute))).toEqual({ minute: minuteOf(replayMinute), longest: null, beats: 0 });

    // Replays of early beats ahead of new ones: the first new beat's interval is from the latest stored beat (99),
    // not from the replayed beat 40 before it in the flush (which would make a gap of 60 beats).
    const mixedMinute = Date.parse("2025-06-10T09:41:05.000Z");
    await send(writer, [...range(20, 41), ...range(100, 150)], mixedMinute);
    // A restarted writer (it has stored nothing for the device) does the same: it finds the latest stored beat (149)
    // in the beats table.
    const restarted = new BeatWriter(db, map, writerOptions, undefined, () => clock);
    const restartMinute = Date.parse("2025-06-10T09:42:05.000Z");
    await send(restarted, [...range(0, 5), ...range(140, 200)], restartMinute);

    const rec = await recorded(d);
    expect(rec.map(({ minute, longest }) => ({ minute, longest })).filter((r) => r.minute !== minuteOf(replayMinute))).toEqual(await lagByMinute(d));
    expect(rec.find((r) => r.minute === minuteOf(mixedMinute))).toMatchObject({ beats: 50 });
    expect(rec.find((r) => r.minute === minuteOf(restartMinute))).toMatchObject({ beats: 50 });
    // Every interval is a regular one: the replays made none longer than the longest before them or between new beats.
    expect(Math.max(...rec.map((r) => r.longest ?? 0))).toBe(await lagOverall(d));
    expect(await lagOverall(d)).toBeLessThan(1_000);
    expect(before).toBeLessThan(1_000);
  });

  it("starts with a device's first beat ever, spans flushes of one beat, and makes no gap of a beat stepped back before the latest stored time", async () => {
    const unit = await addUnit("SHF");
    const d = await addDevice(unit, "F-1");
    const map = new Map<string, DeviceCounters>([[d, counters()]]);
    let clock = 0;
    const writer = new BeatWriter(db, map, writerOptions, undefined, () => clock);
    const t1 = Date.parse("2025-06-10T09:50:10.000Z");
    const flushes: { seq: number; at: number }[][] = [
      [{ seq: 1, at: t1 }],
      [{ seq: 2, at: t1 + 2_000 }],
      // A clock correction after beat 2: beat 3 is 40 ms before it, beat 4 760 ms after it.
      [{ seq: 3, at: t1 + 1_960 }, { seq: 4, at: t1 + 2_760 }],
    ];
    for (const [i, f] of flushes.entries()) {
      clock = t1 + i * MIN + ARRIVAL_MS; // one flush a minute
      for (const x of f) writer.add({ deviceId: d, record: beat(x.seq, x.at), beatAt: x.at, receivedAt: clock });
      await writer.flush();
    }
    const rec = await recorded(d);
    // By definition: no beat before the first, so no interval; then beat 2 − beat 1; then beat 4 − beat 2 (the latest
    // stored time before it), while beat 3 − beat 2 is negative and no gap.
    expect(rec.map((r) => r.longest)).toEqual([null, 2_000, 760]);
    // By beat time, beat 3 now splits the 2-s interval already counted (LAG: 1.96 s): an interval counted once stays
    // counted, so the figure can exceed LAG by at most the step back.
    const lag = (await lagOverall(d))!;
    expect(lag).toBe(1_960);
    expect(Math.max(...rec.map((r) => r.longest ?? 0)) - lag).toBe(40);
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

    // A live, clean device with 300 beats in the last 5 min (one a second), 101 earlier beats, and one beat 25 h ago.
    // Inserted straight into the beats table, so no minute sample holds a longest gap for it.
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

  it("counts beats received per minute over the last 5 min from the beats, and reads no longest gap from them", async () => {
    const o = (await unitStreamHealth(unitId, NOW, db))!;
    const clean = o.rows.find((r) => r.deviceId === ids.clean)!;
    expect(clean.beatsPerMinute).toBe(60); // 300 beats in (now − 5 min, now]
    // Its beats alone would make a gap of 38.5 s ((now − 299 s) − (now − 337.5 s)); the figure is the minute samples'.
    expect(clean.longestGapS).toBeNull();
    expect(o.rows.find((r) => r.deviceId === ids.never)!).toMatchObject({ beatsPerMinute: 0, longestGapS: null });
  });

  it("takes the longest gap from the window's minute samples: the largest longest_gap_ms from the window's first minute to the one holding now", async () => {
    const unit = await addUnit("SHL");
    const d = await addDevice(unit, "L-1");
    const none = await addDevice(unit, "L-NONE");
    const from = healthWindowFrom(NOW).getTime();
    const nowMinute = from + (HEALTH_MINUTES - 1) * MIN;
    await db("device_health_minutes").insert([
      { device_id: d, minute: new Date(from - MIN), longest_gap_ms: 3_600_000 }, // before the window: not counted
      { device_id: d, minute: new Date(from), longest_gap_ms: 38_500 },
      { device_id: d, minute: new Date(from + MIN), longest_gap_ms: null },
      { device_id: d, minute: new Date(nowMinute), longest_gap_ms: 38_499 },
      { device_id: none, minute: new Date(from), beats: 0, longest_gap_ms: null },
    ]);
    // Beats 90 s apart in the window: a scan of the beats would say 90 s.
    await insertBeats(d, [NOW.getTime() - 100_000, NOW.getTime() - 10_000]);
    const o = (await unitStreamHealth(unit, NOW, db))!;
    expect(o.rows.find((r) => r.deviceId === d)!.longestGapS).toBe(38.5);
    expect(o.rows.find((r) => r.deviceId === none)!.longestGapS).toBeNull();
    expect((await deviceHealthSeries(d, NOW, db))!.latest.longestGapS).toBe(38.5);
    // One minute later the window starts at from + 1 min: the 38.5 s sample has left it.
    expect((await unitStreamHealth(unit, new Date(NOW.getTime() + MIN), db))!.rows.find((r) => r.deviceId === d)!.longestGapS).toBe(38.499);
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
