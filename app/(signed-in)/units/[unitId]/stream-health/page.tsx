// Stream health: where biomedical engineers land. Every device of the unit with its stream state and the last day's
// gaps, duplicates, malformed events, reconnects and clock figures, most trouble first. Stream data only (no clinical
// value, no patient), so the read is not audited. Server-rendered once, then kept current by the client table.
import { notFound } from "next/navigation";
import { guardPage } from "@/lib/auth/guard";
import { unitStreamHealth } from "@/lib/devices/health";
import { unitIdSchema } from "@/lib/units/unit-id.validation";
import { StreamHealthTable } from "@/components/devices/health/StreamHealthTable";
import { PageHeader } from "@/components/shell/PageHeader";

export const metadata = { title: "Stream health" };

export default async function StreamHealthPage({ params }: { params: Promise<{ unitId: string }> }) {
  const unitId = unitIdSchema.safeParse((await params).unitId);
  if (!unitId.success) notFound();
  // Pages render beside their layout, so the page guards its own data too.
  await guardPage("devices.view", unitId.data);
  const health = await unitStreamHealth(unitId.data);
  if (!health) notFound();
  return (
    <div className="space-y-4">
      <PageHeader eyebrow="Stream health" title={health.unit.name} />
      <StreamHealthTable initial={health} />
    </div>
  );
}
