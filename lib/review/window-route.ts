// The GET handler shared by the Window detail and Research panel route handlers: parse ?start, guard by role and the
// stay's unit, compute, audit the read. Without ?start the stay's latest window; a stay with no window yet answers 200
// with window: null; an unknown start answers 404.
import "server-only";
import { auditAs } from "@/lib/auth/guard";
import { guardStayApi } from "./stay-guard";
import type { StayScopeDTO } from "./stay-scope";
import { windowQuerySchema } from "./window-detail";

const json = (status: number, body: unknown) => Response.json(body, { status, headers: { "Cache-Control": "no-store" } });

export function windowRoute<T extends { window: { start: string } | null }>(
  action: "window.view" | "window.research.view",
  compute: (stay: StayScopeDTO, startIso: string | null) => Promise<T | null>,
) {
  return async function GET(req: Request, { params }: { params: Promise<{ stayId: string }> }) {
    const query = windowQuerySchema.safeParse(Object.fromEntries(new URL(req.url).searchParams));
    const guard = await guardStayApi("trends.view", (await params).stayId);
    if (!guard.ok) return guard.response;
    if (!query.success) return json(400, { error: "bad_request", message: query.error.issues[0]?.message ?? "Bad query." });
    const { actor, stay } = guard;
    const dto = await compute(stay, query.data.start ?? null);
    if (!dto) return json(404, { error: "not_found", message: "No stored window of this stay starts at that time." });
    await auditAs(actor, {
      action,
      permission: "trends.view",
      unitId: stay.unitId,
      target: { type: "stay", id: stay.stayId },
      detail: { window_start: dto.window?.start ?? null, via: "api" },
    });
    return json(200, dto);
  };
}
