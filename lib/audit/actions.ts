"use server";
import { auditAs, guardedAction } from "@/lib/auth/guard";
import { verifyChainSchema } from "./audit.validation";
import { verifyAuditChain as verify, type ChainVerification } from "./verify";

/** Checks the hash chain (whole trail or a range); the check itself is recorded. */
export const verifyAuditChain = guardedAction("verifyAuditChain", verifyChainSchema, async (input, actor) => {
  const result: ChainVerification = await verify({
    fromSeq: input.fromSeq ? BigInt(input.fromSeq) : undefined,
    toSeq: input.toSeq ? BigInt(input.toSeq) : undefined,
  });
  await auditAs(actor, {
    action: "audit.chain_check",
    permission: "audit.view",
    outcome: result.ok ? "success" : "failure",
    detail: { fromSeq: input.fromSeq ?? null, toSeq: input.toSeq ?? null, checked: result.checked, firstBroken: result.firstBroken },
  });
  const message = result.ok
    ? result.checked === 0
      ? "No entries in that range."
      : `All ${result.checked} entries (${result.fromSeq}–${result.toSeq}) link correctly.`
    : `Broken link at entry ${result.firstBroken!.seq}: ${result.firstBroken!.reason.replaceAll("_", " ")}. ${result.checked} entries before it link correctly.`;
  return { ok: true, message, data: result };
});
