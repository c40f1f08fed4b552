// Verifies the audit chain over a range of sequence numbers and reports the first broken link.
import type { Knex } from "knex";
import { db as defaultDb } from "@/lib/db/knex";
import type { AuditEventRow } from "@/lib/db/tables";
import { chainHash, GENESIS_HASH, type ChainedFields } from "./chain";

export type ChainBreakReason = "hash_mismatch" | "prev_hash_mismatch" | "sequence_gap";

export interface ChainVerification {
  ok: boolean;
  fromSeq: string | null;
  toSeq: string | null;
  checked: number;
  firstBroken: { seq: string; reason: ChainBreakReason } | null;
}

const BATCH = 1000;

export function rowFields(row: AuditEventRow): ChainedFields {
  return {
    seq: String(row.seq),
    occurred_at: row.occurred_at.toISOString(),
    actor_user_id: row.actor_user_id,
    actor_email: row.actor_email,
    actor_role: row.actor_role,
    action: row.action,
    target_type: row.target_type,
    target_id: row.target_id,
    unit_id: row.unit_id,
    outcome: row.outcome,
    detail: row.detail,
    request_id: row.request_id,
    client_address: row.client_address,
  };
}

/** Checks rows with fromSeq ≤ seq ≤ toSeq (whole trail by default), reading in batches. */
export async function verifyAuditChain(
  range: { fromSeq?: bigint; toSeq?: bigint } = {},
  knex: Knex = defaultDb,
): Promise<ChainVerification> {
  const from = range.fromSeq ?? 1n;
  let expectedPrev: string;
  if (from <= 1n) {
    expectedPrev = GENESIS_HASH;
  } else {
    // Link to the row before the range; if that row is missing, the range starts after a gap.
    const before = await knex("audit_events").where("seq", (from - 1n).toString()).first("hash");
    expectedPrev = before?.hash ?? "";
  }
  let expectedSeq = from;
  let checked = 0;
  let firstSeq: string | null = null;
  let lastSeq: string | null = null;
  for (;;) {
    let q = knex("audit_events").where("seq", ">=", expectedSeq.toString()).orderBy("seq").limit(BATCH);
    if (range.toSeq !== undefined) q = q.andWhere("seq", "<=", range.toSeq.toString());
    const rows = (await q.select("*")) as AuditEventRow[];
    for (const row of rows) {
      const seq = BigInt(row.seq);
      firstSeq ??= row.seq;
      lastSeq = row.seq;
      const result = (reason: ChainBreakReason): ChainVerification => ({
        ok: false,
        fromSeq: firstSeq,
        toSeq: lastSeq,
        checked,
        firstBroken: { seq: row.seq, reason },
      });
      if (seq !== expectedSeq) return result("sequence_gap");
      if (row.prev_hash !== expectedPrev) return result("prev_hash_mismatch");
      if (chainHash(row.prev_hash, rowFields(row)) !== row.hash) return result("hash_mismatch");
      checked += 1;
      expectedPrev = row.hash;
      expectedSeq = seq + 1n;
    }
    if (rows.length < BATCH) break;
  }
  return { ok: true, fromSeq: firstSeq, toSeq: lastSeq, checked, firstBroken: null };
}
