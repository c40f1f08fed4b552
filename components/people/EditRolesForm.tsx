"use client";
import { updatePersonRoles } from "@/lib/people/actions";
import type { Grant } from "@/lib/auth/roles";
import { Notice } from "@/components/Notice";
import { useActionForm } from "@/components/useActionForm";
import { RolesGrid, type GridUnit } from "./RolesGrid";

export function EditRolesForm({ userId, units, grants }: { userId: string; units: GridUnit[]; grants: Grant[] }) {
  const { state, pending, onSubmit, onChange, errorsFor } = useActionForm(updatePersonRoles);
  return (
    <form onSubmit={onSubmit} onChange={onChange} className="space-y-4">
      <input type="hidden" name="userId" value={userId} />
      {state && <Notice tone={state.ok ? "fine" : "problem"}>{state.message}</Notice>}
      <RolesGrid units={units} grants={grants} errors={errorsFor("grants")} />
      <button type="submit" className="btn-primary" disabled={pending}>{pending ? "Saving…" : "Save roles"}</button>
    </form>
  );
}
