// People and their unit-scoped roles. Returns DTOs: never a password hash outside this file and sign-in.
import type { Knex } from "knex";
import { db as defaultDb } from "@/lib/db/knex";
import type { Grant, Role } from "@/lib/auth/roles";

export interface PersonDTO {
  id: string;
  email: string;
  name: string;
  active: boolean;
  lastSignInAt: string | null;
  createdAt: string;
  grants: Grant[];
}

export interface SignInRecord {
  id: string;
  email: string;
  name: string;
  active: boolean;
  passwordHash: string;
}

export async function findForSignIn(email: string, knex: Knex = defaultDb): Promise<SignInRecord | null> {
  const row = await knex("users")
    .whereRaw("lower(email) = lower(?)", [email])
    .first("id", "email", "name", "active", "password_hash");
  return row
    ? { id: row.id, email: row.email, name: row.name, active: row.active, passwordHash: row.password_hash }
    : null;
}

export async function grantsOf(userId: string, knex: Knex = defaultDb): Promise<Grant[]> {
  const rows = await knex("user_unit_roles")
    .join("units", "units.id", "user_unit_roles.unit_id")
    .where("user_id", userId)
    .orderBy([{ column: "units.name" }, { column: "user_unit_roles.role" }])
    .select("user_unit_roles.unit_id", "user_unit_roles.role");
  return rows.map((r) => ({ unitId: r.unit_id as string, role: r.role as Role }));
}

/** The signed-in person as the guards need them: current active flag and grants, read fresh per request. */
export async function loadActor(
  userId: string,
  knex: Knex = defaultDb,
): Promise<{ id: string; email: string; name: string; grants: Grant[] } | null> {
  const user = await knex("users").where({ id: userId, active: true }).first("id", "email", "name");
  if (!user) return null;
  return { ...user, grants: await grantsOf(userId, knex) };
}

export async function markSignedIn(userId: string, knex: Knex = defaultDb): Promise<void> {
  await knex("users").where({ id: userId }).update({ last_sign_in_at: knex.fn.now() as unknown as Date });
}

function toDTO(
  u: { id: string; email: string; name: string; active: boolean; last_sign_in_at: Date | null; created_at: Date },
  grants: Grant[],
): PersonDTO {
  return {
    id: u.id,
    email: u.email,
    name: u.name,
    active: u.active,
    lastSignInAt: u.last_sign_in_at?.toISOString() ?? null,
    createdAt: u.created_at.toISOString(),
    grants,
  };
}

const PERSON_COLUMNS = ["id", "email", "name", "active", "last_sign_in_at", "created_at"] as const;

export interface PeoplePage {
  people: PersonDTO[];
  total: number;
  page: number;
  pageSize: number;
}

/** People, active first then by name; `query` matches name or e-mail. */
export async function listPeople(
  opts: { page: number; pageSize: number; query?: string },
  knex: Knex = defaultDb,
): Promise<PeoplePage> {
  const base = knex("users");
  if (opts.query) {
    const like = `%${opts.query.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
    base.where((w) => w.whereILike("name", like).orWhereILike("email", like));
  }
  const countRow = await base.clone().count<{ count: string }[]>({ count: "*" }).first();
  const users = await base
    .clone()
    .orderBy([{ column: "active", order: "desc" }, { column: "name" }])
    .limit(opts.pageSize)
    .offset((opts.page - 1) * opts.pageSize)
    .select(...PERSON_COLUMNS);
  const ids = users.map((u) => u.id);
  const grantRows = ids.length
    ? await knex("user_unit_roles").whereIn("user_id", ids).select("user_id", "unit_id", "role")
    : [];
  return {
    people: users.map((u) =>
      toDTO(
        u,
        grantRows.filter((g) => g.user_id === u.id).map((g) => ({ unitId: g.unit_id, role: g.role })),
      ),
    ),
    total: Number(countRow?.count ?? 0),
    page: opts.page,
    pageSize: opts.pageSize,
  };
}

export async function getPerson(id: string, knex: Knex = defaultDb): Promise<PersonDTO | null> {
  const u = await knex("users").where({ id }).first(...PERSON_COLUMNS);
  return u ? toDTO(u, await grantsOf(id, knex)) : null;
}

export async function emailTaken(email: string, knex: Knex = defaultDb): Promise<boolean> {
  const row = await knex("users").whereRaw("lower(email) = lower(?)", [email]).first("id");
  return Boolean(row);
}

export async function insertPerson(
  trx: Knex.Transaction,
  p: { email: string; name: string; passwordHash: string; grants: Grant[]; grantedBy: string },
): Promise<string> {
  const [row] = await trx("users")
    .insert({ email: p.email, name: p.name, password_hash: p.passwordHash })
    .returning("id");
  const id = (row as { id: string }).id;
  if (p.grants.length) {
    await trx("user_unit_roles").insert(
      p.grants.map((g) => ({ user_id: id, unit_id: g.unitId, role: g.role, granted_by: p.grantedBy })),
    );
  }
  return id;
}

/** Replaces the person's grants within `unitIds` (the units the acting admin manages); others stay. */
export async function replaceGrantsInUnits(
  trx: Knex.Transaction,
  p: { userId: string; unitIds: string[]; grants: Grant[]; grantedBy: string },
): Promise<void> {
  await trx("user_unit_roles").where("user_id", p.userId).whereIn("unit_id", p.unitIds).delete();
  if (p.grants.length) {
    await trx("user_unit_roles").insert(
      p.grants.map((g) => ({ user_id: p.userId, unit_id: g.unitId, role: g.role, granted_by: p.grantedBy })),
    );
  }
}

export async function updateActive(trx: Knex.Transaction, userId: string, active: boolean): Promise<void> {
  await trx("users").where({ id: userId }).update({ active, updated_at: new Date() });
}
