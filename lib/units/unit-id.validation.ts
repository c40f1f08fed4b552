import { z } from "zod";

/** A `[unitId]` route parameter. */
export const unitIdSchema = z.uuid({ error: "Not a unit id." });
