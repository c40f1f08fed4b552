// Handoff summary of one patient for a night (?night=YYYY-MM-DD; default: the latest night the patient was in).
import Link from "next/link";
import { z } from "zod";
import { auditAs } from "@/lib/auth/guard";
import { can } from "@/lib/auth/roles";
import { defaultNightOf, patientHandoff } from "@/lib/review/handoff";
import { nightParamSchema, nightsOfStay, reviewNight } from "@/lib/review/night";
import { guardStayPage } from "@/lib/review/stay-guard";
import { HandoffFrame } from "@/components/handoff/HandoffFrame";
import { DirectionRule, HandoffHeader } from "@/components/handoff/HandoffHeader";
import { NightPicker } from "@/components/handoff/NightPicker";
import { PrintButton } from "@/components/handoff/PrintButton";
import { StayHandoffSection } from "@/components/handoff/StayHandoffSection";

export const metadata = { title: "Handoff summary" };

// A malformed night falls back to the default rather than failing the page (the picker only sends valid ones).
const querySchema = z.object({ night: nightParamSchema.optional().catch(undefined) });

const asChoice = (n: { night: string; from: Date; to: Date; hours: number }) => ({ night: n.night, from: n.from.toISOString(), to: n.to.toISOString(), hours: n.hours });

export default async function StayHandoffPage({
  params,
  searchParams,
}: {
  params: Promise<{ stayId: string }>;
  searchParams: Promise<Record<string, string | string[] | undefined>>;
}) {
  // Pages render beside their layout, so the page guards its own data too.
  const { actor, stay } = await guardStayPage("trends.view", (await params).stayId);
  const query = querySchema.parse(await searchParams);
  const now = new Date();
  const night = query.night ? reviewNight(query.night, stay.night) : defaultNightOf(stay, now);
  const h = await patientHandoff(stay, night, undefined, now);
  await auditAs(actor, {
    action: "handoff.view",
    permission: "trends.view",
    unitId: stay.unitId,
    target: { type: "stay", id: stay.stayId },
    detail: { night: night.night },
  });
  const nights = nightsOfStay(new Date(stay.admittedAt), stay.dischargedAt ? new Date(stay.dischargedAt) : now, stay.night).map(asChoice);

  return (
    <HandoffFrame
      header={
        <HandoffHeader
          context={`${stay.unitName}, bed ${stay.bedLabel}`}
          title={<>{stay.displayName} <span className="font-mono text-lg font-normal text-muted">{stay.recordNumber}</span></>}
          night={h.night}
          asOf={h.asOf}
        />
      }
    >
      <div className="space-y-4 pt-4 print:pt-0">
        <div className="flex flex-wrap items-end gap-3 print:hidden">
          <NightPicker nights={nights} selected={asChoice(night)} timeZone={stay.night.timeZone} />
          <PrintButton />
          <Link href={`/units/${stay.unitId}/handoff?night=${night.night}`} className="ml-auto self-center">Whole unit for this night</Link>
        </div>
        <DirectionRule />
        <StayHandoffSection h={h} canWrite={can(actor.grants, "handoff.write", stay.unitId)} />
      </div>
    </HandoffFrame>
  );
}
