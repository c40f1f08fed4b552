"use client";
// The clinician's note on a patient's night. It carries the version it was loaded with: a save over someone else's
// newer note is refused and shows their text, and the typed text stays in the box (useActionForm).
import { formatInTimeZone } from "date-fns-tz";
import { FieldError } from "@/components/FieldError";
import { Notice } from "@/components/Notice";
import { useActionForm } from "@/components/useActionForm";
import type { HandoffNoteDTO } from "@/lib/review/handoff";
import { saveHandoffNote } from "@/lib/review/handoff-actions";
import { HANDOFF_NOTE_MAX } from "@/lib/review/handoff.validation";

export function HandoffNoteForm({ stayId, night, note, timeZone }: { stayId: string; night: string; note: HandoffNoteDTO | null; timeZone: string }) {
  const { state, pending, onSubmit, onChange, errorsFor } = useActionForm(saveHandoffNote);
  const id = (part: string) => `note-${stayId}-${part}`;
  const other = [...(errorsFor("night") ?? []), ...(errorsFor("version") ?? []), ...(errorsFor("stayId") ?? [])];
  return (
    <form onSubmit={onSubmit} onChange={onChange} className="space-y-2 print:hidden">
      <input type="hidden" name="stayId" value={stayId} />
      <input type="hidden" name="night" value={night} />
      <input type="hidden" name="version" value={note?.version ?? 0} />
      {state && (
        <div className="whitespace-pre-line">
          <Notice tone={state.ok ? "fine" : "problem"}>{state.message}</Notice>
        </div>
      )}
      <label htmlFor={id("text")} className="block font-bold">Clinician’s note for this night</label>
      <p id={id("hint")} className="text-sm text-muted">
        Up to {HANDOFF_NOTE_MAX} characters.{" "}
        {note
          ? `Last saved by ${note.updatedBy} at ${formatInTimeZone(note.updatedAt, timeZone, "EEE d MMM, HH:mm zzz")} (version ${note.version}).`
          : "No note saved for this night yet."}
      </p>
      <textarea
        id={id("text")}
        name="note"
        rows={4}
        maxLength={HANDOFF_NOTE_MAX}
        defaultValue={note?.note ?? ""}
        className="field-input"
        aria-invalid={errorsFor("note") ? true : undefined}
        aria-describedby={`${id("hint")} ${id("error")}`}
      />
      <FieldError id={id("error")} errors={errorsFor("note")} />
      {other.length > 0 && <FieldError id={id("other-error")} errors={other} />}
      <button type="submit" className="btn-primary" disabled={pending}>{pending ? "Saving…" : "Save note"}</button>
    </form>
  );
}
