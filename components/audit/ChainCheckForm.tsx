"use client";
import { useActionState } from "react";
import { verifyAuditChain } from "@/lib/audit/actions";
import type { ActionResult } from "@/lib/auth/action-result";
import type { ChainVerification } from "@/lib/audit/verify";
import { FieldError } from "@/components/FieldError";
import { Notice } from "@/components/Notice";

export function ChainCheckForm() {
  const [state, action, pending] = useActionState<ActionResult<ChainVerification> | null, FormData>(verifyAuditChain, null);
  const fe = state && !state.ok ? state.fieldErrors ?? {} : {};
  const broken = state?.ok && state.data && !state.data.ok;
  return (
    <form action={action} className="space-y-3" noValidate>
      <div className="flex flex-wrap items-end gap-4">
        <div>
          <label htmlFor="fromSeq" className="mb-1 block font-bold">From entry</label>
          <input id="fromSeq" name="fromSeq" inputMode="numeric" className="field-input w-36" placeholder="first"
            aria-invalid={fe.fromSeq ? true : undefined} aria-describedby="fromSeq-error" />
        </div>
        <div>
          <label htmlFor="toSeq" className="mb-1 block font-bold">To entry</label>
          <input id="toSeq" name="toSeq" inputMode="numeric" className="field-input w-36" placeholder="last"
            aria-invalid={fe.toSeq ? true : undefined} aria-describedby="toSeq-error" />
        </div>
        <button type="submit" className="btn-primary" disabled={pending}>{pending ? "Checking…" : "Check the chain"}</button>
      </div>
      <FieldError id="fromSeq-error" errors={fe.fromSeq} />
      <FieldError id="toSeq-error" errors={fe.toSeq} />
      <div aria-live="polite">
        {state && (state.ok ? <Notice tone={broken ? "problem" : "fine"}>{state.message}</Notice> : !state.fieldErrors && <Notice tone="problem">{state.message}</Notice>)}
      </div>
    </form>
  );
}
