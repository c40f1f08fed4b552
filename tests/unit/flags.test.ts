// Pure review-flag logic: the rule schema, one rule over a series of windows (duration, hysteresis, suppression), the
// night a flag counts against, and the personal baseline the rules compare with. No database here.
import { describe, expect, it } from "vitest";
import { chooseBaselineValues, MAD_TO_SD, robustBaseline } from "@/lib/compute/baseline";
import { evaluateRule, judgeWindow, type EvalWindow, type RuleState } from "@/lib/flags/evaluate";
import { nightOf } from "@/lib/flags/night";
import { FLAGGABLE_INDEX_KEYS, RESEARCH_INDEX_KEYS, ruleSchema, ruleSetDocumentSchema, type Rule } from "@/lib/flags/rules.validation";
import { DEFAULT_RULE_SET } from "@/seeds/02_rule_sets";

const MIN = 60_000;
const T0 = Date.UTC(2026, 10, 20, 3, 0); // any whole minute
const SHORT = { windowMs: 5 * MIN, strideMs: MIN };

/** Short windows every minute from T0, one per value (null = unusable window). */
function windows(values: (number | null)[], key = "hr", coverage: (i: number) => number = () => 1): EvalWindow[] {
  return values.map((v, i) => ({
    startMs: T0 + i * MIN,
    endMs: T0 + i * MIN + 5 * MIN,
    grade: v === null ? "unusable" : "good",
    values: v === null ? null : { [key]: v },
    coverage: coverage(i),
  }));
}

const hrAbove100 = (over: Partial<Pick<Rule, "minDuration" | "hysteresis">> = {}): Rule =>
  ruleSchema.parse({
    id: "hr-high",
    kind: "index",
    label: "HR above 100",
    index: "hr",
    comparison: { type: "above_value", value: 100 },
    minDuration: { unit: "minutes", value: 10 },
    severity: "watch",
    hysteresis: { margin: 5, clearWindows: 3 },
    ...over,
  });

const idle: RuleState = { phase: "idle" };
const repeat = <T,>(v: T, n: number): T[] => Array.from({ length: n }, () => v);

describe("rule schema", () => {
  it("accepts the seeded default rule set (source: seeds/02_rule_sets.ts, DOMAIN §1 triggers)", () => {
    expect(ruleSetDocumentSchema.safeParse(DEFAULT_RULE_SET).success).toBe(true);
  });

  it("refuses every research-only index, naming it as research-only (source: DOMAIN §2.7, §5.6)", () => {
    for (const key of RESEARCH_INDEX_KEYS) {
      const r = ruleSchema.safeParse({ ...DEFAULT_RULE_SET.rules[0], index: key });
      expect(r.success, key).toBe(false);
      expect(r.error!.issues[0]!.message).toMatch(/research-only/);
    }
    // The allowed list is exactly the engine's per-window keys, none of them research-only (lib/engine/indices.ts).
    expect(FLAGGABLE_INDEX_KEYS.some((k) => (RESEARCH_INDEX_KEYS as readonly string[]).includes(k))).toBe(false);
  });

  it("refuses unknown indices, unknown fields, repeated rule ids and impossible percentages (source: schema contract)", () => {
    const base = DEFAULT_RULE_SET.rules[0]!;
    expect(ruleSchema.safeParse({ ...base, index: "beta" }).error!.issues[0]!.message).toMatch(/not an index Corvane stores per window/);
    expect(ruleSchema.safeParse({ ...base, sound: "loud" }).success).toBe(false);
    expect(ruleSchema.safeParse({ ...base, comparison: { type: "below_baseline_percent", percent: 120 } }).success).toBe(false);
    expect(ruleSchema.safeParse({ ...base, severity: "critical" }).success).toBe(false);
    const twice = { ...DEFAULT_RULE_SET, rules: [base, base] };
    expect(ruleSetDocumentSchema.safeParse(twice).error!.issues[0]!.message).toMatch(/used twice/);
    expect(ruleSetDocumentSchema.safeParse({ ...DEFAULT_RULE_SET, nightStartsAt: "25:00" }).success).toBe(false);
  });
});

describe("judging one window", () => {
  it("uses strict thresholds and the margin for recovery (source: rule definition, analytic)", () => {
    const rule = hrAbove100();
    const at = (v: number) => judgeWindow(rule, windows([v])[0]!, null).verdict;
    expect(at(100)).toBe("between"); // exactly at the threshold: not met
    expect(at(100.01)).toBe("met");
    expect(at(95.01)).toBe("between");
    expect(at(95)).toBe("recovered"); // threshold − margin
  });

  it("computes percentage-of-baseline thresholds and needs a baseline (source: analytic)", () => {
    const sdnnHalf = DEFAULT_RULE_SET.rules[1]!; // SDNN below 50 % of baseline, recovery at 60 %
    const w = (v: number) => windows([v], "sdnn")[0]!;
    expect(judgeWindow(sdnnHalf, w(19.99), 40)).toMatchObject({ verdict: "met", threshold: 20 });
    expect(judgeWindow(sdnnHalf, w(20), 40).verdict).toBe("between");
    expect(judgeWindow(sdnnHalf, w(24), 40).verdict).toBe("recovered");
    expect(judgeWindow(sdnnHalf, w(5), null).verdict).toBe("invalid"); // no baseline yet: not judged
  });

  it("does not judge an unusable window for an index, but judges its coverage (source: DOMAIN §1 trigger c, §5.7)", () => {
    const [unusable] = windows([null], "hr", () => 0.4);
    expect(judgeWindow(hrAbove100(), unusable!, null).verdict).toBe("invalid");
    expect(judgeWindow(DEFAULT_RULE_SET.rules[2]!, unusable!, null).verdict).toBe("met");
  });
});

describe("one rule over a night", () => {
  it("raises once the condition spans the minimum duration: 3 windows of 5 min = 15 min = 11 one-minute steps (source: DOMAIN §1 '≥ 3 consecutive valid 5-min windows')", () => {
    const alpha1 = DEFAULT_RULE_SET.rules[0]!; // α1 below baseline − 0.3
    const ctx = { ...SHORT, baselineMedian: 1.1 };
    const ten = evaluateRule(alpha1, windows([...repeat(1.2, 5), ...repeat(0.7, 10)], "dfa_alpha1"), ctx, idle);
    expect(ten.events).toEqual([]);
    const eleven = evaluateRule(alpha1, windows([...repeat(1.2, 5), ...repeat(0.7, 11)], "dfa_alpha1"), ctx, idle);
    expect(eleven.events).toHaveLength(1);
    expect(eleven.events[0]).toMatchObject({ type: "raise", fromMs: T0 + 5 * MIN, atMs: T0 + 20 * MIN, extreme: 0.7, threshold: 1.1 - 0.3 });
    expect(eleven.state).toEqual({ phase: "active", sinceMs: T0 + 5 * MIN, lastMetEndMs: T0 + 20 * MIN });
  });

  it("with hysteresis, a value hovering at the threshold keeps one condition; without it, the same values raise again and again (source: DOMAIN §1 'with hysteresis', alarm-fatigue practice)", () => {
    // Six minutes just above 100, one just below, over and over for 3 hours.
    const hovering = Array.from({ length: 180 }, (_, i) => (i % 7 === 6 ? 99.5 : 100.5));
    const withHysteresis = evaluateRule(hrAbove100({ minDuration: { unit: "windows", value: 1 } }), windows(hovering), { ...SHORT, baselineMedian: null }, idle);
    expect(withHysteresis.events.map((e) => e.type)).toEqual(["raise"]);
    const without = evaluateRule(hrAbove100({ minDuration: { unit: "windows", value: 1 }, hysteresis: { margin: 0, clearWindows: 1 } }), windows(hovering), { ...SHORT, baselineMedian: null }, idle);
    expect(without.events.filter((e) => e.type === "raise").length).toBeGreaterThan(20);
  });

  it("ends the condition after clearWindows recovered windows in a row, at the end of the last window that met it (source: rule definition)", () => {
    const values = [...repeat(110, 8), 97, ...repeat(90, 2), 110, ...repeat(90, 3), ...repeat(90, 2)];
    const r = evaluateRule(hrAbove100(), windows(values), { ...SHORT, baselineMedian: null }, idle);
    expect(r.events.map((e) => e.type)).toEqual(["raise", "clear"]);
    // The 110 at index 11 restarted the recovery count; recovery completes at index 14.
    expect(r.events[1]).toEqual({ type: "clear", toMs: T0 + 11 * MIN + 5 * MIN, atMs: T0 + 14 * MIN + 5 * MIN });
  });

  it("suppresses index rules on unusable windows: an unusable window breaks a run and never completes one (source: DOMAIN §5.7)", () => {
    const broken = [...repeat(110, 5), null, ...repeat(110, 5), null, ...repeat(110, 5)];
    expect(evaluateRule(hrAbove100(), windows(broken), { ...SHORT, baselineMedian: null }, idle).events).toEqual([]);
    const allUnusable = windows(repeat(null, 60), "hr", () => 0.5);
    expect(evaluateRule(hrAbove100(), allUnusable, { ...SHORT, baselineMedian: null }, idle).events).toEqual([]);
    // The data-quality rule is the one that speaks for those windows: coverage 50 % for ≥ 10 min.
    expect(evaluateRule(DEFAULT_RULE_SET.rules[2]!, allUnusable, { ...SHORT, baselineMedian: null }, idle).events[0]).toMatchObject({ type: "raise", fromMs: T0, atMs: T0 + 10 * MIN });
  });

  it("treats a hole in the window grid as a break (source: rule definition, consecutive windows)", () => {
    const whole = windows(repeat(110, 10)); // spans 14 min
    expect(evaluateRule(hrAbove100(), whole, { ...SHORT, baselineMedian: null }, idle).events).toHaveLength(1);
    const holed = whole.filter((_, i) => i !== 4); // two runs of 8 and 9 min
    expect(evaluateRule(hrAbove100(), holed, { ...SHORT, baselineMedian: null }, idle).events).toEqual([]);
  });

  it("continues a condition that was active before the evaluated windows (source: rule definition)", () => {
    const start: RuleState = { phase: "active", sinceMs: T0 - 60 * MIN, lastMetEndMs: T0 - 2 * MIN };
    const r = evaluateRule(hrAbove100(), windows(repeat(90, 3)), { ...SHORT, baselineMedian: null }, start);
    expect(r.events).toEqual([{ type: "clear", toMs: T0 - 2 * MIN, atMs: T0 + 2 * MIN + 5 * MIN }]);
  });
});

describe("the night a flag counts against", () => {
  const NY = "America/New_York";
  it("runs noon to noon in local time: 25 h across fall-back, 23 h across spring-forward (source: DOMAIN §4; IANA tz rules for 2026)", () => {
    const fall = nightOf(new Date("2026-11-01T07:30:00Z"), NY, "12:00"); // 02:30 EST, after the clocks went back
    expect(fall.from.toISOString()).toBe("2026-10-31T16:00:00.000Z"); // 12:00 EDT (UTC−4)
    expect(fall.to.toISOString()).toBe("2026-11-01T17:00:00.000Z"); // 12:00 EST (UTC−5)
    expect(fall.to.getTime() - fall.from.getTime()).toBe(25 * 3_600_000);
    const spring = nightOf(new Date("2026-03-08T06:00:00Z"), NY, "12:00");
    expect(spring.from.toISOString()).toBe("2026-03-07T17:00:00.000Z");
    expect(spring.to.getTime() - spring.from.getTime()).toBe(23 * 3_600_000);
  });

  it("puts an instant exactly at the start in the new night (source: half-open interval)", () => {
    const n = nightOf(new Date("2026-10-31T16:00:00Z"), NY, "12:00");
    expect(n.from.toISOString()).toBe("2026-10-31T16:00:00.000Z");
    expect(() => nightOf(new Date(), NY, "7:00")).toThrow(/HH:MM/);
  });
});

describe("personal baseline", () => {
  it("is the median and MAD × 1.4826 (source: analytic; 1.4826 = 1/Φ⁻¹(3/4), common practice)", () => {
    expect(robustBaseline([1, 2, 3, 4, 100])).toEqual({ median: 3, spread: 1 * MAD_TO_SD }); // deviations 2 1 0 1 97
    expect(robustBaseline([10, 20])).toEqual({ median: 15, spread: 5 * MAD_TO_SD });
    expect(() => robustBaseline([])).toThrow(RangeError);
  });

  it("waits for the period, then uses its valid windows; extends to the minimum; else records too few (source: baseline definition, lib/compute/baseline.ts)", () => {
    const H = 3_600_000;
    const pts = (n: number, from = 0, stepMs = MIN) => Array.from({ length: n }, (_, i) => ({ startMs: from + i * stepMs, endMs: from + i * stepMs + 5 * MIN, value: i }));
    expect(chooseBaselineValues(pts(50), 0, 0.5 * H, 1, 30)).toEqual({ status: "wait" });
    const ready = chooseBaselineValues(pts(90), 0, 1.5 * H, 1, 30);
    expect(ready).toMatchObject({ status: "ready", fromMs: 0, toMs: 59 * MIN + 5 * MIN });
    expect(ready.status === "ready" && ready.values.length).toBe(60); // only the first hour
    // 10 valid windows in the first hour, more later: the first 30 values are taken.
    const sparse = [...pts(10, 0, 6 * MIN), ...pts(40, H)];
    const extended = chooseBaselineValues(sparse, 0, 2 * H, 1, 30);
    expect(extended.status === "ready" && extended.values.length).toBe(30);
    expect(chooseBaselineValues(pts(10, 0, 6 * MIN), 0, 1.5 * H, 1, 30)).toEqual({ status: "wait" });
    expect(chooseBaselineValues(pts(10, 0, 6 * MIN), 0, 2 * H, 1, 30)).toMatchObject({ status: "insufficient", n: 10 });
  });
});
