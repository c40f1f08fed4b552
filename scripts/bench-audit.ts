// npm run bench:audit — writes 1,000,000 audit entries with a valid hash chain (hashes computed here, as
// lib/audit/record.ts does, and loaded with COPY), then exports them all through the export route's own code path
// (lib/audit/export/run.ts: keyset batches → ReadableStream) as CSV and as FHIR R4 NDJSON, reading each stream to the
// end as a client would. Prints rows per second and the peak growth of the process's resident memory during each
// export (goal: under 100 MB, whatever the row count). Runs against DATABASE_URL (scripts/bench.sh starts a private
// PostgreSQL for it). All data are synthetic.
import { createHash } from "node:crypto";
import { Readable } from "node:stream";
import { pipeline } from "node:stream/promises";
import { from as copyFrom } from "pg-copy-streams";
import type { PoolClient } from "pg";
import { db } from "@/lib/db/knex";
import { auditFilterSchema, type AuditExportFormat } from "@/lib/audit/audit.validation";
import { chainHash, GENESIS_HASH, type ChainedFields } from "@/lib/audit/chain";
import { startAuditExport } from "@/lib/audit/export/run";

const ROWS = Number(process.env.BENCH_AUDIT_ROWS ?? 1_000_000);
const START = Date.UTC(2026, 0, 1);
const GOAL_MB = 100;
const ACTIONS = ["night.view", "window.view", "queue.view", "flag.acknowledge", "auth.sign_in", "compute.run", "overview.view", "annotation.create"];
const MB = 1_048_576;

/** COPY text format: backslash, tab, LF and CR escaped; null is \N. */
const copyText = (v: string | null) => (v === null ? "\\N" : v.replace(/[\\\t\n\r]/g, (c) => ({ "\\": "\\\\", "\t": "\\t", "\n": "\\n", "\r": "\\r" })[c]!));

async function load(unitId: string, userId: string): Promise<number> {
  const client = (await db.client.acquireConnection()) as PoolClient;
  const t0 = performance.now();
  let prev = GENESIS_HASH;
  const lines = function* () {
    let chunk = "";
    for (let i = 1; i <= ROWS; i++) {
      const action = ACTIONS[i % ACTIONS.length]!;
      const system = action === "compute.run";
      const fields: ChainedFields = {
        seq: String(i),
        occurred_at: new Date(START + i * 30_000).toISOString(),
        actor_user_id: system ? null : userId,
        actor_email: system ? null : "bench.reader@larkspur.example",
        actor_role: system ? null : "charge_nurse",
        action,
        target_type: system ? "compute_run" : "stay",
        target_id: `00000000-0000-4000-8000-${String(i % 500).padStart(12, "0")}`,
        unit_id: i % 10 === 0 ? null : unitId,
        outcome: i % 97 === 0 ? "denied" : "success",
        detail: { night: "2026-01-01", via: "page", n: i, note_length: i % 300 },
        request_id: `req-${i}`,
        client_address: system ? null : "127.0.0.1",
      };
      const hash = chainHash(prev, fields);
      chunk += [
        fields.seq, fields.occurred_at, fields.actor_user_id, fields.actor_email, fields.actor_role, fields.action, fields.target_type,
        fields.target_id, fields.unit_id, fields.outcome, JSON.stringify(fields.detail), fields.request_id, fields.client_address, prev, hash,
      ].map(copyText).join("\t") + "\n";
      prev = hash;
      if (chunk.length > 1 << 16) {
        yield chunk;
        chunk = "";
      }
    }
    if (chunk) yield chunk;
  };
  await pipeline(
    Readable.from(lines()),
    client.query(copyFrom(`COPY audit_events (seq, occurred_at, actor_user_id, actor_email, actor_role, action, target_type, target_id,
      unit_id, outcome, detail, request_id, client_address, prev_hash, hash) FROM STDIN`)),
  );
  await db.client.releaseConnection(client);
  await db.raw("ANALYZE audit_events");
  return performance.now() - t0;
}

async function exportOnce(format: AuditExportFormat, unitId: string, userId: string) {
  (globalThis as { gc?: () => void }).gc?.();
  const base = process.memoryUsage().rss;
  let peak = base;
  const sampler = setInterval(() => {
    peak = Math.max(peak, process.memoryUsage().rss);
  }, 20);
  const t0 = performance.now();
  const res = await startAuditExport({
    format,
    filter: auditFilterSchema.parse({}),
    actor: { userId, email: "bench.reader@larkspur.example", grants: [{ unitId, role: "quality" }], requestId: "bench-audit", clientAddress: "127.0.0.1" },
    scope: { unitIds: [unitId] },
  });
  if (!res.ok) throw new Error(res.message);
  const sha = createHash("sha256");
  let bytes = 0;
  const reader = res.started.body.getReader();
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    sha.update(value);
    bytes += value.byteLength;
    peak = Math.max(peak, process.memoryUsage().rss);
  }
  const ms = performance.now() - t0;
  clearInterval(sampler);
  const manifest = await db("audit_exports").where({ id: res.started.exportId }).first("rows", "sha256", "status");
  const ok = manifest?.status === "done" && Number(manifest.rows) === res.started.expectedRows && manifest.sha256 === sha.digest("hex");
  return { rows: res.started.expectedRows, ms, bytes, growthMb: (peak - base) / MB, manifestOk: ok };
}

async function main() {
  const [unit] = await db("units").insert({ code: "BENCH-AUDIT", name: "Bench audit unit (synthetic)", kind: "adult", time_zone: "UTC" }).returning("id");
  const [user] = await db("users").insert({ email: "bench.reader@larkspur.example", name: "Bench reader (synthetic)", password_hash: "unused" }).returning("id");
  const loadMs = await load(unit!.id, user!.id);
  console.log(`Loaded ${ROWS.toLocaleString("en")} chained audit entries (hashes in Node, COPY) in ${(loadMs / 1000).toFixed(1)} s = ${Math.round(ROWS / (loadMs / 1000)).toLocaleString("en")} rows/s`);
  // The chain as loaded: spot-check the first and last thousand rows against their hashes.
  for (const order of ["asc", "desc"] as const) {
    const rows = await db("audit_events").orderBy("seq", order).limit(1000).select("*");
    for (const r of rows) {
      const f: ChainedFields = {
        seq: String(r.seq), occurred_at: r.occurred_at.toISOString(), actor_user_id: r.actor_user_id, actor_email: r.actor_email, actor_role: r.actor_role,
        action: r.action, target_type: r.target_type, target_id: r.target_id, unit_id: r.unit_id, outcome: r.outcome, detail: r.detail,
        request_id: r.request_id, client_address: r.client_address,
      };
      if (chainHash(r.prev_hash, f) !== r.hash) throw new Error(`bench data: hash of entry ${r.seq} does not match`);
    }
  }
  for (const format of ["csv", "fhir-ndjson"] as const) {
    const r = await exportOnce(format, unit!.id, user!.id);
    console.log(
      `Export ${format.padEnd(11)} ${r.rows.toLocaleString("en")} rows, ${(r.bytes / MB).toFixed(0)} MB in ${(r.ms / 1000).toFixed(1)} s = ` +
        `${Math.round(r.rows / (r.ms / 1000)).toLocaleString("en")} rows/s; peak RSS growth ${r.growthMb.toFixed(1)} MB ` +
        `(goal < ${GOAL_MB} MB) — ${r.growthMb < GOAL_MB ? "met" : "NOT met"}; manifest ${r.manifestOk ? "matches the bytes read" : "DOES NOT MATCH"}`,
    );
  }
  await db.destroy();
}

main().catch(async (err) => {
  console.error(err);
  await db.destroy();
  process.exit(1);
});
