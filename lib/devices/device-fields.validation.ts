// The fields of a device record, one schema for the registration form, the edit form and each row of a CSV import.
import { z } from "zod";

const text = (label: string, max: number) =>
  z
    .string({ error: `Enter the ${label}.` })
    .trim()
    .min(1, { error: `Enter the ${label}.` })
    .max(max, { error: `The ${label} is at most ${max} characters.` });

export const deviceFieldsSchema = z.object({
  /** Upper-case letters, digits and dashes, as printed on the device label (compared case-insensitively). */
  serial: text("serial number", 64)
    .transform((s) => s.toUpperCase())
    .pipe(z.string().regex(/^[A-Z0-9][A-Z0-9-]*$/, { error: "Use letters, digits and dashes only, as on the device label." })),
  model: text("model", 120),
  manufacturer: text("manufacturer", 120),
  firmware: text("firmware version", 40),
  timestampResolutionMs: z.coerce
    .number({ error: "Enter the RR resolution in milliseconds." })
    .positive({ error: "The RR resolution is a positive number of milliseconds." })
    .max(20, { error: "The RR resolution is at most 20 ms; coarser clocks are not usable for variability." }),
  streamUrl: z
    .string({ error: "Enter the stream address." })
    .trim()
    .pipe(z.url({ protocol: /^https?$/, error: "Enter the device's stream address, starting with http:// or https://." })),
  notes: z.string().trim().max(2000, { error: "Notes are at most 2,000 characters." }).default(""),
});
export type DeviceFields = z.infer<typeof deviceFieldsSchema>;
