// Verifies the audit chain over a range (entry numbers or instants) and reports the first broken link, then checks
// the signed checkpoints in the same range (lib/audit/checkpoints.ts), which is how removed newest rows show.
// Rows and checkpoints are read in batches, so memory stays flat however long the trail.
import type { Knex } from "knex";
import { db as defaultDb } from "@/lib/db/knex";
import type { AuditEventRow } from "@/lib/db/tables";
import { chainHash, GENESIS_HASH, type ChainedFields } from "./chain";
import { verifyCheckpoints, type CheckpointReport } from "./checkpoints";

export type ChainBreakReason = "hash_mismatch" | "prev_hash_mismatch" | "sequence_gap";

export interface ChainBreak {
  seq: string;
  reason: ChainBreakReason;
  /**
   * hash_mismatch: the hash recomputed from the row's contents, and the hash stored in the row.
   * prev_hash_mismatch: the stored hash of the row before (null when that row is missing), and the row's prev_hash.
   * sequence_gap: both null (see expectedSeq).
   */
  expectedHash: string | null;
  foundHash: string | null;
  /** sequence_gap: the entry number that should have come next. */
  expectedSeq: string | null;
}

export interface ChainRange {
  fromSeq?: bigint;
  toSeq?: bigint;
  /** Rows with occurred_at ≥ fromTime … */
  fromTime?: Date;
  /** … and occurred_at < toTime (half-open, so consecutive ranges neither overlap nor leave a gap). */
  toTime?: Date;
}

export interface ChainVerification {
  /** The chain is intact over the range and every checkpoint in it agrees. */
  ok: boolean;
  /** First and last entry read (the last is the broken one when the chain breaks). */
  fromSeq: string | null;
  toSeq: string | null;
  /** Entries that link correctly (all of them read, or those before the first broken link). */
  checked: number;
  firstBroken: ChainBreak | null;
  checkpoints: CheckpointReport;
  /** Entries of the range after its newest agreeing checkpoint (all of them when it has none). */
  uncovered: number;
  /** The range runs to the newest entry of the trail, so its uncovered entries are the newest ones. */
  reachesNewest: boolean;
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

const maxOf = (a: bigint | undefined, b: bigint | undefined) => (a === undefined ? b : b === undefined ? a : a > b ? a : b);
const minOf = (a: bigint | undefined, b: bigint | undefined) => (a === undefined ? b : b === undefined ? a : a < b ? a : b);

/**
 * The entry numbers a range covers: instants become the first entry at or after fromTime and the last before toTime
 * (entries are numbered in the order they were written, under one lock, so numbers follow time); with both kinds of
 * bound, the narrower wins. `empty` when the instants enclose no entry.
 */
async function seqBounds(knex: Knex, range: ChainRange): Promise<{ from: bigint; to: bigint | undefined; empty: boolean }> {
  let from = range.fromSeq;
  let to = range.toSeq;
  if (range.fromTime || range.toTime) {
    let q = knex("audit_events");
    if (range.fromTime) q = q.where("occurred_at", ">=", range.fromTime);
    if (range.toTime) q = q.where("occurred_at", "<", range.toTime);
    const r = (await q.min({ first: "seq" }).max({ last: "seq" }).first()) as { first: string | null; last: string | null } | undefined;
    if (!r?.first || !r.last) return { from: from ?? 1n, to, empty: true };
    from = maxOf(from, BigInt(r.first));
    to = minOf(to, BigInt(r.last));
  }
  const start = from ?? 1n;
  return { from: start, to, empty: to !== undefined && to < start };
}

/** Checks rows in the range (whole trail by default), reading in batches, then the checkpoints of the range. */
export async function verifyAuditChain(range: ChainRange = {}, knex: Knex = defaultDb): Promise<ChainVerification> {
  const bounds = await seqBounds(knex, range);
  const newestRow = await knex("audit_events").max({ seq: "seq" }).first();
  const newestSeq = newestRow?.seq ? BigInt(newestRow.seq as string) : 0n;
  const reachesNewest = bounds.to === undefined || bounds.to >= newestSeq;
  // A range that runs to the end of the trail is also held against checkpoints past its last row: those are the
  // checkpoints of rows removed from the end. A range that stops earlier is held against its own checkpoints only.
  const checkpointsTo = bounds.to !== undefined && (!reachesNewest || range.toSeq !== undefined) ? bounds.to : undefined;
  let checkpoints: CheckpointReport;
  if (!bounds.empty) {
    checkpoints = await verifyCheckpoints(knex, { fromSeq: bounds.from, toSeq: checkpointsTo });
  } else if (range.toTime === undefined || !(await knex("audit_events").where("occurred_at", ">=", range.toTime).first("seq"))) {
    // Instants after the newest entry enclose none, yet checkpoints past the newest entry are the removed rows'.
    checkpoints = await verifyCheckpoints(knex, { fromSeq: newestSeq + 1n });
  } else {
    checkpoints = { checked: 0, agreeing: 0, firstFailure: null, newest: null };
  }
  const chain = bounds.empty ? { fromSeq: null, toSeq: null, checked: 0, firstBroken: null } : await verifyLinks(knex, bounds.from, bounds.to);

  let uncovered = 0;
  if (chain.fromSeq !== null) {
    const coveredTo = checkpoints.newest ? BigInt(checkpoints.newest.seq) : bounds.from - 1n;
    let q = knex("audit_events").where("seq", ">", maxOf(coveredTo, bounds.from - 1n)!.toString());
    if (bounds.to !== undefined) q = q.andWhere("seq", "<=", bounds.to.toString());
    uncovered = Number((await q.count<{ n: string }[]>({ n: "*" }).first())?.n ?? 0);
  }
  return {
    ok: chain.firstBroken === null && checkpoints.firstFailure === null,
    ...chain,
    checkpoints,
    uncovered,
    reachesNewest,
  };
}

async function verifyLinks(
  knex: Knex,
  from: bigint,
  to: bigint | undefined,
): Promise<Pick<ChainVerification, "fromSeq" | "toSeq" | "checked" | "firstBroken">> {
  let expectedPrev: string | null;
  if (from <= 1n) {
    expectedPrev = GENESIS_HASH;
  } else {
    // Link to the row before the range; if that row is missing (null), the range starts after a gap.
    const before = await knex("audit_events").where("seq", (from - 1n).toString()).first("hash");
    expectedPrev = before?.hash ?? null;
  }
  let expectedSeq = from;
  let checked = 0;
  let firstSeq: string | null = null;
  let lastSeq: string | null = null;
  for (;;) {
    let q = knex("audit_events").where("seq", ">=", expectedSeq.toString()).orderBy("seq").limit(BATCH);
    if (to !== undefined) q = q.andWhere("seq", "<=", to.toString());
    const rows = (await q.select("*")) as AuditEventRow[];
    for (const row of rows) {
      const seq = BigInt(row.seq);
      firstSeq ??= String(row.seq);
      lastSeq = String(row.seq);
      const broken = (reason: ChainBreakReason, expectedHash: string | null, foundHash: string | null) => ({
        fromSeq: firstSeq,
        toSeq: lastSeq,
        checked,
        firstBroken: { seq: String(row.seq), reason, expectedHash, foundHash, expectedSeq: reason === "sequence_gap" ? expectedSeq.toString() : null },
      });
      if (seq !== expectedSeq) return broken("sequence_gap", null, null);
      if (row.prev_hash !== expectedPrev) return broken("prev_hash_mismatch", expectedPrev, row.prev_hash);
      const recomputed = chainHash(row.prev_hash, rowFields(row));
      if (recomputed !== row.hash) return broken("hash_mismatch", recomputed, row.hash);
      checked += 1;
      expectedPrev = row.hash;
      expectedSeq = seq + 1n;
    }
    if (rows.length < BATCH) break;
  }
  return { fromSeq: firstSeq, toSeq: lastSeq, checked, firstBroken: null };
}
