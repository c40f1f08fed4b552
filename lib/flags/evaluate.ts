// Pure rule evaluation: one rule over a stay's windows in time order, as a small state machine. No database and no
// clock here, so every behaviour (duration, hysteresis, suppression on unusable windows) is testable on its own;
// lib/flags/evaluate-stay.ts turns the events into flags.
import type { Comparison, Rule } from "./rules.validation";

export type WindowGrade = "good" | "limited" | "unusable";

/** What the evaluator needs of one stored window. */
export interface EvalWindow {
  startMs: number;
  endMs: number;
  grade: WindowGrade;
  /** Index values (null where undefined); null when the window is unusable. */
  values: Readonly<Record<string, number | null>> | null;
  /** Share of the window covered by beats, 0–1 (from the window's quality). */
  coverage: number;
}

export interface RuleContext {
  /** The stay's baseline median of the rule's index; null while it has none. */
  baselineMedian: number | null;
  /** Length and spacing of the windows the rule reads, ms (5 min every minute, or 60 min every hour). */
  windowMs: number;
  strideMs: number;
}

/** `active`: the condition holds (a flag is standing for it); `lastMetEndMs` is the end of the last window that met it. */
export type RuleState = { phase: "idle" } | { phase: "active"; sinceMs: number; lastMetEndMs: number };

/** `met`: beyond the threshold; `recovered`: back past threshold + margin; `between`: neither; `invalid`: not judged. */
export type Verdict = "met" | "between" | "recovered" | "invalid";

export interface Judgement {
  verdict: Verdict;
  value: number | null;
  threshold: number | null;
}

export interface TriggerWindow {
  startMs: number;
  endMs: number;
  value: number;
}

export type RuleEvent =
  /** The condition has held for the rule's minimum duration: from the first window that met it to `atMs`. */
  | { type: "raise"; fromMs: number; atMs: number; threshold: number; extreme: number; windows: TriggerWindow[] }
  /** The condition ended: it last held until `toMs`; recovery was confirmed at `atMs`. */
  | { type: "clear"; toMs: number; atMs: number };

const isBelow = (c: Comparison) => c.type.startsWith("below");

/** Threshold and recovery level of a rule for a baseline median; null when it cannot be judged (no baseline). */
function thresholdsOf(rule: Rule, baselineMedian: number | null): { threshold: number; recovery: number; below: boolean } | null {
  const margin = rule.hysteresis.margin;
  if (rule.kind === "data_quality") return { threshold: rule.below, recovery: rule.below + margin, below: true };
  const c = rule.comparison;
  const below = isBelow(c);
  const signed = (x: number) => (below ? x + margin : x - margin);
  switch (c.type) {
    case "below_value":
    case "above_value":
      return { threshold: c.value, recovery: signed(c.value), below };
    case "below_baseline_minus":
      if (baselineMedian === null) return null;
      return { threshold: baselineMedian - c.amount, recovery: signed(baselineMedian - c.amount), below };
    case "above_baseline_plus":
      if (baselineMedian === null) return null;
      return { threshold: baselineMedian + c.amount, recovery: signed(baselineMedian + c.amount), below };
    case "below_baseline_percent":
    case "above_baseline_percent":
      // A percentage of a non-positive baseline has no meaning for these indices.
      if (baselineMedian === null || !(baselineMedian > 0)) return null;
      return {
        threshold: (baselineMedian * c.percent) / 100,
        recovery: (baselineMedian * (below ? c.percent + margin : c.percent - margin)) / 100,
        below,
      };
  }
}

/**
 * One window against one rule. Index rules do not judge unusable windows or windows without a value for the index
 * (evaluation is suppressed, DOMAIN §5.7); the coverage rule judges every window. Thresholds are strict: a value
 * exactly at the threshold does not meet it.
 */
export function judgeWindow(rule: Rule, w: EvalWindow, baselineMedian: number | null): Judgement {
  let value: number | null;
  if (rule.kind === "data_quality") value = w.coverage;
  else value = w.grade === "unusable" || w.values === null ? null : (w.values[rule.index] ?? null);
  if (value === null || !Number.isFinite(value)) return { verdict: "invalid", value: null, threshold: null };
  const t = thresholdsOf(rule, baselineMedian);
  if (!t) return { verdict: "invalid", value, threshold: null };
  const met = t.below ? value < t.threshold : value > t.threshold;
  const recovered = t.below ? value >= t.recovery : value <= t.recovery;
  return { verdict: met ? "met" : recovered ? "recovered" : "between", value, threshold: t.threshold };
}

/** The time the condition must span before a flag is raised, ms (see minDurationSchema). */
export function minSpanMs(rule: Rule, windowMs: number): number {
  return rule.minDuration.unit === "windows" ? rule.minDuration.value * windowMs : rule.minDuration.value * 60_000;
}

/**
 * How far before the first new window a re-evaluation must start so that it sees every window the rule's state can
 * depend on: a pending run shorter than the minimum duration, or a recovery run shorter than `clearWindows`.
 */
export function lookbackMs(rule: Rule, windowMs: number, strideMs: number): number {
  return minSpanMs(rule, windowMs) + windowMs + (rule.hysteresis.clearWindows + 2) * strideMs;
}

/**
 * Runs one rule over windows in ascending start order, from `initial`.
 * - idle → a run of consecutive windows that all meet the condition, with no gap in the window grid, raises once
 *   it spans the minimum duration. Any window that is not `met` (including an unusable one) ends the run.
 * - active → stays active until `clearWindows` consecutive windows are `recovered`; a `met`, `between` or
 *   `invalid` window restarts that count. So a value oscillating around the threshold keeps one condition.
 */
export function evaluateRule(
  rule: Rule,
  windows: readonly EvalWindow[],
  ctx: RuleContext,
  initial: RuleState,
): { events: RuleEvent[]; state: RuleState } {
  const events: RuleEvent[] = [];
  const span = minSpanMs(rule, ctx.windowMs);
  const below = rule.kind === "data_quality" || isBelow(rule.comparison);
  let state: RuleState = initial.phase === "active" ? { ...initial } : initial;
  let run: TriggerWindow[] = [];
  let runThreshold = 0;
  let recovered = 0;
  let prevStart: number | null = null;

  for (const w of windows) {
    const contiguous = prevStart !== null && w.startMs - prevStart === ctx.strideMs;
    if (prevStart !== null && w.startMs <= prevStart) throw new RangeError("windows must be in ascending start order without repeats");
    prevStart = w.startMs;
    const j = judgeWindow(rule, w, ctx.baselineMedian);

    if (state.phase === "idle") {
      if (j.verdict !== "met") {
        run = [];
        continue;
      }
      if (!contiguous) run = [];
      run.push({ startMs: w.startMs, endMs: w.endMs, value: j.value! });
      runThreshold = j.threshold!;
      if (w.endMs - run[0]!.startMs >= span) {
        const values = run.map((x) => x.value);
        events.push({
          type: "raise",
          fromMs: run[0]!.startMs,
          atMs: w.endMs,
          threshold: runThreshold,
          extreme: below ? Math.min(...values) : Math.max(...values),
          windows: run,
        });
        state = { phase: "active", sinceMs: run[0]!.startMs, lastMetEndMs: w.endMs };
        run = [];
        recovered = 0;
      }
      continue;
    }

    if (j.verdict === "met") {
      state.lastMetEndMs = w.endMs;
      recovered = 0;
    } else if (j.verdict === "recovered") {
      recovered = contiguous ? recovered + 1 : 1;
      if (recovered >= rule.hysteresis.clearWindows) {
        events.push({ type: "clear", toMs: state.lastMetEndMs, atMs: w.endMs });
        state = { phase: "idle" };
        recovered = 0;
      }
    } else {
      recovered = 0;
    }
  }
  return { events, state };
}
