"use server";
// Rule sets (admin): preview a draft on the unit's last completed night, and save it as the next version. Both are
// guarded by "rules.manage" in the unit named by the form. The preview reads patient-derived data (which bed was
// flagged and when), so it is audited as a read; it writes nothing else.
import { revalidatePath } from "next/cache";
import { auditAs, guardedAction } from "@/lib/auth/guard";
import { roleFor } from "@/lib/auth/roles";
import { db } from "@/lib/db";
import { previewRuleSetOn } from "./preview";
import { ruleSetPreviewSchema, ruleSetSaveSchema } from "./rules-form.validation";
import { RuleSetConflictError, saveRuleSetChange } from "./store";

export const previewRuleSet = guardedAction(
  "previewRuleSet",
  ruleSetPreviewSchema,
  async (input, actor) => {
    const preview = await previewRuleSetOn(input.unitId, input.document);
    if (!preview) return { ok: false, code: "not_found", message: "That unit no longer exists." };
    await auditAs(actor, {
      action: "rule_set.preview",
      permission: "rules.manage",
      unitId: input.unitId,
      target: { type: "unit", id: input.unitId },
      detail: { night: preview.night.night, stays: preview.stays, draft_count: preview.draft.count, in_force: preview.inForce },
    });
    return { ok: true, message: `This version would have raised ${preview.draft.count} flag${preview.draft.count === 1 ? "" : "s"} on the night of ${preview.night.night}.`, data: preview };
  },
  { unitIdsOf: (input) => [input.unitId] },
);

export const saveRuleSet = guardedAction(
  "saveRuleSet",
  ruleSetSaveSchema,
  async (input, actor) => {
    try {
      const { saved } = await db.transaction((trx) =>
        saveRuleSetChange(trx, {
          unitId: input.unitId,
          document: input.document,
          note: input.note,
          basedOnVersion: input.basedOnVersion,
          createdBy: actor.userId,
          audit: {
            actor: { userId: actor.userId, email: actor.email, role: roleFor(actor.grants, "rules.manage", input.unitId) },
            requestId: actor.requestId,
            clientAddress: actor.clientAddress,
          },
        }),
      );
      revalidatePath(`/units/${input.unitId}/rules`);
      return { ok: true, message: `Saved as version ${saved.version}. It applies to windows computed from now on.`, data: { version: saved.version } };
    } catch (err) {
      if (!(err instanceof RuleSetConflictError)) throw err;
      return { ok: false, code: "conflict", message: `Someone saved version ${err.inForceVersion} while you were editing. Reload the page to edit from it; nothing was saved.` };
    }
  },
  { unitIdsOf: (input) => [input.unitId] },
);
