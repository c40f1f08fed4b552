"use server";
// People: create, change unit roles, deactivate/reactivate. Admins act only in units they administer; every
// change and its before/after lands in the audit trail within the same transaction as the change.
import { revalidatePath } from "next/cache";
import { db } from "@/lib/db";
import { auditAs, guardedAction } from "@/lib/auth/guard";
import { hashPassword } from "@/lib/auth/password";
import { unitsWhere } from "@/lib/auth/roles";
import { emailTaken, getPerson, insertPerson, replaceGrantsInUnits, updateActive } from "./repository";
import { createPersonSchema, setActiveSchema, updateRolesSchema } from "./people.validation";

export const createPerson = guardedAction(
  "createPerson",
  createPersonSchema,
  async (input, actor) => {
    if (await emailTaken(input.email)) {
      return { ok: false, code: "conflict", message: "Check the highlighted fields.", fieldErrors: { email: ["Someone already has this e-mail address."] } };
    }
    const passwordHash = await hashPassword(input.password);
    const id = await db.transaction(async (trx) => {
      const userId = await insertPerson(trx, { email: input.email, name: input.name, passwordHash, grants: input.grants, grantedBy: actor.userId });
      await auditAs(actor, {
        action: "person.create",
        permission: "people.manage",
        target: { type: "user", id: userId },
        detail: { email: input.email, name: input.name, grants: input.grants },
      }, trx);
      return userId;
    });
    revalidatePath("/people");
    return { ok: true, message: `${input.name} can now sign in.`, data: { id } };
  },
  { unitIdsOf: (input) => input.grants.map((g) => g.unitId) },
);

export const updatePersonRoles = guardedAction(
  "updatePersonRoles",
  updateRolesSchema,
  async (input, actor) => {
    const before = await getPerson(input.userId);
    if (!before) return { ok: false, code: "not_found", message: "That person no longer exists." };
    const managed = unitsWhere(actor.grants, "people.manage");
    // Admins cannot remove their own administration of a unit (no accidental lock-out).
    if (input.userId === actor.userId) {
      const keepsAdmin = managed.every((u) => input.grants.some((g) => g.unitId === u && g.role === "admin"));
      if (!keepsAdmin) {
        return { ok: false, code: "invalid_input", message: "You cannot remove your own administrator role.", fieldErrors: { grants: ["Keep your own administrator role; another administrator can change it."] } };
      }
    }
    await db.transaction(async (trx) => {
      await replaceGrantsInUnits(trx, { userId: input.userId, unitIds: managed, grants: input.grants, grantedBy: actor.userId });
      await auditAs(actor, {
        action: "person.roles_change",
        permission: "people.manage",
        target: { type: "user", id: input.userId },
        detail: {
          units: managed,
          before: before.grants.filter((g) => managed.includes(g.unitId)),
          after: input.grants,
        },
      }, trx);
    });
    revalidatePath("/people");
    revalidatePath(`/people/${input.userId}`);
    return { ok: true, message: `Roles of ${before.name} saved.` };
  },
  { unitIdsOf: (input) => input.grants.map((g) => g.unitId) },
);

export const setPersonActive = guardedAction("setPersonActive", setActiveSchema, async (input, actor) => {
  const before = await getPerson(input.userId);
  if (!before) return { ok: false, code: "not_found", message: "That person no longer exists." };
  const managed = unitsWhere(actor.grants, "people.manage");
  if (before.grants.some((g) => !managed.includes(g.unitId))) {
    return { ok: false, code: "forbidden", message: "This person holds roles in units you do not administer; an administrator of every one of those units must do this." };
  }
  if (input.userId === actor.userId && !input.active) {
    return { ok: false, code: "invalid_input", message: "You cannot deactivate yourself.", fieldErrors: { reason: ["Ask another administrator."] } };
  }
  await db.transaction(async (trx) => {
    await updateActive(trx, input.userId, input.active);
    await auditAs(actor, {
      action: input.active ? "person.reactivate" : "person.deactivate",
      permission: "people.manage",
      target: { type: "user", id: input.userId },
      detail: { reason: input.reason, before: { active: before.active }, after: { active: input.active } },
    }, trx);
  });
  revalidatePath("/people");
  revalidatePath(`/people/${input.userId}`);
  return { ok: true, message: input.active ? `${before.name} can sign in again.` : `${before.name} is deactivated and signed out everywhere.` };
});
