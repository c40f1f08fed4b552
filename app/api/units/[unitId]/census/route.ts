// The unit census as JSON (the census screen refreshes from here). Guarded by role and unit; each read audited.
import { auditAs, guardApi } from "@/lib/auth/guard";
import { censusOf } from "@/lib/units/repository";
import { unitIdSchema } from "@/lib/units/unit-id.validation";

export const dynamic = "force-dynamic";

export async function GET(_req: Request, { params }: { params: Promise<{ unitId: string }> }) {
  const parsed = unitIdSchema.safeParse((await params).unitId);
  if (!parsed.success) return Response.json({ error: "bad_request", message: "Not a unit id." }, { status: 400 });
  const guard = await guardApi("census.view", parsed.data);
  if (!guard.ok) return guard.response;
  const census = await censusOf(parsed.data);
  if (!census) return Response.json({ error: "not_found", message: "No such unit." }, { status: 404 });
  await auditAs(guard.actor, { action: "census.view", permission: "census.view", unitId: parsed.data, target: { type: "unit", id: parsed.data }, detail: { via: "api" } });
  return Response.json(census, { headers: { "Cache-Control": "no-store" } });
}
