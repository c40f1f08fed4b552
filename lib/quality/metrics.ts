// Quality metrics for quality officers: how fast flags are acknowledged, how many flags the units carry per 100
// patient-hours, how much of each stay has usable data, and which reminders and escalations went out — over a range of
// local calendar dates, each unit in its own IANA zone (00:00 of the first day to 24:00 of the last, DST-aware).
//
// Three queries (plus the units), each aggregating in SQL with GROUPING SETS so a unit's range, its days, its
// severities and the all-units total come from one pass. Percentiles are PostgreSQL's percentile_cont, which
// interpolates linearly between the order statistics at position 1 + (n − 1)·p: Hyndman & Fan (1996) type 7, the
// default of R's quantile() (checked against R's values in tests/integration/quality-metrics.test.ts).
import "server-only";
import type { Knex } from "knex";
import { unitsWhere, type Grant } from "@/lib/auth/roles";
import { SHORT_S, SHORT_STRIDE_S } from "@/lib/compute/stay-windows";
import { db as defaultDb } from "@/lib/db/knex";
import { ALGORITHM_VERSION } from "@/lib/engine/version";
import type { QualityFilter } from "./quality.validation";
import { lastCompleteDays, localDays, ratio, type LocalDay } from "./stats";

export const SEVERITY_KEYS = ["all", "watch", "review"] as const;
export type SeverityKey = (typeof SEVERITY_KEYS)[number];
type Severity = Exclude<SeverityKey, "all">;
type BySeverity<T> = Record<SeverityKey, T>;

/** Mail kinds of lib/mail (reminder to charge nurses, reminder escalation to clinicians, a nurse's escalation e-mail). */
export const MESSAGE_KINDS = ["reminder", "reminder_escalation", "escalation"] as const;
export type MessageKind = (typeof MESSAGE_KINDS)[number];

export interface AckFigures {
  /** Flags raised in the range. */
  raised: number;
  /** Of those, acknowledged or escalated (by now). */
  acknowledged: number;
  unacknowledged: number;
  /** Time from raising to the first acknowledgement or escalation, minutes, over the acknowledged flags. */
  medianMin: number | null;
  p90Min: number | null;
  /** Acknowledged within the unit's target (wait ≤ target). */
  withinTarget: number;
  /** Flags whose outcome against the target is known: acknowledged, or still waiting past the target. */
  decided: number;
  shareWithinTarget: number | null;
}

export interface BurdenFigures {
  flags: number;
  per100PatientHours: number | null;
}

export interface CoverageFigures {
  patientHours: number;
  /** 5-min windows the stays' time in the range could hold (one a minute, each ending by the stay's end). */
  expectedWindows: number;
  usableWindows: number;
  unusableWindows: number;
  /** usable / expected. */
  coverage: number | null;
  /** unusable / (usable + unusable): of the windows computed, the share graded unusable. */
  unusableShare: number | null;
}

export interface MessageFigures {
  /** Messages the system created in the range, by kind: sent, and not (yet) delivered (queued or failed). */
  mail: Record<MessageKind, { sent: number; notDelivered: number }>;
  /** Escalations recorded on flags (flag_events to `escalated`) in the range. */
  escalated: number;
}

export interface DayMetrics {
  date: string;
  from: string;
  to: string;
  hours: number;
  ack: Pick<AckFigures, "raised" | "acknowledged" | "medianMin" | "p90Min">;
  burden: BurdenFigures;
  coverage: Pick<CoverageFigures, "patientHours" | "expectedWindows" | "usableWindows" | "coverage">;
}

export interface UnitMetrics {
  unit: { id: string; code: string; name: string; timeZone: string; ackTargetMinutes: number };
  /** The range as instants in the unit's zone (ISO 8601 UTC) and its length in hours (23/25-h days included). */
  from: string;
  to: string;
  hours: number;
  ack: BySeverity<AckFigures>;
  burden: BySeverity<BurdenFigures>;
  coverage: CoverageFigures;
  messages: BySeverity<MessageFigures>;
  days: DayMetrics[];
}

export interface QualityMetricsDTO {
  /** The filter as applied (dates resolved when the default was used). */
  filter: { unit: string | null; from: string; to: string };
  defaulted: boolean;
  asOf: string;
  units: UnitMetrics[];
  /** Every unit of the selection together (each over its own local range). */
  overall: { ack: BySeverity<AckFigures>; burden: BySeverity<BurdenFigures>; coverage: CoverageFigures; messages: BySeverity<MessageFigures> };
}

interface UnitRow {
  id: string;
  code: string;
  name: string;
  time_zone: string;
  ack_target_minutes: number;
}

/** The units where the grants allow metrics.view, narrowed to the filter's unit; sorted by name. */
async function unitsInScope(grants: readonly Grant[], unit: string | undefined, knex: Knex): Promise<UnitRow[]> {
  const scope = unitsWhere(grants, "metrics.view").filter((u) => unit === undefined || u === unit);
  if (!scope.length) return [];
  return knex("units").whereIn("id", scope).orderBy([{ column: "name" }, { column: "id" }]).select("id", "code", "name", "time_zone", "ack_target_minutes");
}

/** The units the reader may choose in the filter (metrics.view), by name. */
export async function metricsUnits(grants: readonly Grant[], knex: Knex = defaultDb): Promise<{ id: string; name: string; timeZone: string }[]> {
  return (await unitsInScope(grants, undefined, knex)).map((u) => ({ id: u.id, name: u.name, timeZone: u.time_zone }));
}

/** Each unit's local days as a jsonb recordset parameter: the one place the queries learn the calendar. */
const DAYS_CTE = `d AS (SELECT * FROM jsonb_to_recordset(?::jsonb) AS d(unit_id uuid, day date, day_from timestamptz, day_to timestamptz))`;

// GROUPING(unit_id, day, severity) bits: 4 = unit rolled up, 2 = day rolled up, 1 = severity rolled up (so a unit's
// severity = 2, a unit = 3, a unit's day = 1, a severity over all units = 6, everything = 7).
interface AckRow {
  unit_id: string | null;
  day: string | null;
  severity: Severity | null;
  g: number;
  raised: number;
  acknowledged: number;
  within_target: number;
  decided: number;
  median_min: number | null;
  p90_min: number | null;
}

function ackQuery(knex: Knex, days: string, now: Date) {
  return knex.raw<{ rows: AckRow[] }>(
    `WITH ${DAYS_CTE},
     f AS (
       SELECT d.unit_id, d.day, f.severity, fa.first_at,
              (extract(epoch FROM fa.first_at - f.raised_at) / 60)::float8 AS wait_min,
              fa.first_at - f.raised_at <= make_interval(mins => u.ack_target_minutes) AS within_target,
              fa.first_at IS NULL AND ?::timestamptz - f.raised_at > make_interval(mins => u.ack_target_minutes) AS overdue
         FROM d
         JOIN units u ON u.id = d.unit_id
         JOIN flags f ON f.unit_id = d.unit_id AND f.raised_at >= d.day_from AND f.raised_at < d.day_to AND f.raised_at <= ?::timestamptz
         LEFT JOIN LATERAL (
           SELECT min(e.at) AS first_at FROM flag_events e
            WHERE e.flag_id = f.id AND e.to_state IN ('acknowledged', 'escalated') AND e.at <= ?::timestamptz
         ) fa ON true
     )
     SELECT unit_id, day::text AS day, severity, GROUPING(unit_id, day, severity)::int AS g,
            count(*)::int AS raised,
            count(first_at)::int AS acknowledged,
            count(*) FILTER (WHERE within_target)::int AS within_target,
            count(*) FILTER (WHERE first_at IS NOT NULL OR overdue)::int AS decided,
            percentile_cont(0.5) WITHIN GROUP (ORDER BY wait_min) AS median_min,
            percentile_cont(0.9) WITHIN GROUP (ORDER BY wait_min) AS p90_min
       FROM f
      GROUP BY GROUPING SETS ((unit_id, severity), (unit_id), (severity), (), (unit_id, day))`,
    [days, now, now, now],
  );
}

// GROUPING(unit_id, day): 0 = a unit's day, 1 = a unit's range, 3 = every unit together.
interface StayRow {
  unit_id: string | null;
  day: string | null;
  g: number;
  patient_hours: number;
  expected: number;
  usable: number;
  unusable: number;
}

/**
 * Patient-hours (each stay's overlap with the unit's days, up to now) and the short windows of that time. A window
 * belongs to the day its start falls in; it is expected at every whole UTC minute of the overlap whose 5-min span ends
 * by the stay's end (discharge, or now for a stay still going): lib/compute lays short windows on that grid.
 */
function stayQuery(knex: Knex, days: string, now: Date) {
  return knex.raw<{ rows: StayRow[] }>(
    `WITH ${DAYS_CTE},
     s AS (
       SELECT d.unit_id, d.day, st.id AS stay_id,
              greatest(st.admitted_at, d.day_from) AS o_from,
              least(st.discharged_at, d.day_to, ?::timestamptz) AS o_to,
              least(st.discharged_at, ?::timestamptz) AS stay_end
         FROM d
         JOIN beds b ON b.unit_id = d.unit_id
         JOIN stays st ON st.bed_id = b.id AND st.admitted_at < d.day_to AND (st.discharged_at IS NULL OR st.discharged_at > d.day_from)
     ),
     c AS (
       SELECT s.unit_id, s.day,
              extract(epoch FROM s.o_to - s.o_from)::float8 / 3600 AS hours,
              greatest(0,
                least(ceil(extract(epoch FROM s.o_to) / ?) - 1, floor((extract(epoch FROM s.stay_end) - ?) / ?))
                - ceil(extract(epoch FROM s.o_from) / ?) + 1) AS expected,
              w.usable, w.unusable
         FROM s
         LEFT JOIN LATERAL (
           SELECT count(*) FILTER (WHERE w.grade <> 'unusable') AS usable, count(*) FILTER (WHERE w.grade = 'unusable') AS unusable
             FROM index_windows w
            WHERE w.stay_id = s.stay_id AND w.kind = 'short' AND w.algorithm_version = ?
              AND w.window_start >= s.o_from AND w.window_start < s.o_to
              AND w.window_start <= s.stay_end - make_interval(secs => ?)
         ) w ON true
        WHERE s.o_to > s.o_from
     )
     SELECT unit_id, day::text AS day, GROUPING(unit_id, day)::int AS g,
            sum(hours)::float8 AS patient_hours, sum(expected)::int AS expected, sum(usable)::int AS usable, sum(unusable)::int AS unusable
       FROM c
      GROUP BY GROUPING SETS ((unit_id), (unit_id, day), ())`,
    [days, now, now, SHORT_STRIDE_S, SHORT_S, SHORT_STRIDE_S, SHORT_STRIDE_S, ALGORITHM_VERSION, SHORT_S],
  );
}

interface MessageRow {
  unit_id: string | null;
  severity: Severity | null;
  kind: MessageKind | "escalated";
  total: number;
  delivered: number;
}

/** Mail created in the range for the units' flags, by kind and status, and escalations recorded on flags. */
function messageQuery(knex: Knex, days: string, now: Date) {
  return knex.raw<{ rows: MessageRow[] }>(
    `WITH ${DAYS_CTE},
     x AS (
       SELECT f.unit_id, f.severity, m.kind, m.status = 'sent' AS delivered
         FROM mail_outbox m
         JOIN flags f ON f.id = m.flag_id
         JOIN d ON d.unit_id = f.unit_id AND m.created_at >= d.day_from AND m.created_at < d.day_to
        WHERE m.created_at <= ?::timestamptz
       UNION ALL
       SELECT f.unit_id, f.severity, 'escalated', true
         FROM flag_events e
         JOIN flags f ON f.id = e.flag_id
         JOIN d ON d.unit_id = f.unit_id AND e.at >= d.day_from AND e.at < d.day_to
        WHERE e.to_state = 'escalated' AND e.at <= ?::timestamptz
     )
     SELECT unit_id, severity, kind, count(*)::int AS total, count(*) FILTER (WHERE delivered)::int AS delivered
       FROM x
      GROUP BY GROUPING SETS ((unit_id, severity, kind), (unit_id, kind), (severity, kind), (kind))`,
    [days, now, now],
  );
}

const emptyAck = (): AckFigures => ({ raised: 0, acknowledged: 0, unacknowledged: 0, medianMin: null, p90Min: null, withinTarget: 0, decided: 0, shareWithinTarget: null });

function toAck(r: AckRow | undefined): AckFigures {
  if (!r) return emptyAck();
  return {
    raised: r.raised,
    acknowledged: r.acknowledged,
    unacknowledged: r.raised - r.acknowledged,
    medianMin: r.median_min,
    p90Min: r.p90_min,
    withinTarget: r.within_target,
    decided: r.decided,
    shareWithinTarget: ratio(r.within_target, r.decided),
  };
}

function toCoverage(r: StayRow | undefined): CoverageFigures {
  const usable = r?.usable ?? 0;
  const unusable = r?.unusable ?? 0;
  const expected = r?.expected ?? 0;
  return { patientHours: r?.patient_hours ?? 0, expectedWindows: expected, usableWindows: usable, unusableWindows: unusable, coverage: ratio(usable, expected), unusableShare: ratio(unusable, usable + unusable) };
}

function toMessages(rows: MessageRow[]): MessageFigures {
  const mail = Object.fromEntries(MESSAGE_KINDS.map((k) => [k, { sent: 0, notDelivered: 0 }])) as MessageFigures["mail"];
  let escalated = 0;
  for (const r of rows) {
    if (r.kind === "escalated") escalated = r.total;
    else if (r.kind in mail) mail[r.kind] = { sent: r.delivered, notDelivered: r.total - r.delivered };
  }
  return { mail, escalated };
}

const per100 = (flags: number, hours: number): BurdenFigures => ({ flags, per100PatientHours: hours > 0 ? (100 * flags) / hours : null });

const bySeverity = <T>(f: (s: SeverityKey) => T): BySeverity<T> => ({ all: f("all"), watch: f("watch"), review: f("review") });

/**
 * The quality metrics of the units where `grants` hold metrics.view (narrowed to `filter.unit`), as of `now`.
 * null when the filter names a unit outside that scope (or none exists).
 * Without dates, the range is the last 7 complete local days in the zone of the first unit of the selection (by name).
 */
export async function qualityMetrics(grants: readonly Grant[], filter: QualityFilter, now: Date = new Date(), knex: Knex = defaultDb): Promise<QualityMetricsDTO | null> {
  const units = await unitsInScope(grants, filter.unit, knex);
  if (!units.length) return null;
  const defaulted = filter.from === undefined || filter.to === undefined;
  const range = defaulted ? lastCompleteDays(now, units[0]!.time_zone) : { from: filter.from!, to: filter.to! };
  const calendar = new Map<string, LocalDay[]>(units.map((u) => [u.id, localDays(range.from, range.to, u.time_zone)]));
  const days = JSON.stringify(units.flatMap((u) => calendar.get(u.id)!.map((d) => ({ unit_id: u.id, day: d.date, day_from: d.from.toISOString(), day_to: d.to.toISOString() }))));

  const [ack, stays, messages] = await Promise.all([ackQuery(knex, days, now), stayQuery(knex, days, now), messageQuery(knex, days, now)]);

  const ackAt = (g: number, unit: string | null, sev: Severity | null, day: string | null = null) =>
    ack.rows.find((r) => r.g === g && r.unit_id === unit && r.severity === sev && r.day === day);
  const stayAt = (g: number, unit: string | null, day: string | null = null) => stays.rows.find((r) => r.g === g && r.unit_id === unit && r.day === day);
  const messagesOf = (unit: string | null, sev: SeverityKey) =>
    messages.rows.filter((r) => r.unit_id === unit && r.severity === (sev === "all" ? null : sev));

  const unitAck = (id: string, s: SeverityKey) => (s === "all" ? toAck(ackAt(3, id, null)) : toAck(ackAt(2, id, s)));
  const overallAck = (s: SeverityKey) => (s === "all" ? toAck(ackAt(7, null, null)) : toAck(ackAt(6, null, s)));

  const unitMetrics: UnitMetrics[] = units.map((u) => {
    const cal = calendar.get(u.id)!;
    const coverage = toCoverage(stayAt(1, u.id));
    const ackBy = bySeverity((s) => unitAck(u.id, s));
    return {
      unit: { id: u.id, code: u.code, name: u.name, timeZone: u.time_zone, ackTargetMinutes: u.ack_target_minutes },
      from: cal[0]!.from.toISOString(),
      to: cal[cal.length - 1]!.to.toISOString(),
      hours: (cal[cal.length - 1]!.to.getTime() - cal[0]!.from.getTime()) / 3_600_000,
      ack: ackBy,
      burden: bySeverity((s) => per100(ackBy[s].raised, coverage.patientHours)),
      coverage,
      messages: bySeverity((s) => toMessages(messagesOf(u.id, s))),
      days: cal.map((d) => {
        const a = toAck(ackAt(1, u.id, null, d.date));
        const c = toCoverage(stayAt(0, u.id, d.date));
        return {
          date: d.date,
          from: d.from.toISOString(),
          to: d.to.toISOString(),
          hours: (d.to.getTime() - d.from.getTime()) / 3_600_000,
          ack: { raised: a.raised, acknowledged: a.acknowledged, medianMin: a.medianMin, p90Min: a.p90Min },
          burden: per100(a.raised, c.patientHours),
          coverage: { patientHours: c.patientHours, expectedWindows: c.expectedWindows, usableWindows: c.usableWindows, coverage: c.coverage },
        };
      }),
    };
  });

  const overallCoverage = toCoverage(stayAt(3, null));
  const overallAckBy = bySeverity(overallAck);
  return {
    filter: { unit: filter.unit ?? null, from: range.from, to: range.to },
    defaulted,
    asOf: now.toISOString(),
    units: unitMetrics,
    overall: {
      ack: overallAckBy,
      burden: bySeverity((s) => per100(overallAckBy[s].raised, overallCoverage.patientHours)),
      coverage: overallCoverage,
      messages: bySeverity((s) => toMessages(messagesOf(null, s))),
    },
  };
}
