// Heart rate of a stay over a span, for the Night review's zoom panel: single beats up to 15 min, heart rate per
// bucket beyond. Default span: the last 5 min of the stay's latest night. Guarded by role and the stay's unit; each
// read audited with its range.
import { auditAs } from "@/lib/auth/guard";
import { beatsQuerySchema, beatsView } from "@/lib/review/beats-view";
import { chosenNight } from "@/lib/review/night-windows";
import { guardStayApi } from "@/lib/review/stay-guard";

export const dynamic = "force-dynamic";

const DEFAULT_SPAN_MS = 5 * 60_000;

const json = (status: number, body: unknown) => Response.json(body, { status, headers: { "Cache-Control": "no-store" } });

export async function GET(req: Request, { params }: { params: Promise<{ stayId: string }> }) {
  const query = beatsQuerySchema.safeParse(Object.fromEntries(new URL(req.url).searchParams));
  const guard = await guardStayApi("trends.view", (await params).stayId);
  if (!guard.ok) return guard.response;
  if (!query.success) return json(400, { error: "bad_request", message: query.error.issues[0]?.message ?? "Bad query." });
  const { actor, stay } = guard;
  let fromMs: number;
  let toMs: number;
  if (query.data.from && query.data.to) {
    fromMs = Date.parse(query.data.from);
    toMs = Date.parse(query.data.to);
  } else {
    // The night's end, or the stay's last moment (discharge, or now) when that comes first.
    const now = Date.now();
    const night = chosenNight(stay, undefined, new Date(now));
    toMs = Math.min(night.to.getTime(), stay.dischargedAt ? Date.parse(stay.dischargedAt) : now, now);
    fromMs = toMs - DEFAULT_SPAN_MS;
  }
  const dto = await beatsView(stay, fromMs, toMs);
  await auditAs(actor, {
    action: "beats.view",
    permission: "trends.view",
    unitId: stay.unitId,
    target: { type: "stay", id: stay.stayId },
    detail: { from: dto.from, to: dto.to, mode: dto.mode },
  });
  return json(200, dto);
}
