// Hash chain of the audit trail. Pure: no database here, so the rule is testable on its own.
// hash = SHA-256( prev_hash ‖ canonical JSON of the row's fields ), hex. Canonical JSON is RFC 8785 (JCS),
// via the `canonicalize` package, so an outside verifier can recompute hashes from an export.
import { createHash } from "node:crypto";
import canonicalize from "canonicalize";

/** prev_hash of the first row. */
export const GENESIS_HASH = "0".repeat(64);

/** The fields covered by the hash: everything of a row except prev_hash and hash themselves. */
export interface ChainedFields {
  seq: string;
  occurred_at: string; // ISO 8601 UTC with milliseconds
  actor_user_id: string | null;
  actor_email: string | null;
  actor_role: string | null;
  action: string;
  target_type: string | null;
  target_id: string | null;
  unit_id: string | null;
  outcome: string;
  detail: Record<string, unknown>;
  request_id: string | null;
  client_address: string | null;
}

export function canonicalJson(fields: ChainedFields): string {
  const text = canonicalize(fields);
  if (text === undefined) throw new TypeError("audit row cannot be canonicalised");
  return text;
}

export function chainHash(prevHash: string, fields: ChainedFields): string {
  return createHash("sha256").update(prevHash).update(canonicalJson(fields)).digest("hex");
}
