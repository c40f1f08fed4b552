// One audit entry with every field: who, what, where, the detail as recorded, before/after values side by side when
// the detail has them, and its place in the hash chain (with a check that its hash matches its contents). Entries of
// units the reader may not audit are not found (404), the same as entries that do not exist.
import Link from "next/link";
import { notFound } from "next/navigation";
import { auditAs, guardPage } from "@/lib/auth/guard";
import { ROLE_LABELS, ROLES, unitsWhere, type Role } from "@/lib/auth/roles";
import { auditEventDetail } from "@/lib/audit/repository";
import { listUnits } from "@/lib/units/repository";
import { formatLocalPrecise } from "@/lib/time";
import { Notice } from "@/components/Notice";

export const metadata = { title: "Audit entry" };

const SEQ = /^[1-9][0-9]{0,17}$/;
const OUTCOME_TEXT = { success: "Success", failure: "Failure", denied: "Denied" } as const;
const roleLabel = (r: string) => ((ROLES as readonly string[]).includes(r) ? ROLE_LABELS[r as Role] : r);

function Field({ label, children, mono }: { label: string; children: React.ReactNode; mono?: boolean }) {
  return (
    <div className="grid gap-1 border-b border-line py-2 sm:grid-cols-[12rem_1fr]">
      <dt className="text-sm font-bold text-muted">{label}</dt>
      <dd className={`break-all ${mono ? "font-mono text-sm" : ""}`}>{children ?? <span className="text-muted">—</span>}</dd>
    </div>
  );
}

export default async function AuditEntryPage({ params }: { params: Promise<{ seq: string }> }) {
  const { seq } = await params;
  if (!SEQ.test(seq)) notFound();
  const actor = await guardPage("audit.view");
  const unitIds = unitsWhere(actor.grants, "audit.view");
  const entry = await auditEventDetail(seq, { unitIds });
  if (!entry) notFound();
  const units = await listUnits();
  const unit = units.find((u) => u.id === entry.unitId);
  const zone = unit?.timeZone ?? units.find((u) => unitIds.includes(u.id))?.timeZone ?? "UTC";
  await auditAs(actor, { action: "audit.view", permission: "audit.view", target: { type: "audit_event", id: entry.seq } });

  return (
    <div className="space-y-5">
      <div>
        <p className="text-sm"><Link href="/audit">← Audit trail</Link></p>
        <h1>Audit entry {entry.seq}</h1>
        <p className="text-muted"><span className="font-mono">{entry.action}</span> · {OUTCOME_TEXT[entry.outcome]}</p>
      </div>

      <section className="card p-6" aria-labelledby="entry-heading">
        <h2 id="entry-heading">What was recorded</h2>
        <dl className="mt-2">
          <Field label="Entry number" mono>{entry.seq}</Field>
          <Field label="Time">
            <time dateTime={entry.occurredAt}>{formatLocalPrecise(entry.occurredAt, zone)}</time>{" "}
            <span className="text-sm text-muted">({zone}; UTC {entry.occurredAt})</span>
          </Field>
          <Field label="Person">
            {entry.actorEmail || entry.actorName ? (
              <>
                {entry.actorName && <span className="block">{entry.actorName}</span>}
                {entry.actorEmail && <span className="block">{entry.actorEmail}</span>}
              </>
            ) : (
              <span className="text-muted">Automatic (no person)</span>
            )}
          </Field>
          <Field label="User id" mono>{entry.actorUserId}</Field>
          <Field label="Role">{entry.actorRole ? roleLabel(entry.actorRole) : null}</Field>
          <Field label="Action" mono>{entry.action}</Field>
          <Field label="Outcome">{OUTCOME_TEXT[entry.outcome]}</Field>
          <Field label="Target" mono>{entry.targetType ? `${entry.targetType}: ${entry.targetId}` : null}</Field>
          <Field label="Unit">{entry.unitId ? (unit ? unit.name : <span className="font-mono text-sm">{entry.unitId}</span>) : null}</Field>
          <Field label="Request id" mono>{entry.requestId}</Field>
          <Field label="Network address" mono>{entry.clientAddress}</Field>
        </dl>
      </section>

      {entry.changes && (
        <section className="card overflow-x-auto" aria-labelledby="changes-heading">
          <h2 id="changes-heading" className="px-4 pt-4">Before and after</h2>
          <table className="mt-2 text-sm">
            <thead>
              <tr>
                <th scope="col">Field</th>
                <th scope="col">Before</th>
                <th scope="col">After</th>
              </tr>
            </thead>
            <tbody>
              {entry.changes.map((c) => (
                <tr key={c.field}>
                  <th scope="row" className="font-mono font-normal text-ink">
                    {c.field}
                    {c.changed && <span className="block text-xs font-bold text-accent"><span aria-hidden="true">◆ </span>changed</span>}
                  </th>
                  <td className="whitespace-pre-wrap break-all font-mono">{c.before}</td>
                  <td className={`whitespace-pre-wrap break-all font-mono ${c.changed ? "font-bold" : ""}`}>{c.after}</td>
                </tr>
              ))}
            </tbody>
          </table>
        </section>
      )}

      <section className="card p-6" aria-labelledby="detail-heading">
        <h2 id="detail-heading">Detail as recorded</h2>
        <pre className="mt-2 overflow-x-auto rounded-md bg-raised p-3 font-mono text-sm">{JSON.stringify(entry.detail, null, 2)}</pre>
      </section>

      <section className="card space-y-3 p-6" aria-labelledby="chain-heading">
        <h2 id="chain-heading">Place in the chain</h2>
        {entry.hashMatches ? (
          <Notice tone="fine">This entry&apos;s contents match its stored hash.</Notice>
        ) : (
          <Notice tone="problem">This entry&apos;s contents do not match its stored hash: it was changed after it was written. Run the chain check.</Notice>
        )}
        <dl>
          <Field label="Hash of the entry before" mono>{entry.prevHash}</Field>
          <Field label="Hash of this entry" mono>{entry.hash}</Field>
        </dl>
      </section>
    </div>
  );
}
