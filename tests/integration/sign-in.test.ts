import { randomBytes } from "node:crypto";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { db } from "@/lib/db/knex";
import { authenticate } from "@/lib/auth/sign-in";
import { hashPassword } from "@/lib/auth/password";
import { config } from "@/lib/config";

// Runs against DATABASE_URL (the seeded test database); every account and address here is unique to this run.
const tag = randomBytes(3).toString("hex");
const PASSWORD = "a-long-test-password";
let address = 0;
const freshAddress = () => `198.51.100.${(address += 1)}-${tag}`; // TEST-NET-2 (RFC 5737), tagged per run

async function makeUser(local: string, active = true) {
  const email = `${local}-${tag}@test.example`;
  await db("users").insert({ email, name: `Test ${local}`, password_hash: await hashPassword(PASSWORD), active });
  return email;
}

beforeAll(() => {
  // The defaults this suite is written for (documented in .env.example).
  expect(config().CORVANE_SIGNIN_MAX_FAILURES_ACCOUNT).toBe(5);
  expect(config().CORVANE_SIGNIN_MAX_FAILURES_ADDRESS).toBe(20);
});
afterAll(async () => {
  await db.destroy();
});

describe("sign-in", () => {
  it("accepts the right password, records the success and the time of sign-in", async () => {
    const email = await makeUser("ok");
    const ctx = { requestId: `r-${tag}`, clientAddress: freshAddress() };
    const res = await authenticate({ email: email.toUpperCase(), password: PASSWORD }, ctx);
    expect(res).toMatchObject({ ok: true, user: { email } });
    const last = await db("audit_events").where({ action: "auth.sign_in", target_id: email }).orderBy("seq", "desc").first();
    expect(last).toMatchObject({ outcome: "success", request_id: ctx.requestId, client_address: ctx.clientAddress });
    expect((await db("users").where({ email }).first())!.last_sign_in_at).not.toBeNull();
  });

  it("refuses a wrong password and an unknown account with the same answer", async () => {
    const email = await makeUser("wrong");
    const ctx = { requestId: null, clientAddress: freshAddress() };
    expect(await authenticate({ email, password: "not-it" }, ctx)).toEqual({ ok: false, code: "invalid" });
    expect(await authenticate({ email: `nobody-${tag}@test.example`, password: "x" }, ctx)).toEqual({ ok: false, code: "invalid" });
    const reasons = await db("audit_events").where({ action: "auth.sign_in", client_address: ctx.clientAddress }).orderBy("seq").select("outcome", "detail");
    expect(reasons).toEqual([
      { outcome: "failure", detail: { reason: "wrong_password" } },
      { outcome: "failure", detail: { reason: "unknown_account" } },
    ]);
  });

  it("pauses an account after 5 failures, even with the right password", async () => {
    const email = await makeUser("limited");
    for (let i = 0; i < 5; i++) {
      expect(await authenticate({ email, password: "nope" }, { requestId: null, clientAddress: freshAddress() })).toMatchObject({ code: "invalid" });
    }
    expect(await authenticate({ email, password: PASSWORD }, { requestId: null, clientAddress: freshAddress() })).toEqual({ ok: false, code: "rate_limited" });
    const last = await db("audit_events").where({ target_id: email }).orderBy("seq", "desc").first();
    expect(last!.detail).toEqual({ reason: "rate_limited", scope: "account" });
  });

  it("counts an account's failures from its last success", async () => {
    const email = await makeUser("reset");
    const ctx = () => ({ requestId: null, clientAddress: freshAddress() });
    for (let i = 0; i < 4; i++) await authenticate({ email, password: "nope" }, ctx());
    expect((await authenticate({ email, password: PASSWORD }, ctx())).ok).toBe(true);
    for (let i = 0; i < 4; i++) await authenticate({ email, password: "nope" }, ctx());
    expect((await authenticate({ email, password: PASSWORD }, ctx())).ok).toBe(true);
  });

  it("pauses an address after 20 failures across accounts", async () => {
    const victim = await makeUser("addr-victim");
    const clientAddress = freshAddress();
    for (let i = 0; i < 20; i++) {
      await authenticate({ email: `guess-${i}-${tag}@test.example`, password: "nope" }, { requestId: null, clientAddress });
    }
    expect(await authenticate({ email: victim, password: PASSWORD }, { requestId: null, clientAddress })).toEqual({ ok: false, code: "rate_limited" });
    // The same account from another workstation is unaffected.
    expect((await authenticate({ email: victim, password: PASSWORD }, { requestId: null, clientAddress: freshAddress() })).ok).toBe(true);
  });

  it("refuses a deactivated account and says so", async () => {
    const email = await makeUser("inactive", false);
    expect(await authenticate({ email, password: PASSWORD }, { requestId: null, clientAddress: freshAddress() })).toEqual({ ok: false, code: "inactive" });
  });
});
