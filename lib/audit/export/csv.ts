// Audit entries as CSV, RFC 4180: CRLF line ends, a header row, fields holding a comma, a quote, CR or LF quoted, and
// quotes inside doubled. The columns are the hashed fields of lib/audit/chain.ts plus prev_hash and hash, with the
// detail as RFC 8785 canonical JSON, so an outside verifier can recompute every row's hash:
//   hash = SHA-256(prev_hash ‖ JCS({seq, occurred_at, actor_user_id, …, client_address}))
// A null is an empty field with no quotes; an empty string is a quoted empty field (""), so the two stay apart.
import canonicalize from "canonicalize";
import { csvQuote } from "@/lib/csv";
import type { AuditEventRow } from "@/lib/db/tables";

export const CSV_COLUMNS = [
  "seq", "occurred_at", "actor_user_id", "actor_email", "actor_role", "action", "target_type", "target_id", "unit_id",
  "outcome", "detail", "request_id", "client_address", "prev_hash", "hash",
] as const;

/** One field: null → empty; "" → ""; quoted when RFC 4180 requires it (and for the empty string). */
export function csvField(v: string | null): string {
  if (v === null) return "";
  return v === "" ? '""' : csvQuote(v);
}

export const CSV_HEADER = `${CSV_COLUMNS.join(",")}\r\n`;

export function csvRecord(r: AuditEventRow): string {
  const values: (string | null)[] = [
    String(r.seq),
    r.occurred_at.toISOString(),
    r.actor_user_id,
    r.actor_email,
    r.actor_role,
    r.action,
    r.target_type,
    r.target_id,
    r.unit_id,
    r.outcome,
    canonicalize(r.detail) ?? "{}",
    r.request_id,
    r.client_address,
    r.prev_hash,
    r.hash,
  ];
  return `${values.map(csvField).join(",")}\r\n`;
}
