// A device's maintenance entries, newest first: what was done, when and by whom, firmware before → after, the next
// due date the entry set, the note and the attachments as download links (the route serves them as downloads only).
import type { MaintenanceEntryDTO } from "@/lib/devices/maintenance";
import { ATTACHMENT_TYPE_WORDS, formatBytes } from "@/lib/devices/attachments";
import { MAINTENANCE_KIND_LABELS } from "@/lib/devices/maintenance.validation";
import { formatLocal } from "@/lib/time";
import { formatDay } from "./format";

export function MaintenanceLogList({ entries, unitId, deviceId, timeZone }: {
  entries: MaintenanceEntryDTO[];
  unitId: string;
  deviceId: string;
  timeZone: string;
}) {
  if (!entries.length) return <p className="text-muted">No maintenance recorded for this device yet.</p>;
  return (
    <ol className="space-y-3">
      {entries.map((e) => (
        <li key={e.id} className="card p-4">
          <article aria-labelledby={`entry-${e.id}`} className="space-y-2">
            <h4 id={`entry-${e.id}`} className="font-bold">
              {MAINTENANCE_KIND_LABELS[e.kind]} · <time dateTime={e.performedOn}>{formatDay(e.performedOn)}</time>
            </h4>
            <dl className="grid gap-x-6 gap-y-1 text-sm sm:grid-cols-[max-content_1fr]">
              <dt className="text-muted">Work done by</dt>
              <dd>{e.performedBy}</dd>
              {e.firmwareAfter && (
                <>
                  <dt className="text-muted">Firmware</dt>
                  <dd className="font-mono">
                    {e.firmwareBefore ?? "unknown"} <span aria-hidden="true">→</span><span className="sr-only"> updated to </span> {e.firmwareAfter}
                  </dd>
                </>
              )}
              <dt className="text-muted">Next due</dt>
              <dd>{e.nextDueOn ? <time dateTime={e.nextDueOn}>{formatDay(e.nextDueOn)}</time> : "not set by this entry"}</dd>
              <dt className="text-muted">Recorded</dt>
              <dd>
                {e.recordedByName ?? "a former user"}, <time dateTime={e.recordedAt}>{formatLocal(e.recordedAt, timeZone)}</time>
              </dd>
            </dl>
            {e.note && <p className="whitespace-pre-line">{e.note}</p>}
            {e.attachments.length > 0 && (
              <div>
                <h5 className="text-sm font-bold text-muted">Attachments</h5>
                <ul className="mt-1 space-y-1">
                  {e.attachments.map((a) => (
                    <li key={a.id} className="flex flex-wrap items-center gap-2">
                      <svg aria-hidden="true" viewBox="0 0 20 20" className="h-4 w-4 shrink-0">
                        <path d="M5 2.5h7l3.5 3.5v11.5H5z M12 2.5V6h3.5" fill="none" stroke="currentColor" strokeWidth="1.5" strokeLinejoin="round" />
                      </svg>
                      <a href={`/api/units/${unitId}/devices/${deviceId}/attachments/${a.id}`} className="break-all">
                        {a.name}
                      </a>
                      <span className="text-sm text-muted">
                        {ATTACHMENT_TYPE_WORDS[a.type]}, {formatBytes(a.sizeBytes)} · download
                      </span>
                    </li>
                  ))}
                </ul>
              </div>
            )}
          </article>
        </li>
      ))}
    </ol>
  );
}
