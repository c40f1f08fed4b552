// Reading the audit trail for people who may (quality officers): their units' events and unit-less ones.
import type { Knex } from "knex";
import { db as defaultDb } from "@/lib/db/knex";
import type { AuditOutcome } from "@/lib/db/tables";

export interface AuditEventDTO {
  seq: string;
  occurredAt: string;
  actorEmail: string | null;
  actorRole: string | null;
  action: string;
  targetType: string | null;
  targetId: string | null;
  unitId: string | null;
  outcome: AuditOutcome;
  requestId: string | null;
  clientAddress: string | null;
  hash: string;
}

export interface AuditPage {
  events: AuditEventDTO[];
  total: number;
  page: number;
  pageSize: number;
}

export async function listAuditEvents(
  opts: { unitIds: string[]; page: number; pageSize: number },
  knex: Knex = defaultDb,
): Promise<AuditPage> {
  const scoped = knex("audit_events").where((w) => w.whereNull("unit_id").orWhereIn("unit_id", opts.unitIds));
  const count = await scoped.clone().count<{ count: string }[]>({ count: "*" }).first();
  const rows = await scoped
    .clone()
    .orderBy("seq", "desc")
    .limit(opts.pageSize)
    .offset((opts.page - 1) * opts.pageSize)
    .select("seq", "occurred_at", "actor_email", "actor_role", "action", "target_type", "target_id", "unit_id", "outcome", "request_id", "client_address", "hash");
  return {
    events: rows.map((r) => ({
      seq: String(r.seq),
      occurredAt: r.occurred_at.toISOString(),
      actorEmail: r.actor_email,
      actorRole: r.actor_role,
      action: r.action,
      targetType: r.target_type,
      targetId: r.target_id,
      unitId: r.unit_id,
      outcome: r.outcome,
      requestId: r.request_id,
      clientAddress: r.client_address,
      hash: r.hash,
    })),
    total: Number(count?.count ?? 0),
    page: opts.page,
    pageSize: opts.pageSize,
  };
}
