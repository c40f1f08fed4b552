// One patient's night on the Handoff summary: monitoring and coverage, windows by grade, key indices against the
// personal baseline (shape and words, never colour alone), flags, annotations, device issues and the note. Rendered
// on the server; the note form is the only client piece. Kept in one block when printed.
import Link from "next/link";
import { formatInTimeZone } from "date-fns-tz";
import { describeChange, formatIndexValue, type PatientHandoffDTO } from "@/lib/review/handoff";
import { clockTime, hoursAndMinutes, percent } from "./format";
import { HandoffNoteForm } from "./HandoffNoteForm";

const SEVERITY = { watch: "◇ Watch", review: "◆ Review" } as const;
const STATE = { open: "open", acknowledged: "acknowledged", escalated: "escalated", resolved: "resolved" } as const;
const plural = (n: number, word: string) => `${n} ${word}${n === 1 ? "" : "s"}`;
const KIND = { medication: "Medication", procedure: "Procedure", repositioning: "Repositioning", other: "Other" } as const;

function Fact({ term, children }: { term: string; children: React.ReactNode }) {
  return (
    <div>
      <dt className="text-sm text-muted">{term}</dt>
      <dd className="font-bold">{children}</dd>
    </div>
  );
}

export function StayHandoffSection({ h, canWrite, headingLevel = 2 }: { h: PatientHandoffDTO; canWrite: boolean; headingLevel?: 2 | 3 }) {
  const tz = h.night.timeZone;
  const s = h.stay;
  const Heading = headingLevel === 2 ? "h2" : "h3";
  const Sub = headingLevel === 2 ? "h3" : "h4";
  const headingId = `stay-${s.stayId}`;
  const when = (iso: string) => formatInTimeZone(iso, tz, "EEE d MMM, HH:mm zzz");
  const leftDuringNight = s.dischargedAt !== null && s.dischargedAt > h.night.from && s.dischargedAt <= h.night.to;
  const present = h.presentHours > 0;
  const query = `night=${h.night.night}`;
  // The 5-min indices share one baseline period; the first that has one stands for all.
  const baselineSpan = h.indices.flatMap((t) => (t.kind === "short" && t.baselineFrom && t.baselineTo ? [{ from: t.baselineFrom, to: t.baselineTo }] : []))[0] ?? null;

  return (
    <section aria-labelledby={headingId} className="card space-y-4 p-4 print:break-inside-avoid print:rounded-none print:p-2">
      <div className="flex flex-wrap items-baseline justify-between gap-x-4 gap-y-1">
        <Heading id={headingId} className="text-lg font-bold">
          <span className="font-mono">{s.bedLabel}</span> · {s.displayName} <span className="font-mono text-sm font-normal text-muted">{s.recordNumber}</span>
        </Heading>
        <p className="flex flex-wrap gap-x-4 text-sm print:hidden">
          <Link href={`/stays/${s.stayId}/night?${query}`}>Night review</Link>
          {headingLevel === 3 && <Link href={`/stays/${s.stayId}/handoff?${query}`}>Patient summary</Link>}
        </p>
      </div>
      <p className="text-sm text-muted">
        Admitted {when(s.admittedAt)}
        {s.dischargedAt && <> · discharged {when(s.dischargedAt)}{leftDuringNight && <strong className="text-ink"> (during this night)</strong>}</>}
      </p>

      {!present ? (
        <p>Not in the unit during this night.</p>
      ) : (
        <>
          <dl className="grid grid-cols-2 gap-3 sm:grid-cols-4">
            <Fact term="Monitored (time with beats)">
              {hoursAndMinutes(h.monitoredHours)} of {hoursAndMinutes(h.presentHours)} in bed
            </Fact>
            <Fact term={`Coverage by usable windows, of ${h.night.inProgress ? "the night so far" : "the whole night"}`}>
              {h.coverage === null ? "—" : percent(h.coverage)}
            </Fact>
            <Fact term="5-min windows">
              {h.windows.good} good · {h.windows.limited} limited · {h.windows.unusable} unusable
            </Fact>
            <Fact term="Unusable windows">{h.device.unusableShare === null ? "no windows" : percent(h.device.unusableShare)}</Fact>
          </dl>

          <table className="text-sm">
            <caption className="sr-only">Key indices of {s.displayName} this night against the personal baseline</caption>
            <thead>
              <tr>
                <th scope="col">Index</th>
                <th scope="col">This night (median)</th>
                <th scope="col">Personal baseline (median ± spread)</th>
                <th scope="col">Change</th>
              </tr>
            </thead>
            <tbody>
              {h.indices.map((t) => (
                <tr key={t.key}>
                  <th scope="row" className="border-b border-line px-3 py-2 text-ink">
                    {t.label}
                    {t.kind === "long" && <span className="block text-xs font-normal text-muted">60-min windows</span>}
                  </th>
                  <td>
                    {t.nightMedian === null ? "—" : formatIndexValue(t.nightMedian, t)}
                    <span className="text-muted"> (n = {t.nWindows})</span>
                  </td>
                  <td>{t.baselineMedian === null ? "—" : `${formatIndexValue(t.baselineMedian, t)} ± ${formatIndexValue(t.baselineSpread ?? 0, t)}`}</td>
                  <td className="font-bold">{describeChange(t)}</td>
                </tr>
              ))}
            </tbody>
          </table>
          {baselineSpan && (
            <p className="text-sm text-muted">
              Personal baseline from {when(baselineSpan.from)} to {when(baselineSpan.to)}.
            </p>
          )}
        </>
      )}

      <div className="grid gap-4 md:grid-cols-2 print:grid-cols-2">
        <div>
          <Sub className="font-bold">Flags this night</Sub>
          {h.flags.length === 0 ? (
            <p className="text-muted">None.</p>
          ) : (
            <ul className="space-y-1">
              {h.flags.map((f) => (
                <li key={f.id}>
                  <span className="mr-1 rounded border border-line px-1 text-xs font-bold">{SEVERITY[f.severity]}</span>
                  {f.label} — <strong>{STATE[f.state]}</strong>
                  <span className="text-muted">
                    {" "}· {clockTime(f.conditionFrom, tz)} → {f.conditionTo ? clockTime(f.conditionTo, tz) : "still holding"}
                  </span>
                </li>
              ))}
            </ul>
          )}
        </div>
        <div>
          <Sub className="font-bold">Annotations</Sub>
          {h.annotations.length === 0 ? (
            <p className="text-muted">None.</p>
          ) : (
            <ul className="space-y-1">
              {h.annotations.map((a) => (
                <li key={a.id}>
                  <time dateTime={a.occurredAt} className="font-mono">{clockTime(a.occurredAt, tz)}</time> {KIND[a.kind]}: {a.note}
                  <span className="text-muted"> ({a.author})</span>
                </li>
              ))}
            </ul>
          )}
        </div>
      </div>

      {present && (
        <div>
          <Sub className="font-bold">Device issues</Sub>
          <ul className="space-y-1">
            <li>
              {h.device.gaps.length === 0
                ? "No stretch without beats longer than 5 min."
                : `${h.device.gaps.length} stretch${h.device.gaps.length === 1 ? "" : "es"} without beats longer than 5 min:`}
              {h.device.gaps.length > 0 && (
                <ul className="ml-5 list-disc">
                  {h.device.gaps.map((g) => (
                    <li key={g.from}>
                      {clockTime(g.from, tz)} → {clockTime(g.to, tz)} ({hoursAndMinutes(g.minutes / 60)}
                      {g.leadOff ? ", device reported lead-off" : ", no beats received"})
                    </li>
                  ))}
                </ul>
              )}
            </li>
            <li>Lead-off reported: {h.device.leadOffMinutes > 0 ? hoursAndMinutes(h.device.leadOffMinutes / 60) : "none"}</li>
            {h.device.streams.map((d) => (
              <li key={`${d.deviceId}-${d.assignedFrom}`}>
                Monitor <span className="font-mono">{d.serial}</span> ({d.model}), stream now:{" "}
                {d.status === null ? (
                  "no stream status recorded"
                ) : (
                  <>
                    {d.status.connected ? "connected" : <strong>not connected</strong>}
                    {d.status.lastBeatAt && <>, last beat {when(d.status.lastBeatAt)}</>}
                    {d.status.leadOffNow && <strong>, lead-off now</strong>}
                    {d.status.clockOffsetNoted && d.status.clockOffsetMs !== null && <strong>, device clock {(d.status.clockOffsetMs / 1000).toFixed(1)} s off (over 1 s)</strong>}
                    {d.status.lastError && <>, last error: {d.status.lastError}</>}
                    <span className="text-muted"> · device totals: {plural(d.status.gaps, "stream gap")}, {plural(d.status.reconnects, "reconnect")}</span>
                  </>
                )}
              </li>
            ))}
          </ul>
        </div>
      )}

      <div>
        <Sub className="font-bold">Clinician’s note</Sub>
        {canWrite ? (
          <>
            <HandoffNoteForm key={`${s.stayId}-${h.night.night}`} stayId={s.stayId} night={h.night.night} note={h.note} timeZone={tz} />
            {/* The form is not printed; the saved note is. */}
            <div className="hidden print:block">
              <SavedNote h={h} />
            </div>
          </>
        ) : (
          <SavedNote h={h} />
        )}
      </div>
    </section>
  );
}

function SavedNote({ h }: { h: PatientHandoffDTO }) {
  if (!h.note) return <p className="text-muted">No note for this night.</p>;
  return (
    <>
      <p className="whitespace-pre-line">{h.note.note}</p>
      <p className="text-sm text-muted">
        {h.note.updatedBy}, {formatInTimeZone(h.note.updatedAt, h.night.timeZone, "EEE d MMM, HH:mm zzz")} (version {h.note.version})
      </p>
    </>
  );
}
