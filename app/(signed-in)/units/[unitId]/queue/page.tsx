// Review queue: the unit's flags awaiting a decision or still standing, oldest first, with the time each has waited
// against the unit's target. Charge nurses work it (acknowledge, escalate, resolve); clinicians see it read-only.
// Server-rendered once (audited), then kept current by the client list. Filters live in the URL.
import { notFound } from "next/navigation";
import { auditAs, guardPage } from "@/lib/auth/guard";
import { can } from "@/lib/auth/roles";
import { queueFiltersSchema } from "@/lib/queue/queue.validation";
import { cliniciansOfUnit, reviewQueue } from "@/lib/queue/repository";
import { unitIdSchema } from "@/lib/units/unit-id.validation";
import { DecisionSupportCaution } from "@/components/DecisionSupportCaution";
import { QueueFiltersForm } from "@/components/queue/QueueFiltersForm";
import { QueueList } from "@/components/queue/QueueList";
import { PageHeader } from "@/components/shell/PageHeader";

export const metadata = { title: "Review queue" };

export default async function ReviewQueuePage({ params, searchParams }: {
  params: Promise<{ unitId: string }>;
  searchParams: Promise<Record<string, string | string[] | undefined>>;
}) {
  const unitId = unitIdSchema.safeParse((await params).unitId);
  if (!unitId.success) notFound();
  // Pages render beside their layout, so the page guards its own data too.
  const actor = await guardPage("queue.view", unitId.data);
  const raw = Object.fromEntries(Object.entries(await searchParams).map(([k, v]) => [k, Array.isArray(v) ? v[0] : v]));
  // A filter that does not parse (an edited URL) is dropped, with a note, rather than failing the page.
  const parsed = queueFiltersSchema.safeParse(raw);
  const filters = parsed.success ? parsed.data : {};
  const queue = await reviewQueue(unitId.data, filters);
  if (!queue) notFound();
  const canAct = can(actor.grants, "queue.act", unitId.data);
  const clinicians = canAct ? await cliniciansOfUnit(unitId.data) : [];
  await auditAs(actor, {
    action: "queue.view",
    permission: "queue.view",
    unitId: unitId.data,
    target: { type: "unit", id: unitId.data },
    detail: { via: "page", filters, flagIds: queue.flags.map((f) => f.id) },
  });
  return (
    <div className="space-y-4">
      <PageHeader
        eyebrow="Review queue"
        title={queue.unit.name}
        aside={
          <p className="text-muted">
            Acknowledgement target: <span className="font-bold text-ink">{queue.unit.ackTargetMinutes} min</span>
            {canAct ? null : <span className="block text-sm">You can view this queue; charge nurses work it.</span>}
          </p>
        }
      />
      <DecisionSupportCaution />
      <QueueFiltersForm unitId={queue.unit.id} beds={queue.beds} filters={filters} invalid={!parsed.success} />
      <QueueList initial={queue} canAct={canAct} clinicians={clinicians} />
    </div>
  );
}
