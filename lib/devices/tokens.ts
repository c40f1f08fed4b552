// The life cycle of a device's stream token, written on the caller's transaction: issue (when none is current),
// rotate (a new token is current; the old one stays valid for a grace period so the device can be reconfigured without
// a gap), revoke (nothing valid remains). Corvane keeps the hash and the sealed token (lib/devices/stream-token.ts);
// the plaintext is returned to the caller once, to be shown once, and is never stored, logged or audited.
import "server-only";
import type { Knex } from "knex";
import { encryptStreamToken, generateStreamToken, hashStreamToken } from "@/lib/devices/stream-token";

const MINUTE = 60_000;

export type TokenRefusal = "not_found" | "decommissioned" | "token_current" | "no_token";
type Refused = { ok: false; reason: TokenRefusal };

/** The device's token columns, row-locked until the transaction ends so two token changes cannot interleave. */
async function lockTokenRow(trx: Knex.Transaction, deviceId: string) {
  return trx("devices")
    .where({ id: deviceId })
    .forUpdate()
    .first("id", "status", "stream_token_hash", "previous_token_hash", "previous_token_valid_until");
}

function sealed(now: Date) {
  const token = generateStreamToken();
  return { token, columns: { stream_token_hash: hashStreamToken(token), stream_token_enc: encryptStreamToken(token), token_rotated_at: now } };
}

/** A first token, or a new one after a revocation. Refused while a token is current (that is a rotation). */
export async function issueToken(trx: Knex.Transaction, deviceId: string, now: Date): Promise<{ ok: true; token: string; issuedAt: Date } | Refused> {
  const row = await lockTokenRow(trx, deviceId);
  if (!row) return { ok: false, reason: "not_found" };
  if (row.status === "decommissioned") return { ok: false, reason: "decommissioned" };
  if (row.stream_token_hash) return { ok: false, reason: "token_current" };
  const { token, columns } = sealed(now);
  await trx("devices")
    .where({ id: deviceId })
    .update({
      ...columns,
      previous_token_hash: null,
      previous_token_enc: null,
      previous_token_valid_until: null,
      token_revoked_at: null,
      updated_at: now,
    });
  return { ok: true, token, issuedAt: now };
}

/**
 * A new current token; the replaced one becomes the previous token until now + grace (none: it stops at once). A
 * previous token still in its grace period is dropped: only the token just replaced keeps working.
 */
export async function rotateToken(
  trx: Knex.Transaction,
  deviceId: string,
  graceMinutes: number,
  now: Date,
): Promise<{ ok: true; token: string; issuedAt: Date; previousValidUntil: Date | null } | Refused> {
  const row = await trx("devices")
    .where({ id: deviceId })
    .forUpdate()
    .first("id", "status", "stream_token_hash", "stream_token_enc");
  if (!row) return { ok: false, reason: "not_found" };
  if (row.status === "decommissioned") return { ok: false, reason: "decommissioned" };
  if (!row.stream_token_hash || !row.stream_token_enc) return { ok: false, reason: "no_token" };
  const { token, columns } = sealed(now);
  const previousValidUntil = graceMinutes > 0 ? new Date(now.getTime() + graceMinutes * MINUTE) : null;
  await trx("devices")
    .where({ id: deviceId })
    .update({
      ...columns,
      previous_token_hash: previousValidUntil ? row.stream_token_hash : null,
      previous_token_enc: previousValidUntil ? row.stream_token_enc : null,
      previous_token_valid_until: previousValidUntil,
      updated_at: now,
    });
  return { ok: true, token, issuedAt: now, previousValidUntil };
}

/** Clears the current and the previous token; refused when neither is valid any more. */
export async function revokeToken(trx: Knex.Transaction, deviceId: string, now: Date): Promise<{ ok: true; hadPrevious: boolean } | Refused> {
  const row = await lockTokenRow(trx, deviceId);
  if (!row) return { ok: false, reason: "not_found" };
  const previousValid = !!row.previous_token_hash && !!row.previous_token_valid_until && row.previous_token_valid_until > now;
  if (!row.stream_token_hash && !previousValid) return { ok: false, reason: "no_token" };
  await trx("devices").where({ id: deviceId }).update(revokedColumns(now));
  return { ok: true, hadPrevious: previousValid };
}

/** The token columns of a device whose tokens are revoked at `now` (also used when a device is decommissioned). */
export function revokedColumns(now: Date) {
  return {
    stream_token_hash: null,
    stream_token_enc: null,
    previous_token_hash: null,
    previous_token_enc: null,
    previous_token_valid_until: null,
    token_revoked_at: now,
    updated_at: now,
  };
}
