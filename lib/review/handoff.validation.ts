// The clinician's note on a Handoff summary: one schema shared by the note form and saveHandoffNote.
import { z } from "zod";
import { nightParamSchema } from "./night";

/** The handoff_notes column's own bound (migrations/20261202000100_review.ts). */
export const HANDOFF_NOTE_MAX = 2000;

export const handoffNoteSchema = z
  .object({
    stayId: z.uuid({ error: "Not a stay id." }),
    night: nightParamSchema,
    note: z.string({ error: "Write the note." }).trim().max(HANDOFF_NOTE_MAX, { error: `Keep the note to ${HANDOFF_NOTE_MAX} characters or fewer.` }),
    /** The version the writer started from, for optimistic concurrency: 0 for a note not saved yet. */
    version: z.coerce.number({ error: "Reload the page and try again." }).int({ error: "Reload the page and try again." }).min(0, { error: "Reload the page and try again." }),
  })
  // An empty text may clear a saved note, but there is nothing to create from it.
  .refine((v) => v.version > 0 || v.note.length > 0, { path: ["note"], error: "Write the note before saving." });
export type HandoffNoteInput = z.infer<typeof handoffNoteSchema>;
