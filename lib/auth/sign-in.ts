// Credential check with rate limiting; every attempt lands in the audit trail. The counts come from the audit
// trail itself (failed sign-ins within the window), so there is one record of what happened, not two.
import type { Knex } from "knex";
import { db as defaultDb } from "@/lib/db/knex";
import { recordAudit } from "@/lib/audit/record";
import { config } from "@/lib/config";
import { findForSignIn, grantsOf, markSignedIn } from "@/lib/people/repository";
import { dummyPasswordHash, verifyPassword } from "./password";
import type { Grant } from "./roles";

export type SignInFailure = "invalid" | "rate_limited" | "inactive";

export type SignInResult =
  | { ok: true; user: { id: string; email: string; name: string; grants: Grant[] } }
  | { ok: false; code: SignInFailure };

export const SIGN_IN_ACTION = "auth.sign_in";

interface Limits {
  maxPerAccount: number;
  maxPerAddress: number;
  windowMinutes: number;
}

function limits(): Limits {
  const c = config();
  return {
    maxPerAccount: c.CORVANE_SIGNIN_MAX_FAILURES_ACCOUNT,
    maxPerAddress: c.CORVANE_SIGNIN_MAX_FAILURES_ADDRESS,
    windowMinutes: c.CORVANE_SIGNIN_WINDOW_MINUTES,
  };
}

/** Failed attempts within the window: for the account since its last success, and from the address. */
export async function recentFailures(
  email: string,
  clientAddress: string | null,
  windowMinutes: number,
  knex: Knex = defaultDb,
): Promise<{ account: number; address: number }> {
  const since = knex.raw("now() - make_interval(mins => ?)", [windowMinutes]);
  const lastSuccess = knex("audit_events")
    .where({ action: SIGN_IN_ACTION, outcome: "success", target_type: "account" })
    .andWhere("target_id", email.toLowerCase())
    .max("occurred_at");
  const account = await knex("audit_events")
    .where({ action: SIGN_IN_ACTION, outcome: "failure", target_type: "account" })
    .andWhere("target_id", email.toLowerCase())
    .andWhere("occurred_at", ">", since)
    .andWhere("occurred_at", ">", knex.raw("coalesce((?), '-infinity')", [lastSuccess]))
    .count<{ count: string }[]>({ count: "*" })
    .first();
  const address = clientAddress
    ? await knex("audit_events")
        .where({ action: SIGN_IN_ACTION, outcome: "failure", client_address: clientAddress })
        .andWhere("occurred_at", ">", since)
        .count<{ count: string }[]>({ count: "*" })
        .first()
    : { count: "0" };
  return { account: Number(account?.count ?? 0), address: Number(address?.count ?? 0) };
}

export async function authenticate(
  input: { email: string; password: string },
  ctx: { requestId: string | null; clientAddress: string | null },
  knex: Knex = defaultDb,
): Promise<SignInResult> {
  const email = input.email.trim().toLowerCase();
  const lim = limits();
  const audit = (outcome: "success" | "failure", userId: string | null, detail: Record<string, unknown>) =>
    recordAudit({
      actor: { userId, email, role: null },
      action: SIGN_IN_ACTION,
      target: { type: "account", id: email },
      outcome,
      detail,
      requestId: ctx.requestId,
      clientAddress: ctx.clientAddress,
    });

  const failures = await recentFailures(email, ctx.clientAddress, lim.windowMinutes, knex);
  if (failures.account >= lim.maxPerAccount || failures.address >= lim.maxPerAddress) {
    await audit("failure", null, {
      reason: "rate_limited",
      scope: failures.account >= lim.maxPerAccount ? "account" : "address",
    });
    return { ok: false, code: "rate_limited" };
  }

  const user = await findForSignIn(email, knex);
  const passwordOk = await verifyPassword(user?.passwordHash ?? (await dummyPasswordHash()), input.password);
  if (!user || !passwordOk) {
    await audit("failure", user?.id ?? null, { reason: user ? "wrong_password" : "unknown_account" });
    return { ok: false, code: "invalid" };
  }
  if (!user.active) {
    await audit("failure", user.id, { reason: "inactive" });
    return { ok: false, code: "inactive" };
  }
  await markSignedIn(user.id, knex);
  await audit("success", user.id, {});
  return { ok: true, user: { id: user.id, email: user.email, name: user.name, grants: await grantsOf(user.id, knex) } };
}
