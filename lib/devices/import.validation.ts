// The inputs of the device CSV import: the upload (dry run) and the confirmation of a stored batch. Shared by the
// import form and lib/devices/import-actions.ts; the file's content is checked by lib/devices/import.ts.
import { z } from "zod";

/** Upper bounds of one import: a unit's whole fleet fits well inside them, and a preview stays readable. */
export const MAX_IMPORT_BYTES = 1024 * 1024;
export const MAX_IMPORT_ROWS = 1000;

/** The file's columns in the order of the template; `notes` may be left out of the header. */
export const IMPORT_COLUMNS = ["serial", "manufacturer", "model", "firmware", "rr_resolution_ms", "stream_url", "notes"] as const;
export type ImportColumn = (typeof IMPORT_COLUMNS)[number];
export const REQUIRED_IMPORT_COLUMNS: readonly ImportColumn[] = IMPORT_COLUMNS.filter((c) => c !== "notes");

const unitId = z.uuid({ error: "Not a unit id." });

export const previewDeviceImportSchema = z.object({
  unitId,
  file: z
    .file({ error: "Choose a CSV file to upload." })
    .max(MAX_IMPORT_BYTES, { error: "The file is larger than 1 MB. Split it into smaller files." })
    .refine((f) => f.name.length <= 255, { error: "The file name is longer than 255 characters. Rename the file." }),
});
export type PreviewDeviceImportInput = z.infer<typeof previewDeviceImportSchema>;

export const confirmDeviceImportSchema = z.object({
  unitId,
  batchId: z.uuid({ error: "Not an import batch id. Upload the file again." }),
});
export type ConfirmDeviceImportInput = z.infer<typeof confirmDeviceImportSchema>;
