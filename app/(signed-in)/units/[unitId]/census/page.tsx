import { notFound } from "next/navigation";
import { auditAs, guardPage } from "@/lib/auth/guard";
import { censusOf } from "@/lib/units/repository";
import { unitIdSchema } from "@/lib/units/unit-id.validation";
import { DecisionSupportCaution } from "@/components/DecisionSupportCaution";
import { CensusTable } from "@/components/census/CensusTable";
import { PageHeader } from "@/components/shell/PageHeader";

export const metadata = { title: "Census" };

export default async function CensusPage({ params }: { params: Promise<{ unitId: string }> }) {
  const unitId = unitIdSchema.safeParse((await params).unitId);
  if (!unitId.success) notFound();
  // Pages render beside their layout, so the page guards its own data too.
  const actor = await guardPage("census.view", unitId.data);
  const census = await censusOf(unitId.data);
  if (!census) notFound();
  await auditAs(actor, { action: "census.view", permission: "census.view", unitId: unitId.data, target: { type: "unit", id: unitId.data } });
  return (
    <div className="space-y-5">
      <PageHeader
        eyebrow="Unit census"
        title={census.unit.name}
        aside={
          <p className="text-muted">
            <span className="text-2xl font-bold text-ink">{census.occupied}</span> of {census.beds.length} beds occupied
          </p>
        }
      />
      <DecisionSupportCaution />
      <CensusTable initial={census} />
    </div>
  );
}
