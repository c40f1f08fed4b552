// The Quality metrics of a filter as a CSV download (tidy long format, documented in lib/quality/export-csv.ts): the
// same filter schema as the page, guarded by metrics.view (in the filter's unit when one is named), audited.
import { auditAs, guardApi } from "@/lib/auth/guard";
import { metricsCsv } from "@/lib/quality/export-csv";
import { qualityMetrics } from "@/lib/quality/metrics";
import { qualityFilterSchema } from "@/lib/quality/quality.validation";

export const dynamic = "force-dynamic";

const json = (status: number, body: unknown) => Response.json(body, { status, headers: { "Cache-Control": "no-store" } });

export async function GET(req: Request) {
  const filter = qualityFilterSchema.safeParse(Object.fromEntries(new URL(req.url).searchParams));
  if (!filter.success) return json(400, { error: "bad_request", message: filter.error.issues.map((i) => i.message).join(" ") });
  const guard = await guardApi("metrics.view", filter.data.unit);
  if (!guard.ok) return guard.response;
  const metrics = await qualityMetrics(guard.actor.grants, filter.data);
  if (!metrics) return json(404, { error: "not_found", message: "No such unit." });
  const body = metricsCsv(metrics);
  await auditAs(guard.actor, {
    action: "quality.metrics.export",
    permission: "metrics.view",
    unitId: metrics.filter.unit,
    detail: { filter: metrics.filter, defaulted: metrics.defaulted, unitIds: metrics.units.map((u) => u.unit.id), bytes: Buffer.byteLength(body) },
  });
  const name = `corvane-quality-metrics_${metrics.filter.from}_${metrics.filter.to}.csv`;
  return new Response(body, {
    status: 200,
    headers: {
      "Content-Type": "text/csv; charset=utf-8; header=present",
      "Content-Disposition": `attachment; filename="${name}"`,
      "Cache-Control": "no-store",
    },
  });
}
