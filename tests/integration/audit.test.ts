import type { Knex } from "knex";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { recordAudit, type AuditEntry } from "@/lib/audit/record";
import { verifyAuditChain } from "@/lib/audit/verify";
import { GENESIS_HASH } from "@/lib/audit/chain";
import { scratchDatabase } from "@/tests/support/db";

// Each test file works in its own scratch database, so tampering here cannot disturb other tests.
let db: Knex;
let superuser: Knex;
let cleanup: () => Promise<void>;

const entry = (action: string, extra: Partial<AuditEntry> = {}): AuditEntry => ({
  actor: { userId: null, email: "quality@larkspur.example", role: "quality" },
  action,
  outcome: "success",
  detail: { n: 1 },
  requestId: "req-test",
  clientAddress: "127.0.0.1",
  ...extra,
});

const append = (e: AuditEntry) => db.transaction((trx) => recordAudit(e, trx));

beforeAll(async () => {
  ({ db, superuser, cleanup } = await scratchDatabase());
});
afterAll(async () => {
  await cleanup?.();
});

describe("audit trail", () => {
  it("chains each entry to the one before, starting from the genesis hash", async () => {
    const a = await append(entry("test.first"));
    const b = await append(entry("test.second", { detail: { nested: { z: 1, a: [1, 2] }, dropped: undefined } }));
    expect(a.seq).toBe("1");
    expect(b.seq).toBe("2");
    const rows = await db("audit_events").orderBy("seq").select("seq", "prev_hash", "hash");
    expect(rows[0]!.prev_hash).toBe(GENESIS_HASH);
    expect(rows[1]!.prev_hash).toBe(rows[0]!.hash);
    expect(await verifyAuditChain({}, db)).toMatchObject({ ok: true, checked: 2, firstBroken: null });
  });

  it("has no forks when many writers append at once (advisory lock)", async () => {
    await Promise.all(Array.from({ length: 25 }, (_, i) => append(entry(`test.parallel.${i}`))));
    const seqs = (await db("audit_events").orderBy("seq").pluck("seq")).map(Number);
    expect(seqs).toEqual(Array.from({ length: seqs.length }, (_, i) => i + 1));
    expect(await verifyAuditChain({}, db)).toMatchObject({ ok: true, checked: 27 });
  });

  it("rejects UPDATE, DELETE and TRUNCATE, even by the table's owner", async () => {
    await expect(db("audit_events").where({ seq: "1" }).update({ action: "x" } as never)).rejects.toThrow(/append-only/);
    await expect(db("audit_events").where({ seq: "1" }).delete()).rejects.toThrow(/append-only/);
    await expect(db.raw("TRUNCATE audit_events")).rejects.toThrow(/append-only/);
    expect(await db("audit_events").count({ n: "*" }).first()).toEqual({ n: "27" });
  });

  it("fails the whole action when the audit write fails", async () => {
    const before = await db("units").count({ n: "*" }).first();
    await expect(
      db.transaction(async (trx) => {
        await trx("units").insert({ code: "TX", name: "Test unit", kind: "adult", time_zone: "America/New_York" });
        await recordAudit(entry("test.bad", { outcome: "maybe" as never }), trx); // violates the outcome check
      }),
    ).rejects.toThrow();
    expect(await db("units").count({ n: "*" }).first()).toEqual(before);
  });

  it("verifies a range and finds a row changed by the database superuser behind the trigger", async () => {
    // The superuser can switch triggers off for the session (replica mode) — the chain still catches it.
    await superuser.transaction(async (trx) => {
      await trx.raw("SET LOCAL session_replication_role = replica");
      await trx.raw("UPDATE audit_events SET detail = '{\"n\": 2}' WHERE seq = 10");
    });
    expect(await verifyAuditChain({ fromSeq: 1n, toSeq: 9n }, db)).toMatchObject({ ok: true, checked: 9 });
    expect(await verifyAuditChain({}, db)).toMatchObject({ ok: false, checked: 9, firstBroken: { seq: "10", reason: "hash_mismatch" } });
    expect(await verifyAuditChain({ fromSeq: 11n }, db)).toMatchObject({ ok: true });
  });

  it("finds a deleted row as a gap and a re-hashed row as a broken link to its successor", async () => {
    await superuser.transaction(async (trx) => {
      await trx.raw("SET LOCAL session_replication_role = replica");
      await trx.raw("DELETE FROM audit_events WHERE seq = 20");
    });
    const whole = await verifyAuditChain({ fromSeq: 11n }, db);
    expect(whole).toMatchObject({ ok: false, firstBroken: { seq: "21", reason: "sequence_gap" } });
    expect(await verifyAuditChain({ fromSeq: 21n }, db)).toMatchObject({ ok: false, firstBroken: { seq: "21", reason: "prev_hash_mismatch" } });
  });
});
