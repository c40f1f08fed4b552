// The Quality metrics' tables, one per metric, by unit and severity (the selection's total first when it holds more
// than one unit). Each shows the counts a figure rests on beside it, so a median of two flags reads as such.
import type { QualityMetricsDTO, SeverityKey } from "@/lib/quality/metrics";
import { fmtCount, fmtHours, fmtMinutes, fmtPercent, fmtRate } from "./format";

const SEVERITY_TEXT: Record<SeverityKey, string> = { all: "All flags", watch: "Watch (lower)", review: "Review (higher)" };

type Figures = QualityMetricsDTO["overall"];

interface Row<T> {
  key: string;
  unit: string;
  target: number | null;
  figures: T;
}

const SEVERITIES: SeverityKey[] = ["all", "watch", "review"];

/** Rows by unit (and total) × severity; the unit's name only on its first row. */
function rowsOf<T>(m: QualityMetricsDTO, pick: (f: Figures, s: SeverityKey) => T): Row<T>[][] {
  const groups: Row<T>[][] = [];
  if (m.units.length > 1) {
    groups.push(SEVERITIES.map((s) => ({ key: `all-${s}`, unit: "All my units", target: null, figures: pick(m.overall, s) })));
  }
  for (const u of m.units) {
    groups.push(SEVERITIES.map((s) => ({ key: `${u.unit.id}-${s}`, unit: u.unit.name, target: u.unit.ackTargetMinutes, figures: pick(u, s) })));
  }
  return groups;
}

/** A metric's table: scrolls sideways on narrow screens, with a caption for screen readers and one header row. */
function MetricTable({ caption, columns, children }: { caption: string; columns: string[]; children: React.ReactNode }) {
  return (
    <div className="overflow-x-auto">
      <table className="text-sm">
        <caption className="sr-only">{caption}</caption>
        <thead>
          <tr>
            {columns.map((c) => (
              <th key={c} scope="col">{c}</th>
            ))}
          </tr>
        </thead>
        {children}
      </table>
    </div>
  );
}

/** One row group a unit (and the total): the unit's name spans its three severity rows; `cells` fills the rest. */
function SeverityGroups<T>({ groups, cells }: { groups: Row<T>[][]; cells: (r: Row<T>) => React.ReactNode }) {
  return groups.map((g) => (
    <tbody key={g[0]!.key}>
      {g.map((r, i) => (
        <tr key={r.key}>
          {i === 0 && <th scope="rowgroup" rowSpan={3} className="font-bold text-ink">{r.unit}</th>}
          <th scope="row" className="font-normal text-ink">{SEVERITY_TEXT[SEVERITIES[i]!]}</th>
          {cells(r)}
        </tr>
      ))}
    </tbody>
  ));
}

export function AckTable({ m }: { m: QualityMetricsDTO }) {
  return (
    <MetricTable
      caption="Time to acknowledge by unit and severity"
      columns={["Unit", "Severity", "Target", "Flags raised", "Acknowledged", "Median", "90th percentile", "Within target", "Still unacknowledged"]}
    >
      <SeverityGroups
        groups={rowsOf(m, (f, s) => f.ack[s])}
        cells={(r) => (
          <>
            <td>{r.target === null ? "each unit's own" : `${r.target} min`}</td>
            <td>{fmtCount(r.figures.raised)}</td>
            <td>{fmtCount(r.figures.acknowledged)}</td>
            <td>{fmtMinutes(r.figures.medianMin)}</td>
            <td>{fmtMinutes(r.figures.p90Min)}</td>
            <td>
              {fmtPercent(r.figures.shareWithinTarget)}
              <span className="block text-muted">{r.figures.withinTarget} of {r.figures.decided}</span>
            </td>
            <td>{r.figures.unacknowledged ? <strong>{fmtCount(r.figures.unacknowledged)}</strong> : "0"}</td>
          </>
        )}
      />
    </MetricTable>
  );
}

export function BurdenTable({ m }: { m: QualityMetricsDTO }) {
  return (
    <MetricTable
      caption="Flags per 100 patient-hours by unit and severity"
      columns={["Unit", "Severity", "Flags raised", "Patient-hours", "Flags per 100 patient-hours"]}
    >
      <SeverityGroups
        groups={rowsOf(m, (f, s) => ({ ...f.burden[s], hours: f.coverage.patientHours }))}
        cells={(r) => (
          <>
            <td>{fmtCount(r.figures.flags)}</td>
            <td>{fmtHours(r.figures.hours)}</td>
            <td>{fmtRate(r.figures.per100PatientHours)}</td>
          </>
        )}
      />
    </MetricTable>
  );
}

export function CoverageTable({ m }: { m: QualityMetricsDTO }) {
  const rows = [...(m.units.length > 1 ? [{ key: "all", unit: "All my units", c: m.overall.coverage }] : []), ...m.units.map((u) => ({ key: u.unit.id, unit: u.unit.name, c: u.coverage }))];
  return (
    <MetricTable
      caption="Data coverage and unusable windows by unit"
      columns={["Unit", "Patient-hours", "Windows expected", "Usable windows", "Coverage", "Unusable windows", "Share unusable"]}
    >
      <tbody>
        {rows.map((r) => (
          <tr key={r.key}>
            <th scope="row" className="font-bold text-ink">{r.unit}</th>
            <td>{fmtHours(r.c.patientHours)}</td>
            <td>{fmtCount(r.c.expectedWindows)}</td>
            <td>{fmtCount(r.c.usableWindows)}</td>
            <td>{fmtPercent(r.c.coverage)}</td>
            <td>{fmtCount(r.c.unusableWindows)}</td>
            <td>{fmtPercent(r.c.unusableShare)}</td>
          </tr>
        ))}
      </tbody>
    </MetricTable>
  );
}

function Sent({ n }: { n: { sent: number; notDelivered: number } }) {
  return (
    <>
      {fmtCount(n.sent)}
      {n.notDelivered ? <span className="block text-muted">+ {fmtCount(n.notDelivered)} not delivered</span> : null}
    </>
  );
}

export function MessagesTable({ m }: { m: QualityMetricsDTO }) {
  return (
    <MetricTable
      caption="Reminders and escalations by unit and severity"
      columns={["Unit", "Severity", "Reminder e-mails", "Reminder escalation e-mails", "Escalation e-mails", "Escalations recorded"]}
    >
      <SeverityGroups
        groups={rowsOf(m, (f, s) => f.messages[s])}
        cells={(r) => (
          <>
            <td><Sent n={r.figures.mail.reminder} /></td>
            <td><Sent n={r.figures.mail.reminder_escalation} /></td>
            <td><Sent n={r.figures.mail.escalation} /></td>
            <td>{fmtCount(r.figures.escalated)}</td>
          </>
        )}
      />
    </MetricTable>
  );
}
