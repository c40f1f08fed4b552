// A reader's own exports and their manifests (audit_exports): what was exported, how many rows, the first and last
// hash, and the SHA-256 of the file as sent, so a file kept elsewhere can be checked against it.
import "server-only";
import type { Knex } from "knex";
import { db as defaultDb } from "@/lib/db/knex";
import { auditFilterSchema, type AuditExportFormat, type AuditFilter } from "../audit.validation";

export interface AuditExportManifest {
  exportId: string;
  fileName: string;
  format: AuditExportFormat;
  status: "running" | "done" | "failed";
  /** The filter as chosen (null if it no longer parses), and the newest entry the export could include. */
  filter: AuditFilter | null;
  upToSeq: string | null;
  rows: number | null;
  bytes: number | null;
  firstHash: string | null;
  lastHash: string | null;
  sha256: string | null;
  startedAt: string;
  finishedAt: string | null;
  by: { email: string | null; name: string | null };
}

interface ExportRow {
  id: string;
  file_name: string;
  format: AuditExportFormat;
  status: AuditExportManifest["status"];
  filter: Record<string, unknown>;
  rows: string | null;
  bytes: string | null;
  first_hash: string | null;
  last_hash: string | null;
  sha256: string | null;
  started_at: Date;
  finished_at: Date | null;
  email: string | null;
  name: string | null;
}

const toManifest = (r: ExportRow): AuditExportManifest => {
  const filter = auditFilterSchema.safeParse(r.filter);
  return {
    exportId: r.id,
    fileName: r.file_name,
    format: r.format,
    status: r.status,
    filter: filter.success ? filter.data : null,
    upToSeq: typeof r.filter.upToSeq === "string" ? r.filter.upToSeq : null,
    rows: r.rows === null ? null : Number(r.rows),
    bytes: r.bytes === null ? null : Number(r.bytes),
    firstHash: r.first_hash,
    lastHash: r.last_hash,
    sha256: r.sha256,
    startedAt: r.started_at.toISOString(),
    finishedAt: r.finished_at?.toISOString() ?? null,
    by: { email: r.email, name: r.name },
  };
};

const select = (knex: Knex) =>
  knex("audit_exports as x")
    .leftJoin("users as u", "u.id", "x.created_by")
    .select<ExportRow[]>(
      "x.id", "x.file_name", "x.format", "x.status", "x.filter", "x.rows", "x.bytes", "x.first_hash", "x.last_hash", "x.sha256",
      "x.started_at", "x.finished_at", "u.email", "u.name",
    );

/** The reader's exports, newest first, a page at a time (keyset on started_at, id; index created_by, started_at). */
export async function listOwnExports(
  userId: string,
  page: { before?: string; size: number },
  knex: Knex = defaultDb,
): Promise<{ exports: AuditExportManifest[]; older: string | null }> {
  const q = select(knex).where("x.created_by", userId).orderBy([{ column: "x.started_at", order: "desc" }, { column: "x.id", order: "desc" }]).limit(page.size + 1);
  // The cursor is the last export shown; its own started_at is compared in full precision (microseconds).
  if (page.before) q.whereRaw("(x.started_at, x.id) < (SELECT started_at, id FROM audit_exports WHERE id = ?)", [page.before]);
  const rows = await q;
  const shown = rows.slice(0, page.size).map(toManifest);
  const last = shown.at(-1);
  return { exports: shown, older: rows.length > page.size && last ? last.exportId : null };
}
