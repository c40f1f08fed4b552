// One 5-min window of a stay for the Window detail: stored values, quality and parameters, and the plots recomputed
// from the beats. Without ?start the stay's latest window; a stay with no window yet answers 200 with window: null.
// Guarded by role and the stay's unit; each read audited.
import { auditAs } from "@/lib/auth/guard";
import { guardStayApi } from "@/lib/review/stay-guard";
import { windowDetail, windowQuerySchema } from "@/lib/review/window-detail";

export const dynamic = "force-dynamic";

const json = (status: number, body: unknown) => Response.json(body, { status, headers: { "Cache-Control": "no-store" } });

export async function GET(req: Request, { params }: { params: Promise<{ stayId: string }> }) {
  const query = windowQuerySchema.safeParse(Object.fromEntries(new URL(req.url).searchParams));
  const guard = await guardStayApi("trends.view", (await params).stayId);
  if (!guard.ok) return guard.response;
  if (!query.success) return json(400, { error: "bad_request", message: query.error.issues[0]?.message ?? "Bad query." });
  const { actor, stay } = guard;
  const dto = await windowDetail(stay, query.data.start ?? null);
  if (!dto) return json(404, { error: "not_found", message: "No stored window of this stay starts at that time." });
  await auditAs(actor, {
    action: "window.view",
    permission: "trends.view",
    unitId: stay.unitId,
    target: { type: "stay", id: stay.stayId },
    detail: { window_start: dto.window?.start ?? null, via: "api" },
  });
  return json(200, dto);
}
