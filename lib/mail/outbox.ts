// The mail outbox: every message Corvane sends is first written here, in the same transaction as the change that
// caused it, and delivered later by the mail worker (lib/mail/deliver.ts) with retry and backoff. A mail outage
// therefore loses nothing, and a message is enqueued once per purpose (its dedupe key), however often a job runs.
// Messages carry the minimum necessary: bed, flag and a link — never a patient's name (issue 6, HIPAA minimum
// necessary).
import type { Knex } from "knex";
import type { MailKind } from "@/lib/db/tables";

export interface OutboxMessage {
  kind: MailKind;
  to: string;
  subject: string;
  text: string;
  /** One message per purpose, e.g. `escalation:<flag id>:<flag version>` or `reminder:<flag id>`. */
  dedupeKey: string;
  flagId?: string | null;
}

/** Enqueues a message; returns false when a message with the same dedupe key was enqueued before. */
export async function enqueueMail(trx: Knex | Knex.Transaction, m: OutboxMessage): Promise<boolean> {
  const rows = await trx("mail_outbox")
    .insert({ kind: m.kind, to_address: m.to, subject: m.subject, body_text: m.text, dedupe_key: m.dedupeKey, flag_id: m.flagId ?? null })
    .onConflict("dedupe_key")
    .ignore()
    .returning("id");
  return rows.length > 0;
}
