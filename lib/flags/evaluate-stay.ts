// Raises, re-activates and ends review flags for one stay after new windows are stored, in the caller's transaction.
// The state of each rule is rebuilt from the database (the rule's latest flag) and a short look-back over stored
// windows, so the result does not depend on how the windows were split between compute runs.
import type { Knex } from "knex";
import type { FlagRow, WindowKind } from "@/lib/db/tables";
import { WINDOW_DEFAULTS } from "@/lib/engine/windows";
import { evaluateRule, lookbackMs, type EvalWindow, type RuleEvent, type RuleState, type WindowGrade } from "./evaluate";
import { nightOf } from "./night";
import type { RuleSet } from "./rule-sets";
import { windowKindOf, type Rule } from "./rules.validation";

const GRID: Record<WindowKind, { windowMs: number; strideMs: number }> = {
  short: { windowMs: WINDOW_DEFAULTS.shortWindowS * 1000, strideMs: WINDOW_DEFAULTS.shortStrideS * 1000 },
  long: { windowMs: WINDOW_DEFAULTS.longWindowS * 1000, strideMs: WINDOW_DEFAULTS.longStrideS * 1000 },
};

/** Trigger windows kept in a flag's details (a 15-min condition on 1-min steps has 11). */
const MAX_TRIGGER_WINDOWS = 120;

const ruleWindowKind = (rule: Rule): WindowKind => (rule.kind === "data_quality" ? "short" : windowKindOf(rule.index));

export interface StayFlagInput {
  stayId: string;
  unitId: string;
  /** The unit's IANA zone: a night for the cap is counted in local time. */
  timeZone: string;
  algorithmVersion: string;
  ruleSet: RuleSet;
  /** Start of the earliest window of each kind stored since the last evaluation; null when none is new. */
  newFrom: Record<WindowKind, Date | null>;
  /** Windows starting at or before this were already judged under an older algorithm version: not judged again. */
  judgedUpTo: Record<WindowKind, Date | null>;
}

export interface StayFlagOutcome {
  raised: string[];
  reactivated: string[];
  cleared: string[];
  /** Conditions that met a rule but raised no flag because the patient's flags for that night reached the cap. */
  capped: number;
}

const iso = (ms: number) => new Date(ms).toISOString();

function triggerDetails(e: Extract<RuleEvent, { type: "raise" }>) {
  return {
    threshold: e.threshold,
    extreme: e.extreme,
    raised_on_window_end: iso(e.atMs),
    trigger_windows: e.windows.slice(0, MAX_TRIGGER_WINDOWS).map((w) => ({ start: iso(w.startMs), end: iso(w.endMs), value: w.value })),
  };
}

export async function evaluateStayFlags(trx: Knex.Transaction, input: StayFlagInput): Promise<StayFlagOutcome> {
  const out: StayFlagOutcome = { raised: [], reactivated: [], cleared: [], capped: 0 };
  const { document } = input.ruleSet;
  const baselines = new Map(
    (await trx("baselines").where({ stay_id: input.stayId, algorithm_version: input.algorithmVersion }).whereNotNull("median").select("index_key", "median", "spread", "n_windows"))
      .map((b) => [b.index_key, b]),
  );
  const latest = new Map<string, FlagRow>(
    (await trx("flags")
      .distinctOn("rule_id")
      .where({ stay_id: input.stayId })
      .orderBy([{ column: "rule_id" }, { column: "condition_from", order: "desc" }, { column: "raised_at", order: "desc" }])
      .select("*")).map((f) => [f.rule_id, f]),
  );

  for (const kind of ["short", "long"] as const) {
    const newFrom = input.newFrom[kind];
    const rules = document.rules.filter((r) => ruleWindowKind(r) === kind);
    if (!newFrom || !rules.length) continue;
    const { windowMs, strideMs } = GRID[kind];
    const floor = input.judgedUpTo[kind];

    const plans = rules.map((rule) => {
      let fromMs = newFrom.getTime() - lookbackMs(rule, windowMs, strideMs);
      if (floor) fromMs = Math.max(fromMs, floor.getTime() + 1);
      let initial: RuleState = { phase: "idle" };
      const f = latest.get(rule.id);
      if (f && f.condition_to === null) {
        const lastMet = typeof f.details.last_met_end === "string" ? Date.parse(f.details.last_met_end) : f.condition_from.getTime();
        initial = { phase: "active", sinceMs: f.condition_from.getTime(), lastMetEndMs: lastMet };
        // Windows up to the last one that met the condition are already accounted for.
        fromMs = Math.max(fromMs, lastMet - windowMs + 1);
      } else if (f && f.condition_to) {
        // An ended condition is never raised again from its own windows.
        fromMs = Math.max(fromMs, f.condition_to.getTime() - windowMs + 1);
      }
      return { rule, fromMs, initial };
    });

    const rows = await trx("index_windows")
      .where({ stay_id: input.stayId, algorithm_version: input.algorithmVersion, kind })
      .where("window_start", ">=", new Date(Math.min(...plans.map((p) => p.fromMs))))
      .orderBy("window_start")
      .select<{ window_start: Date; window_end: Date; grade: WindowGrade; values: Record<string, number | null> | null; coverage: number }[]>(
        "window_start", "window_end", "grade", "values", trx.raw("(quality ->> 'coverage')::float8 AS coverage"),
      );
    const windows: EvalWindow[] = rows.map((r) => ({ startMs: r.window_start.getTime(), endMs: r.window_end.getTime(), grade: r.grade, values: r.values, coverage: r.coverage }));

    for (const { rule, fromMs, initial } of plans) {
      const baseline = rule.kind === "index" ? (baselines.get(rule.index) ?? null) : null;
      const { events, state } = evaluateRule(rule, windows.filter((w) => w.startMs >= fromMs), { baselineMedian: baseline?.median ?? null, windowMs, strideMs }, initial);
      // The flag standing for the condition while it holds (none when the cap stopped it).
      let current: FlagRow | null = initial.phase === "active" ? (latest.get(rule.id) ?? null) : null;
      for (const e of events) {
        if (e.type === "clear") {
          if (!current) continue;
          const details = { ...current.details, last_met_end: iso(e.toMs), cleared_on_window_end: iso(e.atMs) };
          const [row] = await trx("flags").where({ id: current.id }).update({ condition_to: new Date(e.toMs), details }).returning("*");
          latest.set(rule.id, row!);
          out.cleared.push(row!.id);
          current = null;
          continue;
        }
        const prev = latest.get(rule.id);
        if (prev && prev.state === "open") {
          // Nobody has looked at the previous flag yet: the recurrence joins it instead of adding a second one.
          const recurrences = Array.isArray(prev.details.recurrences) ? prev.details.recurrences : [];
          const details = { ...prev.details, last_met_end: iso(e.atMs), recurrences: [...recurrences, { from: iso(e.fromMs), ...triggerDetails(e) }] };
          const [row] = await trx("flags").where({ id: prev.id }).update({ condition_to: null, details }).returning("*");
          latest.set(rule.id, row!);
          out.reactivated.push(row!.id);
          current = row!;
          continue;
        }
        const night = nightOf(new Date(e.fromMs), input.timeZone, document.nightStartsAt);
        const counted = await trx("flags")
          .where({ stay_id: input.stayId })
          .where("condition_from", ">=", night.from)
          .where("condition_from", "<", night.to)
          .count<{ n: string }[]>("* as n");
        if (Number(counted[0]!.n) >= document.maxFlagsPerNight) {
          // A capped condition is found again by every later look-back while it lasts; count it once, when the
          // window that completed it is new.
          if (e.atMs - windowMs >= newFrom.getTime()) out.capped += 1;
          current = null;
          continue;
        }
        const [row] = await trx("flags")
          .insert({
            stay_id: input.stayId,
            unit_id: input.unitId,
            rule_set_id: input.ruleSet.id,
            rule_set_version: input.ruleSet.version,
            rule_id: rule.id,
            severity: rule.severity,
            condition_from: new Date(e.fromMs),
            condition_to: null,
            // A recurrence after the previous flag was acknowledged, escalated or resolved is a new flag, linked.
            previous_flag_id: prev?.id ?? null,
            details: {
              rule,
              window_kind: kind,
              algorithm_version: input.algorithmVersion,
              baseline: baseline ? { median: baseline.median, spread: baseline.spread, n_windows: baseline.n_windows } : null,
              last_met_end: iso(e.atMs),
              ...triggerDetails(e),
            },
          })
          .returning("*");
        latest.set(rule.id, row!);
        out.raised.push(row!.id);
        current = row!;
      }
      if (state.phase === "active" && current && current.details.last_met_end !== iso(state.lastMetEndMs)) {
        const details = { ...current.details, last_met_end: iso(state.lastMetEndMs) };
        const [row] = await trx("flags").where({ id: current.id }).update({ details }).returning("*");
        latest.set(rule.id, row!);
      }
    }
  }
  return out;
}
