// Signed checkpoints of the audit trail. The hash chain shows a changed or removed row *inside* the trail, but not
// the newest rows removed from its end (what is left still links). A checkpoint records the newest seq and its hash
// at a moment, signed with a server key (HMAC-SHA-256, RFC 2104 / FIPS 198-1), in its own append-only table: a
// later check that finds no row at that seq, or another hash there, has found a truncation or a rewrite.
// The scheduler writes one every 10 minutes (scripts/scheduler.ts). Not audited themselves: an audit row per
// checkpoint would leave the newest row uncovered forever.
import { createHash, createHmac, hkdfSync, timingSafeEqual } from "node:crypto";
import canonicalize from "canonicalize";
import type { Knex } from "knex";
import { AUDIT_CHAIN_LOCK } from "./record";

export interface CheckpointRow {
  id: string; // bigint comes back from pg as a string
  created_at: Date;
  seq: string;
  hash: string;
  key_id: string;
  signature: string;
}

/** What is signed: everything of a checkpoint but its id and the signature itself. */
export interface CheckpointClaim {
  created_at: string; // ISO 8601 UTC with milliseconds (the column's precision)
  seq: string;
  hash: string;
  key_id: string;
}

export interface CheckpointKey {
  id: string;
  key: Buffer;
}

/**
 * The checkpoint key: HKDF-SHA-256 (RFC 5869) from NEXTAUTH_SECRET with its own label, so no second secret has to be
 * managed and the key is unrelated to the session and stream-token keys. Its id is the first 16 hex digits of the
 * key's SHA-256: a changed secret shows up as checkpoints signed by a key this server does not hold ("unknown_key"),
 * never silently as valid or as forged.
 */
export function checkpointKey(secret = process.env.NEXTAUTH_SECRET): CheckpointKey {
  if (!secret) throw new Error("NEXTAUTH_SECRET is not set: audit checkpoints cannot be signed or checked");
  const key = Buffer.from(hkdfSync("sha256", secret, "corvane", "audit checkpoints v1", 32));
  return { id: createHash("sha256").update(key).digest("hex").slice(0, 16), key };
}

/** The signed text: RFC 8785 canonical JSON of the claim, as for the chain (lib/audit/chain.ts). */
export function checkpointMessage(claim: CheckpointClaim): string {
  const text = canonicalize(claim);
  if (text === undefined) throw new TypeError("checkpoint cannot be canonicalised");
  return text;
}

export function signCheckpoint(claim: CheckpointClaim, key: Buffer): string {
  return createHmac("sha256", key).update(checkpointMessage(claim)).digest("hex");
}

const claimOf = (row: CheckpointRow): CheckpointClaim => ({
  created_at: row.created_at.toISOString(),
  seq: String(row.seq),
  hash: row.hash,
  key_id: row.key_id,
});

/** Constant-time comparison, so a forger learns nothing from how long a rejection takes. */
function signatureMatches(row: CheckpointRow, key: Buffer): boolean {
  const expected = Buffer.from(signCheckpoint(claimOf(row), key), "hex");
  const stored = /^[0-9a-f]{64}$/.test(row.signature) ? Buffer.from(row.signature, "hex") : Buffer.alloc(0);
  return stored.length === expected.length && timingSafeEqual(stored, expected);
}

export type CheckpointOutcome =
  | { created: true; id: string; seq: string; hash: string }
  /** The newest row already has a checkpoint (nothing was written since), or the trail is empty. */
  | { created: false; seq: string | null };

/**
 * Signs the newest audit row as a checkpoint at `now`. Runs under the writers' advisory lock, so the newest row read
 * is the newest committed one and two schedulers never sign the same row twice.
 */
export async function createCheckpoint(knex: Knex, now: Date, key: CheckpointKey = checkpointKey()): Promise<CheckpointOutcome> {
  return knex.transaction(async (trx) => {
    await trx.raw("SELECT pg_advisory_xact_lock(?)", [AUDIT_CHAIN_LOCK]);
    const newest = await trx("audit_events").orderBy("seq", "desc").first("seq", "hash");
    if (!newest) return { created: false, seq: null };
    const seq = String(newest.seq);
    if (await trx("audit_checkpoints").where({ seq }).first("id")) return { created: false, seq };
    const claim: CheckpointClaim = { created_at: now.toISOString(), seq, hash: newest.hash, key_id: key.id };
    const [row] = await trx("audit_checkpoints")
      .insert({ created_at: now, seq, hash: newest.hash, key_id: key.id, signature: signCheckpoint(claim, key.key) })
      .returning("id");
    return { created: true, id: String((row as { id: string }).id), seq, hash: newest.hash };
  });
}

export type CheckpointFailureReason = "signature_invalid" | "unknown_key" | "row_missing" | "hash_differs";

export interface CheckpointFailure {
  id: string;
  seq: string;
  createdAt: string;
  reason: CheckpointFailureReason;
  /** The hash the checkpoint signed, and the one now stored at its seq (null when the row is gone). */
  signedHash: string;
  foundHash: string | null;
}

export interface CheckpointReport {
  /** Checkpoints whose seq lies in the range. */
  checked: number;
  /** Of those, checked before the first failure, that agree. */
  agreeing: number;
  firstFailure: CheckpointFailure | null;
  /** The newest checkpoint in the range (by seq): rows of the range after it are not covered yet. */
  newest: { seq: string; createdAt: string } | null;
}

const BATCH = 1000;

/**
 * Checks every checkpoint with fromSeq ≤ seq ≤ toSeq (all by default), in seq order, reading in batches: signed by a
 * known key, signature valid, the audit row at its seq present with the signed hash. Stops at the first failure.
 */
export async function verifyCheckpoints(
  knex: Knex,
  range: { fromSeq?: bigint; toSeq?: bigint } = {},
  keys: readonly CheckpointKey[] = [checkpointKey()],
): Promise<CheckpointReport> {
  const known = new Map(keys.map((k) => [k.id, k.key]));
  let checked = 0;
  let newest: CheckpointReport["newest"] = null;
  // Keyset pagination on (seq, id): several checkpoints may share a seq only if forged, and then each is checked.
  let after: { seq: string; id: string } | null = null;
  for (;;) {
    let q = knex<CheckpointRow>("audit_checkpoints").orderBy([{ column: "seq" }, { column: "id" }]).limit(BATCH);
    if (range.fromSeq !== undefined) q = q.where("seq", ">=", range.fromSeq.toString());
    if (range.toSeq !== undefined) q = q.where("seq", "<=", range.toSeq.toString());
    if (after) {
      const a = after;
      q = q.whereRaw("(seq, id) > (?::bigint, ?::bigint)", [a.seq, a.id]);
    }
    const rows = (await q.select("*")) as CheckpointRow[];
    if (rows.length === 0) break;
    const stored = new Map(
      (await knex("audit_events").whereIn("seq", [...new Set(rows.map((r) => String(r.seq)))]).select("seq", "hash")).map((r) => [String(r.seq), r.hash]),
    );
    for (const row of rows) {
      const seq = String(row.seq);
      const found = stored.get(seq) ?? null;
      const fail = (reason: CheckpointFailureReason): CheckpointReport => ({
        checked: checked + 1,
        agreeing: checked,
        firstFailure: { id: String(row.id), seq, createdAt: row.created_at.toISOString(), reason, signedHash: row.hash, foundHash: found },
        newest,
      });
      const key = known.get(row.key_id);
      if (!key) return fail("unknown_key");
      if (!signatureMatches(row, key)) return fail("signature_invalid");
      if (found === null) return fail("row_missing");
      if (found !== row.hash) return fail("hash_differs");
      checked += 1;
      newest = { seq, createdAt: row.created_at.toISOString() };
    }
    const last = rows[rows.length - 1]!;
    after = { seq: String(last.seq), id: String(last.id) };
    if (rows.length < BATCH) break;
  }
  return { checked, agreeing: checked, firstFailure: null, newest };
}
