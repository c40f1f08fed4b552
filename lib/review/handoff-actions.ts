"use server";
// The clinician's note on a Handoff summary. A thin wrapper: the guard (session, "handoff.write" in the stay's unit,
// input) and page refresh around saveHandoffNoteAs, which does the versioned write and its audit.
import { revalidatePath } from "next/cache";
import { guardedAction } from "@/lib/auth/guard";
import { saveHandoffNoteAs } from "./handoff";
import { handoffNoteSchema } from "./handoff.validation";
import { stayScope } from "./stay-scope";

export const saveHandoffNote = guardedAction(
  "saveHandoffNote",
  handoffNoteSchema,
  async (input, actor) => {
    const result = await saveHandoffNoteAs(actor, input);
    // A stale save refreshes the page too, so the form carries the stored version and the saved text is shown.
    if (result.ok || result.code === "conflict") {
      const stay = await stayScope(input.stayId);
      revalidatePath(`/stays/${input.stayId}/handoff`);
      if (stay) revalidatePath(`/units/${stay.unitId}/handoff`);
    }
    return result;
  },
  {
    unitIdsOf: async (input) => {
      const stay = await stayScope(input.stayId);
      return stay ? [stay.unitId] : [];
    },
  },
);
