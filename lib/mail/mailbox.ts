// Reading the demo Mailbox: what the local SMTP sink received, newest first, and the outbox's delivery status.
import type { Knex } from "knex";
import { db as defaultDb } from "@/lib/db/knex";
import type { MailKind, MailOutboxRow } from "@/lib/db/tables";

export interface ReceivedSummaryDTO {
  id: string;
  receivedAt: string;
  to: string[];
  subject: string | null;
}

export interface ReceivedMessageDTO extends ReceivedSummaryDTO {
  from: string | null;
  text: string | null;
  messageId: string | null;
}

export interface ReceivedPage {
  messages: ReceivedSummaryDTO[];
  total: number;
  page: number;
  pageSize: number;
}

export interface OutboxFailureDTO {
  id: string;
  kind: MailKind;
  status: MailOutboxRow["status"];
  attempts: number;
  lastError: string;
  /** Null once given up (status failed). */
  nextAttemptAt: string | null;
  createdAt: string;
}

export interface OutboxStatusDTO {
  queued: number;
  sent: number;
  failed: number;
  /** Messages whose last attempt failed (still retrying, or given up), latest first. */
  failures: OutboxFailureDTO[];
}

export async function listReceived(opts: { page: number; pageSize: number }, knex: Knex = defaultDb): Promise<ReceivedPage> {
  const count = await knex("mail_received").count<{ count: string }[]>({ count: "*" }).first();
  const rows = await knex("mail_received")
    .orderBy([{ column: "received_at", order: "desc" }, { column: "id", order: "desc" }])
    .limit(opts.pageSize)
    .offset((opts.page - 1) * opts.pageSize)
    .select("id", "received_at", "envelope_to", "subject");
  return {
    messages: rows.map((r) => ({ id: String(r.id), receivedAt: r.received_at.toISOString(), to: r.envelope_to, subject: r.subject })),
    total: Number(count?.count ?? 0),
    page: opts.page,
    pageSize: opts.pageSize,
  };
}

export async function getReceived(id: string, knex: Knex = defaultDb): Promise<ReceivedMessageDTO | null> {
  const r = await knex("mail_received").where({ id }).first("id", "received_at", "envelope_from", "envelope_to", "subject", "body_text", "message_id");
  if (!r) return null;
  return {
    id: String(r.id),
    receivedAt: r.received_at.toISOString(),
    to: r.envelope_to,
    subject: r.subject,
    from: r.envelope_from,
    text: r.body_text,
    messageId: r.message_id,
  };
}

export async function outboxStatus(knex: Knex = defaultDb, failuresShown = 10): Promise<OutboxStatusDTO> {
  const counts = await knex("mail_outbox").groupBy("status").select("status").count<{ status: MailOutboxRow["status"]; count: string }[]>({ count: "*" });
  const n = (s: MailOutboxRow["status"]) => Number(counts.find((c) => c.status === s)?.count ?? 0);
  const failures = await knex("mail_outbox")
    .whereNotNull("last_error")
    .whereIn("status", ["queued", "failed"])
    .orderBy("id", "desc")
    .limit(failuresShown)
    .select("id", "kind", "status", "attempts", "last_error", "next_attempt_at", "created_at");
  return {
    queued: n("queued"),
    sent: n("sent"),
    failed: n("failed"),
    failures: failures.map((f) => ({
      id: String(f.id),
      kind: f.kind,
      status: f.status,
      attempts: f.attempts,
      lastError: f.last_error!,
      nextAttemptAt: f.status === "queued" ? f.next_attempt_at.toISOString() : null,
      createdAt: f.created_at.toISOString(),
    })),
  };
}
