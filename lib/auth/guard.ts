// The one guard module. Every page group layout, route handler and server action calls it: it reads the
// session, re-reads the person's current roles from the database (a deactivation or role change applies at
// once), checks role *and* unit scope, and audits refusals.
import "server-only";
import { getServerSession } from "next-auth";
import { redirect } from "next/navigation";
import { z } from "zod";
import { recordAudit } from "@/lib/audit/record";
import { loadActor } from "@/lib/people/repository";
import { logger } from "@/lib/log";
import { authOptions } from "./options";
import { requestContext } from "./request-context";
import { ACTION_ACCESS, type Access } from "./routes";
import { can, roleFor, type Grant, type Permission } from "./roles";
import type { ActionResult } from "./action-result";

export interface Actor {
  userId: string;
  email: string;
  name: string;
  grants: Grant[];
  requestId: string;
  clientAddress: string | null;
}

export async function currentActor(): Promise<Actor | null> {
  const session = await getServerSession(authOptions());
  if (!session?.user?.id) return null;
  const person = await loadActor(session.user.id);
  if (!person) return null;
  const ctx = await requestContext();
  return {
    userId: person.id,
    email: person.email,
    name: person.name,
    grants: person.grants,
    requestId: ctx.requestId,
    clientAddress: ctx.clientAddress,
  };
}

/** Audits an action by the actor; throws if the audit write fails, so the caller's action fails too. */
export function auditAs(
  actor: Actor,
  e: {
    action: string;
    permission?: Permission;
    unitId?: string | null;
    target?: { type: string; id: string } | null;
    outcome?: "success" | "failure" | "denied";
    detail?: Record<string, unknown>;
  },
  trx?: Parameters<typeof recordAudit>[1],
) {
  return recordAudit(
    {
      actor: {
        userId: actor.userId,
        email: actor.email,
        role: e.permission ? roleFor(actor.grants, e.permission, e.unitId ?? undefined) : null,
      },
      action: e.action,
      target: e.target ?? null,
      unitId: e.unitId ?? null,
      outcome: e.outcome ?? "success",
      detail: e.detail,
      requestId: actor.requestId,
      clientAddress: actor.clientAddress,
    },
    trx,
  );
}

function denied(actor: Actor, what: string, permission: Permission, unitId?: string) {
  return auditAs(actor, {
    action: "access.denied",
    unitId: unitId ?? null,
    outcome: "denied",
    detail: { what, permission },
  });
}

/**
 * For page group layouts and pages: signed-out → sign-in (returning here afterwards); wrong role or unit →
 * the forbidden page. Returns the actor when allowed.
 */
export async function guardPage(permission?: Permission, unitId?: string): Promise<Actor> {
  const actor = await currentActor();
  if (!actor) {
    const { pathname } = await requestContext();
    redirect(`/signin?callbackUrl=${encodeURIComponent(pathname)}`);
  }
  if (permission && !can(actor.grants, permission, unitId)) {
    const { pathname } = await requestContext();
    await denied(actor, `page ${pathname}`, permission, unitId);
    redirect("/forbidden");
  }
  return actor;
}

const json = (status: number, body: unknown) => Response.json(body, { status, headers: { "Cache-Control": "no-store" } });

/** For route handlers: 401 JSON when signed out, 403 JSON on wrong role or unit. */
export async function guardApi(
  permission: Permission,
  unitId?: string,
): Promise<{ ok: true; actor: Actor } | { ok: false; response: Response }> {
  const actor = await currentActor();
  if (!actor) return { ok: false, response: json(401, { error: "unauthorized", message: "Sign in first." }) };
  if (!can(actor.grants, permission, unitId)) {
    await denied(actor, "api", permission, unitId);
    return { ok: false, response: json(403, { error: "forbidden", message: "Your roles do not allow this here." }) };
  }
  return { ok: true, actor };
}

/** FormData → plain object; repeated keys become arrays. Uploaded files stay `File`s (an empty file input sends a
 *  nameless empty file, dropped here as if nothing was chosen); the action's schema checks them like any field. */
function formObject(form: FormData): Record<string, unknown> {
  const out: Record<string, unknown> = {};
  for (const key of new Set(form.keys())) {
    if (key.startsWith("$ACTION")) continue;
    const all = form.getAll(key).filter((v) => typeof v === "string" || (v.size > 0 || v.name !== ""));
    out[key] = all.length > 1 ? all : all[0];
  }
  return out;
}

/**
 * Wraps a server action: session → role → input (zod) → unit scope of the input → handler → error shaping.
 * Access comes from ACTION_ACCESS by the action's exported name, so the matrix test and the runtime agree.
 * Denied and invalid calls write nothing but the audit of the refusal.
 */
export function guardedAction<S extends z.ZodType, R = undefined>(
  name: keyof typeof ACTION_ACCESS,
  schema: S,
  handler: (input: z.infer<S>, actor: Actor) => Promise<ActionResult<R>>,
  opts: { unitIdsOf?: (input: z.infer<S>) => string[] | Promise<string[]> } = {},
): (prev: ActionResult<R> | null, form: FormData) => Promise<ActionResult<R>> {
  const access: Access = ACTION_ACCESS[name]!;
  return async (_prev, form) => {
    const actor = await currentActor();
    if (!actor) return { ok: false, code: "unauthorized", message: "Your session has ended. Sign in again." };
    if (access.kind === "permission" && !can(actor.grants, access.permission)) {
      await denied(actor, `action ${name}`, access.permission);
      return { ok: false, code: "forbidden", message: "Your roles do not allow this." };
    }
    const parsed = schema.safeParse(form instanceof FormData ? formObject(form) : {});
    if (!parsed.success) {
      const fieldErrors: Record<string, string[]> = {};
      for (const issue of parsed.error.issues) {
        const key = String(issue.path[0] ?? "_form");
        (fieldErrors[key] ??= []).push(issue.message);
      }
      return { ok: false, code: "invalid_input", message: "Check the highlighted fields.", fieldErrors };
    }
    if (access.kind === "permission" && opts.unitIdsOf) {
      const outside = (await opts.unitIdsOf(parsed.data)).filter((u) => !can(actor.grants, access.permission, u));
      if (outside.length) {
        await denied(actor, `action ${name}`, access.permission, outside[0]);
        return { ok: false, code: "forbidden", message: "Your roles do not allow this in that unit." };
      }
    }
    try {
      return await handler(parsed.data, actor);
    } catch (err) {
      logger.error({ err, action: name, requestId: actor.requestId }, "server action failed");
      return { ok: false, code: "server_error", message: "That did not work and nothing was saved. Try again." };
    }
  };
}
