// The filtered audit trail as a file: ?format=csv|fhir-ndjson and the search filter (lib/audit/audit.validation.ts).
// Streamed (lib/audit/export/run.ts); the manifest id and the expected row count travel in headers, so the page can
// show progress and link the manifest. Audited by the export itself.
import { guardApi } from "@/lib/auth/guard";
import { unitsWhere } from "@/lib/auth/roles";
import { auditExportQuerySchema, filterOf } from "@/lib/audit/audit.validation";
import { startAuditExport } from "@/lib/audit/export/run";

export const dynamic = "force-dynamic";

const json = (status: number, body: unknown) => Response.json(body, { status, headers: { "Cache-Control": "no-store" } });

export async function GET(req: Request) {
  const query = auditExportQuerySchema.safeParse(Object.fromEntries(new URL(req.url).searchParams));
  if (!query.success) return json(400, { error: "bad_request", message: query.error.issues.map((i) => i.message).join(" ") });
  const guard = await guardApi("audit.view");
  if (!guard.ok) return guard.response;
  const result = await startAuditExport({
    format: query.data.format,
    filter: filterOf(query.data),
    actor: guard.actor,
    scope: { unitIds: unitsWhere(guard.actor.grants, "audit.view") },
  });
  if (!result.ok) return json(400, { error: "bad_request", message: result.message });
  const { started } = result;
  return new Response(started.body, {
    status: 200,
    headers: {
      "Content-Type": started.contentType,
      "Content-Disposition": `attachment; filename="${started.fileName}"`,
      "Cache-Control": "no-store",
      "X-Corvane-Export-Id": started.exportId,
      "X-Corvane-Export-Rows": String(started.expectedRows),
    },
  });
}
