// Audit trail: search the trail of the units the reader may audit (and unit-less entries such as sign-ins), newest
// first, keyset-paginated; export the same filter as CSV or FHIR R4 NDJSON; check the hash chain. Filters live in
// the URL (a plain GET form), so a search can be shared and reloaded. Each search is itself audited.
import Link from "next/link";
import { auditAs, guardPage } from "@/lib/auth/guard";
import { ROLE_LABELS, ROLES, unitsWhere, type Role } from "@/lib/auth/roles";
import { AUDIT_OUTCOMES, auditSearchQuerySchema, filterOf, type AuditFilter } from "@/lib/audit/audit.validation";
import { knownActions, resolveAuditFilter, searchAuditEvents, type AuditSearchPage } from "@/lib/audit/repository";
import { listUnits } from "@/lib/units/repository";
import { formatLocal, formatLocalPrecise } from "@/lib/time";
import { ChainCheckForm } from "@/components/audit/ChainCheckForm";
import { AuditExportButtons } from "@/components/audit/AuditExportButtons";
import { FieldError } from "@/components/FieldError";
import { Notice } from "@/components/Notice";
import { PageHeader } from "@/components/shell/PageHeader";

export const metadata = { title: "Audit trail" };
const PAGE_SIZE = 50;

const roleLabel = (r: string) => ((ROLES as readonly string[]).includes(r) ? ROLE_LABELS[r as Role] : r);
const OUTCOME_TEXT = { success: "Success", failure: "Failure", denied: "Denied" } as const;

/** The filter as URL parameters (empty fields left out), for page links and the export route. */
function filterQuery(filter: AuditFilter): URLSearchParams {
  const q = new URLSearchParams();
  for (const [k, v] of Object.entries(filter)) if (v) q.set(k, String(v));
  return q;
}

function Outcome({ outcome }: { outcome: keyof typeof OUTCOME_TEXT }) {
  if (outcome === "success") return <span>{OUTCOME_TEXT.success}</span>;
  return (
    <strong className="inline-flex items-center gap-1 text-problem">
      <svg aria-hidden="true" viewBox="0 0 20 20" className="h-4 w-4">
        {outcome === "denied" ? (
          <>
            <circle cx="10" cy="10" r="7.5" fill="none" stroke="currentColor" strokeWidth="2" />
            <path d="M5 15 15 5" stroke="currentColor" strokeWidth="2" />
          </>
        ) : (
          <path d="M10 3 18 17H2Z M10 8v4 M10 14.5v.5" fill="none" stroke="currentColor" strokeWidth="2" strokeLinejoin="round" />
        )}
      </svg>
      {OUTCOME_TEXT[outcome]}
    </strong>
  );
}

/** A labelled filter with its error list; the control inside takes its id and wiring from `control(name)`. */
function FilterField({ name, label, wide, errors, children }: {
  name: string;
  label: React.ReactNode;
  wide?: boolean;
  errors: string[] | undefined;
  children: React.ReactNode;
}) {
  return (
    <div className={wide ? "lg:col-span-2" : undefined}>
      <label htmlFor={`audit-${name}`} className="mb-1 block text-sm font-bold">{label}</label>
      {children}
      <FieldError id={`audit-${name}-error`} errors={errors} />
    </div>
  );
}

export default async function AuditPage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const actor = await guardPage("audit.view");
  const unitIds = unitsWhere(actor.grants, "audit.view");
  const [units, actions] = await Promise.all([listUnits(), knownActions()]);
  const unitName = new Map(units.map((u) => [u.id, u.name]));
  const mine = units.filter((u) => unitIds.includes(u.id));
  const zones = [...new Set([...mine.map((u) => u.timeZone), "UTC"])].map((z) => ({
    zone: z,
    units: mine.filter((u) => u.timeZone === z).map((u) => u.name),
  }));
  const defaultZone = mine[0]?.timeZone ?? "UTC";

  const raw = Object.fromEntries(
    Object.entries(await searchParams).flatMap(([k, v]) => {
      const s = Array.isArray(v) ? v[0] : v;
      return s?.trim() ? [[k, s]] : [];
    }),
  );
  const parsed = auditSearchQuerySchema.safeParse({ zone: defaultZone, ...raw });
  const fieldErrors: Record<string, string[]> = {};
  let result: AuditSearchPage | null = null;
  let filter: AuditFilter | null = null;
  let range: { from: Date | null; to: Date | null } = { from: null, to: null };
  if (!parsed.success) {
    for (const issue of parsed.error.issues) (fieldErrors[String(issue.path[0] ?? "_form")] ??= []).push(issue.message);
  } else {
    filter = filterOf(parsed.data);
    const resolved = await resolveAuditFilter(filter);
    if (!resolved.ok) fieldErrors[resolved.field] = [resolved.message];
    else {
      range = { from: resolved.from, to: resolved.to };
      result = await searchAuditEvents(resolved, { unitIds }, { before: parsed.data.before, after: parsed.data.after, size: PAGE_SIZE });
      await auditAs(actor, {
        action: "audit.view",
        permission: "audit.view",
        detail: { filter, olderThan: parsed.data.before ?? null, newerThan: parsed.data.after ?? null, shown: result.events.length },
      });
    }
  }
  const zone = parsed.success ? parsed.data.zone : defaultZone;
  const value = (k: string) => (typeof raw[k] === "string" ? (raw[k] as string) : "");
  const query = filter ? filterQuery(filter) : new URLSearchParams();
  const link = (cursor: Record<string, string>) => `/audit?${new URLSearchParams([...query, ...Object.entries(cursor)])}`;
  const groups = [...new Set(actions.map((a) => `${a.split(".")[0]}.`))];
  const actionOptions = [...groups, ...actions];
  if (value("action") && !actionOptions.includes(value("action"))) actionOptions.push(value("action"));
  /** A filter control's id, name, value and error wiring (its error list is `audit-<name>-error`, see FilterField). */
  const control = (k: string, defaultValue = value(k)) => ({
    id: `audit-${k}`,
    name: k,
    defaultValue,
    className: "field-input",
    "aria-invalid": fieldErrors[k] ? true : undefined,
    "aria-describedby": `audit-${k}-error`,
  });
  const anyFilter = filter !== null && [...query.keys()].some((k) => k !== "zone");

  return (
    <div className="space-y-5">
      <PageHeader
        title="Audit trail"
        description={
          <p className="text-muted">
            Every sign-in, view of patient data and change, newest first. Entries cannot be edited or deleted; each one
            carries the SHA-256 hash of the one before, so any change breaks the chain. You see the entries of the units
            you may audit, and those that belong to no unit (sign-ins, automatic jobs).
          </p>
        }
      />

      <form method="get" action="/audit" aria-labelledby="filters-heading" className="card space-y-4 p-4" noValidate>
        <h2 id="filters-heading">Find entries</h2>
        <div className="grid gap-x-4 gap-y-3 sm:grid-cols-2 lg:grid-cols-4">
          <FilterField name="from" label="From" errors={fieldErrors.from}>
            <input {...control("from")} type="datetime-local" step={60} />
          </FilterField>
          <FilterField name="to" label={<>Until <span className="font-normal text-muted">(not included)</span></>} errors={fieldErrors.to}>
            <input {...control("to")} type="datetime-local" step={60} />
          </FilterField>
          <FilterField name="zone" label="Times read on the clock of" wide errors={fieldErrors.zone}>
            <select {...control("zone", zone)}>
              {zones.map((z) => (
                <option key={z.zone} value={z.zone}>{z.units.length ? `${z.units.join(", ")} (${z.zone})` : z.zone}</option>
              ))}
              {!zones.some((z) => z.zone === zone) && <option value={zone}>{zone}</option>}
            </select>
          </FilterField>
          <FilterField name="person" label="Person" errors={fieldErrors.person}>
            <input {...control("person")} type="text" placeholder="e-mail or user id" autoComplete="off" />
          </FilterField>
          <FilterField name="role" label="Role" errors={fieldErrors.role}>
            <select {...control("role")}>
              <option value="">Any role</option>
              {ROLES.map((r) => <option key={r} value={r}>{ROLE_LABELS[r]}</option>)}
            </select>
          </FilterField>
          <FilterField name="action" label="Action" errors={fieldErrors.action}>
            <select {...control("action")}>
              <option value="">Any action</option>
              {actionOptions.map((a) => (
                <option key={a} value={a}>{a.endsWith(".") ? `${a}* (every ${a.slice(0, -1)} action)` : a}</option>
              ))}
            </select>
          </FilterField>
          <FilterField name="outcome" label="Outcome" errors={fieldErrors.outcome}>
            <select {...control("outcome")}>
              <option value="">Any outcome</option>
              {AUDIT_OUTCOMES.map((o) => <option key={o} value={o}>{OUTCOME_TEXT[o]}</option>)}
            </select>
          </FilterField>
          <FilterField name="patient" label="Patient or stay" wide errors={fieldErrors.patient}>
            <input {...control("patient")} type="text" placeholder="record number or stay id" autoComplete="off" />
          </FilterField>
          <FilterField name="device" label="Device" wide errors={fieldErrors.device}>
            <input {...control("device")} type="text" placeholder="serial number or device id" autoComplete="off" />
          </FilterField>
        </div>
        {Object.keys(fieldErrors).length > 0 && (
          <Notice tone="problem">
            {fieldErrors.after || fieldErrors.before
              ? "A page link in the address was not understood, so no search was run. Search again."
              : "No search was run: correct the marked field and search again."}
          </Notice>
        )}
        <div className="flex flex-wrap items-center gap-4">
          <button type="submit" className="btn-primary">Search</button>
          {(anyFilter || Object.keys(fieldErrors).length > 0) && <Link href="/audit">Clear filters</Link>}
        </div>
      </form>

      {result && filter && (
        <>
          <section className="card overflow-x-auto" aria-labelledby="events-heading">
            <div className="flex flex-wrap items-baseline justify-between gap-x-6 gap-y-1 px-4 pt-4">
              <h2 id="events-heading">Entries</h2>
              <p className="text-sm text-muted">
                {range.from || range.to ? (
                  <>
                    {range.from ? `From ${formatLocal(range.from, zone)}` : "Up to"}
                    {range.to ? `${range.from ? " until" : ""} ${formatLocal(range.to, zone)} (not included)` : " onwards"}.{" "}
                  </>
                ) : null}
                Times in {zone}.
              </p>
            </div>
            {result.events.length === 0 ? (
              <p className="px-4 py-6">No entries match{anyFilter ? " these filters" : ""}{parsed.success && (parsed.data.before || parsed.data.after) ? " on this page" : ""}.</p>
            ) : (
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
                      <td className="font-mono"><Link href={`/audit/${e.seq}`} aria-label={`Entry ${e.seq}: details`}>{e.seq}</Link></td>
                      <td className="whitespace-nowrap"><time dateTime={e.occurredAt} title={e.occurredAt}>{formatLocalPrecise(e.occurredAt, zone)}</time></td>
                      <td>{e.actorEmail ?? <span className="text-muted">automatic</span>}{e.actorRole && <span className="block text-muted">{roleLabel(e.actorRole)}</span>}</td>
                      <td className="font-mono">{e.action}</td>
                      <td className="font-mono text-xs">{e.targetType ? `${e.targetType}: ${e.targetId}` : "—"}</td>
                      <td>{e.unitId ? unitName.get(e.unitId) ?? e.unitId : "—"}</td>
                      <td><Outcome outcome={e.outcome} /></td>
                      <td className="font-mono text-xs">{e.clientAddress ?? "—"}</td>
                    </tr>
                  ))}
                </tbody>
              </table>
            )}
          </section>
          {(result.events.length > 0 || result.newer) && <nav aria-label="Audit pages" className="flex flex-wrap items-center gap-4 text-sm">
            {result.events.length > 0 && (
              <span className="text-muted">Entries {result.events[0]!.seq} to {result.events.at(-1)!.seq}{result.older ? "; more older entries" : ""}</span>
            )}
            {result.newer && <Link href={link({ after: result.newer })}>← Newer entries</Link>}
            {result.older && <Link href={link({ before: result.older })}>Older entries →</Link>}
            {result.newer && <Link href={link({})}>Newest entries</Link>}
          </nav>}

          <section className="card space-y-3 p-6" aria-labelledby="export-heading">
            <h2 id="export-heading">Export these entries</h2>
            <p className="text-sm text-muted">
              Every entry matching the filters above (not only this page), oldest first, as CSV or as HL7 FHIR R4
              AuditEvent resources (one per line). Each export is recorded in the trail, with a manifest of its rows,
              first and last hash and the file&apos;s SHA-256 in <Link href="/audit/exports">your exports</Link>.
            </p>
            <AuditExportButtons query={query.toString()} />
          </section>
        </>
      )}

      <section className="card p-6" aria-labelledby="chain-heading">
        <h2 id="chain-heading">Chain check</h2>
        <p className="mb-4 mt-1 text-sm text-muted">Recomputes every hash in the range and reports the first broken link. Leave both empty to check the whole trail.</p>
        <ChainCheckForm />
      </section>
    </div>
  );
}

