// The inputs of the device registry's actions, one schema each, shared by the forms and lib/devices/actions.ts; and
// the check of an assignment's local time (the unit's wall clock) against the window an assignment may start or end in.
import { formatInTimeZone } from "date-fns-tz";
import { z } from "zod";
import { deviceFieldsSchema } from "@/lib/devices/device-fields.validation";
import { chosenLocalInstant } from "@/lib/local-time";
import { unitIdSchema } from "@/lib/units/unit-id.validation";

const deviceId = z.uuid({ error: "Not a device id. Reload the page." });

/** An empty form field is the same as an absent one. */
const blankToUndefined = (v: unknown) => (v === "" || v === null ? undefined : v);

/** What <input type="datetime-local"> sends: "YYYY-MM-DDTHH:MM", seconds optional. */
const LOCAL_DATE_TIME = /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}(:\d{2}(\.\d{1,3})?)?$/;
const localDateTime = (what: string) =>
  z.preprocess(blankToUndefined, z.string().regex(LOCAL_DATE_TIME, { error: `Enter ${what} as a date and time, or leave it empty for now.` }).optional());
/** Which of two equal local times is meant, on the night the clocks go back. */
const occurrence = z.preprocess(blankToUndefined, z.enum(["earlier", "later"], { error: "Choose which of the two times you mean." }).optional());

/** The registry list's filters, from the URL: a status and a text searched in serial and model. */
export const REGISTRY_STATUS_FILTERS = ["all", "active", "maintenance", "decommissioned"] as const;
export const REGISTRY_STATUS_FILTER_LABELS: Record<(typeof REGISTRY_STATUS_FILTERS)[number], string> = {
  all: "All",
  active: "In service",
  maintenance: "In maintenance",
  decommissioned: "Decommissioned",
};
export const registryFilterSchema = z.object({
  status: z.preprocess(blankToUndefined, z.enum(REGISTRY_STATUS_FILTERS).default("all")),
  q: z.preprocess(blankToUndefined, z.string().trim().max(100).default("")),
});
export type RegistryFilter = z.infer<typeof registryFilterSchema>;

export const registerDeviceSchema = deviceFieldsSchema.extend({ unitId: unitIdSchema });

export const EDITABLE_STATUSES = ["active", "maintenance"] as const;
export const EDITABLE_STATUS_LABELS: Record<(typeof EDITABLE_STATUSES)[number], string> = {
  active: "In service",
  maintenance: "In maintenance (not streamed)",
};

/** The serial is the device's identity (printed on it, named in its stream address) and cannot be edited. */
export const updateDeviceSchema = deviceFieldsSchema.omit({ serial: true }).extend({
  deviceId,
  unitId: unitIdSchema,
  status: z.enum(EDITABLE_STATUSES, { error: "Choose in service or in maintenance." }),
  /** The record's version as the form showed it (its last change, ms since the epoch): a stale edit is refused. */
  version: z.coerce.number({ error: "Reload the page and edit again." }).int({ error: "Reload the page and edit again." }),
});

export const DECOMMISSION_REASON_MAX = 500;
export const decommissionDeviceSchema = z.object({
  deviceId,
  unitId: unitIdSchema,
  reason: z
    .string({ error: "Say why the device is taken out of service." })
    .trim()
    .min(1, { error: "Say why the device is taken out of service." })
    .max(DECOMMISSION_REASON_MAX, { error: `Keep the reason to ${DECOMMISSION_REASON_MAX} characters.` }),
});

export const deviceTokenSchema = z.object({ deviceId, unitId: unitIdSchema });

/** How long the token before a rotation keeps working, so the device can be reconfigured without a gap. */
export const GRACE_CHOICES = [
  { minutes: 0, label: "None — the old token stops at once" },
  { minutes: 15, label: "15 minutes" },
  { minutes: 60, label: "1 hour" },
  { minutes: 240, label: "4 hours" },
  { minutes: 1440, label: "24 hours" },
] as const;
export const DEFAULT_GRACE_MINUTES = 60;
export const rotateTokenSchema = deviceTokenSchema.extend({
  graceMinutes: z.coerce
    .number({ error: "Choose how long the old token keeps working." })
    .refine((m) => GRACE_CHOICES.some((c) => c.minutes === m), { error: "Choose how long the old token keeps working." }),
});

export const assignDeviceSchema = z.object({
  deviceId,
  unitId: unitIdSchema,
  bedId: z.uuid({ error: "Choose a bed." }),
  from: localDateTime("the start"),
  occurrence,
});

export const unassignDeviceSchema = z.object({
  deviceId,
  unitId: unitIdSchema,
  at: localDateTime("the end"),
  occurrence,
});

/** An assignment may start or end at most this far back (a device hooked up before it was recorded here). */
export const BACKDATE_LIMIT_MS = 24 * 3_600_000;

/**
 * The instant a local date-time names in the unit's zone, which must lie in [notBefore, now] (empty → now); or the
 * field and message to show beside it. A missing local time (clocks went forward) or a repeated one without a choice
 * of which (clocks went back) is said to the person, never guessed.
 */
export function assignmentInstant(
  local: string | undefined,
  which: "earlier" | "later" | undefined,
  timeZone: string,
  now: Date,
  notBefore: { at: Date; why: string },
): { ok: true; at: Date } | { ok: false; field: "time" | "occurrence"; message: string } {
  if (local === undefined) return { ok: true, at: now };
  const chosen = chosenLocalInstant(local, which, timeZone);
  if (!chosen.ok) return chosen;
  const at = chosen.at;
  if (at.getTime() > now.getTime()) return { ok: false, field: "time", message: "That time is in the future: enter a time up to now, or leave it empty for now." };
  if (at.getTime() < notBefore.at.getTime()) {
    return { ok: false, field: "time", message: `Enter a time after ${formatInTimeZone(notBefore.at, timeZone, "d MMM, HH:mm zzz")} (${notBefore.why}).` };
  }
  return { ok: true, at };
}
