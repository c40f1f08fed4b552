// The one way anything is written to the audit trail. Every mutation and every view of patient data calls
// recordAudit (usually through the guards); a failing audit write throws, and so fails the action.
import type { Knex } from "knex";
import { db as defaultDb } from "@/lib/db/knex";
import { logger } from "@/lib/log";
import type { AuditOutcome } from "@/lib/db/tables";
import { chainHash, GENESIS_HASH, type ChainedFields } from "./chain";

/**
 * Arbitrary constant: the advisory-lock key that serialises writers, so the chain never forks. Checkpoints
 * (lib/audit/checkpoints.ts) take it too, so the newest row they sign is the newest committed row.
 */
export const AUDIT_CHAIN_LOCK = 0x636f7276; // "corv"

export interface AuditEntry {
  actor: { userId: string | null; email: string | null; role: string | null };
  action: string;
  target?: { type: string; id: string } | null;
  unitId?: string | null;
  outcome: AuditOutcome;
  detail?: Record<string, unknown>;
  requestId: string | null;
  clientAddress: string | null;
}

export interface RecordedAudit {
  seq: string;
  hash: string;
}

/**
 * Appends one event. Pass `trx` to make the event part of the caller's transaction (the mutation and its audit
 * commit or roll back together); otherwise it runs in its own transaction.
 */
export async function recordAudit(entry: AuditEntry, trx?: Knex.Transaction): Promise<RecordedAudit> {
  if (trx) return append(trx, entry);
  return defaultDb.transaction((t) => append(t, entry));
}

async function append(trx: Knex.Transaction, entry: AuditEntry): Promise<RecordedAudit> {
  await trx.raw("SELECT pg_advisory_xact_lock(?)", [AUDIT_CHAIN_LOCK]);
  const last = await trx("audit_events").select("seq", "hash").orderBy("seq", "desc").first();
  const seq = last ? (BigInt(last.seq) + 1n).toString() : "1";
  const prevHash = last?.hash ?? GENESIS_HASH;
  // Server clock, UTC, millisecond precision (the column's precision, so the hash survives a round trip).
  const occurredAt = new Date();
  const fields: ChainedFields = {
    seq,
    occurred_at: occurredAt.toISOString(),
    actor_user_id: entry.actor.userId,
    actor_email: entry.actor.email,
    actor_role: entry.actor.role,
    action: entry.action,
    target_type: entry.target?.type ?? null,
    target_id: entry.target?.id ?? null,
    unit_id: entry.unitId ?? null,
    outcome: entry.outcome,
    // Through JSON once, so what is hashed is exactly what jsonb gives back (no undefined, no Dates).
    detail: JSON.parse(JSON.stringify(entry.detail ?? {})) as Record<string, unknown>,
    request_id: entry.requestId,
    client_address: entry.clientAddress,
  };
  const hash = chainHash(prevHash, fields);
  await trx("audit_events").insert({ ...fields, outcome: entry.outcome, occurred_at: occurredAt, prev_hash: prevHash, hash });
  // One log line per audited action: ids and outcome only (details may name patients and stay in the database).
  logger.info({ requestId: entry.requestId, auditSeq: seq, action: entry.action, outcome: entry.outcome, userId: entry.actor.userId }, "audit entry appended");
  return { seq, hash };
}
