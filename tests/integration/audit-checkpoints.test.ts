// The chain check and its signed checkpoints on real PostgreSQL: an intact trail verifies with its checkpoints
// agreeing; a row rewritten by the database superuser behind the append-only trigger is the first broken link; the
// newest rows deleted by the superuser leave a chain that still verifies, and are found only through the checkpoints;
// forged checkpoints are reported; a checkpoint's signature equals an HMAC computed here by hand from its
// definition; a range in the middle of the trail is linked to the row before it.
// Each scenario works in its own scratch database, so one scenario's tampering cannot mask another's finding.
import { createHash } from "node:crypto";
import type { Knex } from "knex";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { chainHash } from "@/lib/audit/chain";
import { checkpointKey, createCheckpoint, signCheckpoint, verifyCheckpoints, type CheckpointRow } from "@/lib/audit/checkpoints";
import { recordAudit } from "@/lib/audit/record";
import { rowFields, verifyAuditChain } from "@/lib/audit/verify";
import type { AuditEventRow } from "@/lib/db/tables";
import { requireEnv, scratchDatabase } from "@/tests/support/db";

type Scratch = Awaited<ReturnType<typeof scratchDatabase>>;

/** Appends n entries, each in its own transaction (as actions do); `spacedMs` keeps their instants apart. */
async function appendEntries(db: Knex, n: number, spacedMs = 0): Promise<void> {
  for (let i = 0; i < n; i++) {
    await db.transaction((trx) =>
      recordAudit(
        {
          actor: { userId: null, email: "quality@larkspur.example", role: "quality" },
          action: "test.checkpoint",
          outcome: "success",
          detail: { i },
          requestId: `req-cp-${i}`,
          clientAddress: "127.0.0.1",
        },
        trx,
      ),
    );
    if (spacedMs) await new Promise((r) => setTimeout(r, spacedMs));
  }
}

/** What a superuser can do: switch the append-only triggers off for a moment (ALTER TABLE … DISABLE TRIGGER USER). */
async function behindTheTrigger(superuser: Knex, sql: string, bindings: readonly unknown[] = []): Promise<void> {
  await superuser.transaction(async (trx) => {
    await trx.raw("ALTER TABLE audit_events DISABLE TRIGGER USER");
    await trx.raw(sql, bindings as Knex.RawBinding[]);
    await trx.raw("ALTER TABLE audit_events ENABLE TRIGGER USER");
  });
}

const rowAt = async (db: Knex, seq: number) => (await db("audit_events").where({ seq: String(seq) }).first()) as AuditEventRow;

// ---- an HMAC-SHA-256 and HKDF written from their definitions, independent of node:crypto's createHmac/hkdf ----
const SHA256_BLOCK = 64; // bytes (FIPS 180-4 §1: SHA-256 block size 512 bits)
const sha256 = (...parts: Buffer[]) => createHash("sha256").update(Buffer.concat(parts)).digest();

/** RFC 2104 §2 / FIPS 198-1 §4: H((K0 ⊕ opad) ‖ H((K0 ⊕ ipad) ‖ text)), K0 = K (hashed if longer than B) zero-padded. */
function hmacByHand(key: Buffer, text: Buffer): Buffer {
  const k0 = Buffer.alloc(SHA256_BLOCK);
  (key.length > SHA256_BLOCK ? sha256(key) : key).copy(k0);
  const ipad = Buffer.from(k0.map((b) => b ^ 0x36));
  const opad = Buffer.from(k0.map((b) => b ^ 0x5c));
  return sha256(opad, sha256(ipad, text));
}

/** RFC 5869 §2.2–2.3: PRK = HMAC(salt, IKM); T(i) = HMAC(PRK, T(i−1) ‖ info ‖ i); OKM = first L bytes. */
function hkdfByHand(ikm: Buffer, salt: Buffer, info: Buffer, length: number): Buffer {
  const prk = hmacByHand(salt, ikm);
  const blocks: Buffer[] = [];
  let t: Buffer = Buffer.alloc(0);
  for (let i = 1; Buffer.concat(blocks).length < length; i++) {
    t = hmacByHand(prk, Buffer.concat([t, info, Buffer.from([i])]));
    blocks.push(t);
  }
  return Buffer.concat(blocks).subarray(0, length);
}

describe("the hand-written HMAC and HKDF used as references below", () => {
  it("reproduce RFC 4231 test case 2 and RFC 5869 test case 1 (A.1)", () => {
    // RFC 4231 §4.3: key "Jefe", data "what do ya want for nothing?", HMAC-SHA-256.
    expect(hmacByHand(Buffer.from("Jefe"), Buffer.from("what do ya want for nothing?")).toString("hex")).toBe(
      "5bdcc146bf60754e6a042426089575c75a003f089d2739839dec58b964ec3843",
    );
    // RFC 4231 §4.7 (test case 6): a 131-byte key, longer than the block, is hashed first.
    expect(hmacByHand(Buffer.alloc(131, 0xaa), Buffer.from("Test Using Larger Than Block-Size Key - Hash Key First")).toString("hex")).toBe(
      "60e431591ee0b67f0d8a26aacbf5b77f8e0bc6213728c5140546040f0ee37f54",
    );
    // RFC 5869 A.1: SHA-256, 22-byte IKM of 0x0b, salt 0x00…0c, info 0xf0…f9, L = 42.
    const okm = hkdfByHand(
      Buffer.alloc(22, 0x0b),
      Buffer.from(Array.from({ length: 13 }, (_, i) => i)),
      Buffer.from(Array.from({ length: 10 }, (_, i) => 0xf0 + i)),
      42,
    );
    expect(okm.toString("hex")).toBe("3cb25f25faacd57a90434f64d0362f2a2d2d0a90cf1a5a4c5db02d56ecc4c5bf34007208d5b887185865");
  });
});

describe("an intact trail, its checkpoints, and forged ones", () => {
  let s: Scratch;
  beforeAll(async () => {
    s = await scratchDatabase();
  });
  afterAll(async () => {
    await s?.cleanup();
  });

  it("writes no checkpoint for an empty trail, one per newest entry, and none twice even when asked at once", async () => {
    expect(await createCheckpoint(s.db, new Date())).toEqual({ created: false, seq: null });
    await appendEntries(s.db, 30);
    const outcomes = await Promise.all([1, 2, 3].map(() => createCheckpoint(s.db, new Date())));
    expect(outcomes.filter((o) => o.created)).toHaveLength(1);
    expect(outcomes.map((o) => o.seq)).toEqual(["30", "30", "30"]);
    await appendEntries(s.db, 20);
    expect(await createCheckpoint(s.db, new Date("2026-12-02T03:10:00.123Z"))).toMatchObject({ created: true, seq: "50" });
    expect(await s.db("audit_checkpoints").count({ n: "*" }).first()).toEqual({ n: "2" });
  });

  it("(1) verifies an intact chain with its checkpoints agreeing, and counts the newest entries not yet covered", async () => {
    await appendEntries(s.db, 7);
    const r = await verifyAuditChain({}, s.db);
    expect(r).toMatchObject({
      ok: true,
      fromSeq: "1",
      toSeq: "57",
      checked: 57,
      firstBroken: null,
      checkpoints: { checked: 2, agreeing: 2, firstFailure: null, newest: { seq: "50" } },
      uncovered: 7,
      reachesNewest: true,
    });
    // A range that stops before the newest entry: covered up to its own last checkpoint.
    expect(await verifyAuditChain({ fromSeq: 1n, toSeq: 40n }, s.db)).toMatchObject({
      ok: true,
      checked: 40,
      checkpoints: { checked: 1, newest: { seq: "30" } },
      uncovered: 10,
      reachesNewest: false,
    });
  });

  it("(5) signs HMAC-SHA-256 (RFC 2104 / FIPS 198-1) with an HKDF-SHA-256 key (RFC 5869), as recomputed by hand", async () => {
    const cp = (await s.db("audit_checkpoints").where({ seq: "50" }).first()) as CheckpointRow;
    const secret = requireEnv("NEXTAUTH_SECRET");
    const key = hkdfByHand(Buffer.from(secret), Buffer.from("corvane"), Buffer.from("audit checkpoints v1"), 32);
    expect(cp.key_id).toBe(sha256(key).toString("hex").slice(0, 16));
    // The signed text is the RFC 8785 canonical JSON of the claim: string members in code-point order, no spaces.
    const row50 = await rowAt(s.db, 50);
    const text = `{"created_at":"2026-12-02T03:10:00.123Z","hash":"${row50.hash}","key_id":"${cp.key_id}","seq":"50"}`;
    expect(cp.hash).toBe(row50.hash);
    expect(cp.signature).toBe(hmacByHand(key, Buffer.from(text)).toString("hex"));
  });

  it("(4) reports a checkpoint signed with another key: as forged under our key id, as an unknown key under its own", async () => {
    const row10 = await rowAt(s.db, 10);
    const row20 = await rowAt(s.db, 20);
    const ours = checkpointKey();
    const other = checkpointKey("a-different-secret-the-forger-holds-not-ours");
    expect(other.id).not.toBe(ours.id);
    const forge = (seq: string, hash: string, keyId: string) => {
      const created = new Date("2026-12-02T04:00:00.000Z");
      const signature = signCheckpoint({ created_at: created.toISOString(), seq, hash, key_id: keyId }, other.key);
      return s.db("audit_checkpoints").insert({ created_at: created, seq, hash, key_id: keyId, signature });
    };
    await forge("10", row10.hash, ours.id);
    await forge("20", row20.hash, other.id);

    const whole = await verifyAuditChain({}, s.db);
    expect(whole.firstBroken).toBeNull(); // the chain itself is untouched
    expect(whole).toMatchObject({ ok: false, checkpoints: { agreeing: 0, firstFailure: { seq: "10", reason: "signature_invalid", signedHash: row10.hash, foundHash: row10.hash } } });
    expect(await verifyAuditChain({ fromSeq: 11n }, s.db)).toMatchObject({ ok: false, checkpoints: { firstFailure: { seq: "20", reason: "unknown_key" } } });
    // After the forgeries, the genuine checkpoints of 30 and 50 still agree.
    expect(await verifyAuditChain({ fromSeq: 21n }, s.db)).toMatchObject({ ok: true, checkpoints: { checked: 2, agreeing: 2 } });
    // A server whose secret changed holds none of the keys: every checkpoint is "unknown_key", never "valid".
    expect(await verifyCheckpoints(s.db, { fromSeq: 21n }, [other])).toMatchObject({ firstFailure: { seq: "30", reason: "unknown_key" } });
  });
});

describe("tampering by the database superuser", () => {
  let s: Scratch;
  beforeAll(async () => {
    s = await scratchDatabase();
    // Spaced 3 ms apart (the column keeps milliseconds), so each entry has its own instant for the time range below.
    await appendEntries(s.db, 40, 3);
    await createCheckpoint(s.db, new Date());
  });
  afterAll(async () => {
    await s?.cleanup();
  });

  it("(2) finds a row whose detail was rewritten behind the disabled trigger: first broken link, hash mismatch", async () => {
    const before = await rowAt(s.db, 12);
    await behindTheTrigger(s.superuser, `UPDATE audit_events SET detail = '{"i": 999}'::jsonb WHERE seq = 12`);
    // The triggers are back on: the app's role still cannot change the trail.
    await expect(s.db("audit_events").where({ seq: "12" }).delete()).rejects.toThrow(/append-only/);

    const after = await rowAt(s.db, 12);
    expect(after.detail).toEqual({ i: 999 });
    const r = await verifyAuditChain({}, s.db);
    expect(r).toMatchObject({
      ok: false,
      fromSeq: "1",
      toSeq: "12",
      checked: 11,
      firstBroken: { seq: "12", reason: "hash_mismatch", expectedHash: chainHash(after.prev_hash, rowFields(after)), foundHash: before.hash },
    });
    expect(r.firstBroken!.expectedHash).not.toBe(before.hash);
    // The checkpoint signed entry 40's hash, which the rewrite left alone: it is the chain that finds this one.
    expect(r.checkpoints).toMatchObject({ checked: 1, agreeing: 1, firstFailure: null });
  });

  it("(6) links a range in the middle of the trail to the row before it, by entry numbers and by instants", async () => {
    const row19 = await rowAt(s.db, 19);
    expect(await verifyAuditChain({ fromSeq: 20n, toSeq: 30n }, s.db)).toMatchObject({ ok: true, fromSeq: "20", toSeq: "30", checked: 11 });
    // Entry 19's stored hash is replaced: entry 19 no longer matches its contents, and entry 20 no longer links to it.
    const forgedHash = "f".repeat(64);
    await behindTheTrigger(s.superuser, "UPDATE audit_events SET hash = ? WHERE seq = 19", [forgedHash]);
    expect(await verifyAuditChain({ fromSeq: 20n, toSeq: 30n }, s.db)).toMatchObject({
      ok: false,
      checked: 0,
      firstBroken: { seq: "20", reason: "prev_hash_mismatch", expectedHash: forgedHash, foundHash: row19.hash },
    });
    expect(await verifyAuditChain({ fromSeq: 21n, toSeq: 30n }, s.db)).toMatchObject({ ok: true, fromSeq: "21", toSeq: "30", checked: 10 });

    // The same range given as instants: from entry 20's instant (included) until entry 31's (not included).
    const [t20, t31] = [(await rowAt(s.db, 20)).occurred_at, (await rowAt(s.db, 31)).occurred_at];
    expect(await verifyAuditChain({ fromTime: t20, toTime: t31 }, s.db)).toMatchObject({
      ok: false,
      fromSeq: "20",
      firstBroken: { seq: "20", reason: "prev_hash_mismatch", expectedHash: forgedHash },
    });
    const later = await verifyAuditChain({ fromTime: (await rowAt(s.db, 21)).occurred_at, toTime: t31 }, s.db);
    expect(later).toMatchObject({ ok: true, fromSeq: "21", toSeq: "30", checked: 10 });
    // Instants that enclose no entry: nothing to check, said as such.
    expect(await verifyAuditChain({ fromTime: new Date("2000-01-01T00:00:00Z"), toTime: new Date("2000-01-02T00:00:00Z") }, s.db)).toMatchObject({
      ok: true,
      checked: 0,
      fromSeq: null,
    });
  });
});

describe("the newest entries deleted by the database superuser", () => {
  let s: Scratch;
  beforeAll(async () => {
    s = await scratchDatabase();
    await appendEntries(s.db, 40);
    await createCheckpoint(s.db, new Date());
  });
  afterAll(async () => {
    await s?.cleanup();
  });

  it("(3) still verifies as a chain, and is found through the checkpoint that covered them", async () => {
    const row40 = await rowAt(s.db, 40);
    await behindTheTrigger(s.superuser, "DELETE FROM audit_events WHERE seq >= 39");
    const r = await verifyAuditChain({}, s.db);
    // What is left links perfectly: the chain alone cannot see a cut at its end — this is why checkpoints exist.
    expect(r.firstBroken).toBeNull();
    expect(r).toMatchObject({ fromSeq: "1", toSeq: "38", checked: 38 });
    expect(r).toMatchObject({ ok: false, checkpoints: { firstFailure: { seq: "40", reason: "row_missing", signedHash: row40.hash, foundHash: null } } });
    // A range given up to the lost entries finds it too.
    expect(await verifyAuditChain({ fromSeq: 30n, toSeq: 45n }, s.db)).toMatchObject({ ok: false, checkpoints: { firstFailure: { reason: "row_missing" } } });
    // So does a range of instants after the newest remaining entry, though it encloses no entry at all.
    const afterLast = new Date((await rowAt(s.db, 38)).occurred_at.getTime() + 1);
    expect(await verifyAuditChain({ fromTime: afterLast }, s.db)).toMatchObject({ ok: false, checked: 0, checkpoints: { firstFailure: { seq: "40", reason: "row_missing" } } });
  });

  it("still finds the cut after new entries have grown the trail over it: entry 40 now has another hash", async () => {
    await appendEntries(s.db, 2);
    const r = await verifyAuditChain({}, s.db);
    expect(r.firstBroken).toBeNull();
    expect(r.checkpoints.firstFailure).toMatchObject({ seq: "40", reason: "hash_differs", foundHash: (await rowAt(s.db, 40)).hash });
    expect(r.checkpoints.firstFailure!.foundHash).not.toBe(r.checkpoints.firstFailure!.signedHash);
  });
});
