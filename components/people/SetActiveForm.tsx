"use client";
import { setPersonActive } from "@/lib/people/actions";
import { FieldError } from "@/components/FieldError";
import { Notice } from "@/components/Notice";
import { useActionForm } from "@/components/useActionForm";

export function SetActiveForm({ userId, active, name }: { userId: string; active: boolean; name: string }) {
  const { state, pending, onSubmit, onChange, errorsFor } = useActionForm(setPersonActive);
  return (
    <form onSubmit={onSubmit} onChange={onChange} className="space-y-3">
      <input type="hidden" name="userId" value={userId} />
      <input type="hidden" name="active" value={active ? "false" : "true"} />
      {state && <Notice tone={state.ok ? "fine" : "problem"}>{state.message}</Notice>}
      <div>
        <label htmlFor="reason" className="mb-1 block font-bold">Reason</label>
        <input id="reason" name="reason" className="field-input" required aria-invalid={errorsFor("reason") ? true : undefined} aria-describedby="reason-error"
          placeholder={active ? "e.g. left the unit on 30 Nov" : "e.g. returned from leave"} />
        <FieldError id="reason-error" errors={errorsFor("reason")} />
      </div>
      <button type="submit" className="btn-secondary" disabled={pending}>
        {pending ? "Saving…" : active ? `Deactivate ${name}` : `Reactivate ${name}`}
      </button>
    </form>
  );
}
