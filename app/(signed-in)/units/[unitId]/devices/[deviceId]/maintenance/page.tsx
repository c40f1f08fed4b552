import { notFound } from "next/navigation";
import { can } from "@/lib/auth/roles";
import { MAX_ATTACHMENT_BYTES, MAX_ENTRY_UPLOAD_BYTES } from "@/lib/devices/attachments";
import { guardDevicePage } from "@/lib/devices/device-scope";
import { daysBetween, DUE_SOON_DAYS, maintenanceLog, todayIn } from "@/lib/devices/maintenance";
import { DueTag } from "@/components/devices/maintenance/DueTag";
import { MaintenanceEntryForm } from "@/components/devices/maintenance/MaintenanceEntryForm";
import { MaintenanceLogList } from "@/components/devices/maintenance/MaintenanceLogList";
import { formatDay } from "@/components/devices/maintenance/format";

export const metadata = { title: "Maintenance log" };

export default async function DeviceMaintenancePage({ params }: { params: Promise<{ unitId: string; deviceId: string }> }) {
  // The layout guards too, but pages render beside it: the page guards its own data.
  const { actor, device } = await guardDevicePage("devices.view", await params);
  const log = await maintenanceLog(device.id);
  if (!log) notFound();
  const today = todayIn(device.timeZone);
  const decommissioned = device.status === "decommissioned";
  const mayRecord = can(actor.grants, "devices.manage", device.unitId) && !decommissioned;
  return (
    <div className="space-y-6">
      <h2>Maintenance log</h2>

      <section aria-labelledby="next-due" className="card p-4">
        <h3 id="next-due" className="text-sm font-bold text-muted">Next maintenance</h3>
        <p className="mt-2">
          {log.nextDueOn ? (
            <DueTag nextDueOn={log.nextDueOn} daysUntilDue={daysBetween(today, log.nextDueOn)} dueSoonDays={DUE_SOON_DAYS} size="large" />
          ) : (
            <span className="text-lg font-bold">{log.entries.length ? "No next due date set" : "No maintenance recorded yet"}</span>
          )}
        </p>
        <p className="mt-2 text-sm text-muted">
          Firmware now <span className="font-mono text-ink">{log.firmware}</span> · today is {formatDay(today)} in {device.unitName}
        </p>
      </section>

      {mayRecord && (
        <section aria-labelledby="record-maintenance" className="space-y-3">
          <h3 id="record-maintenance">Record maintenance</h3>
          <MaintenanceEntryForm
            unitId={device.unitId}
            deviceId={device.id}
            today={today}
            firmware={log.firmware}
            nextDueHint={log.nextDueOn ? formatDay(log.nextDueOn) : null}
            maxFileBytes={MAX_ATTACHMENT_BYTES}
            maxEntryBytes={MAX_ENTRY_UPLOAD_BYTES}
          />
        </section>
      )}
      {decommissioned && <p className="text-muted">This device is decommissioned; its maintenance log is kept as it was.</p>}

      <section aria-labelledby="entries" className="space-y-3">
        <h3 id="entries">Entries, newest first</h3>
        <MaintenanceLogList entries={log.entries} unitId={device.unitId} deviceId={device.id} timeZone={device.timeZone} />
      </section>
    </div>
  );
}
