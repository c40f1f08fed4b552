// Handoff summary of a unit for a night (?night=YYYY-MM-DD; default: the unit's latest night): one compact section
// per bed, each kept on one printed page where it fits.
import { notFound } from "next/navigation";
import { z } from "zod";
import { auditAs, guardPage } from "@/lib/auth/guard";
import { can } from "@/lib/auth/roles";
import { handoffUnit, unitHandoff } from "@/lib/review/handoff";
import { addDays, latestNight, nightParamSchema, reviewNight, type ReviewNight } from "@/lib/review/night";
import { unitIdSchema } from "@/lib/units/unit-id.validation";
import { HandoffFrame } from "@/components/handoff/HandoffFrame";
import { DirectionRule, HandoffHeader } from "@/components/handoff/HandoffHeader";
import { NightPicker } from "@/components/handoff/NightPicker";
import { PrintButton } from "@/components/handoff/PrintButton";
import { StayHandoffSection } from "@/components/handoff/StayHandoffSection";

export const metadata = { title: "Handoff summary" };

/** Nights offered by the picker: the latest and the two weeks before it. */
const PICKER_NIGHTS = 14;

// A malformed night falls back to the default rather than failing the page (the picker only sends valid ones).
const querySchema = z.object({ night: nightParamSchema.optional().catch(undefined) });

const asChoice = (n: ReviewNight) => ({ night: n.night, from: n.from.toISOString(), to: n.to.toISOString(), hours: n.hours });

export default async function UnitHandoffPage({
  params,
  searchParams,
}: {
  params: Promise<{ unitId: string }>;
  searchParams: Promise<Record<string, string | string[] | undefined>>;
}) {
  const unitId = unitIdSchema.safeParse((await params).unitId);
  if (!unitId.success) notFound();
  // Pages render beside their layout, so the page guards its own data too.
  const actor = await guardPage("trends.view", unitId.data);
  const unit = await handoffUnit(unitId.data);
  if (!unit) notFound();
  const query = querySchema.parse(await searchParams);
  const now = new Date();
  const latest = latestNight(now, unit.night);
  const night = query.night ? reviewNight(query.night, unit.night) : latest;
  const u = (await unitHandoff(unitId.data, night, undefined, now))!;
  await auditAs(actor, {
    action: "handoff.view",
    permission: "trends.view",
    unitId: unitId.data,
    target: { type: "unit", id: unitId.data },
    detail: { night: night.night, stays: u.stays.map((s) => s.stay.stayId) },
  });
  const nights = Array.from({ length: PICKER_NIGHTS }, (_, k) => asChoice(reviewNight(addDays(latest.night, -k), unit.night)));
  const canWrite = can(actor.grants, "handoff.write", unitId.data);

  return (
    <HandoffFrame header={<HandoffHeader context={`unit ${unit.unitCode}`} title={unit.unitName} night={u.night} asOf={u.asOf} />}>
      <div className="space-y-4 pt-4 print:pt-0">
        <div className="flex flex-wrap items-end gap-3 print:hidden">
          <NightPicker nights={nights} selected={asChoice(night)} timeZone={unit.night.timeZone} />
          <PrintButton />
        </div>
        <DirectionRule />
        <h2 className="sr-only">Patients, bed by bed</h2>
        {u.stays.length === 0 ? (
          <p className="card p-4">No patients were in this unit during this night.</p>
        ) : (
          u.stays.map((h) => <StayHandoffSection key={h.stay.stayId} h={h} canWrite={canWrite} headingLevel={3} />)
        )}
      </div>
    </HandoffFrame>
  );
}
