// One night of a stay for the Night review (the page refreshes from here while the night is in progress): windows,
// baselines, flags, annotations, coverage. Guarded by role and the stay's unit; each read audited.
import { auditAs } from "@/lib/auth/guard";
import { chosenNight, nightQuerySchema, nightWindows } from "@/lib/review/night-windows";
import { guardStayApi } from "@/lib/review/stay-guard";

export const dynamic = "force-dynamic";

const json = (status: number, body: unknown) => Response.json(body, { status, headers: { "Cache-Control": "no-store" } });

export async function GET(req: Request, { params }: { params: Promise<{ stayId: string }> }) {
  const query = nightQuerySchema.safeParse(Object.fromEntries(new URL(req.url).searchParams));
  const guard = await guardStayApi("trends.view", (await params).stayId);
  if (!guard.ok) return guard.response;
  if (!query.success) return json(400, { error: "bad_request", message: query.error.issues[0]?.message ?? "Bad query." });
  const { actor, stay } = guard;
  const night = chosenNight(stay, query.data.night);
  const dto = await nightWindows(stay, night);
  await auditAs(actor, {
    action: "night.view",
    permission: "trends.view",
    unitId: stay.unitId,
    target: { type: "stay", id: stay.stayId },
    detail: { night: night.night, via: "api" },
  });
  return json(200, dto);
}
