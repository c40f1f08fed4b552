import { describe, expect, it } from "vitest";
import { safeCallbackUrl } from "@/lib/auth/callback-url";
import { signInSchema } from "@/lib/auth/sign-in.validation";
import { verifyChainSchema } from "@/lib/audit/audit.validation";
import { createPersonSchema, setActiveSchema, updateRolesSchema } from "@/lib/people/people.validation";

const U1 = "11111111-1111-4111-8111-111111111111";

describe("sign-in input", () => {
  it("accepts an e-mail and password and rejects blanks with a message per field", () => {
    expect(signInSchema.safeParse({ email: "a@b.example", password: "x" }).success).toBe(true);
    const bad = signInSchema.safeParse({ email: "nope", password: "" });
    expect(bad.success).toBe(false);
    expect(bad.error?.issues.map((i) => i.path[0]).sort()).toEqual(["email", "password"]);
  });
});

describe("return address after sign-in", () => {
  it("allows same-origin paths only (no open redirect)", () => {
    expect(safeCallbackUrl("/units/x/census?a=1")).toBe("/units/x/census?a=1");
    for (const bad of ["https://elsewhere.example/", "//elsewhere.example", "/\\elsewhere", "javascript:alert(1)", "/signin", "", undefined]) {
      expect(safeCallbackUrl(bad)).toBe("/");
    }
  });
});

describe("people forms", () => {
  it("normalises e-mail, requires a 12-character password and parses role checkboxes", () => {
    const ok = createPersonSchema.parse({ name: " Ada Quill ", email: " Ada@Larkspur.Example ", password: "long-enough-pw", grants: `${U1}:clinician` });
    expect(ok).toEqual({ name: "Ada Quill", email: "ada@larkspur.example", password: "long-enough-pw", grants: [{ unitId: U1, role: "clinician" }] });
    const many = updateRolesSchema.parse({ userId: U1, grants: [`${U1}:clinician`, `${U1}:admin`] });
    expect(many.grants).toHaveLength(2);
    expect(updateRolesSchema.parse({ userId: U1 }).grants).toEqual([]);
  });

  it("rejects unknown roles, short passwords and missing reasons", () => {
    expect(createPersonSchema.safeParse({ name: "Ada", email: "a@b.example", password: "short", grants: [] }).success).toBe(false);
    expect(updateRolesSchema.safeParse({ userId: U1, grants: `${U1}:surgeon` }).success).toBe(false);
    expect(setActiveSchema.safeParse({ userId: U1, active: "false", reason: "" }).success).toBe(false);
    expect(setActiveSchema.parse({ userId: U1, active: "false", reason: "left the unit" }).active).toBe(false);
  });
});

describe("chain-check range", () => {
  it("accepts an empty or ordered range and rejects a reversed one", () => {
    expect(verifyChainSchema.parse({ fromSeq: "", toSeq: "" })).toMatchObject({ by: "seq", fromSeq: undefined, toSeq: undefined });
    expect(verifyChainSchema.parse({ fromSeq: "2", toSeq: "9" })).toMatchObject({ by: "seq", fromSeq: "2", toSeq: "9" });
    expect(verifyChainSchema.safeParse({ fromSeq: "9", toSeq: "2" }).success).toBe(false);
    expect(verifyChainSchema.safeParse({ fromSeq: "0" }).success).toBe(false);
  });
});
