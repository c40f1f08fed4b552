// The Ward overview as JSON (the overview table refreshes from here). Guarded by role and unit; each read audited,
// with the ids of the stays it showed.
import { auditAs, guardApi } from "@/lib/auth/guard";
import { wardOverview } from "@/lib/review/overview";
import { unitIdSchema } from "@/lib/units/unit-id.validation";

export const dynamic = "force-dynamic";

const json = (status: number, body: unknown) => Response.json(body, { status, headers: { "Cache-Control": "no-store" } });

export async function GET(_req: Request, { params }: { params: Promise<{ unitId: string }> }) {
  const parsed = unitIdSchema.safeParse((await params).unitId);
  if (!parsed.success) return json(400, { error: "bad_request", message: "Not a unit id." });
  const guard = await guardApi("trends.view", parsed.data);
  if (!guard.ok) return guard.response;
  const overview = await wardOverview(parsed.data);
  if (!overview) return json(404, { error: "not_found", message: "No such unit." });
  await auditAs(guard.actor, {
    action: "overview.view",
    permission: "trends.view",
    unitId: parsed.data,
    target: { type: "unit", id: parsed.data },
    detail: { via: "api", stayIds: overview.beds.flatMap((b) => (b.stay ? [b.stay.stayId] : [])) },
  });
  return json(200, overview);
}
