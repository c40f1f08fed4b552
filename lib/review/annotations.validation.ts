// Clinical event annotations: the one schema shared by the Night review's form and the server actions, and the
// conversion of the form's local date-time (the unit's wall clock) to an instant. A local time can be missing (the
// spring-forward gap) or occur twice (the autumn repeat, DOMAIN W5); both are said to the person, never guessed.
import { formatInTimeZone, fromZonedTime } from "date-fns-tz";
import { z } from "zod";
import { ANNOTATION_KINDS } from "@/lib/db/tables";

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

const MINUTE = 60_000;
const MINUTE_FORMAT = "yyyy-MM-dd'T'HH:mm";

type LocalInstant =
  | { kind: "ok"; at: Date }
  /** The local time occurs twice (clocks went back): the two instants, earlier first, with their zone abbreviations. */
  | { kind: "ambiguous"; earlier: Date; later: Date; earlierZone: string; laterZone: string }
  /** The local time does not exist (clocks went forward over it). */
  | { kind: "missing" };

/**
 * The instant(s) a local "YYYY-MM-DDTHH:MM" names in `timeZone`. Candidates are fromZonedTime's answer and the
 * instants 30 and 60 min either side (the DST shifts in use are 30 or 60 min); those whose local time reads the same
 * are the instants meant.
 */
export function localToInstant(local: string, timeZone: string): LocalInstant {
  const minute = local.slice(0, 16);
  const guess = fromZonedTime(minute, timeZone).getTime();
  const same = [-60, -30, 0, 30, 60]
    .map((d) => guess + d * MINUTE)
    .filter((ms) => formatInTimeZone(ms, timeZone, MINUTE_FORMAT) === minute)
    .sort((a, b) => a - b);
  if (same.length === 0) return { kind: "missing" };
  if (same.length === 1) return { kind: "ok", at: new Date(same[0]!) };
  const earlier = new Date(same[0]!);
  const later = new Date(same[same.length - 1]!);
  return { kind: "ambiguous", earlier, later, earlierZone: formatInTimeZone(earlier, timeZone, "zzz"), laterZone: formatInTimeZone(later, timeZone, "zzz") };
}

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
  const r = localToInstant(input.occurredAt, stay.timeZone);
  if (r.kind === "missing") {
    return { ok: false, field: "occurredAt", message: "This local time does not exist: the clocks went forward over it. Enter the time as the clock on the wall showed it." };
  }
  let at: Date;
  if (r.kind === "ambiguous") {
    if (!input.occurrence) {
      return { ok: false, field: "occurrence", message: `This time occurred twice (the clocks went back): choose the first (${r.earlierZone}) or the second (${r.laterZone}).` };
    }
    at = input.occurrence === "earlier" ? r.earlier : r.later;
  } else at = r.at;
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
