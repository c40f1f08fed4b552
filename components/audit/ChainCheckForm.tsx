"use client";
import { verifyAuditChain } from "@/lib/audit/actions";
import type { ChainVerification } from "@/lib/audit/verify";
import { FieldError } from "@/components/FieldError";
import { Notice } from "@/components/Notice";
import { useActionForm } from "@/components/useActionForm";

export function ChainCheckForm() {
  const { state, pending, onSubmit, onChange, errorsFor } = useActionForm<ChainVerification>(verifyAuditChain);
  const broken = state?.ok && state.data && !state.data.ok;
  return (
    <form onSubmit={onSubmit} onChange={onChange} className="space-y-3" noValidate>
      <div className="flex flex-wrap items-end gap-4">
        <div>
          <label htmlFor="fromSeq" className="mb-1 block font-bold">From entry</label>
          <input id="fromSeq" name="fromSeq" inputMode="numeric" className="field-input w-36" placeholder="first"
            aria-invalid={errorsFor("fromSeq") ? true : undefined} aria-describedby="fromSeq-error" />
        </div>
        <div>
          <label htmlFor="toSeq" className="mb-1 block font-bold">To entry</label>
          <input id="toSeq" name="toSeq" inputMode="numeric" className="field-input w-36" placeholder="last"
            aria-invalid={errorsFor("toSeq") ? true : undefined} aria-describedby="toSeq-error" />
        </div>
        <button type="submit" className="btn-primary" disabled={pending}>{pending ? "Checking…" : "Check the chain"}</button>
      </div>
      <FieldError id="fromSeq-error" errors={errorsFor("fromSeq")} />
      <FieldError id="toSeq-error" errors={errorsFor("toSeq")} />
      <div aria-live="polite">
        {state && (state.ok ? <Notice tone={broken ? "problem" : "fine"}>{state.message}</Notice> : !state.fieldErrors && <Notice tone="problem">{state.message}</Notice>)}
      </div>
    </form>
  );
}
