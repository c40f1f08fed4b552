// Stay-addressed pages and route handlers: parse the stay id, find the stay's unit, then the one guard (role and
// unit scope). An unknown stay and a stay outside the person's units look the same to the caller (not found / 403
// after the guard), so ids cannot be probed for existence beyond what the guard already allows.
import "server-only";
import { notFound } from "next/navigation";
import { guardApi, guardPage, type Actor } from "@/lib/auth/guard";
import type { Permission } from "@/lib/auth/roles";
import { stayIdSchema, stayScope, type StayScopeDTO } from "./stay-scope";

export async function guardStayPage(permission: Permission, rawStayId: string): Promise<{ actor: Actor; stay: StayScopeDTO }> {
  const id = stayIdSchema.safeParse(rawStayId);
  if (!id.success) notFound();
  const stay = await stayScope(id.data);
  if (!stay) {
    await guardPage(permission); // signed-out callers go to sign-in, others to not-found
    notFound();
  }
  const actor = await guardPage(permission, stay.unitId);
  return { actor, stay };
}

const json = (status: number, body: unknown) => Response.json(body, { status, headers: { "Cache-Control": "no-store" } });

export async function guardStayApi(
  permission: Permission,
  rawStayId: string,
): Promise<{ ok: true; actor: Actor; stay: StayScopeDTO } | { ok: false; response: Response }> {
  const id = stayIdSchema.safeParse(rawStayId);
  if (!id.success) return { ok: false, response: json(400, { error: "bad_request", message: "Not a stay id." }) };
  const stay = await stayScope(id.data);
  if (!stay) {
    const g = await guardApi(permission);
    return g.ok ? { ok: false, response: json(404, { error: "not_found", message: "No such stay." }) } : g;
  }
  const g = await guardApi(permission, stay.unitId);
  return g.ok ? { ok: true, actor: g.actor, stay } : g;
}
