// The Review queue's inputs: one schema per flag transition (shared by the forms and the server actions) and the
// queue's filters (shared by the page and the route handler). Each transition names the flag version the person
// saw, so of two people acting on one flag at once, one wins and the other is told (optimistic concurrency).
import { z } from "zod";
import { ACK_REASONS, type AckReason } from "@/lib/db/tables";

/** The acknowledge reasons of the GLOSSARY, in plain words for the form and the list. */
export const ACK_REASON_LABELS: Record<AckReason, string> = {
  artifact_or_poor_signal: "Artefact or poor signal",
  known_rhythm: "Known rhythm (e.g. AF, paced)",
  expected_clinical_context: "Expected in the clinical context (medication, procedure, sleep)",
  reviewed_no_action: "Reviewed, no action needed",
};

/** The flag_events note column's limit (migrations/20261202000300_review_queue.ts). */
export const TRANSITION_NOTE_MAX = 500;

/** An empty form field is the same as an absent one. */
const blankToUndefined = (v: unknown) => (typeof v === "string" && v.trim() === "" ? undefined : v);

const note = z.preprocess(
  blankToUndefined,
  z.string().trim().max(TRANSITION_NOTE_MAX, { error: `Keep the note to ${TRANSITION_NOTE_MAX} characters.` }).optional(),
);

const flagRef = {
  flagId: z.uuid({ error: "Not a valid flag." }),
  version: z.coerce.number({ error: "Reload the page and try again." }).int().min(1, { error: "Reload the page and try again." }),
};

export const acknowledgeSchema = z.object({
  ...flagRef,
  reason: z.enum(ACK_REASONS, { error: "Choose why this flag needs no more than acknowledging." }),
  note,
});
export type AcknowledgeInput = z.infer<typeof acknowledgeSchema>;

export const escalateSchema = z.object({
  ...flagRef,
  recipientId: z.uuid({ error: "Choose the clinician to escalate to." }),
  note,
});
export type EscalateInput = z.infer<typeof escalateSchema>;

export const resolveSchema = z.object({ ...flagRef, note });
export type ResolveInput = z.infer<typeof resolveSchema>;

export const QUEUE_STATES = ["open", "acknowledged", "escalated"] as const;
export const SEVERITIES = ["watch", "review"] as const;

/** Query parameters of the queue page and route; every one optional (absent = all). */
export const queueFiltersSchema = z.object({
  state: z.preprocess(blankToUndefined, z.enum(QUEUE_STATES, { error: "Not a queue state." }).optional()),
  severity: z.preprocess(blankToUndefined, z.enum(SEVERITIES, { error: "Not a severity." }).optional()),
  bed: z.preprocess(blankToUndefined, z.string().trim().max(40, { error: "Not a bed label." }).optional()),
});
export type QueueFilters = z.infer<typeof queueFiltersSchema>;
