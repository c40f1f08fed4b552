import { z } from "zod";

const seq = z
  .string()
  .trim()
  .optional()
  .transform((v) => (v ? v : undefined))
  .pipe(z.string().regex(/^[1-9][0-9]{0,17}$/, { error: "Enter an entry number (1 or more)." }).optional());

/** Chain check over an optional range of entry numbers. */
export const verifyChainSchema = z
  .object({ fromSeq: seq, toSeq: seq })
  .refine((v) => !v.fromSeq || !v.toSeq || BigInt(v.fromSeq) <= BigInt(v.toSeq), {
    error: "The last entry must not come before the first.",
    path: ["toSeq"],
  });

export const auditQuerySchema = z.object({
  page: z.coerce.number().int().min(1).max(1_000_000).catch(1).default(1),
});
