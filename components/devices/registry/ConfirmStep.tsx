"use client";
// A two-step submit for actions that cut a device off or cannot be undone: the first press asks, the second does.
// Focus moves to the question so keyboard and screen-reader users hear what they are confirming.
import { useEffect, useRef, useState } from "react";

export function ConfirmStep({ label, question, confirmLabel, pending, resetKey }: {
  label: string;
  question: React.ReactNode;
  confirmLabel: string;
  pending: boolean;
  /** Changes when the action answers: the step closes again. */
  resetKey: unknown;
}) {
  const [asking, setAsking] = useState(false);
  const questionRef = useRef<HTMLDivElement>(null);
  const openRef = useRef<HTMLButtonElement>(null);
  const [answeredFor, setAnsweredFor] = useState(resetKey);
  if (answeredFor !== resetKey) {
    setAnsweredFor(resetKey);
    setAsking(false);
  }
  const cancelled = useRef(false);
  useEffect(() => {
    if (asking) questionRef.current?.focus();
    else if (cancelled.current) {
      cancelled.current = false;
      openRef.current?.focus();
    }
  }, [asking]);
  if (!asking) {
    return <button ref={openRef} type="button" className="btn-secondary" onClick={() => setAsking(true)}>{label}</button>;
  }
  return (
    <div ref={questionRef} tabIndex={-1} role="group" aria-label={`Confirm: ${label}`} className="space-y-3 rounded-md border border-dashed border-muted bg-surface p-3">
      <div>{question}</div>
      <div className="flex flex-wrap gap-3">
        <button type="submit" className="btn-primary" disabled={pending}>{pending ? "Working…" : confirmLabel}</button>
        <button type="button" className="btn-secondary" onClick={() => { cancelled.current = true; setAsking(false); }} disabled={pending}>Cancel</button>
      </div>
    </div>
  );
}
