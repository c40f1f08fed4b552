"use server";
import { auditAs, guardedAction } from "@/lib/auth/guard";
import { localRangeBound } from "@/lib/local-time";
import { getUnit } from "@/lib/units/repository";
import { verifyChainSchema } from "./audit.validation";
import { verifyAuditChain as verify, type ChainRange, type ChainVerification } from "./verify";

/**
 * Checks the hash chain and the signed checkpoints (whole trail, or a range of entry numbers or of local times on a
 * unit's clock); the check itself is recorded. Local times are read as the search reads them (localRangeBound): a
 * repeated time is its first occurrence where the range opens and its second where it closes (a wider check only
 * checks more); a skipped time is the moment of the change.
 */
export const verifyAuditChain = guardedAction(
  "verifyAuditChain",
  verifyChainSchema,
  async (input, actor) => {
    const range: ChainRange = {};
    let timeZone: string | null = null;
    if (input.by === "seq") {
      if (input.fromSeq) range.fromSeq = BigInt(input.fromSeq);
      if (input.toSeq) range.toSeq = BigInt(input.toSeq);
    } else if (input.fromTime || input.toTime) {
      const unit = await getUnit(input.unitId!);
      if (!unit) return { ok: false, code: "invalid_input", message: "Check the highlighted fields.", fieldErrors: { unitId: ["That unit no longer exists."] } };
      timeZone = unit.timeZone;
      const fieldErrors: Record<string, string[]> = {};
      for (const [field, end] of [["fromTime", "start"], ["toTime", "end"]] as const) {
        const local = input[field];
        if (!local) continue;
        const at = localRangeBound(local, unit.timeZone, end);
        if (at) range[field] = at;
        else fieldErrors[field] = ["That date does not exist."];
      }
      if (range.fromTime && range.toTime && range.fromTime >= range.toTime) fieldErrors.toTime = ["The end must come after the start."];
      if (Object.keys(fieldErrors).length) return { ok: false, code: "invalid_input", message: "Check the highlighted fields.", fieldErrors };
    }
    const result: ChainVerification = await verify(range);
    const failure = result.checkpoints.firstFailure;
    await auditAs(actor, {
      action: "audit.chain_check",
      permission: "audit.view",
      outcome: result.ok ? "success" : "failure",
      detail: {
        by: input.by,
        fromSeq: input.by === "seq" ? input.fromSeq ?? null : null,
        toSeq: input.by === "seq" ? input.toSeq ?? null : null,
        fromTime: range.fromTime?.toISOString() ?? null,
        toTime: range.toTime?.toISOString() ?? null,
        timeZone,
        checked: result.checked,
        firstBroken: result.firstBroken && { seq: result.firstBroken.seq, reason: result.firstBroken.reason },
        checkpointsAgreeing: result.checkpoints.agreeing,
        checkpointFailure: failure && { id: failure.id, seq: failure.seq, reason: failure.reason },
        uncovered: result.uncovered,
      },
    });
    const message = result.ok
      ? result.checked === 0
        ? "No entries in that range."
        : "Chain intact and every signed checkpoint in the range agrees."
      : result.firstBroken
        ? `The chain is broken at entry #${result.firstBroken.seq}.`
        : `Signed checkpoint ${failure!.id} does not agree with the trail.`;
    return { ok: true, message, data: result };
  },
  { unitIdsOf: (input) => (input.by === "time" && input.unitId ? [input.unitId] : []) },
);
