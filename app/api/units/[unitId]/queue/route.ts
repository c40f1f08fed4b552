// The Review queue as JSON (the queue screen refreshes from here). Guarded by role and unit; each read audited, with
// the ids of the flags it showed.
import { auditAs, guardApi } from "@/lib/auth/guard";
import { queueFiltersSchema } from "@/lib/queue/queue.validation";
import { reviewQueue } from "@/lib/queue/repository";
import { unitIdSchema } from "@/lib/units/unit-id.validation";

export const dynamic = "force-dynamic";

const json = (status: number, body: unknown) => Response.json(body, { status, headers: { "Cache-Control": "no-store" } });

export async function GET(req: Request, { params }: { params: Promise<{ unitId: string }> }) {
  const unitId = unitIdSchema.safeParse((await params).unitId);
  if (!unitId.success) return json(400, { error: "bad_request", message: "Not a unit id." });
  const filters = queueFiltersSchema.safeParse(Object.fromEntries(new URL(req.url).searchParams));
  if (!filters.success) return json(400, { error: "bad_request", message: filters.error.issues.map((i) => i.message).join(" ") });
  const guard = await guardApi("queue.view", unitId.data);
  if (!guard.ok) return guard.response;
  const queue = await reviewQueue(unitId.data, filters.data);
  if (!queue) return json(404, { error: "not_found", message: "No such unit." });
  await auditAs(guard.actor, {
    action: "queue.view",
    permission: "queue.view",
    unitId: unitId.data,
    target: { type: "unit", id: unitId.data },
    detail: { via: "api", filters: filters.data, flagIds: queue.flags.map((f) => f.id) },
  });
  return json(200, queue);
}
