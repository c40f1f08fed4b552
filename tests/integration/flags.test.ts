// Review flags on real PostgreSQL: the seeded default rule set, flags raised end to end from synthetic beats (loss
// of complexity yes, healthy sleep no), and — on windows written directly, so each value is chosen — hysteresis
// across runs, suppression on unusable windows, the cap per night, recurrence and re-activation, rule-set versions
// and the refusal of research-only indices.
import type { Knex } from "knex";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { runCompute } from "@/lib/compute/run";
import type { IndexWindowInsert } from "@/lib/db/tables";
import { simulateComplexityLoss, simulateHealthySleep, type SimulatedBeats } from "@/lib/engine/simulate";
import { ALGORITHM_VERSION } from "@/lib/engine/version";
import { evaluateStayFlags } from "@/lib/flags/evaluate-stay";
import { RuleSetInvalidError, rulesInForce, saveRuleSetVersion, type RuleSet } from "@/lib/flags/rule-sets";
import type { RuleSetDocument } from "@/lib/flags/rules.validation";
import { seed } from "@/seeds/01_demo";
import { DEFAULT_RULE_SET, seedRuleSets } from "@/seeds/02_rule_sets";
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

const makeStay = (unitId: string, admittedAt: Date, dischargedAt: Date) => makeTestStay(db, unitId, admittedAt, dischargedAt);
const insertBeats = (deviceId: string, sim: SimulatedBeats) => insertTestBeats(db, deviceId, sim);

const unitId = async (code: string) => (await db("units").where({ code }).first("id"))!.id;
const flagsOf = (stayId: string) => db("flags").where({ stay_id: stayId }).orderBy("condition_from").select("*");

describe("the seeded rule sets", () => {
  it("gives each unit version 1 of the DEFAULT set, once, audited (source: issue 4 item 6)", async () => {
    expect(await seedRuleSets(db)).toEqual({ inserted: 0 });
    const sets = await db("rule_sets").orderBy("unit_id").select("*");
    expect(sets).toHaveLength(2);
    for (const s of sets) {
      expect(s).toMatchObject({ version: 1, is_default: true });
      expect(s.name).toMatch(/^DEFAULT .*local protocol/);
      expect(s.note).toMatch(/not a clinical protocol/);
      expect(s.rules).toEqual(DEFAULT_RULE_SET);
    }
    expect(await db("audit_events").where({ action: "rule_set.create" }).count<{ n: string }[]>("* as n")).toEqual([{ n: "2" }]);
  });
});

describe("flags from beats, end to end", () => {
  it("raises SDNN (rigid) and α1 + SDNN (decorrelated) flags for loss of complexity, and none for healthy sleep (source: DOMAIN §6.2 table, §1 triggers)", async () => {
    const ward = await unitId("4W");
    const admitted = new Date("2025-06-01T02:00:00Z");
    const discharged = new Date(admitted.getTime() + 4 * HOUR);
    const startS = admitted.getTime() / 1000;
    // Baseline over the first hour; the drift ramps from 1.25 h to 2.75 h (DOMAIN §6.2: over 2–6 h, shortened here).
    const ramp = { rampStartS: 4500, rampDurationS: 5400, durationS: 4 * 3600 + 60, startS };
    const healthy = await makeStay(ward, admitted, discharged);
    const rigid = await makeStay(ward, admitted, discharged);
    const decorrelated = await makeStay(ward, admitted, discharged);
    await insertBeats(healthy.deviceId, simulateHealthySleep({ seed: 71, durationS: 4 * 3600 + 60, startS }));
    await insertBeats(rigid.deviceId, simulateComplexityLoss({ seed: 72, ...ramp, betaEnd: 2 }));
    await insertBeats(decorrelated.deviceId, simulateComplexityLoss({ seed: 73, ...ramp, betaEnd: 0 }));

    const run = await runCompute({ trigger: "test", db, now: new Date(discharged.getTime() + HOUR), baseline: { hours: 1, minWindows: 30 } });
    expect(run).toMatchObject({ status: "done", stays: 3, flagsRaised: 3 });

    expect(await flagsOf(healthy.stayId)).toEqual([]);
    // Rigid: SDNN 48 → 9 ms while α1 rises (1.09 → 1.44), so only the SDNN rule fires.
    const [sdnn, ...rest] = await flagsOf(rigid.stayId);
    expect(rest).toEqual([]);
    expect(sdnn).toMatchObject({ rule_id: "sdnn-below-half-baseline", severity: "watch", state: "open", rule_set_version: 1, previous_flag_id: null, condition_to: null });
    expect(sdnn!.condition_from.getTime()).toBeGreaterThan(admitted.getTime() + 4500_000);
    const base = await db("baselines").where({ stay_id: rigid.stayId, index_key: "sdnn", algorithm_version: ALGORITHM_VERSION }).first();
    const details = sdnn!.details as { baseline: { median: number }; threshold: number; trigger_windows: { value: number }[] };
    expect(details.baseline.median).toBe(base!.median);
    expect(details.threshold).toBe(base!.median! * 0.5);
    expect(details.trigger_windows.length).toBe(11); // 15 min of 5-min windows every minute
    expect(details.trigger_windows.every((w) => w.value < details.threshold)).toBe(true);
    // Decorrelated: α1 falls to about 0.6 (review) and SDNN falls too (watch).
    const dec = await flagsOf(decorrelated.stayId);
    expect(dec.map((f) => [f.rule_id, f.severity]).sort()).toEqual([["alpha1-below-baseline", "review"], ["sdnn-below-half-baseline", "watch"]]);
    const audit = await db("audit_events").where({ action: "compute.run", target_id: run.runId }).first();
    expect([...(audit!.detail.raised_flag_ids as string[])].sort()).toEqual([sdnn!.id, ...dec.map((f) => f.id)].sort());
  });
});

describe("flag rules on chosen windows", () => {
  const hrRule = (threshold: number) => ({
    id: "hr-high",
    kind: "index" as const,
    label: `Heart rate above ${threshold}/min for 10 minutes`,
    index: "hr" as const,
    comparison: { type: "above_value" as const, value: threshold },
    minDuration: { unit: "minutes" as const, value: 10 },
    severity: "watch" as const,
    hysteresis: { margin: 5, clearWindows: 3 },
  });
  const doc = (threshold: number): RuleSetDocument => ({ rules: [hrRule(threshold), DEFAULT_RULE_SET.rules[2]!], maxFlagsPerNight: 2, nightStartsAt: "12:00" });
  let unit: string;
  let ruleSet: RuleSet;
  const audit = { actor: { userId: null, email: null, role: "system" }, requestId: "test", clientAddress: null };

  beforeAll(async () => {
    const [row] = await db("units").insert({ code: "TX", name: "Test unit", kind: "adult", time_zone: NY }).returning("id");
    unit = row!.id;
    ruleSet = await db.transaction((trx) => saveRuleSetVersion(trx, { unitId: unit, name: "Test rules", document: doc(100), audit }));
  });

  /** Short windows every minute from `from` (null = unusable), written as the compute job would. */
  async function putWindows(stayId: string, from: Date, hr: (number | null)[], coverage = 1, version = ALGORITHM_VERSION) {
    const rows: IndexWindowInsert[] = hr.map((v, i) => ({
      stay_id: stayId,
      kind: "short",
      window_start: new Date(from.getTime() + i * MIN),
      window_end: new Date(from.getTime() + i * MIN + 5 * MIN),
      algorithm_version: version,
      params_hash: "chosen-by-test",
      grade: v === null ? "unusable" : "good",
      quality: { coverage },
      values: v === null ? null : { hr: v },
      reasons: {},
      mse: null,
      baseline_delta: null,
      compute_run_id: null,
    }));
    await db("index_windows").insert(rows);
    return new Date(from.getTime() + hr.length * MIN);
  }

  function evaluate(stayId: string, newFrom: Date, rs = ruleSet, judgedUpTo: Date | null = null) {
    return db.transaction((trx) =>
      evaluateStayFlags(trx, { stayId, unitId: unit, timeZone: NY, algorithmVersion: ALGORITHM_VERSION, ruleSet: rs, newFrom: { short: newFrom, long: null }, judgedUpTo: { short: judgedUpTo, long: null } }),
    );
  }

  const stayAt = async (iso: string) => (await makeStay(unit, new Date(iso), new Date(new Date(iso).getTime() + 24 * HOUR))).stayId;
  const rep = <T,>(v: T, n: number): T[] => Array.from({ length: n }, () => v);
  /** One episode: 8 windows above 100 (raised after 10 min), then 4 at 90 (ended after 3). */
  const episode = [...rep(110, 8), ...rep(90, 4)];

  it("keeps one flag for a value hovering at the threshold, evaluated piece by piece as windows arrive (source: DOMAIN §1 'with hysteresis')", async () => {
    const stay = await stayAt("2025-07-10T01:00:00Z");
    const hovering = [...rep(102, 10), ...Array.from({ length: 120 }, (_, i) => (i % 7 === 6 ? 99.5 : 100.5))];
    let t = new Date("2025-07-10T01:00:00Z");
    for (let i = 0; i < hovering.length; i += 13) {
      const from = t;
      t = await putWindows(stay, from, hovering.slice(i, i + 13));
      await evaluate(stay, from);
    }
    const flags = await flagsOf(stay);
    expect(flags).toHaveLength(1);
    expect(flags[0]).toMatchObject({ rule_id: "hr-high", condition_to: null, state: "open" });
    // The last window (100.5) met the condition: it is still standing at the end of that window.
    const lastMetEnd = new Date(t.getTime() - MIN + 5 * MIN).toISOString();
    expect(flags[0]!.details.last_met_end).toBe(lastMetEnd);
    // Recovery past threshold − margin (95) for 3 windows ends it, at the end of the last window that met it.
    await putWindows(stay, t, [94, 94, 94]);
    const out = await evaluate(stay, t);
    expect(out.cleared).toEqual([flags[0]!.id]);
    expect((await flagsOf(stay))[0]!.condition_to!.toISOString()).toBe(lastMetEnd);
  });

  it("judges no index on unusable windows, which still count for the coverage rule (source: DOMAIN §5.7, §1 trigger c)", async () => {
    const stay = await stayAt("2025-07-11T01:00:00Z");
    const from = new Date("2025-07-11T01:00:00Z");
    // Runs of 5 high windows (9 min) broken by unusable ones never reach 10 min.
    let t = await putWindows(stay, from, [...rep(110, 5), null, ...rep(110, 5), null, ...rep(110, 5)], 0.95);
    await evaluate(stay, from);
    expect(await flagsOf(stay)).toEqual([]);
    // 15 unusable windows at 50 % coverage: a data-quality flag, no heart-rate flag.
    const gap = t;
    t = await putWindows(stay, gap, rep(null, 15), 0.5);
    await evaluate(stay, gap);
    const flags = await flagsOf(stay);
    expect(flags.map((f) => f.rule_id)).toEqual(["coverage-below-80"]);
    expect(flags[0]!.condition_from.toISOString()).toBe(gap.toISOString());
  });

  it("raises at most maxFlagsPerNight new flags per patient per local night, then again the next night (source: DOMAIN §1 alarm fatigue)", async () => {
    const stay = await stayAt("2025-06-30T20:00:00Z");
    // 22:00, 22:20 and 22:40 EDT on 30 June: one night (noon to noon); 13:00 EDT on 1 July: the next.
    const starts = ["2025-07-01T02:00:00Z", "2025-07-01T02:20:00Z", "2025-07-01T02:40:00Z", "2025-07-01T17:00:00Z"].map((s) => new Date(s));
    const outcomes = [];
    for (const from of starts) {
      await putWindows(stay, from, episode);
      outcomes.push(await evaluate(stay, from));
      // Someone looked at each flag, so the next episode is a new flag, not a recurrence of an unseen one.
      await db("flags").where({ stay_id: stay, state: "open" }).update({ state: "acknowledged" });
    }
    expect(outcomes.map((o) => [o.raised.length, o.capped])).toEqual([[1, 0], [1, 0], [0, 1], [1, 0]]);
    const flags = await flagsOf(stay);
    expect(flags.map((f) => f.condition_from.toISOString())).toEqual(["2025-07-01T02:00:00.000Z", "2025-07-01T02:20:00.000Z", "2025-07-01T17:00:00.000Z"]);
    // Each later flag of the rule links to the one before it.
    expect(flags[1]!.previous_flag_id).toBe(flags[0]!.id);
    expect(flags[2]!.previous_flag_id).toBe(flags[1]!.id);
  });

  it("re-activates a flag nobody has looked at yet, and opens a new, linked flag when the condition recurs after it was resolved (source: DOMAIN §1 flag life cycle; GLOSSARY)", async () => {
    const stay = await stayAt("2025-07-12T01:00:00Z");
    const at = (m: number) => new Date(Date.parse("2025-07-12T01:00:00Z") + m * MIN);
    await putWindows(stay, at(0), episode);
    const first = await evaluate(stay, at(0));
    expect(first.raised).toHaveLength(1);
    expect(first.cleared).toEqual(first.raised);
    // Recurs while the flag is still open: the same flag holds both episodes.
    await putWindows(stay, at(20), [...rep(110, 8)]);
    const second = await evaluate(stay, at(20));
    expect(second.reactivated).toEqual(first.raised);
    let flags = await flagsOf(stay);
    expect(flags).toHaveLength(1);
    expect(flags[0]).toMatchObject({ state: "open", condition_to: null });
    expect(flags[0]!.details.recurrences).toHaveLength(1);
    expect(flags[0]!.condition_from.toISOString()).toBe(at(0).toISOString());
    // Ends, is resolved, recurs: a new flag, linked to the resolved one.
    await putWindows(stay, at(28), rep(90, 4));
    await evaluate(stay, at(28));
    await db("flags").where({ id: flags[0]!.id }).update({ state: "resolved" });
    await putWindows(stay, at(40), episode);
    const third = await evaluate(stay, at(40));
    expect(third.raised).toHaveLength(1);
    flags = await flagsOf(stay);
    expect(flags).toHaveLength(2);
    expect(flags[1]).toMatchObject({ id: third.raised[0], previous_flag_id: flags[0]!.id, state: "open" });
  });

  it("does not judge again history already judged under an older algorithm version (source: issue 4 item 4, DOMAIN §4 hazard 'an algorithm change that silently alters values')", async () => {
    const stay = await stayAt("2025-07-13T01:00:00Z");
    const from = new Date("2025-07-13T01:00:00Z");
    // The old engine saw nothing; the new one finds the heart rate high over the same 20 minutes and beyond.
    await putWindows(stay, from, rep(90, 20), 1, "0.9.0-old");
    await putWindows(stay, from, rep(110, 30));
    await evaluate(stay, from, ruleSet, new Date(from.getTime() + 19 * MIN));
    const flags = await flagsOf(stay);
    expect(flags).toHaveLength(1);
    expect(flags[0]!.condition_from.toISOString()).toBe(new Date(from.getTime() + 20 * MIN).toISOString());
  });

  it("versions rule sets: an edit is a new version, and each flag keeps the version that raised it (source: issue 4 item 6)", async () => {
    const earlier = await db("flags").where({ rule_set_id: ruleSet.id }).select("id");
    expect(earlier.length).toBeGreaterThan(0);
    const v2 = await db.transaction((trx) => saveRuleSetVersion(trx, { unitId: unit, name: "Test rules", document: doc(120), audit }));
    expect(v2.version).toBe(2);
    expect((await rulesInForce(db, [unit])).ruleSets.get(unit)).toMatchObject({ id: v2.id, version: 2 });
    const stay = await stayAt("2025-07-14T01:00:00Z");
    const from = new Date("2025-07-14T01:00:00Z");
    await putWindows(stay, from, [...rep(115, 12), ...rep(125, 12)]);
    await evaluate(stay, from, v2);
    const flags = await flagsOf(stay);
    expect(flags).toHaveLength(1);
    expect(flags[0]).toMatchObject({ rule_set_id: v2.id, rule_set_version: 2 });
    expect(flags[0]!.condition_from.toISOString()).toBe(new Date(from.getTime() + 12 * MIN).toISOString());
    expect(await db("flags").whereIn("id", earlier.map((f) => f.id)).distinct("rule_set_version").pluck("rule_set_version")).toEqual([1]);
    expect(await db("rule_sets").where({ unit_id: unit }).orderBy("version").pluck("version")).toEqual([1, 2]);
  });

  it("refuses a rule on a research-only index and stores nothing (source: DOMAIN §2.7, §5.6)", async () => {
    const before = await db("audit_events").count<{ n: string }[]>("* as n");
    const bad = { ...doc(100), rules: [{ ...hrRule(100), index: "lyapunov" }] };
    await expect(db.transaction((trx) => saveRuleSetVersion(trx, { unitId: unit, name: "Chaos", document: bad, audit }))).rejects.toThrow(RuleSetInvalidError);
    await expect(db.transaction((trx) => saveRuleSetVersion(trx, { unitId: unit, name: "Chaos", document: bad, audit }))).rejects.toThrow(/research-only/);
    expect(await db("rule_sets").where({ unit_id: unit }).count<{ n: string }[]>("* as n")).toEqual([{ n: "2" }]);
    expect(await db("audit_events").count<{ n: string }[]>("* as n")).toEqual(before);
  });
});
