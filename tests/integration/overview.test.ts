// The Ward overview's read model on real PostgreSQL: stays with synthetic beats (DOMAIN §6) computed by the scheduled
// computation, then the overview checked against what the computation stored — latest window values, change from
// baseline and baseline median, no value on unusable windows, the night's heart-rate sparkline with gaps where there
// is no usable window, stream status by the age of the last beat, unresolved flags, and a query count that does not
// grow with the number of beds.
import type { Knex } from "knex";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { runCompute } from "@/lib/compute/run";
import type { IndexWindowInsert, IndexWindowRow } from "@/lib/db/tables";
import { simulateHealthySleep, type SimulatedBeats } from "@/lib/engine/simulate";
import { median } from "@/lib/engine/stats";
import { ALGORITHM_VERSION } from "@/lib/engine/version";
import { saveRuleSetVersion } from "@/lib/flags/rule-sets";
import { LIVE_WITHIN_MS } from "@/lib/devices/stream-state";
import { OVERVIEW_INDEX_KEYS, wardOverview, type WardOverviewDTO } from "@/lib/review/overview";
import { seed } from "@/seeds/01_demo";
import { DEFAULT_RULE_SET } from "@/seeds/02_rule_sets";
import { scratchDatabase } from "@/tests/support/db";
import { insertTestBeats, makeTestStay } from "@/tests/support/stays";

const MIN = 60_000;
const HOUR = 3_600_000;
const NY = "America/New_York";
/** 05:30 EDT on 10 June 2025: the latest review night is 9 June 22:00 EDT → 10 June 06:00 EDT (02:00Z → 10:00Z). */
const NOW = new Date("2025-06-10T09:30:00Z");
const NIGHT_FROM = new Date("2025-06-10T02:00:00Z");
/** The live stay: admitted an hour into the night; its monitor lost every beat from 05:00Z to 05:20Z. */
const ADMIT = new Date("2025-06-10T03:00:00Z");
const GAP = { from: new Date("2025-06-10T05:00:00Z"), to: new Date("2025-06-10T05:20:00Z") };
/** The lead-off stay: every beat from 09:05Z on reported with the lead off. */
const LEAD_OFF_FROM = new Date("2025-06-10T09:05:00Z");
/** Float tolerance for a median taken by PostgreSQL's percentile_cont versus the engine's median: both average the
 *  two middle values, possibly in a different order of operations (last-bit differences only). */
const MEDIAN_DIGITS = 9;

let db: Knex;
let cleanup: () => Promise<void>;
let unitId: string;
const ids = { live: { stayId: "", deviceId: "" }, leadOff: { stayId: "", deviceId: "" }, noDevice: { stayId: "", deviceId: "" }, emptyWithDevice: "" };

/** The series without the beats whose times fall in [fromS, toS): a stretch the monitor never sent. */
function withoutBeats(sim: SimulatedBeats, fromS: number, toS: number): SimulatedBeats {
  const keep = Array.from(sim.times, (t) => t < fromS || t >= toS);
  const pick = <T,>(xs: ArrayLike<T>) => Array.from(xs).filter((_, k) => keep[k]);
  return {
    ...sim,
    rr: Float64Array.from(pick(sim.rr)),
    times: Float64Array.from(pick(sim.times)),
    quality: Float64Array.from(pick(sim.quality)),
    leadOff: Uint8Array.from(pick(sim.leadOff)),
    beatType: pick(sim.beatType),
    truth: pick(sim.truth),
    rhythm: pick(sim.rhythm),
  };
}

const seconds = (d: Date) => d.getTime() / 1000;

async function addBed(unit: string, label: string, sortOrder: number, active = true) {
  const [bed] = await db("beds").insert({ unit_id: unit, label, sort_order: sortOrder, active }).returning("id");
  return bed!.id as string;
}

async function addDevice(serial: string, bedId: string, from: Date) {
  const unitOfBed = (await db("beds").where({ id: bedId }).first("unit_id"))!.unit_id;
  const [device] = await db("devices")
    .insert({ serial, unit_id: unitOfBed, model: "test monitor", firmware: "0", timestamp_resolution_ms: 1, stream_url: "http://127.0.0.1:9/unused", stream_token_hash: "unused", stream_token_enc: "unused" })
    .returning("id");
  await db("device_assignments").insert({ device_id: device!.id, bed_id: bedId, assigned_from: from, assigned_to: null, assigned_by: null });
  return device!.id as string;
}

const setLastBeat = (deviceId: string, at: Date | null) =>
  db("device_stream_status").insert({ device_id: deviceId, connected: true, last_beat_at: at, updated_at: NOW }).onConflict("device_id").merge(["last_beat_at"]);

const latestStored = (stayId: string) =>
  db("index_windows")
    .where({ stay_id: stayId, kind: "short", algorithm_version: ALGORITHM_VERSION })
    .where("window_end", "<=", NOW)
    .orderBy("window_start", "desc")
    .first<IndexWindowRow>();

const bedOf = (o: WardOverviewDTO, stayId: string) => o.beds.find((b) => b.stay?.stayId === stayId)!;

beforeAll(async () => {
  ({ db, cleanup } = await scratchDatabase());
  await seed(db);
  const [unit] = await db("units").insert({ code: "OV", name: "Overview test unit", kind: "adult", time_zone: NY }).returning("id");
  unitId = unit!.id;
  const open = new Date(NOW.getTime() + 24 * HOUR); // discharged only after NOW: in the bed at NOW

  ids.live = await makeTestStay(db, unitId, ADMIT, open);
  const night = simulateHealthySleep({ seed: 41, durationS: seconds(NOW) - seconds(ADMIT) - 5, startS: seconds(ADMIT) });
  await insertTestBeats(db, ids.live.deviceId, withoutBeats(night, seconds(GAP.from), seconds(GAP.to)));

  const leadOffAdmit = new Date("2025-06-10T08:00:00Z");
  ids.leadOff = await makeTestStay(db, unitId, leadOffAdmit, open);
  const leadOff = simulateHealthySleep({ seed: 42, durationS: seconds(NOW) - seconds(leadOffAdmit) - 5, startS: seconds(leadOffAdmit) });
  leadOff.times.forEach((t, k) => {
    if (t >= seconds(LEAD_OFF_FROM)) leadOff.leadOff[k] = 1;
  });
  await insertTestBeats(db, ids.leadOff.deviceId, leadOff);

  // Monitored from 03:00Z to 05:00Z, then the monitor was taken away (its assignment closed at 05:30Z).
  ids.noDevice = await makeTestStay(db, unitId, ADMIT, open);
  await insertTestBeats(db, ids.noDevice.deviceId, simulateHealthySleep({ seed: 43, durationS: 2 * 3600, startS: seconds(ADMIT) }));

  const run = await runCompute({ trigger: "test", db, now: NOW, baseline: { hours: 1, minWindows: 30 } });
  expect(run).toMatchObject({ status: "done", failedStays: 0 });
  await db("device_assignments").where({ device_id: ids.noDevice.deviceId }).update({ assigned_to: new Date("2025-06-10T05:30:00Z") });

  // An empty bed with a monitor that has never sent a beat, one with neither, a bed whose patient left before NOW,
  // and an inactive bed, which the overview leaves out.
  const emptyWithDevice = await addBed(unitId, "OV-E1", 200);
  ids.emptyWithDevice = await addDevice("OV-E1-MON", emptyWithDevice, new Date("2025-06-01T00:00:00Z"));
  const discharged = await addBed(unitId, "OV-E2", 201);
  const [patient] = await db("patients").insert({ record_number: "TEST-OV-LEFT", display_name: "Test, Discharged", birth_date: null }).returning("id");
  await db("stays").insert({ patient_id: patient!.id, bed_id: discharged, admitted_at: new Date("2025-06-09T12:00:00Z"), discharged_at: new Date("2025-06-10T01:00:00Z") });
  await addBed(unitId, "OV-X", 202, false);

  await setLastBeat(ids.live.deviceId, new Date(NOW.getTime() - 10_000));
  await setLastBeat(ids.leadOff.deviceId, new Date(NOW.getTime() - 5 * MIN));
  await setLastBeat(ids.noDevice.deviceId, new Date("2025-06-10T05:00:00Z"));
}, 240_000);

afterAll(async () => {
  await cleanup?.();
});

describe("the beds", () => {
  it("lists every active bed once, in bed order, with the stay in it at NOW or none (source: issue 5 item 1; census semantics)", async () => {
    const o = (await wardOverview(unitId, NOW, db))!;
    const beds = await db("beds").where({ unit_id: unitId, active: true }).orderBy(["sort_order", "label"]).select("id", "label");
    expect(o.beds.map((b) => b.bedId)).toEqual(beds.map((b) => b.id));
    expect(o.unit).toMatchObject({ id: unitId, code: "OV", name: "Overview test unit", timeZone: NY });
    expect(o.asOf).toBe(NOW.toISOString());
    expect(o.algorithmVersion).toBe(ALGORITHM_VERSION);
    const occupied = o.beds.filter((b) => b.stay).map((b) => b.stay!.stayId);
    expect(occupied).toEqual([ids.live.stayId, ids.leadOff.stayId, ids.noDevice.stayId]);
    const live = bedOf(o, ids.live.stayId);
    expect(live.stay).toEqual({ stayId: ids.live.stayId, displayName: "Test, Synthetic", recordNumber: expect.stringMatching(/^TEST-/), admittedAt: ADMIT.toISOString() });
    for (const empty of o.beds.filter((b) => !b.stay)) {
      expect(empty).toMatchObject({ latest: null, sparkline: null, flags: { count: 0, highestSeverity: null, labels: [] } });
    }
    expect(await wardOverview("00000000-0000-4000-8000-000000000000", NOW, db)).toBeNull();
  });
});

describe("the latest 5-min window", () => {
  it("carries the stored window's values, baseline deltas and the stay's baseline medians (source: index_windows and baselines as written by runCompute)", async () => {
    const stored = await latestStored(ids.live.stayId);
    expect(stored?.grade).toBe("good");
    // Windows the overview must pass over: an older engine version (one after the latest, one on the sparkline's
    // 5-min grid), and one that ends after NOW.
    const decoy = (start: Date, version: string): IndexWindowInsert => ({
      stay_id: ids.live.stayId, kind: "short", window_start: start, window_end: new Date(start.getTime() + 5 * MIN), algorithm_version: version,
      params_hash: "decoy", grade: "good", quality: { coverage: 1, reasons: [] }, values: { hr: 200, rmssd: 1, dfa_alpha1: 9, sampen: 9 },
      reasons: {}, mse: null, baseline_delta: { hr: 140 }, compute_run_id: null,
    });
    await db("index_windows").insert([
      decoy(new Date(stored!.window_start.getTime() + MIN), "0.9.0"),
      decoy(new Date("2025-06-10T09:20:00Z"), "0.9.0"),
      decoy(new Date(NOW.getTime() - 2 * MIN), ALGORITHM_VERSION),
    ]);

    const o = (await wardOverview(unitId, NOW, db))!;
    const latest = bedOf(o, ids.live.stayId).latest!;
    expect(latest.windowStart).toBe(stored!.window_start.toISOString());
    expect(latest.windowEnd).toBe(stored!.window_end.toISOString());
    expect(latest.grade).toBe("good");
    expect(latest.coverage).toBe((stored!.quality as { coverage: number }).coverage);
    const baselines = await db("baselines").where({ stay_id: ids.live.stayId, algorithm_version: ALGORITHM_VERSION }).select("index_key", "median");
    const medianOf = (k: string) => baselines.find((b) => b.index_key === k)?.median ?? null;
    for (const k of OVERVIEW_INDEX_KEYS) {
      const v = latest.values[k];
      expect(v.value, k).toBe(stored!.values![k]);
      expect(v.value, k).not.toBeNull();
      expect(v.reason, k).toBeNull();
      expect(v.delta, k).toBe(stored!.baseline_delta![k]);
      expect(v.baselineMedian, k).toBe(medianOf(k));
      // A baseline of the first hour exists by 05:30Z (baseline hours 1, at least 30 windows).
      expect(v.baselineMedian, k).not.toBeNull();
    }
  });

  it("shows no value on an unusable window, with the reason (source: GLOSSARY signal-quality grades)", async () => {
    const stored = await latestStored(ids.leadOff.stayId);
    expect(stored!.window_start.getTime()).toBeGreaterThanOrEqual(LEAD_OFF_FROM.getTime());
    expect(stored!.grade).toBe("unusable");
    const o = (await wardOverview(unitId, NOW, db))!;
    const latest = bedOf(o, ids.leadOff.stayId).latest!;
    expect(latest.grade).toBe("unusable");
    expect(latest.qualityReasons).toEqual((stored!.quality as { reasons: string[] }).reasons);
    expect(latest.qualityReasons.length).toBeGreaterThan(0);
    for (const k of OVERVIEW_INDEX_KEYS) {
      expect(latest.values[k]).toMatchObject({ value: null, delta: null });
      expect(latest.values[k].reason).toMatch(/^unusable window: /);
    }
  });
});

describe("the night's heart-rate sparkline", () => {
  it("holds, per 5-min bucket from the night's start to NOW, the HR of the usable window covering it, null where there is none (source: index_windows; DOMAIN §5.7 no value without usable data)", async () => {
    // An unusable window that carries a number anyway must not reach the line (the engine stores none; a value here
    // stands for any that slipped through).
    const inGap = { stay_id: ids.live.stayId, kind: "short" as const, window_start: new Date("2025-06-10T05:05:00Z"), algorithm_version: ALGORITHM_VERSION };
    expect((await db("index_windows").where(inGap).first("grade"))?.grade).toBe("unusable");
    await db("index_windows").where(inGap).update({ values: { hr: 200 } });
    const o = (await wardOverview(unitId, NOW, db))!;
    expect(o.night).toEqual({ night: "2025-06-09", from: NIGHT_FROM.toISOString(), to: "2025-06-10T10:00:00.000Z", bucketS: 300 });
    const { t, hr } = bedOf(o, ids.live.stayId).sparkline!;
    // 02:00Z to 09:30Z in 5-min buckets: 90 points, within the 120-point bound.
    expect(t).toHaveLength(90);
    expect(t.every((x, k) => x === seconds(NIGHT_FROM) + 300 * k)).toBe(true);

    const rows = await db("index_windows")
      .where({ stay_id: ids.live.stayId, kind: "short", algorithm_version: ALGORITHM_VERSION })
      .where("window_start", ">=", NIGHT_FROM)
      .where("window_end", "<=", NOW)
      .select<IndexWindowRow[]>("window_start", "grade", "values");
    // Windows start every minute and last 5: the one starting on a bucket's start covers the bucket exactly.
    const byBucket = new Map<number, number[]>();
    for (const w of rows) {
      const v = w.values?.hr;
      const offsetMs = w.window_start.getTime() - NIGHT_FROM.getTime();
      if (offsetMs % (300 * 1000) !== 0 || w.grade === "unusable" || typeof v !== "number") continue;
      const k = offsetMs / (300 * 1000);
      byBucket.set(k, [...(byBucket.get(k) ?? []), v]);
    }
    hr.forEach((v, k) => {
      const usable = byBucket.get(k);
      if (usable) expect(v, `bucket ${k}`).toBeCloseTo(median(usable), MEDIAN_DIGITS);
      else expect(v, `bucket ${k}`).toBeNull();
    });
    // The gaps, and only they: no window before the first whole minute after the first beat (buckets 02:00Z–03:00Z
    // and 03:00Z, whose window would start before that beat); the 20 beatless minutes 05:00Z–05:20Z (unusable
    // windows); and 09:25Z, whose window would end after the last beat with enough beats after it to be computed.
    const gaps = hr.flatMap((v, k) => (v === null ? [k] : []));
    expect(gaps).toEqual([...Array.from({ length: 13 }, (_, k) => k), 36, 37, 38, 39, 89]);
    // The decoy windows (another engine version, and one ending after NOW) reach no bucket.
    expect(hr.every((v) => v === null || v < 150)).toBe(true);
  });
});

describe("stream status", () => {
  it("is live within 60 s of the last beat, stale after (since the last beat), no_device without an assigned monitor (source: issue 5 item 1; DOMAIN §5.7)", async () => {
    let o = (await wardOverview(unitId, NOW, db))!;
    expect(bedOf(o, ids.live.stayId).stream).toEqual({ state: "live", deviceId: ids.live.deviceId, lastBeatAt: new Date(NOW.getTime() - 10_000).toISOString() });
    expect(bedOf(o, ids.leadOff.stayId).stream).toEqual({ state: "stale", deviceId: ids.leadOff.deviceId, since: new Date(NOW.getTime() - 5 * MIN).toISOString() });
    // Its monitor still has a status row, but the assignment ended at 05:30Z.
    expect(bedOf(o, ids.noDevice.stayId).stream).toEqual({ state: "no_device" });
    const byLabel = new Map(o.beds.map((b) => [b.bedLabel, b]));
    expect(byLabel.get("OV-E1")!.stream).toEqual({ state: "stale", deviceId: ids.emptyWithDevice, since: null });
    expect(byLabel.get("OV-E2")!.stream).toEqual({ state: "no_device" });

    // The bound itself: a beat exactly LIVE_WITHIN_MS old is live, a millisecond older is stale.
    await setLastBeat(ids.live.deviceId, new Date(NOW.getTime() - LIVE_WITHIN_MS));
    o = (await wardOverview(unitId, NOW, db))!;
    expect(bedOf(o, ids.live.stayId).stream.state).toBe("live");
    const older = new Date(NOW.getTime() - LIVE_WITHIN_MS - 1);
    await setLastBeat(ids.live.deviceId, older);
    o = (await wardOverview(unitId, NOW, db))!;
    expect(bedOf(o, ids.live.stayId).stream).toEqual({ state: "stale", deviceId: ids.live.deviceId, since: older.toISOString() });
    await setLastBeat(ids.live.deviceId, new Date(NOW.getTime() - 10_000));

    // The same monitor, now heard 20 s ago with a lead-off status and still connected: leads off, with its last beat.
    // An empty bed's monitor that reports lead-off and has never sent a beat: leads off with no last beat.
    await db("device_stream_status").where({ device_id: ids.leadOff.deviceId }).update({ lead_off: true, last_seen_at: new Date(NOW.getTime() - 20_000) });
    await db("device_stream_status")
      .insert({ device_id: ids.emptyWithDevice, connected: true, lead_off: true, last_seen_at: new Date(NOW.getTime() - 20_000), updated_at: NOW })
      .onConflict("device_id")
      .merge(["connected", "lead_off", "last_seen_at"]);
    o = (await wardOverview(unitId, NOW, db))!;
    expect(bedOf(o, ids.leadOff.stayId).stream).toEqual({ state: "leads_off", deviceId: ids.leadOff.deviceId, lastBeatAt: new Date(NOW.getTime() - 5 * MIN).toISOString() });
    expect(new Map(o.beds.map((b) => [b.bedLabel, b])).get("OV-E1")!.stream).toEqual({ state: "leads_off", deviceId: ids.emptyWithDevice, lastBeatAt: null });
    await db("device_stream_status").whereIn("device_id", [ids.leadOff.deviceId, ids.emptyWithDevice]).update({ lead_off: false });
  });
});

describe("open flags", () => {
  it("counts unresolved flags (open, acknowledged, escalated) with the highest severity and each label once (source: GLOSSARY flag vocabulary)", async () => {
    const rs = await db.transaction((trx) =>
      saveRuleSetVersion(trx, { unitId, name: "Overview test rules", document: DEFAULT_RULE_SET, audit: { actor: { userId: null, email: null, role: "system" }, requestId: "test", clientAddress: null } }),
    );
    const [alpha1, sdnn, coverage] = DEFAULT_RULE_SET.rules;
    const flag = (stayId: string, rule: typeof alpha1, state: "open" | "acknowledged" | "escalated" | "resolved", minute: number) => ({
      stay_id: stayId, unit_id: unitId, rule_set_id: rs.id, rule_set_version: rs.version, rule_id: rule!.id, severity: rule!.severity, state,
      condition_from: new Date(ADMIT.getTime() + minute * MIN), condition_to: null,
      details: { rule: { label: rule!.label, ...(rule!.kind === "index" && { index: rule!.index }) } },
    });
    await db("flags").insert([
      flag(ids.live.stayId, sdnn, "open", 90),
      flag(ids.live.stayId, alpha1, "acknowledged", 100),
      flag(ids.live.stayId, sdnn, "escalated", 110),
      flag(ids.live.stayId, coverage, "resolved", 120),
      flag(ids.leadOff.stayId, coverage, "escalated", 330),
    ]);
    const o = (await wardOverview(unitId, NOW, db))!;
    expect(bedOf(o, ids.live.stayId).flags).toEqual({ count: 3, highestSeverity: "review", labels: [sdnn!.label, alpha1!.label] });
    expect(bedOf(o, ids.leadOff.stayId).flags).toEqual({ count: 1, highestSeverity: "watch", labels: [coverage!.label] });
    expect(bedOf(o, ids.noDevice.stayId).flags).toEqual({ count: 0, highestSeverity: null, labels: [] });
  });
});

describe("cost", () => {
  it("takes the same few queries for 48 beds as for 5 (source: issue 5 item 1, no query per bed)", async () => {
    const count = async (unit: string) => {
      let n = 0;
      const onQuery = () => void n++;
      db.on("query", onQuery);
      try {
        const o = await wardOverview(unit, NOW, db);
        return { n, o: o! };
      } finally {
        db.off("query", onQuery);
      }
    };
    const small = await count(unitId);

    // A 48-bed unit, every bed occupied, each stay with a whole night of windows, baselines and a flag.
    const [big] = await db("units").insert({ code: "OV48", name: "Overview 48 beds", kind: "adult", time_zone: NY }).returning("id");
    const rs = await db.transaction((trx) =>
      saveRuleSetVersion(trx, { unitId: big!.id, name: "Overview test rules", document: DEFAULT_RULE_SET, audit: { actor: { userId: null, email: null, role: "system" }, requestId: "test", clientAddress: null } }),
    );
    const windowStarts = Array.from({ length: (seconds(NOW) - seconds(NIGHT_FROM)) / 60 - 5 }, (_, k) => new Date(NIGHT_FROM.getTime() + k * MIN));
    for (let bed = 0; bed < 48; bed++) {
      const s = await makeTestStay(db, big!.id, new Date(NIGHT_FROM.getTime() - HOUR), new Date(NOW.getTime() + 24 * HOUR));
      const rows: IndexWindowInsert[] = windowStarts.map((start, k) => ({
        stay_id: s.stayId, kind: "short", window_start: start, window_end: new Date(start.getTime() + 5 * MIN), algorithm_version: ALGORITHM_VERSION,
        params_hash: "written-by-test", grade: k % 30 === 0 ? "unusable" : "good", quality: { coverage: 0.97, reasons: [] },
        values: k % 30 === 0 ? null : { hr: 60 + bed / 10, rmssd: 30, dfa_alpha1: 1.1, sampen: 1.6 }, reasons: {}, mse: null,
        baseline_delta: k % 30 === 0 ? null : { hr: 2, rmssd: -4, dfa_alpha1: 0.05, sampen: -0.1 }, compute_run_id: null,
      }));
      for (let i = 0; i < rows.length; i += 400) await db("index_windows").insert(rows.slice(i, i + 400));
      await db("baselines").insert(OVERVIEW_INDEX_KEYS.map((k) => ({ stay_id: s.stayId, index_key: k, algorithm_version: ALGORITHM_VERSION, median: 1, spread: 0.1, n_windows: 60, from_at: NIGHT_FROM, to_at: ADMIT })));
      await db("flags").insert({ stay_id: s.stayId, unit_id: big!.id, rule_set_id: rs.id, rule_set_version: rs.version, rule_id: "coverage-below-80", severity: "watch", state: "open", condition_from: ADMIT, condition_to: null, details: {} });
      await setLastBeat(s.deviceId, new Date(NOW.getTime() - 5_000));
    }
    await db.raw("ANALYZE");
    const large = await count(big!.id);
    expect(large.o.beds).toHaveLength(48);
    expect(large.o.beds.every((b) => b.stay && b.latest?.grade === "good" && b.flags.count === 1 && b.stream.state === "live")).toBe(true);
    // Buckets 0…88 have their window (the last starts 09:24Z); the one of every six starting on a 30-min mark is unusable.
    expect(large.o.beds.every((b) => b.sparkline!.hr.filter((v) => v !== null).length === 89 - 15)).toBe(true);
    expect(large.n).toBe(small.n);
    expect(large.n).toBeLessThanOrEqual(5);
  }, 120_000);
});
