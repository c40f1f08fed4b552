// One export of the filtered audit trail, as a web ReadableStream for the route handler (and the benchmark, which
// drives the same function). Rows are read from PostgreSQL in keyset batches of BATCH_ROWS on seq, one batch per
// pull, so only one batch is in memory however many rows there are, and a slow reader slows the reads down
// (backpressure: the stream asks for the next batch only when its queue has room).
// The manifest (audit_exports) is written running at the start and completed just before the stream closes, with the
// rows, bytes, first and last hash and the SHA-256 of exactly the bytes enqueued. The export is audited at the start;
// its upper bound is the newest entry before that audit write, so the export never contains its own entry.
import "server-only";
import { createHash, randomUUID } from "node:crypto";
import type { Knex } from "knex";
import { formatInTimeZone } from "date-fns-tz";
import type { Actor } from "@/lib/auth/guard";
import { roleFor } from "@/lib/auth/roles";
import { db as defaultDb } from "@/lib/db/knex";
import type { AuditEventRow } from "@/lib/db/tables";
import { recordAudit } from "../record";
import type { AuditExportFormat, AuditFilter } from "../audit.validation";
import { auditRowsAfter, countAuditEvents, newestSeq, resolveAuditFilter, type AuditScope } from "../repository";
import { CSV_HEADER, csvRecord } from "./csv";
import { ndjsonRecord } from "./fhir";

/** Rows per database read: large enough that per-query overhead is small, small enough to keep memory flat. */
export const BATCH_ROWS = 1000;

const FORMATS: Record<AuditExportFormat, { contentType: string; extension: string; header: string; record: (r: AuditEventRow) => string }> = {
  csv: { contentType: "text/csv; charset=utf-8; header=present", extension: "csv", header: CSV_HEADER, record: csvRecord },
  "fhir-ndjson": { contentType: "application/fhir+ndjson", extension: "ndjson", header: "", record: ndjsonRecord },
};

export type ExportActor = Pick<Actor, "userId" | "email" | "grants" | "requestId" | "clientAddress">;

export interface StartedAuditExport {
  exportId: string;
  fileName: string;
  contentType: string;
  /** Rows that match the filter up to the export's upper bound: what the stream will deliver. */
  expectedRows: number;
  body: ReadableStream<Uint8Array>;
}

export type StartAuditExportResult =
  | { ok: true; started: StartedAuditExport }
  | { ok: false; field: "patient" | "device"; message: string };

export async function startAuditExport(
  opts: { format: AuditExportFormat; filter: AuditFilter; actor: ExportActor; scope: AuditScope },
  knex: Knex = defaultDb,
): Promise<StartAuditExportResult> {
  const resolved = await resolveAuditFilter(opts.filter, knex);
  if (!resolved.ok) return resolved;
  const format = FORMATS[opts.format];
  const upToSeq = (await newestSeq(knex)) ?? "0";
  const expectedRows = await countAuditEvents(resolved, opts.scope, upToSeq, knex);
  const exportId = randomUUID();
  const fileName = `corvane-audit-${formatInTimeZone(new Date(), "UTC", "yyyyMMdd'T'HHmm'Z'")}-${exportId.slice(0, 8)}.${format.extension}`;
  const manifestFilter = { ...opts.filter, upToSeq };

  await knex.transaction(async (trx) => {
    await trx("audit_exports").insert({
      id: exportId,
      created_by: opts.actor.userId,
      format: opts.format,
      filter: JSON.stringify(manifestFilter),
      status: "running",
      file_name: fileName,
    });
    await recordAudit(
      {
        actor: { userId: opts.actor.userId, email: opts.actor.email, role: roleFor(opts.actor.grants, "audit.view") },
        action: "audit.export",
        target: { type: "audit_export", id: exportId },
        outcome: "success",
        detail: { exportId, format: opts.format, filter: manifestFilter, expectedRows },
        requestId: opts.actor.requestId,
        clientAddress: opts.actor.clientAddress,
      },
      trx,
    );
  });

  const encoder = new TextEncoder();
  const sha256 = createHash("sha256");
  let afterSeq = "0";
  let rows = 0;
  let bytes = 0;
  let firstHash: string | null = null;
  let lastHash: string | null = null;
  let headerSent = format.header === "";
  let settled = false;

  const settle = async (status: "done" | "failed") => {
    if (settled) return;
    settled = true;
    await knex("audit_exports")
      .where({ id: exportId })
      .update({
        status,
        finished_at: new Date(),
        rows,
        bytes,
        first_hash: firstHash,
        last_hash: lastHash,
        sha256: status === "done" ? sha256.digest("hex") : null,
      });
  };

  const body = new ReadableStream<Uint8Array>(
    {
      async pull(controller) {
        try {
          let text = headerSent ? "" : format.header;
          headerSent = true;
          const batch = await auditRowsAfter(resolved, opts.scope, { afterSeq, upToSeq }, BATCH_ROWS, knex);
          for (const r of batch) text += format.record(r);
          if (batch.length) {
            firstHash ??= batch[0]!.hash;
            lastHash = batch.at(-1)!.hash;
            afterSeq = String(batch.at(-1)!.seq);
            rows += batch.length;
          }
          if (text) {
            const chunk = encoder.encode(text);
            sha256.update(chunk);
            bytes += chunk.byteLength;
            controller.enqueue(chunk);
          }
          // A short batch is the last one: complete the manifest before the reader sees the end.
          if (batch.length < BATCH_ROWS) {
            await settle("done");
            controller.close();
          }
        } catch (err) {
          await settle("failed").catch(() => undefined);
          controller.error(err);
        }
      },
      async cancel() {
        await settle("failed");
      },
    },
    // One batch read ahead of the reader, no more.
    { highWaterMark: 1 },
  );

  return { ok: true, started: { exportId, fileName, contentType: format.contentType, expectedRows, body } };
}
