// Ward overview: every bed of a unit at a glance — current indices against the patient's own baseline, signal
// quality, a heart-rate sparkline of the night, stream status and open review flags. Server-rendered once (audited),
// then kept current by the client table.
import { notFound } from "next/navigation";
import { auditAs, guardPage } from "@/lib/auth/guard";
import { wardOverview } from "@/lib/review/overview";
import { unitIdSchema } from "@/lib/units/unit-id.validation";
import { DecisionSupportCaution } from "@/components/DecisionSupportCaution";
import { OverviewTable } from "@/components/overview/OverviewTable";
import { PageHeader } from "@/components/shell/PageHeader";

export const metadata = { title: "Ward overview" };

export default async function WardOverviewPage({ params }: { params: Promise<{ unitId: string }> }) {
  const unitId = unitIdSchema.safeParse((await params).unitId);
  if (!unitId.success) notFound();
  // Pages render beside their layout, so the page guards its own data too.
  const actor = await guardPage("trends.view", unitId.data);
  const overview = await wardOverview(unitId.data);
  if (!overview) notFound();
  await auditAs(actor, {
    action: "overview.view",
    permission: "trends.view",
    unitId: unitId.data,
    target: { type: "unit", id: unitId.data },
    detail: { via: "page", stayIds: overview.beds.flatMap((b) => (b.stay ? [b.stay.stayId] : [])) },
  });
  const occupied = overview.beds.filter((b) => b.stay).length;
  return (
    // On a wide wall display the table takes the whole screen width, past the shell's reading width.
    <div className="space-y-4 2xl:mx-[calc(50%-50vw+1.5rem)]">
      <PageHeader
        eyebrow="Ward overview"
        title={overview.unit.name}
        aside={
          <p className="text-muted">
            <span className="text-2xl font-bold text-ink">{occupied}</span> of {overview.beds.length} beds occupied
          </p>
        }
      />
      <DecisionSupportCaution />
      <OverviewTable initial={overview} />
    </div>
  );
}
