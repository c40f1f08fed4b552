"use server";
// Recording maintenance (biomedical engineers, "devices.manage" in the unit named by the form). The checks and the
// one transaction are in maintenance.ts; this adds the session, the role and the unit scope.
import { revalidatePath } from "next/cache";
import { guardedAction } from "@/lib/auth/guard";
import { addMaintenanceEntry as addEntryAs } from "./maintenance";
import { maintenanceEntrySchema } from "./maintenance.validation";

export const addMaintenanceEntry = guardedAction(
  "addMaintenanceEntry",
  maintenanceEntrySchema,
  async (input, actor) => {
    const result = await addEntryAs(actor, input);
    if (result.ok) {
      revalidatePath(`/units/${input.unitId}/devices/${input.deviceId}/maintenance`);
      revalidatePath(`/units/${input.unitId}/maintenance`);
    }
    return result;
  },
  { unitIdsOf: (input) => [input.unitId] },
);
