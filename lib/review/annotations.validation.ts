// Clinical event annotations: the one schema shared by the Night review's form and the server actions, and the
// conversion of the form's local date-time (the unit's wall clock) to an instant. A local time can be missing (the
// spring-forward gap) or occur twice (the autumn repeat, DOMAIN W5); both are said to the person, never guessed.
import { formatInTimeZone } from "date-fns-tz";
import { z } from "zod";
import { ANNOTATION_KINDS } from "@/lib/db/tables";
import { chosenLocalInstant } from "@/lib/local-time";

export const ANNOTATION_KIND_LABELS: Record<(typeof ANNOTATION_KINDS)[number], string> = {
  medication: "Medication",
  procedure: "Procedure",
  repositioning: "Repositioning",
  other: "Other",
};

export const ANNOTATION_NOTE_MAX = 500;

/** What <input type="datetime-local"> sends: "YYYY-MM-DDTHH:MM", seconds optional. */
const LOCAL_DATE_TIME = /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}(:\d{2}(\.\d{1,3})?)?$/;

/** An empty form field (an unchosen radio, a blank input) is the same as an absent one. */
const blankToUndefined = (v: unknown) => (v === "" || v === null ? undefined : v);

export const annotationSchema = z.object({
  stayId: z.uuid({ error: "Not a valid stay." }),
  occurredAt: z.string({ error: "Enter the date and time of the event." }).regex(LOCAL_DATE_TIME, { error: "Enter the date and time of the event." }),
  /** Which of two equal local times is meant, on the night the clocks go back. */
  occurrence: z.preprocess(blankToUndefined, z.enum(["earlier", "later"], { error: "Choose which of the two times you mean." }).optional()),
  kind: z.enum(ANNOTATION_KINDS, { error: "Choose what kind of event this was." }),
  note: z
    .string({ error: "Describe the event in a few words." })
    .trim()
    .min(1, { error: "Describe the event in a few words." })
    .max(ANNOTATION_NOTE_MAX, { error: `Keep the note to ${ANNOTATION_NOTE_MAX} characters.` }),
});
export type AnnotationInput = z.infer<typeof annotationSchema>;

/** Editing names the annotation and the version the person saw (optimistic concurrency). */
export const annotationUpdateSchema = annotationSchema.extend({
  id: z.uuid({ error: "Not a valid annotation." }),
  version: z.coerce.number({ error: "Reload the page and try again." }).int().min(1),
});
export type AnnotationUpdateInput = z.infer<typeof annotationUpdateSchema>;

/** The stay as the time check needs it: the unit's zone and the stay's bounds. */
export interface StayWindow {
  timeZone: string;
  admittedAt: Date;
  /** null while the stay is open (then `now` bounds it). */
  dischargedAt: Date | null;
}

/**
 * The instant of an annotation's local time, which must lie within the stay (admission to discharge, or now while
 * the stay is open); or the message to show beside the time field.
 */
export function annotationInstant(input: Pick<AnnotationInput, "occurredAt" | "occurrence">, stay: StayWindow, now: Date): { ok: true; at: Date } | { ok: false; field: "occurredAt" | "occurrence"; message: string } {
  const chosen = chosenLocalInstant(input.occurredAt, input.occurrence, stay.timeZone);
  if (!chosen.ok) return { ok: false, field: chosen.field === "time" ? "occurredAt" : "occurrence", message: chosen.message };
  const at = chosen.at;
  const end = stay.dischargedAt ?? now;
  if (at.getTime() < stay.admittedAt.getTime()) {
    return { ok: false, field: "occurredAt", message: `The patient was admitted at ${formatInTimeZone(stay.admittedAt, stay.timeZone, "d MMM, HH:mm zzz")}: enter a time after that.` };
  }
  if (at.getTime() > end.getTime()) {
    return {
      ok: false,
      field: "occurredAt",
      message: stay.dischargedAt
        ? `The patient was discharged at ${formatInTimeZone(stay.dischargedAt, stay.timeZone, "d MMM, HH:mm zzz")}: enter a time before that.`
        : "That time is in the future: annotate events that have happened.",
    };
  }
  return { ok: true, at };
}
