import Link from "next/link";
import { notFound } from "next/navigation";
import { guardPage } from "@/lib/auth/guard";
import { DUE_SOON_DAYS, dueList } from "@/lib/devices/maintenance";
import { unitIdSchema } from "@/lib/units/unit-id.validation";
import { DueTable } from "@/components/devices/maintenance/DueTable";
import { formatDay } from "@/components/devices/maintenance/format";
import { PageHeader } from "@/components/shell/PageHeader";

export const metadata = { title: "Maintenance" };

export default async function UnitMaintenancePage({ params }: { params: Promise<{ unitId: string }> }) {
  const unitId = unitIdSchema.safeParse((await params).unitId);
  if (!unitId.success) notFound();
  // Pages render beside their layout, so the page guards its own data too.
  await guardPage("devices.view", unitId.data);
  const due = await dueList(unitId.data);
  if (!due) notFound();
  const table = (id: string, title: string, devices: typeof due.overdue, empty: string, withDates = true) => (
    <DueTable id={id} title={title} devices={devices} unitId={due.unit.id} dueSoonDays={DUE_SOON_DAYS} empty={empty} withDates={withDates} />
  );
  return (
    <div className="space-y-6">
      <PageHeader
        eyebrow="Maintenance"
        title={due.unit.name}
        description={
          <p className="text-muted">
            Next due dates of the unit&apos;s devices in service, as of {formatDay(due.today)} ({due.unit.timeZone}). Decommissioned devices
            are not listed; their logs stay in the <Link href={`/units/${due.unit.id}/devices`}>Device registry</Link>.
          </p>
        }
      />
      {table("overdue", "Overdue", due.overdue, "No device is overdue.")}
      {table("due-soon", `Due within ${DUE_SOON_DAYS} days`, due.dueSoon, `No device is due in the next ${DUE_SOON_DAYS} days.`)}
      {table("no-maintenance", "No maintenance recorded", due.noMaintenance, "Every device has at least one maintenance entry.", false)}
      {due.noDueDate.length > 0 && table("no-due-date", "Maintenance recorded, no next due date", due.noDueDate, "")}
      <p className="text-muted">
        {due.later.length} device{due.later.length === 1 ? " is" : "s are"} due later than {DUE_SOON_DAYS} days from today.
      </p>
    </div>
  );
}
