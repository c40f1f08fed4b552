// One device's record (under the device layout, which renders its serial and tabs): the record with its edit form,
// the stream token, the bed and its history, and decommissioning. The forms render only for people who manage
// devices in the unit; everyone with "devices.view" sees the same facts. No clinical values: bed labels only.
import { notFound } from "next/navigation";
import { can } from "@/lib/auth/roles";
import { guardDevicePage } from "@/lib/devices/device-scope";
import { deviceDetail } from "@/lib/devices/registry";
import { servedByDemoSimulator, simulatorCommand } from "@/lib/devices/simulator-command";
import { formatLocal } from "@/lib/time";
import { Notice } from "@/components/Notice";
import { StreamStateTag } from "@/components/devices/StreamStateTag";
import { AssignmentPanel } from "@/components/devices/registry/AssignmentPanel";
import { DecommissionForm } from "@/components/devices/registry/DecommissionForm";
import { EditDeviceForm } from "@/components/devices/registry/EditDeviceForm";
import { TokenPanel } from "@/components/devices/registry/TokenPanel";

export const metadata = { title: "Device" };

const STATUS_WORD = { active: "In service", maintenance: "In maintenance", decommissioned: "Decommissioned" } as const;

function Row({ term, children }: { term: string; children: React.ReactNode }) {
  return (
    <>
      <dt className="text-muted">{term}</dt>
      <dd className="min-w-0 break-words">{children}</dd>
    </>
  );
}

export default async function DevicePage({ params }: { params: Promise<{ unitId: string; deviceId: string }> }) {
  const { actor, device: header } = await guardDevicePage("devices.view", await params);
  const d = await deviceDetail(header.unitId, header.id);
  if (!d) notFound();
  const canManage = can(actor.grants, "devices.manage", d.unit.id);
  const tz = d.unit.timeZone;
  const decommissioned = d.status === "decommissioned";
  const placeholderCommand = simulatorCommand({ serial: d.serial, streamUrl: d.streamUrl }, null);
  return (
    <div className="space-y-5">
      {d.decommissioned && (
        <Notice tone="info">
          Decommissioned on <time dateTime={d.decommissioned.at}>{formatLocal(d.decommissioned.at, tz)}</time>
          {d.decommissioned.by ? ` by ${d.decommissioned.by}` : ""}. Reason: {d.decommissioned.reason}
        </Notice>
      )}
      <div className="grid items-start gap-5 lg:grid-cols-2">
        <section aria-labelledby="record-heading" className="card space-y-4 p-5">
          <h2 id="record-heading">Record</h2>
          <dl className="grid grid-cols-[max-content_1fr] gap-x-6 gap-y-2">
            <Row term="Status">
              <span className="font-bold">{STATUS_WORD[d.status]}</span>
            </Row>
            <Row term="Stream">
              <StreamStateTag state={d.stream} />
              {d.lastBeatAt && (
                <span className="block text-sm text-muted">
                  last beat <time dateTime={d.lastBeatAt}>{formatLocal(d.lastBeatAt, tz)}</time>
                </span>
              )}
            </Row>
            <Row term="Manufacturer">{d.manufacturer || "—"}</Row>
            <Row term="Model">{d.model}</Row>
            <Row term="Firmware"><span className="font-mono">{d.firmware}</span></Row>
            <Row term="RR resolution"><span className="font-mono">{d.timestampResolutionMs}</span> ms</Row>
            <Row term="Stream address"><span className="font-mono text-sm">{d.streamUrl}</span></Row>
            <Row term="Next maintenance due">
              {d.nextMaintenanceDue ? (
                <>
                  <time dateTime={d.nextMaintenanceDue}>{d.nextMaintenanceDue}</time>
                  {d.maintenanceOverdue && <span className="ml-2 font-bold"><span aria-hidden="true">◷ </span>overdue</span>}
                </>
              ) : (
                <span className="text-muted">None set (see the Maintenance log)</span>
              )}
            </Row>
            <Row term="Registered">
              <time dateTime={d.registeredAt}>{formatLocal(d.registeredAt, tz)}</time>
              {d.registeredBy && <span className="text-muted"> by {d.registeredBy}</span>}
            </Row>
            <Row term="Notes">{d.notes ? <span className="whitespace-pre-line">{d.notes}</span> : <span className="text-muted">—</span>}</Row>
          </dl>
          {canManage && !decommissioned && (
            <details className="rounded-md border border-line bg-surface px-3 py-2 open:pb-4">
              <summary className="cursor-pointer font-bold text-accent">Edit record</summary>
              <div className="mt-3">
                <EditDeviceForm
                  unitId={d.unit.id}
                  deviceId={d.id}
                  version={d.version}
                  status={d.status === "maintenance" ? "maintenance" : "active"}
                  values={{
                    manufacturer: d.manufacturer,
                    model: d.model,
                    firmware: d.firmware,
                    timestampResolutionMs: String(d.timestampResolutionMs),
                    streamUrl: d.streamUrl,
                    notes: d.notes,
                  }}
                />
              </div>
            </details>
          )}
        </section>

        <div className="space-y-5">
          <TokenPanel
            unitId={d.unit.id}
            deviceId={d.id}
            serial={d.serial}
            timeZone={tz}
            token={d.token}
            canManage={canManage}
            decommissioned={decommissioned}
            placeholderCommand={placeholderCommand}
            demoSimulator={servedByDemoSimulator({ serial: d.serial, streamUrl: d.streamUrl })}
          />
          <AssignmentPanel
            unitId={d.unit.id}
            deviceId={d.id}
            serial={d.serial}
            timeZone={tz}
            current={d.current}
            beds={d.beds}
            canManage={canManage}
            decommissioned={decommissioned}
            inMaintenance={d.status === "maintenance"}
          />
        </div>
      </div>

      <section aria-labelledby="history-heading" className="card overflow-x-auto">
        <h2 id="history-heading" className="px-4 pt-4">Bed history</h2>
        {d.history.length ? (
          <table className="mt-2">
            <caption className="sr-only">Beds {d.serial} was assigned to, newest first</caption>
            <thead>
              <tr>
                <th scope="col">Bed</th>
                <th scope="col">From</th>
                <th scope="col">To</th>
                <th scope="col">Assigned by</th>
                <th scope="col">Unassigned by</th>
              </tr>
            </thead>
            <tbody>
              {d.history.map((a) => (
                <tr key={a.id}>
                  <th scope="row" className="border-b border-line px-3 py-2 text-left font-mono text-ink">{a.bedLabel}</th>
                  <td><time dateTime={a.from}>{formatLocal(a.from, tz)}</time></td>
                  <td>{a.to ? <time dateTime={a.to}>{formatLocal(a.to, tz)}</time> : <span className="font-bold">On the bed now</span>}</td>
                  <td>{a.assignedBy ?? <span className="text-muted">—</span>}</td>
                  <td>{a.to ? a.unassignedBy ?? <span className="text-muted">—</span> : ""}</td>
                </tr>
              ))}
            </tbody>
          </table>
        ) : (
          <p className="px-4 pb-4 pt-2 text-muted">This device has not been on a bed yet.</p>
        )}
      </section>

      {canManage && !decommissioned && (
        <section aria-labelledby="decommission-heading" className="card space-y-3 p-5">
          <h2 id="decommission-heading">Decommission</h2>
          {d.current ? (
            <p>
              <span aria-hidden="true">◷ </span>
              <span className="font-mono">{d.serial}</span> is on bed <span className="font-mono font-bold">{d.current.bedLabel}</span>. Unassign it from the bed
              first (in the Bed panel above); then it can be decommissioned.
            </p>
          ) : (
            <>
              <p className="text-muted">For a device leaving service for good. For a repair or a service visit, set it to “In maintenance” in Edit record instead.</p>
              <DecommissionForm unitId={d.unit.id} deviceId={d.id} serial={d.serial} />
            </>
          )}
        </section>
      )}
    </div>
  );
}
