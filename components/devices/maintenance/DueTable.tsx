// One of the unit's maintenance lists (overdue, due soon, none recorded …): each device links to its maintenance log.
import Link from "next/link";
import type { DueDeviceDTO } from "@/lib/devices/maintenance";
import { DueTag } from "./DueTag";
import { formatDay } from "./format";

export function DueTable({ id, title, devices, unitId, dueSoonDays, empty, withDates = true }: {
  id: string;
  title: string;
  devices: DueDeviceDTO[];
  unitId: string;
  dueSoonDays: number;
  /** Said when the list is empty. */
  empty: string;
  /** False for devices without any maintenance: they have no dates to show. */
  withDates?: boolean;
}) {
  return (
    <section aria-labelledby={id} className="space-y-2">
      <h2 id={id}>
        {title} <span className="font-normal text-muted">({devices.length})</span>
      </h2>
      {devices.length === 0 ? (
        <p className="text-muted">{empty}</p>
      ) : (
        <div className="card overflow-x-auto">
          <table>
            <caption className="sr-only">{title}</caption>
            <thead>
              <tr>
                <th scope="col">Device</th>
                <th scope="col">Model</th>
                <th scope="col">Bed</th>
                {withDates && <th scope="col">Last maintenance</th>}
                {withDates && <th scope="col">Next due</th>}
              </tr>
            </thead>
            <tbody>
              {devices.map((d) => (
                <tr key={d.id}>
                  <th scope="row" className="border-b border-line px-3 py-2 text-base font-normal">
                    <Link href={`/units/${unitId}/devices/${d.id}/maintenance`} className="font-mono font-bold">
                      {d.serial}
                    </Link>
                    {d.status === "maintenance" && <span className="block text-sm text-muted">in maintenance</span>}
                  </th>
                  <td>{d.model}</td>
                  <td>{d.bedLabel ?? <span className="text-muted">no bed</span>}</td>
                  {withDates && (
                    <>
                      <td>{d.lastPerformedOn ? <time dateTime={d.lastPerformedOn}>{formatDay(d.lastPerformedOn)}</time> : <span className="text-muted">none recorded</span>}</td>
                      <td>
                        {d.nextDueOn && d.daysUntilDue !== null ? (
                          <DueTag nextDueOn={d.nextDueOn} daysUntilDue={d.daysUntilDue} dueSoonDays={dueSoonDays} />
                        ) : (
                          <span className="text-muted">not set</span>
                        )}
                      </td>
                    </>
                  )}
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
    </section>
  );
}
