// Quality metrics (quality officers): response to flags, flag burden, data coverage, reminders and escalations over a
// range of local dates, for the units where the reader holds metrics.view. The filter lives in the URL and is the one
// the CSV link sends; every read is audited with it.
import { auditAs, guardPage } from "@/lib/auth/guard";
import { can } from "@/lib/auth/roles";
import { metricsUnits, qualityMetrics, type QualityMetricsDTO, type UnitMetrics } from "@/lib/quality/metrics";
import { qualityFilterSchema, type QualityFilter } from "@/lib/quality/quality.validation";
import { formatLocalPrecise } from "@/lib/time";
import { Notice } from "@/components/Notice";
import { DailyChart } from "@/components/quality/DailyChart";
import { fmtCount, fmtDay, fmtMinutes, fmtPercent, fmtRate } from "@/components/quality/format";
import { AckTable, BurdenTable, CoverageTable, MessagesTable } from "@/components/quality/MetricTables";
import { QualityFilterForm } from "@/components/quality/QualityFilterForm";
import { PageHeader } from "@/components/shell/PageHeader";

export const metadata = { title: "Quality metrics" };

function Figure({ label, value, note }: { label: string; value: string; note?: string }) {
  return (
    <div className="card px-4 py-3">
      <dt className="text-sm text-muted">{label}</dt>
      <dd className="text-2xl font-bold">{value}</dd>
      {note ? <dd className="text-sm text-muted">{note}</dd> : null}
    </div>
  );
}

function Definitions({ items }: { items: [term: string, text: string][] }) {
  return (
    <div className="mt-4 border-t border-line pt-3 text-sm">
      <h3 className="font-bold">How these figures are counted</h3>
      <dl className="mt-1 space-y-1">
        {items.map(([t, d]) => (
          <div key={t}>
            <dt className="inline font-bold">{t}: </dt>
            <dd className="inline text-muted">{d}</dd>
          </div>
        ))}
      </dl>
    </div>
  );
}

function Charts({ units, chart }: { units: UnitMetrics[]; chart: (u: UnitMetrics) => React.ReactNode }) {
  return <div className="mt-4 grid gap-6 lg:grid-cols-2">{units.map((u) => <div key={u.unit.id}>{chart(u)}</div>)}</div>;
}

const exportHref = (m: QualityMetricsDTO) => {
  const q = new URLSearchParams({ ...(m.filter.unit ? { unit: m.filter.unit } : {}), from: m.filter.from, to: m.filter.to });
  return `/api/quality/export?${q}`;
};

export default async function QualityPage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const actor = await guardPage("metrics.view");
  const raw = Object.fromEntries(Object.entries(await searchParams).map(([k, v]) => [k, Array.isArray(v) ? v[0] : v]));
  // A filter that does not parse (an edited address) is shown by its fields; the page then shows the default range.
  const parsed = qualityFilterSchema.safeParse(raw);
  const errors: Record<string, string[]> = {};
  if (!parsed.success) for (const i of parsed.error.issues) (errors[String(i.path[0] ?? "unit")] ??= []).push(i.message);
  const filter: QualityFilter = parsed.success ? parsed.data : {};
  // A unit outside the reader's scope is refused like any other page of that unit (audited, then the forbidden page).
  if (filter.unit && !can(actor.grants, "metrics.view", filter.unit)) await guardPage("metrics.view", filter.unit);
  const m = (await qualityMetrics(actor.grants, filter))!;
  await auditAs(actor, {
    action: "quality.metrics.view",
    permission: "metrics.view",
    unitId: m.filter.unit,
    detail: { filter: m.filter, defaulted: m.defaulted, unitIds: m.units.map((u) => u.unit.id) },
  });
  const all = m.overall;
  const zones = [...new Set(m.units.map((u) => u.unit.timeZone))];
  const filterUnits = await metricsUnits(actor.grants);
  const mail = all.messages.all.mail;

  return (
    <div className="space-y-6">
      <PageHeader
        title="Quality metrics"
        description={
          <p className="text-muted">
            {fmtDay(m.filter.from)} {m.filter.from.slice(0, 4)} to {fmtDay(m.filter.to)} {m.filter.to.slice(0, 4)}
            {m.defaulted ? " (the last 7 complete days)" : ""}, each unit from 00:00 of the first day to 24:00 of the last in its own time zone ({zones.join(", ")}).
            Figures as of {formatLocalPrecise(m.asOf, m.units[0]!.unit.timeZone)}.
          </p>
        }
        aside={<a href={exportHref(m)} className="btn-secondary" download>Export CSV</a>}
      />

      {!parsed.success && <Notice tone="info">Part of the filter in the address was not understood (see the fields below); the last 7 complete days are shown instead.</Notice>}
      <QualityFilterForm units={filterUnits} values={{ unit: parsed.success ? (filter.unit ?? "") : "", from: m.filter.from, to: m.filter.to }} errors={errors} />

      <section aria-labelledby="summary-heading">
        <h2 id="summary-heading">Summary{m.units.length > 1 ? " — all my units" : ` — ${m.units[0]!.unit.name}`}</h2>
        <dl className="mt-2 grid grid-cols-2 gap-3 md:grid-cols-3 xl:grid-cols-5">
          <Figure label="Flags raised" value={fmtCount(all.ack.all.raised)} note={`${fmtCount(all.ack.all.unacknowledged)} still unacknowledged`} />
          <Figure label="Median time to acknowledge" value={fmtMinutes(all.ack.all.medianMin)} note={`of ${fmtCount(all.ack.all.acknowledged)} acknowledged`} />
          <Figure label="90th percentile" value={fmtMinutes(all.ack.all.p90Min)} />
          <Figure label="Within target" value={fmtPercent(all.ack.all.shareWithinTarget)} note={`${all.ack.all.withinTarget} of ${all.ack.all.decided}`} />
          <Figure label="Flags per 100 patient-hours" value={fmtRate(all.burden.all.per100PatientHours)} note={`${all.coverage.patientHours.toFixed(0)} patient-hours`} />
          <Figure label="Data coverage" value={fmtPercent(all.coverage.coverage)} />
          <Figure label="Unusable windows" value={fmtPercent(all.coverage.unusableShare)} note={`${fmtCount(all.coverage.unusableWindows)} windows`} />
          <Figure label="Reminder e-mails sent" value={fmtCount(mail.reminder.sent)} />
          <Figure label="Escalation e-mails sent" value={fmtCount(mail.reminder_escalation.sent + mail.escalation.sent)} note="reminder escalations and nurses' escalations" />
          <Figure label="Escalations recorded" value={fmtCount(all.messages.all.escalated)} />
        </dl>
      </section>

      <section aria-labelledby="ack-heading" className="card p-4">
        <h2 id="ack-heading">Time to acknowledge</h2>
        <AckTable m={m} />
        <Charts
          units={m.units}
          chart={(u) => (
            <DailyChart
              title={`${u.unit.name}: time to acknowledge by day`}
              kind="minutes"
              dates={u.days.map((d) => d.date)}
              series={[
                { label: "Median", values: u.days.map((d) => d.ack.medianMin) },
                { label: "90th percentile", values: u.days.map((d) => d.ack.p90Min), dashed: true },
              ]}
              extra={[{ label: "Acknowledged flags", values: u.days.map((d) => `${d.ack.acknowledged} of ${d.ack.raised}`) }]}
            />
          )}
        />
        <Definitions
          items={[
            ["Time to acknowledge", "from the moment Corvane raised a flag to the first time a person acknowledged or escalated it, whenever that was. Later transitions (resolve) do not count. A flag belongs to the day, in its unit's time zone, on which it was raised."],
            ["Median and 90th percentile", "over the flags acknowledged or escalated; flags still waiting are counted separately, not in these figures. Computed as PostgreSQL's percentile_cont, which interpolates linearly between the ordered waits (Hyndman and Fan's type 7, the default of R's quantile()). Few flags make them unsteady: the counts are shown beside them."],
            ["Target", "the unit's acknowledgement target (set per unit). A wait of exactly the target counts as within it."],
            ["Within target", "flags acknowledged within the target, out of the flags whose outcome is known: those acknowledged, and those still waiting past the target. A flag still waiting and not yet past the target is left out until it is decided."],
            ["Still unacknowledged", "flags raised in the range that nobody has acknowledged or escalated yet."],
          ]}
        />
      </section>

      <section aria-labelledby="burden-heading" className="card p-4">
        <h2 id="burden-heading">Flags per 100 patient-hours</h2>
        <BurdenTable m={m} />
        <Charts
          units={m.units}
          chart={(u) => (
            <DailyChart
              title={`${u.unit.name}: flags per 100 patient-hours by day`}
              kind="rate"
              dates={u.days.map((d) => d.date)}
              series={[{ label: "Flags per 100 patient-hours", values: u.days.map((d) => d.burden.per100PatientHours) }]}
              extra={[
                { label: "Flags raised", values: u.days.map((d) => fmtCount(d.burden.flags)) },
                { label: "Patient-hours", values: u.days.map((d) => d.coverage.patientHours.toFixed(1)) },
              ]}
            />
          )}
        />
        <Definitions
          items={[
            ["Flags", "every flag raised in the range (watch and review), whatever became of it."],
            ["Patient-hours", "the time each stay in the unit's beds overlapped the range (from admission or the range's start to discharge, the range's end or now), added up. A day with a clock change has 23 or 25 hours."],
            ["Per 100 patient-hours", "flags ÷ patient-hours × 100; no figure when there was no stay time."],
          ]}
        />
      </section>

      <section aria-labelledby="coverage-heading" className="card p-4">
        <h2 id="coverage-heading">Data coverage and unusable windows</h2>
        <CoverageTable m={m} />
        <Charts
          units={m.units}
          chart={(u) => (
            <DailyChart
              title={`${u.unit.name}: data coverage by day`}
              kind="percent"
              dates={u.days.map((d) => d.date)}
              series={[{ label: "Coverage", values: u.days.map((d) => d.coverage.coverage) }]}
              extra={[{ label: "Usable of expected windows", values: u.days.map((d) => `${fmtCount(d.coverage.usableWindows)} of ${fmtCount(d.coverage.expectedWindows)}`) }]}
            />
          )}
        />
        <Definitions
          items={[
            ["Windows expected", "Corvane computes a 5-minute window starting at every whole minute of a stay; expected are the windows starting in the stay's time within the range that end by the stay's end (discharge, or now for a stay still going). A window belongs to the day it starts on."],
            ["Usable windows", "windows computed and graded good or limited by the current engine version."],
            ["Coverage", "usable windows ÷ windows expected: the share of stay time with a usable index value. Missing beats, a monitor not streaming and unusable signal all lower it."],
            ["Share unusable", "of the windows computed, the share graded unusable (no index value shown)."],
          ]}
        />
      </section>

      <section aria-labelledby="messages-heading" className="card p-4">
        <h2 id="messages-heading">Reminders and escalations</h2>
        <MessagesTable m={m} />
        <Definitions
          items={[
            ["Reminder e-mails", "sent by Corvane to each charge nurse on duty when a flag waited past the unit's reminder time; one e-mail per person, counted on the day it was created."],
            ["Reminder escalation e-mails", "sent to each clinician of the unit when a flag waited past the unit's escalation time."],
            ["Escalation e-mails", "sent when a person escalated a flag to a clinician."],
            ["Not delivered", "e-mails created in the range that are still waiting to be sent or failed."],
            ["Escalations recorded", "escalations of flags in the Review queue in the range (each one a recorded transition to escalated)."],
          ]}
        />
      </section>
      <p className="text-sm text-muted">
        These figures describe how the review process worked; they say nothing about any patient. The CSV export holds
        the same figures, and each day&apos;s, one row per unit, period, severity and figure.
      </p>
    </div>
  );
}
