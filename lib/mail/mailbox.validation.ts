import { z } from "zod";

/** The demo Mailbox's query: a page of received messages (25 each) and, optionally, the one opened. */
export const mailboxQuerySchema = z.object({
  page: z.coerce.number().int().min(1).max(1_000_000).catch(1).default(1),
  id: z
    .string()
    .regex(/^[1-9][0-9]{0,17}$/)
    .optional()
    .catch(undefined),
});
