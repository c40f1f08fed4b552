import { notFound } from "next/navigation";
import { auditAs, guardPage } from "@/lib/auth/guard";
import { censusOf } from "@/lib/units/repository";
import { unitIdSchema } from "@/lib/units/unit-id.validation";
import { DecisionSupportCaution } from "@/components/DecisionSupportCaution";
import { CensusTable } from "@/components/census/CensusTable";

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
      <div className="flex flex-wrap items-end justify-between gap-4">
        <div>
          <p className="text-sm text-muted">Unit census</p>
          <h1>{census.unit.name}</h1>
        </div>
        <p className="text-muted">
          <span className="text-2xl font-bold text-ink">{census.occupied}</span> of {census.beds.length} beds occupied
        </p>
      </div>
      <DecisionSupportCaution />
      <CensusTable initial={census} />
    </div>
  );
}
