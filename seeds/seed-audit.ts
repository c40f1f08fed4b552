// The audit entry a seed writes for what it inserted: by the system, outside any request.
import type { Knex } from "knex";
import { randomUUID } from "node:crypto";
import { recordAudit } from "@/lib/audit/record";

export function auditSeed(trx: Knex.Transaction, action: string, detail: Record<string, unknown>) {
  return recordAudit(
    { actor: { userId: null, email: null, role: "system" }, action, outcome: "success", detail, requestId: randomUUID(), clientAddress: null },
    trx,
  );
}
