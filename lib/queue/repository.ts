// The Review queue's data: a unit's flags still awaiting a decision or standing (open, acknowledged, escalated),
// oldest first, each with the time it has waited against the unit's acknowledgement target, its last transition,
// the flag it recurs after, and a small chart of the flagged span against the patient's own baseline. A handful of
// queries for the whole unit, whatever the number of flags (no query per flag).
import "server-only";
import type { Knex } from "knex";
import { db as defaultDb } from "@/lib/db/knex";
import type { AckReason, FlagState, WindowKind } from "@/lib/db/tables";
import { ALGORITHM_VERSION } from "@/lib/engine/version";
import { QUEUE_STATES, type QueueFilters } from "./queue.validation";

const MIN = 60_000;
/** The chart shows the flagged span with this much before and after it (issue 6: "flagged window against baseline"). */
export const CHART_MARGIN_MS = 30 * MIN;
/** A condition holding for hours is charted over its first 3 h only: the queue's chart is a glance, not the Night
 *  review (which shows the whole night). */
export const CHART_MAX_SPAN_MS = 3 * 60 * MIN;

export interface QueueTransitionDTO {
  from: FlagState;
  to: FlagState;
  at: string;
  /** null for an automatic transition (the reminder job's escalation). */
  actorName: string | null;
  reason: AckReason | null;
  note: string | null;
  recipientName: string | null;
}

export interface QueueChartDTO {
  /** What the line shows: an index key, or "coverage" for a data-quality rule. */
  key: string;
  /** Window ends, epoch s, and the value of each window (null where the window is unusable or has no value). */
  t: number[];
  v: (number | null)[];
  /** The span drawn, epoch s: the condition ± 30 min (its first 3 h when it holds longer). */
  from: number;
  to: number;
  /** The condition, epoch s; `conditionTo` null while it holds. */
  conditionFrom: number;
  conditionTo: number | null;
  /** The patient's own baseline for the index (null for coverage, or while it is still being gathered). */
  baseline: { median: number; spread: number | null } | null;
  /** The rule's threshold in the index's units, when the flag recorded one. */
  threshold: number | null;
  /** The span was cut to its first 3 h. */
  truncated: boolean;
}

export interface QueueFlagDTO {
  id: string;
  version: number;
  severity: "watch" | "review";
  state: FlagState;
  ruleId: string;
  ruleLabel: string;
  /** The index the rule watches; null for a data-quality rule. */
  index: string | null;
  stayId: string;
  bedLabel: string;
  /** The invented demo patient's display name (the screen is a guarded, audited read of patient data). */
  displayName: string;
  conditionFrom: string;
  /** null while the condition still holds: the flag cannot be resolved before it ends (DOMAIN §1). */
  conditionTo: string | null;
  raisedAt: string;
  /** Start of the first 5-min window that triggered the flag (the Window detail link). */
  firstWindowStart: string;
  /** Minutes from raising to the first decision (acknowledge or escalate), or to now while the flag is open. */
  waitingMinutes: number;
  /** Waiting stopped at the first decision. */
  waitingStopped: boolean;
  overTarget: boolean;
  lastTransition: QueueTransitionDTO | null;
  previous: { id: string; state: FlagState; raisedAt: string } | null;
  chart: QueueChartDTO;
}

export interface QueueDTO {
  unit: { id: string; name: string; timeZone: string; ackTargetMinutes: number };
  /** The unit's active bed labels, in bed order, for the bed filter. */
  beds: string[];
  filters: QueueFilters;
  flags: QueueFlagDTO[];
  asOf: string;
}

type FlagJoinRow = {
  id: string; version: number; severity: "watch" | "review"; state: FlagState; rule_id: string; stay_id: string;
  condition_from: Date; condition_to: Date | null; raised_at: Date; previous_flag_id: string | null;
  details: { rule?: { label?: string; index?: string; kind?: string }; window_kind?: WindowKind; threshold?: unknown; trigger_windows?: { start?: string }[] };
  bed_label: string; display_name: string; prev_state: FlagState | null; prev_raised_at: Date | null;
};

type EventRow = {
  flag_id: string; from_state: FlagState; to_state: FlagState; at: Date; reason: AckReason | null; note: string | null;
  actor_name: string | null; recipient_name: string | null; first_decision_at: Date | null;
};

/** The last transition of each flag (and when it first left `open`), one query for all of them. */
export async function lastTransitionsOf(flagIds: readonly string[], knex: Knex = defaultDb): Promise<Map<string, { last: QueueTransitionDTO; firstDecisionAt: Date | null }>> {
  const out = new Map<string, { last: QueueTransitionDTO; firstDecisionAt: Date | null }>();
  if (!flagIds.length) return out;
  const rows = await knex("flag_events as e")
    .distinctOn("e.flag_id")
    .leftJoin("users as a", "a.id", "e.actor_id")
    .leftJoin("users as r", "r.id", "e.recipient_id")
    .whereIn("e.flag_id", flagIds)
    .orderBy([{ column: "e.flag_id" }, { column: "e.at", order: "desc" }, { column: "e.id", order: "desc" }])
    .select<EventRow[]>(
      "e.flag_id", "e.from_state", "e.to_state", "e.at", "e.reason", "e.note", "a.name as actor_name", "r.name as recipient_name",
      knex.raw("(SELECT min(f.at) FROM flag_events f WHERE f.flag_id = e.flag_id AND f.from_state = 'open') AS first_decision_at"),
    );
  for (const r of rows) {
    out.set(r.flag_id, {
      last: { from: r.from_state, to: r.to_state, at: r.at.toISOString(), actorName: r.actor_name, reason: r.reason, note: r.note, recipientName: r.recipient_name },
      firstDecisionAt: r.first_decision_at,
    });
  }
  return out;
}

const finiteOrNull = (v: unknown) => (typeof v === "number" && Number.isFinite(v) ? v : null);

/**
 * The Review queue of a unit: its open, acknowledged and escalated flags, oldest first (by raising), filtered by
 * state, severity and bed. null for an unknown unit.
 */
export async function reviewQueue(unitId: string, filters: QueueFilters, now = new Date(), knex: Knex = defaultDb): Promise<QueueDTO | null> {
  const unit = await knex("units").where({ id: unitId }).first("id", "name", "time_zone", "ack_target_minutes");
  if (!unit) return null;
  const [beds, flagRows] = await Promise.all([
    knex("beds").where({ unit_id: unitId, active: true }).orderBy("sort_order").pluck("label"),
    knex("flags as f")
      .join("stays as s", "s.id", "f.stay_id")
      .join("beds as b", "b.id", "s.bed_id")
      .join("patients as p", "p.id", "s.patient_id")
      .leftJoin("flags as pf", "pf.id", "f.previous_flag_id")
      .where("f.unit_id", unitId)
      .whereIn("f.state", filters.state ? [filters.state] : [...QUEUE_STATES])
      .modify((q) => {
        if (filters.severity) q.where("f.severity", filters.severity);
        if (filters.bed) q.whereRaw("lower(b.label) = lower(?)", [filters.bed]);
      })
      .orderBy([{ column: "f.raised_at" }, { column: "f.id" }])
      .select<FlagJoinRow[]>(
        "f.id", "f.version", "f.severity", "f.state", "f.rule_id", "f.stay_id", "f.condition_from", "f.condition_to", "f.raised_at",
        "f.previous_flag_id", "f.details", "b.label as bed_label", "p.display_name", "pf.state as prev_state", "pf.raised_at as prev_raised_at",
      ),
  ]);

  const spans = flagRows.map((f) => {
    const kind: WindowKind = f.details.window_kind === "long" ? "long" : "short";
    const key = f.details.rule?.kind === "data_quality" ? "coverage" : (f.details.rule?.index ?? "hr");
    const fromMs = f.condition_from.getTime();
    const endMs = (f.condition_to ?? now).getTime();
    const truncated = endMs - fromMs > CHART_MAX_SPAN_MS;
    return { flag: f, kind, key, lo: new Date(fromMs - CHART_MARGIN_MS), hi: new Date(Math.min(endMs, fromMs + CHART_MAX_SPAN_MS) + CHART_MARGIN_MS), truncated };
  });

  const [events, points, baselines] = await Promise.all([
    lastTransitionsOf(flagRows.map((f) => f.id), knex),
    spans.length
      ? knex
          .raw<{ rows: { flag_id: string; t: Date; v: number | null }[] }>(
            // One pass for every flag's span: the rule's index (no value from an unusable window, DOMAIN §5.7), or the
            // window's coverage for a data-quality rule (judged on every window, unusable ones included).
            `SELECT q.flag_id, w.window_end AS t,
                    CASE WHEN q.key = 'coverage' THEN (w.quality ->> 'coverage')::float8
                         WHEN w.grade = 'unusable' OR w.values IS NULL THEN NULL
                         ELSE (w.values ->> q.key)::float8 END AS v
               FROM unnest(?::uuid[], ?::uuid[], ?::text[], ?::text[], ?::timestamptz[], ?::timestamptz[]) AS q(flag_id, stay_id, kind, key, lo, hi)
               JOIN index_windows w ON w.stay_id = q.stay_id AND w.kind = q.kind AND w.algorithm_version = ?
                                   AND w.window_start >= q.lo AND w.window_end <= q.hi
              ORDER BY q.flag_id, w.window_start`,
            [
              spans.map((s) => s.flag.id), spans.map((s) => s.flag.stay_id), spans.map((s) => s.kind), spans.map((s) => s.key),
              spans.map((s) => s.lo.toISOString()), spans.map((s) => s.hi.toISOString()), ALGORITHM_VERSION,
            ],
          )
          .then((r) => r.rows)
      : Promise.resolve([]),
    spans.length
      ? knex("baselines")
          .whereIn("stay_id", [...new Set(spans.map((s) => s.flag.stay_id))])
          .where({ algorithm_version: ALGORITHM_VERSION })
          .whereNotNull("median")
          .select("stay_id", "index_key", "median", "spread")
      : Promise.resolve([]),
  ]);

  const series = new Map<string, { t: number[]; v: (number | null)[] }>();
  for (const p of points) {
    const s = series.get(p.flag_id) ?? { t: [], v: [] };
    s.t.push(p.t.getTime() / 1000);
    s.v.push(finiteOrNull(p.v));
    series.set(p.flag_id, s);
  }
  const baselineOf = new Map(baselines.map((b) => [`${b.stay_id}|${b.index_key}`, { median: b.median!, spread: b.spread }]));
  const target = unit.ack_target_minutes;

  const flags = spans.map(({ flag: f, key, lo, hi, truncated }): QueueFlagDTO => {
    const ev = events.get(f.id);
    const stoppedAt = f.state === "open" ? null : (ev?.firstDecisionAt ?? null);
    const waitingMinutes = Math.max(0, Math.floor(((stoppedAt ?? now).getTime() - f.raised_at.getTime()) / MIN));
    const s = series.get(f.id) ?? { t: [], v: [] };
    const firstStart = f.details.trigger_windows?.[0]?.start;
    return {
      id: f.id,
      version: f.version,
      severity: f.severity,
      state: f.state,
      ruleId: f.rule_id,
      ruleLabel: f.details.rule?.label ?? f.rule_id,
      index: f.details.rule?.kind === "data_quality" ? null : (f.details.rule?.index ?? null),
      stayId: f.stay_id,
      bedLabel: f.bed_label,
      displayName: f.display_name,
      conditionFrom: f.condition_from.toISOString(),
      conditionTo: f.condition_to?.toISOString() ?? null,
      raisedAt: f.raised_at.toISOString(),
      firstWindowStart: typeof firstStart === "string" ? firstStart : f.condition_from.toISOString(),
      waitingMinutes,
      waitingStopped: stoppedAt !== null,
      overTarget: waitingMinutes > target,
      lastTransition: ev?.last ?? null,
      previous: f.previous_flag_id && f.prev_state && f.prev_raised_at ? { id: f.previous_flag_id, state: f.prev_state, raisedAt: f.prev_raised_at.toISOString() } : null,
      chart: {
        key,
        t: s.t,
        v: s.v,
        from: lo.getTime() / 1000,
        to: hi.getTime() / 1000,
        conditionFrom: f.condition_from.getTime() / 1000,
        conditionTo: f.condition_to ? f.condition_to.getTime() / 1000 : null,
        baseline: key === "coverage" ? null : (baselineOf.get(`${f.stay_id}|${key}`) ?? null),
        threshold: finiteOrNull(f.details.threshold),
        truncated,
      },
    };
  });

  return {
    unit: { id: unit.id, name: unit.name, timeZone: unit.time_zone, ackTargetMinutes: target },
    beds,
    filters,
    flags,
    asOf: now.toISOString(),
  };
}

export interface ClinicianDTO {
  id: string;
  name: string;
}

/** Active people holding the clinician role in the unit, by name: whom a flag can be escalated to. */
export async function cliniciansOfUnit(unitId: string, knex: Knex = defaultDb): Promise<ClinicianDTO[]> {
  return knex("users as u")
    .join("user_unit_roles as g", "g.user_id", "u.id")
    .where({ "g.unit_id": unitId, "g.role": "clinician", "u.active": true })
    .orderBy([{ column: "u.name" }, { column: "u.id" }])
    .select<ClinicianDTO[]>("u.id", "u.name");
}
