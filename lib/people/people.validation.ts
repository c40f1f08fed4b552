// One schema per input, shared by the forms and the server actions.
import { z } from "zod";
import { ROLES, type Grant, type Role } from "@/lib/auth/roles";

const UUID = z.uuid({ error: "Not a valid id." });

/** Checkbox values "unitId:role"; none, one or many. */
const grantsField = z
  .union([z.string(), z.array(z.string())])
  .optional()
  .transform((v) => (v === undefined ? [] : Array.isArray(v) ? v : [v]))
  .pipe(
    z.array(
      z
        .string()
        .regex(new RegExp(`^[0-9a-f-]{36}:(${ROLES.join("|")})$`), { error: "Unknown role or unit." })
        .transform((s): Grant => {
          const [unitId, role] = s.split(":") as [string, Role];
          return { unitId, role };
        }),
    ),
  );

export const createPersonSchema = z.object({
  name: z.string().trim().min(2, { error: "Enter the person's full name." }).max(120, { error: "Keep the name under 120 characters." }),
  email: z.string().trim().toLowerCase().pipe(z.email({ error: "Enter a valid work e-mail address." }).max(254)),
  password: z
    .string()
    .min(12, { error: "Use at least 12 characters." })
    .max(256, { error: "Use at most 256 characters." }),
  grants: grantsField,
});
export type CreatePersonInput = z.infer<typeof createPersonSchema>;

export const updateRolesSchema = z.object({
  userId: UUID,
  grants: grantsField,
});
export type UpdateRolesInput = z.infer<typeof updateRolesSchema>;

export const setActiveSchema = z.object({
  userId: UUID,
  active: z.enum(["true", "false"], { error: "Choose activate or deactivate." }).transform((v) => v === "true"),
  reason: z.string().trim().min(3, { error: "Say why, in a few words (it goes in the audit trail)." }).max(500),
});
export type SetActiveInput = z.infer<typeof setActiveSchema>;

export const peopleQuerySchema = z.object({
  q: z.string().trim().max(100).optional().catch(undefined),
  page: z.coerce.number().int().min(1).max(10_000).catch(1).default(1),
});
