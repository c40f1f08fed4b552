"use client";
// Add or edit a clinical event annotation. The time is the unit's wall-clock time; on the night the clocks go back
// a time can occur twice, and the form then asks which one is meant (and says so when a time does not exist).
// Field errors appear beside each field, and typed values stay in place when the server refuses them.
import { formatInTimeZone } from "date-fns-tz";
import { useEffect, useMemo, useRef, useState } from "react";
import type { AnnotationDTO } from "@/lib/review/annotations";
import { createAnnotation, updateAnnotation } from "@/lib/review/annotation-actions";
import { localToInstant } from "@/lib/local-time";
import { ANNOTATION_KIND_LABELS, ANNOTATION_NOTE_MAX } from "@/lib/review/annotations.validation";
import { ANNOTATION_KINDS } from "@/lib/db/tables";
import { FieldError } from "@/components/FieldError";
import { Notice } from "@/components/Notice";
import { useActionForm } from "@/components/useActionForm";

const LOCAL_MINUTE = "yyyy-MM-dd'T'HH:mm";
const COMPLETE = /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}/;

export function AnnotationForm({ stayId, timeZone, minAt, maxAt, editing, onSaved, onCancel }: {
  stayId: string;
  timeZone: string;
  /** Earliest and latest instants the stay allows (admission; discharge or now). */
  minAt: string;
  maxAt: string;
  /** The annotation being edited; absent to add one. */
  editing?: AnnotationDTO;
  onSaved: (message: string) => void;
  onCancel?: () => void;
}) {
  const { state, pending, onSubmit, onChange, errorsFor } = useActionForm(editing ? updateAnnotation : createAnnotation);
  const initialLocal = editing ? formatInTimeZone(editing.occurredAt, timeZone, LOCAL_MINUTE) : "";
  const [local, setLocal] = useState(initialLocal);
  const instant = useMemo(() => (COMPLETE.test(local) ? localToInstant(local, timeZone) : null), [local, timeZone]);
  const prefix = editing ? `edit-${editing.id}` : "new-annotation";
  const id = (name: string) => `${prefix}-${name}`;

  // Told once per successful answer, whatever the parent re-renders in between.
  const onSavedRef = useRef(onSaved);
  onSavedRef.current = onSaved;
  useEffect(() => {
    if (state?.ok) onSavedRef.current(state.message);
  }, [state]);

  const occurrenceDefault =
    editing && instant?.kind === "ambiguous" ? (instant.earlier.toISOString() === new Date(editing.occurredAt).toISOString() ? "earlier" : "later") : undefined;

  return (
    <form onSubmit={onSubmit} onChange={onChange} className="space-y-4" noValidate aria-labelledby={id("title")}>
      <h3 id={id("title")} className="font-bold">{editing ? "Edit annotation" : "Add an annotation"}</h3>
      {state && !state.ok && <Notice tone="problem">{state.message}</Notice>}
      <input type="hidden" name="stayId" value={stayId} />
      {editing && (
        <>
          <input type="hidden" name="id" value={editing.id} />
          <input type="hidden" name="version" value={editing.version} />
        </>
      )}
      <div className="grid gap-4 md:grid-cols-2">
        <div>
          <label htmlFor={id("occurredAt")} className="mb-1 block font-bold">When (the unit&apos;s local time)</label>
          <input
            id={id("occurredAt")}
            name="occurredAt"
            type="datetime-local"
            className="field-input"
            defaultValue={initialLocal}
            min={formatInTimeZone(minAt, timeZone, LOCAL_MINUTE)}
            max={formatInTimeZone(maxAt, timeZone, LOCAL_MINUTE)}
            onInput={(e) => setLocal(e.currentTarget.value)}
            required
            aria-invalid={errorsFor("occurredAt") ? true : undefined}
            aria-describedby={`${id("occurredAt-hint")} ${id("occurredAt-error")}`}
          />
          <p id={id("occurredAt-hint")} className="mt-1 text-sm text-muted">
            {instant?.kind === "missing"
              ? "This time does not exist on this date: the clocks went forward over it."
              : `Local time in ${timeZone}, between admission and now (or discharge).`}
          </p>
          <FieldError id={id("occurredAt-error")} errors={errorsFor("occurredAt")} />
        </div>
        <div>
          <label htmlFor={id("kind")} className="mb-1 block font-bold">Kind of event</label>
          <select
            id={id("kind")}
            name="kind"
            className="field-input"
            defaultValue={editing?.kind ?? ""}
            required
            aria-invalid={errorsFor("kind") ? true : undefined}
            aria-describedby={id("kind-error")}
          >
            <option value="" disabled>Choose…</option>
            {ANNOTATION_KINDS.map((k) => (
              <option key={k} value={k}>{ANNOTATION_KIND_LABELS[k]}</option>
            ))}
          </select>
          <FieldError id={id("kind-error")} errors={errorsFor("kind")} />
        </div>
      </div>
      {instant?.kind === "ambiguous" && (
        <fieldset aria-describedby={id("occurrence-error")}>
          <legend className="mb-1 font-bold">This time occurred twice (the clocks went back). Which one?</legend>
          <div className="flex flex-wrap gap-x-6 gap-y-2">
            <label className="flex items-center gap-2">
              <input type="radio" name="occurrence" value="earlier" defaultChecked={occurrenceDefault === "earlier"} />
              The first, {formatInTimeZone(instant.earlier, timeZone, "HH:mm zzz")} (before the change)
            </label>
            <label className="flex items-center gap-2">
              <input type="radio" name="occurrence" value="later" defaultChecked={occurrenceDefault === "later"} />
              The second, {formatInTimeZone(instant.later, timeZone, "HH:mm zzz")} (after the change)
            </label>
          </div>
          <FieldError id={id("occurrence-error")} errors={errorsFor("occurrence")} />
        </fieldset>
      )}
      <div>
        <label htmlFor={id("note")} className="mb-1 block font-bold">Note</label>
        <textarea
          id={id("note")}
          name="note"
          rows={3}
          maxLength={ANNOTATION_NOTE_MAX}
          className="field-input"
          defaultValue={editing?.note ?? ""}
          required
          aria-invalid={errorsFor("note") ? true : undefined}
          aria-describedby={`${id("note-hint")} ${id("note-error")}`}
        />
        <p id={id("note-hint")} className="mt-1 text-sm text-muted">What happened, e.g. the drug and dose or the procedure. Up to {ANNOTATION_NOTE_MAX} characters.</p>
        <FieldError id={id("note-error")} errors={errorsFor("note")} />
      </div>
      <div className="flex gap-3">
        <button type="submit" className="btn-primary" disabled={pending}>
          {pending ? "Saving…" : editing ? "Save changes" : "Add annotation"}
        </button>
        {onCancel && (
          <button type="button" className="btn-secondary" onClick={onCancel}>Cancel</button>
        )}
      </div>
    </form>
  );
}
