"use server";
// CSV import of devices (biomedical engineers): the dry run stores the checked batch and writes no device; the
// confirmation writes the whole batch or nothing. Both need "devices.manage" in the unit named by the form.
import { revalidatePath } from "next/cache";
import { guardedAction } from "@/lib/auth/guard";
import { confirmDeviceImportBatch, previewDeviceImportFile } from "./import";
import { confirmDeviceImportSchema, previewDeviceImportSchema } from "./import.validation";

export const previewDeviceImport = guardedAction(
  "previewDeviceImport",
  previewDeviceImportSchema,
  async (input, actor) =>
    previewDeviceImportFile({ unitId: input.unitId, fileName: input.file.name, content: new Uint8Array(await input.file.arrayBuffer()) }, actor),
  { unitIdsOf: (input) => [input.unitId] },
);

export const confirmDeviceImport = guardedAction(
  "confirmDeviceImport",
  confirmDeviceImportSchema,
  async (input, actor) => {
    const result = await confirmDeviceImportBatch(input, actor);
    if (result.ok) revalidatePath(`/units/${input.unitId}/devices`);
    return result;
  },
  { unitIdsOf: (input) => [input.unitId] },
);
