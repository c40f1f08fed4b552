"use client";
import { useActionState } from "react";
import { setPersonActive } from "@/lib/people/actions";
import type { ActionResult } from "@/lib/auth/action-result";
import { FieldError } from "@/components/FieldError";
import { Notice } from "@/components/Notice";

export function SetActiveForm({ userId, active, name }: { userId: string; active: boolean; name: string }) {
  const [state, action, pending] = useActionState<ActionResult | null, FormData>(setPersonActive, null);
  const fe = state && !state.ok ? state.fieldErrors ?? {} : {};
  return (
    <form action={action} className="space-y-3">
      <input type="hidden" name="userId" value={userId} />
      <input type="hidden" name="active" value={active ? "false" : "true"} />
      {state && <Notice tone={state.ok ? "fine" : "problem"}>{state.message}</Notice>}
      <div>
        <label htmlFor="reason" className="mb-1 block font-bold">Reason</label>
        <input id="reason" name="reason" className="field-input" required aria-invalid={fe.reason ? true : undefined} aria-describedby="reason-error"
          placeholder={active ? "e.g. left the unit on 30 Nov" : "e.g. returned from leave"} />
        <FieldError id="reason-error" errors={fe.reason} />
      </div>
      <button type="submit" className="btn-secondary" disabled={pending}>
        {pending ? "Saving…" : active ? `Deactivate ${name}` : `Reactivate ${name}`}
      </button>
    </form>
  );
}
