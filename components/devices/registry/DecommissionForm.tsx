"use client";
// Decommissioning: the device leaves service for good (its tokens are revoked; its record, bed history and
// maintenance log are kept). A device on a bed is first taken off it, so no stay loses its stream unnoticed.
import { useId } from "react";
import { decommissionDevice } from "@/lib/devices/actions";
import { DECOMMISSION_REASON_MAX } from "@/lib/devices/registry.validation";
import { FieldError } from "@/components/FieldError";
import { Notice } from "@/components/Notice";
import { useActionForm } from "@/components/useActionForm";
import { ConfirmStep } from "./ConfirmStep";

export function DecommissionForm({ unitId, deviceId, serial }: { unitId: string; deviceId: string; serial: string }) {
  const { state, pending, onSubmit, onChange, errorsFor } = useActionForm(decommissionDevice);
  const id = useId();
  return (
    <form onSubmit={onSubmit} onChange={onChange} aria-label="Decommission the device" className="space-y-3" noValidate>
      <input type="hidden" name="unitId" value={unitId} />
      <input type="hidden" name="deviceId" value={deviceId} />
      <div aria-live="polite">{state && <Notice tone={state.ok ? "fine" : "problem"}>{state.message}</Notice>}</div>
      <div>
        <label htmlFor={`${id}-reason`} className="mb-1 block font-bold">Reason</label>
        <textarea id={`${id}-reason`} name="reason" rows={2} required maxLength={DECOMMISSION_REASON_MAX} className="field-input"
          aria-invalid={errorsFor("reason") ? true : undefined} aria-describedby={`${id}-reason-error`} />
        <FieldError id={`${id}-reason-error`} errors={errorsFor("reason")} />
      </div>
      <ConfirmStep
        label="Decommission…"
        confirmLabel="Decommission for good"
        pending={pending}
        resetKey={state}
        question={<p><span className="font-mono">{serial}</span> leaves service for good: its tokens are revoked and it can no longer be edited, assigned or given a token. Its record and history are kept.</p>}
      />
    </form>
  );
}
