// Stream health of a unit's devices as JSON (the Stream health table refreshes from here). Guarded by role and unit;
// stream data only, no patient data, so reads are not audited (the guard audits refusals).
import { guardApi } from "@/lib/auth/guard";
import { unitStreamHealth } from "@/lib/devices/health";
import { unitIdSchema } from "@/lib/units/unit-id.validation";

export const dynamic = "force-dynamic";

const json = (status: number, body: unknown) => Response.json(body, { status, headers: { "Cache-Control": "no-store" } });

export async function GET(_req: Request, { params }: { params: Promise<{ unitId: string }> }) {
  const parsed = unitIdSchema.safeParse((await params).unitId);
  if (!parsed.success) return json(400, { error: "bad_request", message: "Not a unit id." });
  const guard = await guardApi("devices.view", parsed.data);
  if (!guard.ok) return guard.response;
  const health = await unitStreamHealth(parsed.data);
  if (!health) return json(404, { error: "not_found", message: "No such unit." });
  return json(200, health);
}
