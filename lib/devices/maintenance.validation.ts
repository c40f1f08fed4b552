// The "Record maintenance" form of a device, one schema for the form and the server action. Checks that need the
// database or the files' bytes run after it, in lib/devices/maintenance.ts: "not in the future" needs the unit's time
// zone, and the attachments' types are read from their content (lib/devices/attachments.ts).
import { z } from "zod";
import { MAINTENANCE_KINDS, type MaintenanceKind } from "@/lib/db/tables";

export const MAX_ATTACHMENTS = 5;

export const MAINTENANCE_KIND_LABELS: Record<MaintenanceKind, string> = {
  preventive: "Preventive maintenance",
  repair: "Repair",
  firmware_update: "Firmware update",
};

/** A real calendar day written YYYY-MM-DD (what <input type="date"> sends). */
const isCalendarDay = (s: string) => {
  const d = new Date(`${s}T00:00:00Z`);
  return !Number.isNaN(d.getTime()) && d.toISOString().slice(0, 10) === s;
};

const day = (what: string) =>
  z
    .string({ error: `Enter ${what}.` })
    .trim()
    .min(1, { error: `Enter ${what}.` })
    .regex(/^\d{4}-\d{2}-\d{2}$/, { error: `Enter ${what} as a date (YYYY-MM-DD).` })
    .refine(isCalendarDay, { error: `${what[0]!.toUpperCase()}${what.slice(1)} is not a calendar date.` });

const blankToUndefined = (v: unknown) => (typeof v === "string" && v.trim() === "" ? undefined : v);

export const maintenanceEntrySchema = z
  .object({
    unitId: z.uuid({ error: "Not a unit id." }),
    deviceId: z.uuid({ error: "Not a device id." }),
    kind: z.enum(MAINTENANCE_KINDS, { error: "Choose preventive maintenance, repair or firmware update." }),
    performedOn: day("the date the work was done"),
    performedBy: z
      .string({ error: "Enter who did the work." })
      .trim()
      .min(2, { error: "Enter who did the work (a name, and the company for outside service)." })
      .max(200, { error: "Who did the work: at most 200 characters." }),
    note: z.string().trim().max(4000, { error: "The note is at most 4,000 characters." }).default(""),
    firmwareAfter: z.preprocess(
      blankToUndefined,
      z.string().trim().max(40, { error: "The firmware version is at most 40 characters." }).optional(),
    ),
    nextDueOn: z.preprocess(blankToUndefined, day("the next due date").optional()),
    // guardedAction passes one chosen file as a File, several as an array, none as undefined.
    files: z.preprocess(
      (v) => (v === undefined ? [] : Array.isArray(v) ? v : [v]),
      z
        .array(z.instanceof(File, { error: "Attach files with the file picker." }))
        .superRefine((files, ctx) => {
          if (files.length > MAX_ATTACHMENTS) {
            ctx.addIssue({ code: "custom", message: `Attach at most ${MAX_ATTACHMENTS} files to one entry; ${files.length} were chosen. Nothing was saved.` });
          }
        }),
    ),
  })
  .superRefine((v, ctx) => {
    if (v.kind === "firmware_update" && !v.firmwareAfter) {
      ctx.addIssue({ code: "custom", path: ["firmwareAfter"], message: "Enter the firmware version the device runs after the update." });
    }
    if (v.nextDueOn && v.nextDueOn <= v.performedOn) {
      ctx.addIssue({ code: "custom", path: ["nextDueOn"], message: `The next due date must be after the date of the work (${v.performedOn}).` });
    }
  })
  // A firmware version only belongs to a firmware update.
  .transform((v) => ({ ...v, firmwareAfter: v.kind === "firmware_update" ? v.firmwareAfter : undefined }));
export type MaintenanceEntryInput = z.infer<typeof maintenanceEntrySchema>;
