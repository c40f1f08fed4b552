import { randomBytes } from "node:crypto";
import { afterAll, beforeAll, beforeEach, describe, expect, it, vi } from "vitest";

// The actions run for real against PostgreSQL; only Next's request plumbing is replaced: the session (who is
// calling), the request headers and cache revalidation.
const session = vi.hoisted(() => ({ current: null as null | { user: { id: string } } }));
vi.mock("next-auth", async (orig) => ({ ...(await orig<object>()), getServerSession: async () => session.current }));
vi.mock("next/headers", () => ({
  headers: async () => new Headers({ "x-request-id": "req-people-test", "x-forwarded-for": "192.0.2.7" }),
}));
vi.mock("next/cache", () => ({ revalidatePath: () => undefined }));

const { db } = await import("@/lib/db/knex");
const { createPerson, updatePersonRoles, setPersonActive } = await import("@/lib/people/actions");
const { loadActor } = await import("@/lib/people/repository");
const { hashPassword } = await import("@/lib/auth/password");
const { demoPerson } = await import("@/seeds/demo-data");

const tag = randomBytes(3).toString("hex");
let unit4W: string;
let unit2E: string;
let adminId: string;
let admin4WOnlyId: string;
let clinicianId: string;

const form = (fields: Record<string, string | string[]>) => {
  const fd = new FormData();
  for (const [k, v] of Object.entries(fields)) for (const x of Array.isArray(v) ? v : [v]) fd.append(k, x);
  return fd;
};
const as = (id: string | null) => {
  session.current = id ? { user: { id } } : null;
};
const userCount = async () => Number((await db("users").count({ n: "*" }).first())!.n);
const lastAudit = () => db("audit_events").orderBy("seq", "desc").first();

beforeAll(async () => {
  unit4W = (await db("units").where({ code: "4W" }).first("id"))!.id;
  unit2E = (await db("units").where({ code: "2E" }).first("id"))!.id;
  adminId = (await db("users").where({ email: demoPerson("admin").email }).first("id"))!.id;
  clinicianId = (await db("users").where({ email: demoPerson("clinician").email }).first("id"))!.id;
  const [row] = await db("users")
    .insert({ email: `admin4w-${tag}@test.example`, name: "Admin of 4W", password_hash: await hashPassword("irrelevant-here") })
    .returning("id");
  admin4WOnlyId = row!.id;
  await db("user_unit_roles").insert({ user_id: admin4WOnlyId, unit_id: unit4W, role: "admin", granted_by: null });
});
beforeEach(() => as(null));
afterAll(async () => {
  await db.destroy();
});

describe("createPerson", () => {
  const valid = () => ({ name: "Rhea Tamsin", email: `rhea-${tag}-${Math.random().toString(36).slice(2, 7)}@test.example`, password: "twelve-chars-ok" });

  it("refuses signed-out callers and writes nothing", async () => {
    const before = await userCount();
    expect(await createPerson(null, form(valid()))).toMatchObject({ ok: false, code: "unauthorized" });
    expect(await userCount()).toBe(before);
  });

  it("refuses a clinician, writes no person, and records the refusal", async () => {
    as(clinicianId);
    const before = await userCount();
    expect(await createPerson(null, form(valid()))).toMatchObject({ ok: false, code: "forbidden" });
    expect(await userCount()).toBe(before);
    expect(await lastAudit()).toMatchObject({ action: "access.denied", outcome: "denied", actor_user_id: clinicianId, client_address: "192.0.2.7" });
  });

  it("refuses a grant in a unit the admin does not administer", async () => {
    as(admin4WOnlyId);
    const before = await userCount();
    expect(await createPerson(null, form({ ...valid(), grants: [`${unit4W}:clinician`, `${unit2E}:clinician`] }))).toMatchObject({ ok: false, code: "forbidden" });
    expect(await userCount()).toBe(before);
  });

  it("returns field errors for bad input", async () => {
    as(adminId);
    const res = await createPerson(null, form({ name: "", email: "not-an-email", password: "short" }));
    expect(res).toMatchObject({ ok: false, code: "invalid_input" });
    expect(res.ok ? [] : Object.keys(res.fieldErrors ?? {}).sort()).toEqual(["email", "name", "password"]);
  });

  it("creates the person with roles and audits it in the same transaction", async () => {
    as(adminId);
    const input = { ...valid(), grants: [`${unit4W}:charge_nurse`, `${unit2E}:clinician`] };
    const res = await createPerson(null, form(input));
    expect(res).toMatchObject({ ok: true });
    const id = res.ok ? res.data!.id : "";
    const actor = await loadActor(id);
    expect(actor?.grants.sort((a, b) => a.role.localeCompare(b.role))).toEqual([
      { unitId: unit4W, role: "charge_nurse" },
      { unitId: unit2E, role: "clinician" },
    ]);
    expect(await lastAudit()).toMatchObject({ action: "person.create", actor_user_id: adminId, actor_role: "admin", target_type: "user", target_id: id });
    // A second person with the same address (any case) is refused at the field.
    const dup = await createPerson(null, form({ ...input, email: input.email.toUpperCase() }));
    expect(dup).toMatchObject({ ok: false, code: "conflict", fieldErrors: { email: ["Someone already has this e-mail address."] } });
  });
});

describe("updatePersonRoles and setPersonActive", () => {
  it("changes only roles in the admin's units and records before and after", async () => {
    as(adminId);
    const created = await createPerson(null, form({ name: "Ivo Brack", email: `ivo-${tag}@test.example`, password: "twelve-chars-ok", grants: [`${unit2E}:clinician`] }));
    const id = created.ok ? created.data!.id : "";
    as(admin4WOnlyId);
    expect(await updatePersonRoles(null, form({ userId: id, grants: [`${unit4W}:biomed`] }))).toMatchObject({ ok: true });
    expect((await loadActor(id))!.grants).toEqual([
      { unitId: unit2E, role: "clinician" },
      { unitId: unit4W, role: "biomed" },
    ]);
    expect((await lastAudit())!.detail).toEqual({ units: [unit4W], before: [], after: [{ unitId: unit4W, role: "biomed" }] });
    // This admin does not administer 2E, where the person also works: deactivation needs an admin of both.
    expect(await setPersonActive(null, form({ userId: id, active: "false", reason: "left" }))).toMatchObject({ ok: false, code: "forbidden" });
  });

  it("keeps an admin from removing their own admin role or deactivating themselves", async () => {
    as(admin4WOnlyId);
    expect(await updatePersonRoles(null, form({ userId: admin4WOnlyId, grants: [`${unit4W}:clinician`] }))).toMatchObject({ ok: false, code: "invalid_input" });
    expect(await setPersonActive(null, form({ userId: admin4WOnlyId, active: "false", reason: "testing" }))).toMatchObject({ ok: false, code: "invalid_input" });
    expect((await loadActor(admin4WOnlyId))!.grants).toEqual([{ unitId: unit4W, role: "admin" }]);
  });

  it("deactivation takes effect at once: the guard no longer finds the person", async () => {
    as(adminId);
    const created = await createPerson(null, form({ name: "Lio Fairweather", email: `lio-${tag}@test.example`, password: "twelve-chars-ok", grants: [`${unit4W}:clinician`] }));
    const id = created.ok ? created.data!.id : "";
    expect(await loadActor(id)).not.toBeNull();
    expect(await setPersonActive(null, form({ userId: id, active: "false", reason: "left the unit" }))).toMatchObject({ ok: true });
    expect(await loadActor(id)).toBeNull();
    expect(await lastAudit()).toMatchObject({ action: "person.deactivate", detail: { reason: "left the unit", before: { active: true }, after: { active: false } } });
    as(id);
    expect(await createPerson(null, form({ name: "x", email: "x@y.example", password: "twelve-chars-ok" }))).toMatchObject({ code: "unauthorized" });
  });
});
