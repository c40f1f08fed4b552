import { createHash } from "node:crypto";
import { describe, expect, it } from "vitest";
import { canonicalJson, chainHash, GENESIS_HASH, type ChainedFields } from "@/lib/audit/chain";

const row: ChainedFields = {
  seq: "1",
  occurred_at: "2026-12-01T03:04:05.678Z",
  actor_user_id: null,
  actor_email: "a@b.example",
  actor_role: "quality",
  action: "audit.view",
  target_type: null,
  target_id: null,
  unit_id: null,
  outcome: "success",
  detail: { z: 1, a: [true, "é"], m: { y: 2, b: null } },
  request_id: "r-1",
  client_address: "127.0.0.1",
};

describe("canonical JSON (RFC 8785 JCS)", () => {
  it("sorts keys at every depth and drops whitespace (RFC 8785 §3.2.3)", () => {
    expect(canonicalJson(row)).toBe(
      '{"action":"audit.view","actor_email":"a@b.example","actor_role":"quality","actor_user_id":null,' +
        '"client_address":"127.0.0.1","detail":{"a":[true,"é"],"m":{"b":null,"y":2},"z":1},"occurred_at":"2026-12-01T03:04:05.678Z",' +
        '"outcome":"success","request_id":"r-1","seq":"1","target_id":null,"target_type":null,"unit_id":null}',
    );
  });

  it("does not depend on the order keys were written in", () => {
    const reordered = Object.fromEntries(Object.entries(row).reverse()) as unknown as ChainedFields;
    expect(canonicalJson(reordered)).toBe(canonicalJson(row));
  });

  it("serialises numbers as ECMAScript does (RFC 8785 §3.2.2.3 examples)", () => {
    const withNumbers = { ...row, detail: { a: 1e21, b: 0.000001, c: -0, d: 1e-7 } };
    expect(canonicalJson(withNumbers)).toContain('"detail":{"a":1e+21,"b":0.000001,"c":0,"d":1e-7}');
  });
});

describe("chain hash", () => {
  it("is SHA-256 over previous hash then canonical JSON (Node's crypto as the reference)", () => {
    const expected = createHash("sha256").update(GENESIS_HASH + canonicalJson(row), "utf8").digest("hex");
    expect(chainHash(GENESIS_HASH, row)).toBe(expected);
    expect(chainHash(GENESIS_HASH, row)).toMatch(/^[0-9a-f]{64}$/);
  });

  it("changes when any field or the previous hash changes", () => {
    const base = chainHash(GENESIS_HASH, row);
    expect(chainHash("1".repeat(64), row)).not.toBe(base);
    expect(chainHash(GENESIS_HASH, { ...row, outcome: "failure" })).not.toBe(base);
    expect(chainHash(GENESIS_HASH, { ...row, detail: { ...row.detail, z: 2 } })).not.toBe(base);
  });

  it("matches the FIPS 180-2 SHA-256 test vector for 'abc' through the same primitive", () => {
    // FIPS 180-2, Appendix B.1.
    expect(createHash("sha256").update("abc").digest("hex")).toBe(
      "ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad",
    );
  });
});
