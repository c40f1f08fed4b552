// The reader's own audit exports, newest first, each with its manifest: the filter, rows, bytes, first and last hash
// and the SHA-256 of the file as sent, so a file kept elsewhere can be checked (sha256sum) against it. The manifest
// downloads as JSON from a data: URL, built here from the same record.
import Link from "next/link";
import { auditAs, guardPage } from "@/lib/auth/guard";
import { ROLE_LABELS, unitsWhere } from "@/lib/auth/roles";
import { listOwnExports, type AuditExportManifest } from "@/lib/audit/export/manifest";
import { isUuid } from "@/lib/audit/audit.validation";
import { listUnits } from "@/lib/units/repository";
import { formatLocalPrecise } from "@/lib/time";

export const metadata = { title: "Audit exports" };
const PAGE_SIZE = 20;

const FORMAT_TEXT = { csv: "CSV", "fhir-ndjson": "FHIR R4 NDJSON" } as const;
const STATUS = {
  done: { word: "Complete", shape: "✓" },
  running: { word: "Running (or interrupted)", shape: "…" },
  failed: { word: "Stopped before the end", shape: "✕" },
} as const;

function filterWords(m: AuditExportManifest): string {
  const f = m.filter;
  if (!f) return "(not readable)";
  const parts = [
    f.from && `from ${f.from}`,
    f.to && `until ${f.to} (not included)`,
    (f.from || f.to) && `on the clock of ${f.zone}`,
    f.person && `person ${f.person}`,
    f.role && `role ${ROLE_LABELS[f.role]}`,
    f.action && `action ${f.action}${f.action.endsWith(".") ? "*" : ""}`,
    f.patient && `patient or stay ${f.patient}`,
    f.device && `device ${f.device}`,
    f.outcome && `outcome ${f.outcome}`,
  ].filter(Boolean);
  return parts.length ? parts.join("; ") : "everything";
}

/** The manifest as a self-describing JSON document. */
function manifestJson(m: AuditExportManifest): string {
  return JSON.stringify(
    {
      export_id: m.exportId,
      file_name: m.fileName,
      format: m.format,
      status: m.status,
      filter: m.filter,
      up_to_seq: m.upToSeq,
      rows: m.rows,
      bytes: m.bytes,
      first_hash: m.firstHash,
      last_hash: m.lastHash,
      sha256: m.sha256,
      started_at: m.startedAt,
      finished_at: m.finishedAt,
      exported_by: m.by.email,
      chain_rule: "hash = SHA-256(prev_hash || RFC 8785 canonical JSON of the entry's fields)",
    },
    null,
    2,
  );
}

export default async function AuditExportsPage({ searchParams }: { searchParams: Promise<Record<string, string | string[] | undefined>> }) {
  const actor = await guardPage("audit.view");
  const before = (await searchParams).before;
  const cursor = typeof before === "string" && isUuid(before) ? before : undefined;
  const [{ exports, older }, units] = await Promise.all([listOwnExports(actor.userId, { before: cursor, size: PAGE_SIZE }), listUnits()]);
  const unitIds = unitsWhere(actor.grants, "audit.view");
  const zone = units.find((u) => unitIds.includes(u.id))?.timeZone ?? "UTC";
  await auditAs(actor, { action: "audit.view", permission: "audit.view", detail: { page: "exports", olderThan: cursor ?? null, shown: exports.length } });

  return (
    <div className="space-y-5">
      <div>
        <p className="text-sm"><Link href="/audit">← Audit trail</Link></p>
        <h1>Your audit exports</h1>
        <p className="text-muted">
          Each export&apos;s manifest: what was exported and the SHA-256 of the file exactly as it was sent. Compare it with
          the file you kept (for example <code className="font-mono">sha256sum</code>). Times in {zone}.
        </p>
      </div>
      {exports.length === 0 ? (
        <p className="card p-6">You have not exported the audit trail yet. Exports start from the <Link href="/audit">Audit trail</Link> page.</p>
      ) : (
        <ul className="space-y-4" aria-label="Exports, newest first">
          {exports.map((m) => (
            <li key={m.exportId} className="card p-5">
              <div className="flex flex-wrap items-baseline justify-between gap-x-6 gap-y-2">
                <h2 className="break-all font-mono text-base">{m.fileName}</h2>
                <a
                  className="btn-secondary"
                  download={m.fileName.replace(/\.[a-z]+$/, ".manifest.json")}
                  href={`data:application/json;charset=utf-8,${encodeURIComponent(manifestJson(m))}`}
                >
                  Download manifest<span className="sr-only"> of {m.fileName}</span>
                </a>
              </div>
              <dl className="mt-3 grid gap-x-6 gap-y-2 text-sm sm:grid-cols-[10rem_1fr]">
                <dt className="font-bold text-muted">Status</dt>
                <dd><span aria-hidden="true">{STATUS[m.status].shape} </span>{STATUS[m.status].word}</dd>
                <dt className="font-bold text-muted">Format</dt>
                <dd>{FORMAT_TEXT[m.format]}</dd>
                <dt className="font-bold text-muted">Filter</dt>
                <dd>{filterWords(m)}{m.upToSeq ? `; entries up to number ${m.upToSeq}` : ""}</dd>
                <dt className="font-bold text-muted">Rows</dt>
                <dd>{m.rows?.toLocaleString("en") ?? "—"}{m.bytes !== null ? ` (${m.bytes.toLocaleString("en")} bytes)` : ""}</dd>
                <dt className="font-bold text-muted">Started</dt>
                <dd><time dateTime={m.startedAt}>{formatLocalPrecise(m.startedAt, zone)}</time></dd>
                <dt className="font-bold text-muted">Finished</dt>
                <dd>{m.finishedAt ? <time dateTime={m.finishedAt}>{formatLocalPrecise(m.finishedAt, zone)}</time> : "—"}</dd>
                <dt className="font-bold text-muted">By</dt>
                <dd>{m.by.name ? `${m.by.name} (${m.by.email})` : m.by.email ?? "—"}</dd>
                <dt className="font-bold text-muted">First hash</dt>
                <dd className="break-all font-mono">{m.firstHash ?? "—"}</dd>
                <dt className="font-bold text-muted">Last hash</dt>
                <dd className="break-all font-mono">{m.lastHash ?? "—"}</dd>
                <dt className="font-bold text-muted">File SHA-256</dt>
                <dd className="break-all font-mono">{m.sha256 ?? "— (the export did not finish)"}</dd>
              </dl>
            </li>
          ))}
        </ul>
      )}
      <nav aria-label="Export pages" className="flex gap-4 text-sm">
        {cursor && <Link href="/audit/exports">Newest exports</Link>}
        {older && <Link href={`/audit/exports?before=${older}`}>Older exports →</Link>}
      </nav>
    </div>
  );
}
