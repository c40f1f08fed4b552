// The Quality metrics as CSV (RFC 4180: comma-separated, CRLF line ends, a header row, fields quoted when they hold a
// comma, a quote or a line break, quotes doubled), in a tidy long format: one row per unit × period × severity ×
// metric, so a spreadsheet pivot or R's read.csv takes it as it is. Columns:
//   unit_code, unit_name, time_zone   the unit ("ALL" / "All units in scope" / empty zone for the total of the selection)
//   period                            "range" (the whole filter) or "day" (one local calendar day)
//   first_local_date, last_local_date the period's local dates in the unit's zone (the same date for a day)
//   start_utc, end_utc                the period as instants (ISO 8601 UTC; empty for the total, whose units may differ)
//   severity                          all | watch | review ("all" for unit-wide figures such as coverage)
//   metric, value, measure            the metric's name, its value (empty when undefined, e.g. a median of no flags)
//                                     and what the value counts (count, minutes, fraction, hours, per_100_patient_hours)
import { csvQuote } from "@/lib/csv";
import { MESSAGE_KINDS, SEVERITY_KEYS, type AckFigures, type BurdenFigures, type CoverageFigures, type MessageFigures, type QualityMetricsDTO } from "./metrics";

export const CSV_COLUMNS = [
  "unit_code", "unit_name", "time_zone", "period", "first_local_date", "last_local_date", "start_utc", "end_utc", "severity", "metric", "value", "measure",
] as const;

/** RFC 4180 §2.6–2.7 quoting. Text that a spreadsheet would run as a formula (=, +, -, @, tab, CR first) is prefixed
 *  with an apostrophe (OWASP "CSV injection", common practice); numbers are written by csvNumber, never through this. */
export function csvText(v: string): string {
  const safe = /^[=+\-@\t\r]/.test(v) ? `'${v}` : v;
  return csvQuote(safe);
}

/** A number with at most 6 decimals (no binary noise such as 0.30000000000000004); empty for undefined. */
export function csvNumber(v: number | null): string {
  return v === null ? "" : String(Number(v.toFixed(6)));
}

type Measure = "count" | "minutes" | "fraction" | "hours" | "per_100_patient_hours";
type Figure = [metric: string, value: number | null, measure: Measure];

const ackFigures = (a: AckFigures): Figure[] => [
  ["flags_raised", a.raised, "count"],
  ["flags_acknowledged", a.acknowledged, "count"],
  ["flags_unacknowledged", a.unacknowledged, "count"],
  ["time_to_acknowledge_median", a.medianMin, "minutes"],
  ["time_to_acknowledge_p90", a.p90Min, "minutes"],
  ["acknowledged_within_target", a.withinTarget, "count"],
  ["target_outcome_known", a.decided, "count"],
  ["share_within_target", a.shareWithinTarget, "fraction"],
];

const burdenFigures = (b: BurdenFigures): Figure[] => [["flags_per_100_patient_hours", b.per100PatientHours, "per_100_patient_hours"]];

const coverageFigures = (c: CoverageFigures): Figure[] => [
  ["patient_hours", c.patientHours, "hours"],
  ["windows_expected", c.expectedWindows, "count"],
  ["windows_usable", c.usableWindows, "count"],
  ["windows_unusable", c.unusableWindows, "count"],
  ["coverage", c.coverage, "fraction"],
  ["unusable_share", c.unusableShare, "fraction"],
];

const messageFigures = (m: MessageFigures): Figure[] => [
  ...MESSAGE_KINDS.flatMap((k): Figure[] => [[`${k}_mail_sent`, m.mail[k].sent, "count"], [`${k}_mail_not_delivered`, m.mail[k].notDelivered, "count"]]),
  ["escalations_recorded", m.escalated, "count"],
];

/** The whole export as one string (a handful of rows per unit and day: small enough to build in memory). */
export function metricsCsv(m: QualityMetricsDTO): string {
  const lines: string[] = [CSV_COLUMNS.join(",")];
  const push = (unit: [string, string, string], period: [string, string, string, string, string], severity: string, figures: Figure[]) => {
    for (const [metric, value, measure] of figures) {
      lines.push([...unit.map(csvText), ...period.map(csvText), severity, metric, csvNumber(value), measure].join(","));
    }
  };
  const bySeverity = (unit: [string, string, string], period: [string, string, string, string, string], ack: Record<string, AckFigures>, burden: Record<string, BurdenFigures>, messages: Record<string, MessageFigures>) => {
    for (const s of SEVERITY_KEYS) push(unit, period, s, [...ackFigures(ack[s]!), ...burdenFigures(burden[s]!), ...messageFigures(messages[s]!)]);
  };

  const all: [string, string, string] = ["ALL", "All units in scope", ""];
  const allPeriod: [string, string, string, string, string] = ["range", m.filter.from, m.filter.to, "", ""];
  bySeverity(all, allPeriod, m.overall.ack, m.overall.burden, m.overall.messages);
  push(all, allPeriod, "all", coverageFigures(m.overall.coverage));

  for (const u of m.units) {
    const unit: [string, string, string] = [u.unit.code, u.unit.name, u.unit.timeZone];
    const range: [string, string, string, string, string] = ["range", m.filter.from, m.filter.to, u.from, u.to];
    push(unit, range, "all", [["ack_target", u.unit.ackTargetMinutes, "minutes"], ["period_hours", u.hours, "hours"]]);
    bySeverity(unit, range, u.ack, u.burden, u.messages);
    push(unit, range, "all", coverageFigures(u.coverage));
    for (const d of u.days) {
      push(unit, ["day", d.date, d.date, d.from, d.to], "all", [
        ["period_hours", d.hours, "hours"],
        ["flags_raised", d.ack.raised, "count"],
        ["flags_acknowledged", d.ack.acknowledged, "count"],
        ["time_to_acknowledge_median", d.ack.medianMin, "minutes"],
        ["time_to_acknowledge_p90", d.ack.p90Min, "minutes"],
        ...burdenFigures(d.burden),
        ["patient_hours", d.coverage.patientHours, "hours"],
        ["windows_expected", d.coverage.expectedWindows, "count"],
        ["windows_usable", d.coverage.usableWindows, "count"],
        ["coverage", d.coverage.coverage, "fraction"],
      ]);
    }
  }
  return `${lines.join("\r\n")}\r\n`;
}
