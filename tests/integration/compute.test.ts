// The scheduled computation on real PostgreSQL: windows on the clock grid across DST nights, one run at a time,
// chunked runs equal to one pass, recomputation on a new engine version, personal baselines, the neonatal gate,
// beat retention, and the record of every run. Beats are synthetic (lib/engine/simulate, DOMAIN §6).
import { randomBytes } from "node:crypto";
import type { Knex } from "knex";
import { fromZonedTime } from "date-fns-tz";
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import { computationParams } from "@/lib/compute/params";
import { COMPUTE_LOCK_KEY, runCompute } from "@/lib/compute/run";
import { computeWindows } from "@/lib/engine/windows";
import { addArtefacts, addEctopy, simulateComplexityLoss, simulateHealthySleep, simulateNicu, type SimulatedBeats } from "@/lib/engine/simulate";
import { ALGORITHM_VERSION } from "@/lib/engine/version";
import { seed } from "@/seeds/01_demo";
import { seedRuleSets } from "@/seeds/02_rule_sets";
import { scratchDatabase } from "@/tests/support/db";
import { insertTestBeats, makeTestStay } from "@/tests/support/stays";

const MIN = 60_000;
const HOUR = 3_600_000;
const NY = "America/New_York";

let db: Knex;
let cleanup: () => Promise<void>;
beforeAll(async () => {
  ({ db, cleanup } = await scratchDatabase());
  await seed(db);
  await seedRuleSets(db);
});
afterAll(async () => {
  await cleanup?.();
});

const makeStay = async (unitCode: "4W" | "2E", admittedAt: Date, dischargedAt: Date) =>
  makeTestStay(db, (await db("units").where({ code: unitCode }).first("id"))!.id, admittedAt, dischargedAt);
const insertBeats = (deviceId: string, sim: SimulatedBeats, from?: number, to?: number) => insertTestBeats(db, deviceId, sim, from, to);

const storedWindows = (stayId: string, kind: "short" | "long", version = ALGORITHM_VERSION) =>
  db("index_windows").where({ stay_id: stayId, kind, algorithm_version: version }).orderBy("window_start").select("*");

describe("windows on the clock grid", () => {
  it("stores one 5-min window per minute of real time across a 13-h fall-back night and an 11-h spring-forward night (source: DOMAIN §4, W5; tz rules for 2026)", async () => {
    const nights = [
      { from: "2026-10-31T19:00:00", to: "2026-11-01T07:00:00", hours: 13 },
      { from: "2026-03-07T19:00:00", to: "2026-03-08T07:00:00", hours: 11 },
    ];
    for (const [i, night] of nights.entries()) {
      const admitted = fromZonedTime(night.from, NY);
      const discharged = fromZonedTime(night.to, NY);
      // The local clock says 12 h both nights; the instants say otherwise.
      expect(discharged.getTime() - admitted.getTime()).toBe(night.hours * HOUR);
      const { stayId, deviceId } = await makeStay("4W", admitted, discharged);
      await insertBeats(deviceId, simulateHealthySleep({ seed: 11 + i, durationS: night.hours * 3600 + 60, startS: admitted.getTime() / 1000 }));
      const run = await runCompute({ trigger: "test", db, now: new Date(discharged.getTime() + HOUR) });
      expect(run.status).toBe("done");

      const short = await storedWindows(stayId, "short");
      // Analytic: windows start at every whole minute from admission; the last complete one ends by the last beat,
      // just before discharge, so 60·h − 5 windows (a 12-h clock reading would give 715).
      expect(short).toHaveLength(night.hours * 60 - 5);
      expect(short[0]!.window_start.getTime()).toBe(admitted.getTime());
      for (let k = 1; k < short.length; k++) expect(short[k]!.window_start.getTime() - short[k - 1]!.window_start.getTime()).toBe(MIN);
      expect(short.every((w) => w.window_start.getTime() % MIN === 0 && w.window_end.getTime() - w.window_start.getTime() === 5 * MIN)).toBe(true);
      // 60-min windows on whole UTC hours (both admissions fall on one); the hour ending at discharge ends after the
      // last beat, so it is not complete.
      const long = await storedWindows(stayId, "long");
      expect(long).toHaveLength(night.hours - 1);
      expect(long.every((w) => w.window_start.getTime() % HOUR === 0)).toBe(true);
      expect(long.every((w) => w.mse === null || (Array.isArray(w.mse) && w.mse.length === 20))).toBe(true);
    }
  });
});

describe("one run at a time", () => {
  const admitted = new Date("2025-01-10T02:00:00Z");
  const discharged = new Date(admitted.getTime() + 2 * HOUR);
  const now = new Date(discharged.getTime() + HOUR);
  let stayId: string;
  beforeAll(async () => {
    const s = await makeStay("4W", admitted, discharged);
    stayId = s.stayId;
    await insertBeats(s.deviceId, simulateHealthySleep({ seed: 21, durationS: 2 * 3600 + 60, startS: admitted.getTime() / 1000 }));
  });

  it("records a run that cannot take the lock as skipped, and audits it (source: issue 4 item 4)", async () => {
    const conn = await db.client.acquireConnection();
    try {
      await conn.query("SELECT pg_advisory_lock($1)", [COMPUTE_LOCK_KEY]);
      const run = await runCompute({ trigger: "test", db, now });
      expect(run).toMatchObject({ status: "skipped", windows: 0 });
      expect(await db("compute_runs").where({ id: run.runId }).first()).toMatchObject({ status: "skipped", windows: 0, algorithm_version: ALGORITHM_VERSION });
      const audit = await db("audit_events").where({ action: "compute.run", target_id: run.runId }).first();
      expect(audit?.detail).toMatchObject({ status: "skipped", algorithm_version: ALGORITHM_VERSION });
      expect(await db("index_windows").where({ stay_id: stayId }).count<{ n: string }[]>("* as n")).toEqual([{ n: "0" }]);
    } finally {
      await conn.query("SELECT pg_advisory_unlock($1)", [COMPUTE_LOCK_KEY]);
      await db.client.releaseConnection(conn);
    }
  });

  it("two concurrent runs store every window exactly once; a third adds nothing (source: issue 4 item 8)", async () => {
    const runs = await Promise.all([runCompute({ trigger: "test", db, now }), runCompute({ trigger: "test", db, now })]);
    const statuses = runs.map((r) => r.status).sort();
    expect(["done,skipped", "done,done"]).toContain(statuses.join(","));
    const expected = 2 * 60 - 5; // every whole minute of the 2-h stay whose window ends by the last beat
    expect(runs[0]!.windows + runs[1]!.windows).toBeGreaterThanOrEqual(expected);
    const { rows: [counts] } = await db.raw<{ rows: { n: number; distinct: number }[] }>(
      "SELECT count(*)::int AS n, count(DISTINCT (window_start, algorithm_version))::int AS distinct FROM index_windows WHERE stay_id = ? AND kind = 'short'",
      [stayId],
    );
    const { n, distinct } = counts!;
    expect(n).toBe(expected);
    expect(distinct).toBe(expected);
    const again = await runCompute({ trigger: "test", db, now });
    expect(again).toMatchObject({ status: "done", windows: 0, flagsRaised: 0 });
  });

  it("records each run in compute_runs and the audit trail with version, windows and duration (source: issue 4 item 4)", async () => {
    const done = await db("compute_runs").where({ status: "done" }).orderBy("id").select("*");
    const computing = done.find((r) => r.windows > 0)!;
    expect(computing).toMatchObject({ algorithm_version: ALGORITHM_VERSION, trigger: "test" });
    expect(computing.duration_ms).toBeGreaterThan(0);
    expect(computing.finished_at).not.toBeNull();
    const audit = await db("audit_events").where({ action: "compute.run", target_id: computing.id }).first();
    expect(audit).toMatchObject({ actor_role: "system", outcome: "success", target_type: "compute_run" });
    expect(audit!.detail).toMatchObject({ algorithm_version: ALGORITHM_VERSION, windows: computing.windows, duration_ms: computing.duration_ms });
  });
});

describe("what a run computes", () => {
  it("computes, in chunks and minute by minute as beats arrive, exactly what one pass over the whole stay computes (source: analytic — a sliding computation must not depend on how it is split)", async () => {
    const admitted = new Date("2025-03-10T03:00:00Z");
    const discharged = new Date(admitted.getTime() + 3 * HOUR);
    const { stayId, deviceId } = await makeStay("4W", admitted, discharged);
    // Ectopy and artefacts make the cleaning edit beats, which is where a chunk edge could show.
    const sim = addArtefacts(addEctopy(simulateHealthySleep({ seed: 31, durationS: 3 * 3600 + 60, startS: admitted.getTime() / 1000 }), { seed: 32, pvcRate: 0.02, pacRate: 0.01 }), { seed: 33 });
    const upTo = (ms: number) => { const k = sim.times.findIndex((t) => t * 1000 > ms); return k < 0 ? sim.rr.length : k; };
    // The first 90 min arrive at once and are computed in steps of 5,000 beats (about 80 min each)...
    let stored = upTo(admitted.getTime() + 1.5 * HOUR);
    const parts = [await insertBeats(deviceId, sim, 0, stored)];
    const first = await runCompute({ trigger: "test", db, now: new Date(admitted.getTime() + 1.5 * HOUR), chunkBeats: 5000 });
    expect(first.status).toBe("done");
    // ...then beats arrive as they would live, with a run every 7 minutes — each just after the first beat that
    // follows a whole minute, the hardest moment: a window has just ended and only one beat lies beyond it.
    for (let m = admitted.getTime() + 1.5 * HOUR + 7 * MIN; m < discharged.getTime(); m += 7 * MIN) {
      const next = upTo(m) + 1;
      parts.push(await insertBeats(deviceId, sim, stored, next));
      stored = next;
      expect((await runCompute({ trigger: "test", db, now: new Date(Math.round(sim.times[next - 1]! * 1000)) })).status).toBe("done");
    }
    parts.push(await insertBeats(deviceId, sim, stored));
    await runCompute({ trigger: "test", db, now: new Date(discharged.getTime() + HOUR) });
    const all = (pick: (p: (typeof parts)[number]) => Float64Array | Uint8Array) => parts.flatMap((p) => [...pick(p)]);
    const times = Float64Array.from(all((p) => p.times));
    const inStay = times.findIndex((t) => t * 1000 >= discharged.getTime());
    const whole = {
      rr: Float64Array.from(all((p) => p.rr)).subarray(0, inStay),
      times: times.subarray(0, inStay),
      quality: Float64Array.from(all((p) => p.quality)).subarray(0, inStay),
      leadOff: Uint8Array.from(all((p) => p.leadOff)).subarray(0, inStay),
    };

    const onePass = computeWindows(whole, { originS: admitted.getTime() / 1000 });
    const short = await storedWindows(stayId, "short");
    expect(short.map((w) => w.window_start.getTime() / 1000)).toEqual(onePass.short.map((w) => w.startS));
    short.forEach((w, k) => {
      const ref = onePass.short[k]!;
      expect(w.grade).toBe(ref.quality.grade);
      expect(w.quality).toEqual(ref.quality);
      expect(w.values).toEqual(ref.values);
    });
    expect(short.some((w) => (w.quality as { shareEdited: number }).shareEdited > 0)).toBe(true);
    const long = await storedWindows(stayId, "long");
    expect(long.map((w) => w.window_start.getTime() / 1000)).toEqual(onePass.long.map((w) => w.startS));
    long.forEach((w, k) => {
      expect(w.values).toEqual(onePass.long[k]!.values);
      expect(w.mse).toEqual(onePass.long[k]!.mse);
    });
    // Every window names the parameters that produced it.
    const adult = computationParams("adult");
    expect(new Set(short.map((w) => w.params_hash))).toEqual(new Set([adult.hash]));
    expect(await db("computation_params").where({ params_hash: adult.hash }).first()).toMatchObject({ algorithm_version: ALGORITHM_VERSION });
  });

  it("stores the same windows through a 25-min dropout however the beats are split into chunks (source: analytic — a sliding computation must not depend on how it is split)", async () => {
    const admitted = new Date("2025-03-12T03:00:00Z");
    const discharged = new Date(admitted.getTime() + 3 * HOUR);
    const sim = simulateHealthySleep({ seed: 41, durationS: 3 * 3600 + 60, startS: admitted.getTime() / 1000 });
    // The device is silent for 25 min from 70 min in: no beats at all (the ingest stores nothing for a dropout).
    const k1 = sim.times.findIndex((t) => t * 1000 > admitted.getTime() + 70 * MIN);
    const k2 = sim.times.findIndex((t) => t * 1000 > admitted.getTime() + 95 * MIN);
    const stays = [];
    for (const chunkBeats of [5000, 6000, 7000, 100_000]) {
      const { stayId, deviceId } = await makeStay("4W", admitted, discharged);
      await insertBeats(deviceId, sim, 0, k1);
      await insertBeats(deviceId, sim, k2);
      const run = await runCompute({ trigger: "test", db, now: new Date(discharged.getTime() + HOUR), chunkBeats });
      expect(run.status).toBe("done");
      stays.push(stayId);
    }
    const starts = await Promise.all(stays.map(async (id) => (await storedWindows(id, "short")).map((w) => `${w.window_start.toISOString()} ${w.grade}`)));
    for (const s of starts.slice(0, -1)) expect(s).toEqual(starts.at(-1));
    // No minute is missing from the first window to the last; those in the dropout are stored as unusable.
    const minutes = starts.at(-1)!.map((w) => Date.parse(w.split(" ")[0]!) / MIN);
    expect(minutes.at(-1)! - minutes[0]! + 1).toBe(minutes.length);
    expect(starts.at(-1)!.filter((w) => w.endsWith("unusable")).length).toBeGreaterThanOrEqual(20);
  });

  it("works a backlog an hour of every stay per run, all in step, and ends with what one pass stores (source: analytic — a sliding computation must not depend on how it is split)", async () => {
    const admitted = new Date("2025-05-20T01:00:00Z");
    const discharged = new Date(admitted.getTime() + 3 * HOUR);
    const now = new Date(discharged.getTime() + HOUR);
    const sim = simulateHealthySleep({ seed: 43, durationS: 3 * 3600 + 60, startS: admitted.getTime() / 1000 });
    const capped = [await makeStay("4W", admitted, discharged), await makeStay("4W", admitted, discharged)];
    for (const s of capped) await insertBeats(s.deviceId, sim);
    const count = async (stayId: string) => Number((await db("index_windows").where({ stay_id: stayId }).count<{ n: string }[]>("* as n"))[0]!.n);
    const runs = [];
    const afterFirst: number[] = [];
    for (let i = 0; i < 30; i++) {
      const run = await runCompute({ trigger: "test", db, now, chunkBeats: 5000, stepS: 3600 });
      expect(run.status).toBe("done");
      runs.push(run);
      if (i === 0) for (const s of capped) afterFirst.push(await count(s.stayId));
      if (!run.more) break;
    }
    // 3 h of beats an hour at a time (in chunks of 5,000 beats): a few runs, the last one saying nothing is left.
    expect(runs.length).toBeGreaterThanOrEqual(3);
    expect(runs.slice(0, -1).every((r) => r.more)).toBe(true);
    expect(runs.at(-1)!.more).toBe(false);
    // After the first run both stays have windows, the same number (same beats), and not yet all of them.
    expect(afterFirst[0]).toBeGreaterThan(0);
    expect(afterFirst[1]).toBe(afterFirst[0]);
    expect(afterFirst[0]).toBeLessThan(await count(capped[0]!.stayId));
    // A stay with the same beats computed in one uncapped run stores the very same windows.
    const whole = await makeStay("4W", admitted, discharged);
    await insertBeats(whole.deviceId, sim);
    const one = await runCompute({ trigger: "test", db, now });
    expect(one.more).toBe(false);
    const rows = async (stayId: string) =>
      (await db("index_windows").where({ stay_id: stayId }).orderBy(["kind", "window_start"]).select("kind", "window_start", "grade", "values", "baseline_delta"))
        .map((w) => JSON.stringify(w));
    expect(await rows(capped[0]!.stayId)).toEqual(await rows(whole.stayId));
    expect(await rows(capped[1]!.stayId)).toEqual(await rows(whole.stayId));
    await expect(runCompute({ trigger: "test", db, now, stepS: 600 })).rejects.toThrow(/stepS must be a whole number of seconds ≥ 3600/);
  });

  it("uses the neonatal range gate for a neonatal unit (source: DOMAIN §2.1, §6.8)", async () => {
    const admitted = new Date("2025-05-10T05:00:00Z");
    const discharged = new Date(admitted.getTime() + HOUR);
    const { stayId, deviceId } = await makeStay("2E", admitted, discharged);
    await insertBeats(deviceId, simulateNicu({ seed: 41, durationS: 3600 + 60, startS: admitted.getTime() / 1000 }));
    await runCompute({ trigger: "test", db, now: new Date(discharged.getTime() + HOUR) });
    const short = await storedWindows(stayId, "short");
    expect(short).toHaveLength(55);
    const neonatal = computationParams("neonatal");
    expect(neonatal.hash).not.toBe(computationParams("adult").hash);
    expect(new Set(short.map((w) => w.params_hash))).toEqual(new Set([neonatal.hash]));
    const stored = await db("computation_params").where({ params_hash: neonatal.hash }).first();
    expect(stored.params.cleaning.rangeGate).toEqual({ minMs: 250, maxMs: 1500 });
    // NICU heart rates (about 143 bpm, DOMAIN §6.8) pass the neonatal gate untouched.
    expect(short.filter((w) => w.grade === "good").length).toBeGreaterThan(50);
  });

  it("recomputes a stay under a new engine version and keeps the old rows (source: issue 4 item 4)", async () => {
    const admitted = new Date("2025-02-10T04:00:00Z");
    const discharged = new Date(admitted.getTime() + HOUR);
    const { stayId, deviceId } = await makeStay("4W", admitted, discharged);
    await insertBeats(deviceId, simulateHealthySleep({ seed: 51, durationS: 3600 + 60, startS: admitted.getTime() / 1000 }));
    const now = new Date(discharged.getTime() + HOUR);
    await runCompute({ trigger: "test", db, now });
    // Pretend those rows came from an older engine.
    await db("index_windows").where({ stay_id: stayId }).update({ algorithm_version: "0.9.0-test" });
    const rerun = await runCompute({ trigger: "test", db, now });
    expect(rerun.windows).toBe(55);
    expect(await storedWindows(stayId, "short")).toHaveLength(55);
    expect(await storedWindows(stayId, "short", "0.9.0-test")).toHaveLength(55);
  });
});

describe("personal baseline", () => {
  it("stores median and MAD × 1.4826 of the first hour's valid windows, and gives every window its change from it (source: analytic; DOMAIN §1 own baseline)", async () => {
    const admitted = new Date("2025-04-10T01:00:00Z");
    const discharged = new Date(admitted.getTime() + 2 * HOUR);
    const { stayId, deviceId } = await makeStay("4W", admitted, discharged);
    const sim = simulateComplexityLoss({ seed: 61, durationS: 2 * 3600 + 60, startS: admitted.getTime() / 1000, rampStartS: 3600, rampDurationS: 3600 });
    const split = sim.times.findIndex((t) => t * 1000 >= admitted.getTime() + 1.5 * HOUR);
    // First 1.5 h: the baseline is made after the windows it covers are stored (their change is filled in then).
    await insertBeats(deviceId, sim, 0, split);
    const first = await runCompute({ trigger: "test", db, now: new Date(admitted.getTime() + 1.5 * HOUR), baseline: { hours: 1, minWindows: 30 } });
    expect(first.baselines).toBeGreaterThan(0);
    // The rest: later windows get their change as they are stored.
    await insertBeats(deviceId, sim, split);
    await runCompute({ trigger: "test", db, now: new Date(discharged.getTime() + HOUR), baseline: { hours: 1, minWindows: 30 } });

    const short = await storedWindows(stayId, "short");
    const firstValid = short.find((w) => w.grade !== "unusable")!.window_start.getTime();
    const inPeriod = short.filter((w) => w.grade !== "unusable" && w.window_start.getTime() < firstValid + HOUR).map((w) => w.values!.sdnn!);
    const sorted = [...inPeriod].sort((a, b) => a - b);
    const med = (s: number[]) => (s.length % 2 ? s[(s.length - 1) / 2]! : (s[s.length / 2 - 1]! + s[s.length / 2]!) / 2);
    const m = med(sorted);
    const mad = med(inPeriod.map((v) => Math.abs(v - m)).sort((a, b) => a - b));
    const b = await db("baselines").where({ stay_id: stayId, index_key: "sdnn", algorithm_version: ALGORITHM_VERSION }).first();
    expect(b).toMatchObject({ median: m, n_windows: inPeriod.length });
    expect(b!.spread).toBeCloseTo(mad * 1.4826, 12); // floating-point reassociation only
    expect(inPeriod.length).toBeGreaterThanOrEqual(30);
    const withValues = short.filter((w) => w.values !== null);
    expect(withValues.length).toBeGreaterThan(100);
    for (const w of withValues) expect(w.baseline_delta!.sdnn).toBe(w.values!.sdnn! - m);
    expect(short.filter((w) => w.values === null).every((w) => w.baseline_delta === null)).toBe(true);
  });
});

describe("beat retention", () => {
  it("drops day partitions wholly older than CORVANE_BEAT_RETENTION_DAYS (default 30) and keeps the rest (source: issue 4 item 1)", async () => {
    for (const day of ["2024-05-05", "2024-05-15", "2024-05-16"]) await db.raw("SELECT ensure_beats_partition(?::date)", [day]);
    const run = await runCompute({ trigger: "test", db, now: new Date("2024-06-15T12:00:00Z") });
    // Cut-off 2024-05-16 12:00 UTC: the day of 05-15 ended before it, the day of 05-16 after it.
    expect(run.partitionsDropped).toEqual(["beats_20240505", "beats_20240515"]);
    const left = await db.raw<{ rows: { n: string }[] }>("SELECT relname AS n FROM pg_class WHERE relkind = 'r' AND relname LIKE 'beats_2024%' ORDER BY 1");
    expect(left.rows.map((r) => r.n)).toEqual(["beats_20240516"]);
  });
});

describe("the compute route", () => {
  it("answers 401 to a wrong scheduler secret, audited, and runs as the scheduler for the right one (source: issue 4 item 4)", async () => {
    const secret = randomBytes(32).toString("base64url");
    process.env.CORVANE_SCHEDULER_SECRET = secret;
    // A fresh module graph whose one Knex instance is this test's database (and whose settings see the secret).
    vi.resetModules();
    vi.doMock("@/lib/db/knex", () => ({ db }));
    try {
      const { POST } = await import("@/app/api/jobs/compute/route");
      const call = (headers: Record<string, string>) => POST(new Request("http://127.0.0.1:3000/api/jobs/compute", { method: "POST", headers }));

      const wrong = await call({ "x-corvane-scheduler-secret": `${secret}x`, "x-request-id": "route-test-wrong" });
      expect(wrong.status).toBe(401);
      expect(await wrong.json()).toMatchObject({ error: "unauthorized" });
      expect(await db("audit_events").where({ request_id: "route-test-wrong" }).first()).toMatchObject({ action: "access.denied", outcome: "denied", actor_role: "scheduler" });

      const right = await call({ "x-corvane-scheduler-secret": secret, "x-request-id": "route-test-right" });
      expect(right.status).toBe(200);
      expect(right.headers.get("cache-control")).toBe("no-store");
      const body = (await right.json()) as { runId: string; status: string; trigger: string };
      // Nothing left due after this run: the scheduler waits for the next minute.
      expect(body).toMatchObject({ status: "done", trigger: "scheduler", algorithmVersion: ALGORITHM_VERSION, more: false });
      expect(await db("audit_events").where({ request_id: "route-test-right" }).first()).toMatchObject({ action: "compute.run", actor_role: "scheduler", target_id: body.runId });
    } finally {
      vi.doUnmock("@/lib/db/knex");
      delete process.env.CORVANE_SCHEDULER_SECRET;
    }
  });
});

describe("device clock corrected backwards", () => {
  it("computes the stay instead of failing when a clock step re-times beats onto earlier ones (source: DOMAIN §4, §6.7 clock step)", async () => {
    const admitted = new Date(Date.UTC(2026, 10, 20, 0, 0));
    const discharged = new Date(admitted.getTime() + 2 * HOUR);
    const { stayId, deviceId } = await makeStay("4W", admitted, discharged);
    const sim = simulateHealthySleep({ seed: 41, durationS: 7000, startS: admitted.getTime() / 1000 });
    // A correction one hour in, back by exactly two beats: the next beat lands on the same millisecond as a beat
    // already stored, and the following ones interleave with them.
    const stepAt = sim.times.findIndex((t) => t > admitted.getTime() / 1000 + 3600);
    const step = sim.times[stepAt]! - sim.times[stepAt - 2]!;
    for (let k = stepAt; k < sim.times.length; k++) sim.times[k] = sim.times[k]! - step;
    await insertBeats(deviceId, sim);
    const run = await runCompute({ trigger: "test", db, now: new Date(discharged.getTime() + HOUR) });
    expect(run.status).toBe("done");
    expect(run.failedStays).toBe(0);
    expect((await storedWindows(stayId, "short")).length).toBeGreaterThan(100);
  });
});
