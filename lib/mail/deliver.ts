// The mail worker: delivers due outbox messages through the SMTP relay. Rows are claimed with SELECT … FOR UPDATE
// SKIP LOCKED inside one transaction that stays open while they are sent, so two workers (two schedulers, a tick and
// a test) never send the same row: the second skips rows the first holds, and sees them as sent once it commits.
// A failed attempt backs off 1, 2, 4, 8 … minutes (capped at 60); after MAX_ATTEMPTS the row is `failed`, kept and
// shown in the Mailbox's outbox panel. Logs carry outbox ids only, never addresses or message text.
import type { Knex } from "knex";
import type { Transporter } from "nodemailer";
import type { MailOutboxRow } from "@/lib/db/tables";
import { logger } from "@/lib/log";
import { mailConfig } from "./config";

/** Failed attempts before a message is given up as `failed` (about 8 h of retries at the capped backoff). */
export const MAX_ATTEMPTS = 12;
const MAX_BACKOFF_MINUTES = 60;
/** Longest last_error kept (relay answers can be long). */
const MAX_ERROR_CHARS = 500;

/** Minutes to wait after the `attempts`-th failed attempt: 1, 2, 4, 8 … capped at 60. */
export function backoffMinutes(attempts: number): number {
  if (!Number.isInteger(attempts) || attempts < 1) throw new RangeError(`attempts must be a whole number ≥ 1, got ${attempts}`);
  return Math.min(2 ** (attempts - 1), MAX_BACKOFF_MINUTES);
}

export interface DeliveryCounts {
  claimed: number;
  sent: number;
  /** Failed this time, to be retried later. */
  retrying: number;
  /** Failed for the last time: now status `failed`. */
  failed: number;
}

type MailTransport = Pick<Transporter, "sendMail">;

/** Delivers up to `limit` due messages (status queued, next_attempt_at ≤ now), oldest due first. */
export async function deliverDue(db: Knex, transport: MailTransport, now: Date = new Date(), limit = 50): Promise<DeliveryCounts> {
  if (Number.isNaN(now.getTime())) throw new RangeError("now is not a valid date");
  if (!Number.isInteger(limit) || limit < 1) throw new RangeError(`limit must be a whole number ≥ 1, got ${limit}`);
  const from = mailConfig().MAIL_FROM;
  const counts: DeliveryCounts = { claimed: 0, sent: 0, retrying: 0, failed: 0 };
  await db.transaction(async (trx) => {
    const due: MailOutboxRow[] = await trx("mail_outbox")
      .where("status", "queued")
      .andWhere("next_attempt_at", "<=", now)
      .orderBy([{ column: "next_attempt_at" }, { column: "id" }])
      .limit(limit)
      .forUpdate()
      .skipLocked();
    counts.claimed = due.length;
    for (const m of due) {
      try {
        await transport.sendMail({
          from,
          to: m.to_address,
          subject: m.subject,
          text: m.body_text,
          headers: { "X-Corvane-Outbox-Id": String(m.id), "X-Corvane-Kind": m.kind },
        });
        await trx("mail_outbox").where({ id: m.id }).update({ status: "sent", sent_at: new Date(), attempts: m.attempts + 1, last_error: null });
        counts.sent += 1;
        logger.info({ outboxId: m.id, kind: m.kind }, "mail delivered");
      } catch (err) {
        const attempts = m.attempts + 1;
        const giveUp = attempts >= MAX_ATTEMPTS;
        const message = (err instanceof Error ? err.message : String(err)).slice(0, MAX_ERROR_CHARS);
        await trx("mail_outbox")
          .where({ id: m.id })
          .update({
            attempts,
            last_error: message,
            status: giveUp ? "failed" : "queued",
            next_attempt_at: new Date(now.getTime() + backoffMinutes(attempts) * 60_000),
          });
        if (giveUp) counts.failed += 1;
        else counts.retrying += 1;
        // The relay's answer may quote the recipient: only its error code goes to the log (the text stays in the row).
        const code = (err as { code?: unknown; responseCode?: unknown }).responseCode ?? (err as { code?: unknown }).code ?? null;
        logger.warn({ outboxId: m.id, kind: m.kind, attempts, code, gaveUp: giveUp }, "mail delivery failed");
      }
    }
  });
  return counts;
}
