// The Quality metrics' tables, one per metric, by unit and severity (the selection's total first when it holds more
// than one unit). Each shows the counts a figure rests on beside it, so a median of two flags reads as such.
import type { AckFigures, MessageFigures, QualityMetricsDTO, SeverityKey } from "@/lib/quality/metrics";
import { fmtCount, fmtHours, fmtMinutes, fmtPercent, fmtRate } from "./format";

const SEVERITY_TEXT: Record<SeverityKey, string> = { all: "All flags", watch: "Watch (lower)", review: "Review (higher)" };

interface Row<T> {
  key: string;
  unit: string;
  target: number | null;
  figures: T;
}

/** Rows by unit (and total) × severity; the unit's name only on its first row. */
function rowsOf<T>(m: QualityMetricsDTO, pick: (f: { ack: Record<SeverityKey, AckFigures>; messages: Record<SeverityKey, MessageFigures> }, s: SeverityKey) => T): Row<T>[][] {
  const groups: Row<T>[][] = [];
  if (m.units.length > 1) {
    groups.push((["all", "watch", "review"] as const).map((s) => ({ key: `all-${s}`, unit: "All my units", target: null, figures: pick(m.overall, s) })));
  }
  for (const u of m.units) {
    groups.push((["all", "watch", "review"] as const).map((s) => ({ key: `${u.unit.id}-${s}`, unit: u.unit.name, target: u.unit.ackTargetMinutes, figures: pick(u, s) })));
  }
  return groups;
}

const SEVERITIES: SeverityKey[] = ["all", "watch", "review"];

function UnitCell({ name, first }: { name: string; first: boolean }) {
  return first ? <th scope="rowgroup" rowSpan={3} className="font-bold text-ink">{name}</th> : null;
}

export function AckTable({ m }: { m: QualityMetricsDTO }) {
  const groups = rowsOf(m, (f, s) => f.ack[s]);
  return (
    <div className="overflow-x-auto">
      <table className="text-sm">
        <caption className="sr-only">Time to acknowledge by unit and severity</caption>
        <thead>
          <tr>
            <th scope="col">Unit</th>
            <th scope="col">Severity</th>
            <th scope="col">Target</th>
            <th scope="col">Flags raised</th>
            <th scope="col">Acknowledged</th>
            <th scope="col">Median</th>
            <th scope="col">90th percentile</th>
            <th scope="col">Within target</th>
            <th scope="col">Still unacknowledged</th>
          </tr>
        </thead>
        {groups.map((g) => (
          <tbody key={g[0]!.key}>
            {g.map((r, i) => (
              <tr key={r.key}>
                <UnitCell name={r.unit} first={i === 0} />
                <th scope="row" className="font-normal text-ink">{SEVERITY_TEXT[SEVERITIES[i]!]}</th>
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
              </tr>
            ))}
          </tbody>
        ))}
      </table>
    </div>
  );
}

export function BurdenTable({ m }: { m: QualityMetricsDTO }) {
  const groups: { key: string; unit: string; hours: number; rows: { s: SeverityKey; flags: number; rate: number | null }[] }[] = [];
  if (m.units.length > 1) {
    groups.push({ key: "all", unit: "All my units", hours: m.overall.coverage.patientHours, rows: SEVERITIES.map((s) => ({ s, flags: m.overall.burden[s].flags, rate: m.overall.burden[s].per100PatientHours })) });
  }
  for (const u of m.units) {
    groups.push({ key: u.unit.id, unit: u.unit.name, hours: u.coverage.patientHours, rows: SEVERITIES.map((s) => ({ s, flags: u.burden[s].flags, rate: u.burden[s].per100PatientHours })) });
  }
  return (
    <div className="overflow-x-auto">
      <table className="text-sm">
        <caption className="sr-only">Flags per 100 patient-hours by unit and severity</caption>
        <thead>
          <tr>
            <th scope="col">Unit</th>
            <th scope="col">Severity</th>
            <th scope="col">Flags raised</th>
            <th scope="col">Patient-hours</th>
            <th scope="col">Flags per 100 patient-hours</th>
          </tr>
        </thead>
        {groups.map((g) => (
          <tbody key={g.key}>
            {g.rows.map((r, i) => (
              <tr key={r.s}>
                <UnitCell name={g.unit} first={i === 0} />
                <th scope="row" className="font-normal text-ink">{SEVERITY_TEXT[r.s]}</th>
                <td>{fmtCount(r.flags)}</td>
                <td>{fmtHours(g.hours)}</td>
                <td>{fmtRate(r.rate)}</td>
              </tr>
            ))}
          </tbody>
        ))}
      </table>
    </div>
  );
}

export function CoverageTable({ m }: { m: QualityMetricsDTO }) {
  const rows = [...(m.units.length > 1 ? [{ key: "all", unit: "All my units", c: m.overall.coverage }] : []), ...m.units.map((u) => ({ key: u.unit.id, unit: u.unit.name, c: u.coverage }))];
  return (
    <div className="overflow-x-auto">
      <table className="text-sm">
        <caption className="sr-only">Data coverage and unusable windows by unit</caption>
        <thead>
          <tr>
            <th scope="col">Unit</th>
            <th scope="col">Patient-hours</th>
            <th scope="col">Windows expected</th>
            <th scope="col">Usable windows</th>
            <th scope="col">Coverage</th>
            <th scope="col">Unusable windows</th>
            <th scope="col">Share unusable</th>
          </tr>
        </thead>
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
      </table>
    </div>
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
  const groups = rowsOf(m, (f, s) => f.messages[s]);
  return (
    <div className="overflow-x-auto">
      <table className="text-sm">
        <caption className="sr-only">Reminders and escalations by unit and severity</caption>
        <thead>
          <tr>
            <th scope="col">Unit</th>
            <th scope="col">Severity</th>
            <th scope="col">Reminder e-mails</th>
            <th scope="col">Reminder escalation e-mails</th>
            <th scope="col">Escalation e-mails</th>
            <th scope="col">Escalations recorded</th>
          </tr>
        </thead>
        {groups.map((g) => (
          <tbody key={g[0]!.key}>
            {g.map((r, i) => (
              <tr key={r.key}>
                <UnitCell name={r.unit} first={i === 0} />
                <th scope="row" className="font-normal text-ink">{SEVERITY_TEXT[SEVERITIES[i]!]}</th>
                <td><Sent n={r.figures.mail.reminder} /></td>
                <td><Sent n={r.figures.mail.reminder_escalation} /></td>
                <td><Sent n={r.figures.mail.escalation} /></td>
                <td>{fmtCount(r.figures.escalated)}</td>
              </tr>
            ))}
          </tbody>
        ))}
      </table>
    </div>
  );
}
