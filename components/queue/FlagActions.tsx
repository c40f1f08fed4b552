"use client";
// A charge nurse's decisions on one flag: acknowledge (with a reason and an optional note), escalate (to a clinician
// of the unit, with an optional note), resolve. Each form names the flag version it saw; when someone else acted
// first the server says who did what, and the list refreshes to the flag's state now. Values typed are kept on
// every error (useActionForm).
import { useEffect, useId } from "react";
import type { ActionResult } from "@/lib/auth/action-result";
import { ACK_REASONS } from "@/lib/db/tables";
import { acknowledgeFlag, escalateFlag, resolveFlag } from "@/lib/queue/actions";
import { ACK_REASON_LABELS, TRANSITION_NOTE_MAX } from "@/lib/queue/queue.validation";
import type { ClinicianDTO, QueueFlagDTO } from "@/lib/queue/repository";
import { FieldError } from "@/components/FieldError";
import { Notice } from "@/components/Notice";
import { useActionForm } from "@/components/useActionForm";

type Action = (prev: ActionResult<unknown> | null, form: FormData) => Promise<ActionResult<unknown>>;

/** Refreshes the list after every answer: a success shows the new state, a conflict the state that won. */
function useRefreshOn(state: unknown, refresh: () => void) {
  useEffect(() => {
    if (state) refresh();
  }, [state, refresh]);
}

function NoteField({ id, errors }: { id: string; errors?: string[] }) {
  return (
    <div>
      <label htmlFor={id} className="mb-1 block text-sm font-bold">Note <span className="font-normal text-muted">(optional)</span></label>
      <textarea id={id} name="note" rows={2} maxLength={TRANSITION_NOTE_MAX} className="field-input w-full"
        aria-invalid={errors ? true : undefined} aria-describedby={`${id}-error`} />
      <FieldError id={`${id}-error`} errors={errors} />
    </div>
  );
}

function ActionForm({ action, flag, label, submitLabel, refresh, children }: {
  action: Action;
  flag: QueueFlagDTO;
  label: string;
  submitLabel: string;
  refresh: () => void;
  children: (ids: { base: string; errorsFor: (name: string) => string[] | undefined }) => React.ReactNode;
}) {
  const { state, pending, onSubmit, onChange, errorsFor } = useActionForm(action);
  const base = useId();
  useRefreshOn(state, refresh);
  return (
    <form onSubmit={onSubmit} onChange={onChange} aria-label={`${label}: ${flag.bedLabel}, ${flag.ruleLabel}`} className="space-y-2">
      <input type="hidden" name="flagId" value={flag.id} />
      <input type="hidden" name="version" value={flag.version} />
      {state && <Notice tone={state.ok ? "fine" : "problem"}>{state.message}</Notice>}
      {children({ base, errorsFor })}
      <FieldError id={`${base}-version-error`} errors={errorsFor("version") ?? errorsFor("flagId")} />
      <button type="submit" className="btn-primary" disabled={pending}>{pending ? "Saving…" : submitLabel}</button>
    </form>
  );
}

function Disclosure({ summary, children }: { summary: string; children: React.ReactNode }) {
  return (
    <details className="rounded-md border border-line bg-surface px-3 py-2 open:pb-3">
      <summary className="cursor-pointer font-bold text-accent">{summary}</summary>
      <div className="mt-2">{children}</div>
    </details>
  );
}

export function FlagActions({ flag, clinicians, refresh }: { flag: QueueFlagDTO; clinicians: ClinicianDTO[]; refresh: () => void }) {
  const canAck = flag.state === "open";
  const canEscalate = flag.state === "open" || flag.state === "acknowledged";
  const canResolve = flag.state === "acknowledged" || flag.state === "escalated";
  return (
    <div className="space-y-2">
      {canAck && (
        <Disclosure summary="Acknowledge…">
          <ActionForm action={acknowledgeFlag as Action} flag={flag} label="Acknowledge" submitLabel="Acknowledge flag" refresh={refresh}>
            {({ base, errorsFor }) => (
              <>
                <div>
                  <label htmlFor={`${base}-reason`} className="mb-1 block text-sm font-bold">Reason</label>
                  <select id={`${base}-reason`} name="reason" defaultValue="" required className="field-input w-full"
                    aria-invalid={errorsFor("reason") ? true : undefined} aria-describedby={`${base}-reason-error`}>
                    <option value="" disabled>Choose a reason</option>
                    {ACK_REASONS.map((r) => <option key={r} value={r}>{ACK_REASON_LABELS[r]}</option>)}
                  </select>
                  <FieldError id={`${base}-reason-error`} errors={errorsFor("reason")} />
                </div>
                <NoteField id={`${base}-note`} errors={errorsFor("note")} />
                <p className="text-sm text-muted">Acknowledging is not silencing: the flag stays in the queue until its condition ends and it is resolved.</p>
              </>
            )}
          </ActionForm>
        </Disclosure>
      )}
      {canEscalate && (
        <Disclosure summary="Escalate…">
          <ActionForm action={escalateFlag as Action} flag={flag} label="Escalate" submitLabel="Escalate flag" refresh={refresh}>
            {({ base, errorsFor }) => (
              <>
                <div>
                  <label htmlFor={`${base}-recipient`} className="mb-1 block text-sm font-bold">Clinician</label>
                  <select id={`${base}-recipient`} name="recipientId" defaultValue="" required className="field-input w-full"
                    aria-invalid={errorsFor("recipientId") ? true : undefined} aria-describedby={`${base}-recipient-error`}>
                    <option value="" disabled>{clinicians.length ? "Choose a clinician" : "No active clinician in this unit"}</option>
                    {clinicians.map((c) => <option key={c.id} value={c.id}>{c.name}</option>)}
                  </select>
                  <FieldError id={`${base}-recipient-error`} errors={errorsFor("recipientId")} />
                </div>
                <NoteField id={`${base}-note`} errors={errorsFor("note")} />
                <p className="text-sm text-muted">The clinician gets an e-mail with the bed, the flag and a link — never the patient&apos;s name. Your note stays in Corvane.</p>
              </>
            )}
          </ActionForm>
        </Disclosure>
      )}
      {canResolve && (flag.conditionTo === null ? (
        <p className="text-sm text-muted">
          <span aria-hidden="true">◷ </span>Resolve becomes possible once the condition ends: it still holds.
        </p>
      ) : (
        <Disclosure summary="Resolve…">
          <ActionForm action={resolveFlag as Action} flag={flag} label="Resolve" submitLabel="Resolve flag" refresh={refresh}>
            {({ base, errorsFor }) => <NoteField id={`${base}-note`} errors={errorsFor("note")} />}
          </ActionForm>
        </Disclosure>
      ))}
    </div>
  );
}
