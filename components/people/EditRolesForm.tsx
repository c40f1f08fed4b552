"use client";
import { useActionState } from "react";
import { updatePersonRoles } from "@/lib/people/actions";
import type { ActionResult } from "@/lib/auth/action-result";
import type { Grant } from "@/lib/auth/roles";
import { Notice } from "@/components/Notice";
import { RolesGrid, type GridUnit } from "./RolesGrid";

export function EditRolesForm({ userId, units, grants }: { userId: string; units: GridUnit[]; grants: Grant[] }) {
  const [state, action, pending] = useActionState<ActionResult | null, FormData>(updatePersonRoles, null);
  return (
    <form action={action} className="space-y-4">
      <input type="hidden" name="userId" value={userId} />
      {state && <Notice tone={state.ok ? "fine" : "problem"}>{state.message}</Notice>}
      <RolesGrid units={units} grants={grants} errors={state && !state.ok ? state.fieldErrors?.grants : undefined} />
      <button type="submit" className="btn-primary" disabled={pending}>{pending ? "Saving…" : "Save roles"}</button>
    </form>
  );
}
