import Link from "next/link";
import { auditAs, guardPage } from "@/lib/auth/guard";
import { ROLE_LABELS, ROLES, unitsWhere, type Role } from "@/lib/auth/roles";
import { listAuditEvents } from "@/lib/audit/repository";
import { auditQuerySchema } from "@/lib/audit/audit.validation";
import { listUnits } from "@/lib/units/repository";
import { formatLocalPrecise } from "@/lib/time";
import { ChainCheckForm } from "@/components/audit/ChainCheckForm";

export const metadata = { title: "Audit trail" };
const PAGE_SIZE = 50;

const roleLabel = (r: string) => ((ROLES as readonly string[]).includes(r) ? ROLE_LABELS[r as Role] : r);
const OUTCOME_TEXT = { success: "Success", failure: "Failure", denied: "Denied" } as const;

export default async function AuditPage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const actor = await guardPage("audit.view");
  const { page } = auditQuerySchema.parse(await searchParams);
  const unitIds = unitsWhere(actor.grants, "audit.view");
  const [result, units] = await Promise.all([listAuditEvents({ unitIds, page, pageSize: PAGE_SIZE }), listUnits()]);
  await auditAs(actor, { action: "audit.view", permission: "audit.view", detail: { page } });
  const unitName = new Map(units.map((u) => [u.id, u.name]));
  const zone = units.find((u) => unitIds.includes(u.id))?.timeZone ?? "UTC";
  const pages = Math.max(1, Math.ceil(result.total / PAGE_SIZE));
  return (
    <div className="space-y-5">
      <div>
        <h1>Audit trail</h1>
        <p className="text-muted">
          Every sign-in, view of patient data and change, newest first. Entries cannot be edited or deleted; each one
          carries the SHA-256 hash of the one before, so any change breaks the chain. Times in {zone}.
        </p>
      </div>
      <section className="card p-6" aria-labelledby="chain-heading">
        <h2 id="chain-heading">Chain check</h2>
        <p className="mb-4 mt-1 text-sm text-muted">Recomputes every hash in the range and reports the first broken link. Leave both empty to check the whole trail.</p>
        <ChainCheckForm />
      </section>
      <section className="card overflow-x-auto" aria-labelledby="events-heading">
        <h2 id="events-heading" className="px-4 pt-4">Entries</h2>
        <table className="mt-2 text-sm">
          <thead>
            <tr>
              <th scope="col">#</th>
              <th scope="col">Time</th>
              <th scope="col">Who</th>
              <th scope="col">Action</th>
              <th scope="col">Target</th>
              <th scope="col">Unit</th>
              <th scope="col">Outcome</th>
              <th scope="col">Address</th>
            </tr>
          </thead>
          <tbody>
            {result.events.map((e) => (
              <tr key={e.seq}>
                <td className="font-mono">{e.seq}</td>
                <td className="whitespace-nowrap"><time dateTime={e.occurredAt} title={e.occurredAt}>{formatLocalPrecise(e.occurredAt, zone)}</time></td>
                <td>{e.actorEmail ?? <span className="text-muted">system</span>}{e.actorRole && <span className="block text-muted">{roleLabel(e.actorRole)}</span>}</td>
                <td className="font-mono">{e.action}</td>
                <td className="font-mono text-xs">{e.targetType ? `${e.targetType}: ${e.targetId}` : "—"}</td>
                <td>{e.unitId ? unitName.get(e.unitId) ?? e.unitId : "—"}</td>
                <td>{e.outcome === "success" ? OUTCOME_TEXT.success : <strong>{OUTCOME_TEXT[e.outcome]}</strong>}</td>
                <td className="font-mono text-xs">{e.clientAddress ?? "—"}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </section>
      <nav aria-label="Audit pages" className="flex items-center gap-4 text-sm">
        <span className="text-muted">{result.total} entries · page {result.page} of {pages}</span>
        {result.page > 1 && <Link href={`/audit?page=${result.page - 1}`}>Newer entries</Link>}
        {result.page < pages && <Link href={`/audit?page=${result.page + 1}`}>Older entries</Link>}
      </nav>
    </div>
  );
}
