import { z } from "zod";
import { ROLES } from "@/lib/auth/roles";
import { localRangeBound } from "@/lib/local-time";

const seq = z
  .string()
  .trim()
  .optional()
  .transform((v) => (v ? v : undefined))
  .pipe(z.string().regex(/^[1-9][0-9]{0,17}$/, { error: "Enter an entry number (1 or more)." }).optional());

/** What <input type="datetime-local"> sends: "YYYY-MM-DDTHH:MM", seconds optional. */
const localDateTime = z
  .string()
  .trim()
  .optional()
  .transform((v) => (v ? v : undefined))
  .pipe(z.string().regex(/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}(:\d{2})?$/, { error: "Enter a date and a time." }).optional());

/**
 * Chain check over the whole trail or a range, either of entry numbers (`by: "seq"`, the default) or of local
 * date-times read on the clock of a unit the person may audit (`by: "time"`; from included, until not). The other
 * kind's fields are ignored. Local times become instants in the action, which knows the unit's zone.
 */
export const verifyChainSchema = z
  .object({
    by: z.preprocess((v) => (v === "" || v === null ? undefined : v), z.enum(["seq", "time"], { error: "Choose how to give the range." }).default("seq")),
    fromSeq: seq,
    toSeq: seq,
    fromTime: localDateTime,
    toTime: localDateTime,
    unitId: z.preprocess((v) => (v === "" || v === null ? undefined : v), z.uuid({ error: "Choose a unit." }).optional()),
  })
  .superRefine((v, ctx) => {
    if (v.by === "seq" && v.fromSeq && v.toSeq && BigInt(v.fromSeq) > BigInt(v.toSeq)) {
      ctx.addIssue({ code: "custom", path: ["toSeq"], message: "The last entry must not come before the first." });
    }
    if (v.by === "time" && (v.fromTime || v.toTime) && !v.unitId) {
      ctx.addIssue({ code: "custom", path: ["unitId"], message: "Choose the unit whose clock the times are read on." });
    }
  });

// ---- Audit trail search: one filter shared by the search page, the export route and the export manifest ----

/** An empty form field is the same as an absent one. */
const blankToUndefined = (v: unknown) => (typeof v === "string" && v.trim() === "" ? undefined : v);

const LOCAL_DATE_TIME = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2})(?::(\d{2}))?$/;
const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

export const AUDIT_OUTCOMES = ["success", "failure", "denied"] as const;
export const AUDIT_EXPORT_FORMATS = ["csv", "fhir-ndjson"] as const;
export type AuditExportFormat = (typeof AUDIT_EXPORT_FORMATS)[number];
export const isUuid = (v: string) => UUID.test(v);

function isTimeZone(zone: string): boolean {
  try {
    new Intl.DateTimeFormat("en-US", { timeZone: zone });
    return true;
  } catch {
    return false;
  }
}


const filterLocalDateTime = z.preprocess(
  blankToUndefined,
  z.string().trim().regex(LOCAL_DATE_TIME, { error: "Enter a date and a time, e.g. 2026-11-30T20:00." }).optional(),
);
const seqCursor = z.preprocess(
  blankToUndefined,
  z.string().trim().regex(/^[1-9][0-9]{0,17}$/, { error: "Not an entry number." }).optional(),
);

const filterFields = {
  /** IANA zone whose clock `from` and `to` are read on (the page offers the zones of the reader's units). */
  zone: z.preprocess(
    blankToUndefined,
    z.string().trim().refine(isTimeZone, { error: "Not a known time zone." }).default("UTC"),
  ),
  /** Entries at or after this local time … */
  from: filterLocalDateTime,
  /** … and before this one (not included), so consecutive ranges neither overlap nor leave a gap. */
  to: filterLocalDateTime,
  /** An e-mail address (any case) or a user id. */
  person: z.preprocess(
    blankToUndefined,
    z
      .string()
      .trim()
      .toLowerCase()
      .max(254, { error: "Enter an e-mail address or a user id." })
      .refine((v) => UUID.test(v) || /^[^\s@]+@[^\s@]+$/.test(v), { error: "Enter an e-mail address or a user id." })
      .optional(),
  ),
  role: z.preprocess(blankToUndefined, z.enum(ROLES, { error: "Not a role." }).optional()),
  /** A prefix of action codes: "device." for every device action, "flag.acknowledge" for one. */
  action: z.preprocess(
    blankToUndefined,
    z
      .string()
      .trim()
      .regex(/^[a-z0-9_.]{1,64}$/, { error: "Actions are lower-case words joined by dots, e.g. flag. or flag.acknowledge." })
      .optional(),
  ),
  /** A stay id, or a patient's record number (every stay of that patient). */
  patient: z.preprocess(
    blankToUndefined,
    z.string().trim().regex(/^[A-Za-z0-9][A-Za-z0-9._\-/]{0,63}$/, { error: "Enter a record number or a stay id." }).optional(),
  ),
  /** A device id or serial number. */
  device: z.preprocess(
    blankToUndefined,
    z.string().trim().regex(/^[A-Za-z0-9][A-Za-z0-9._\-/]{0,63}$/, { error: "Enter a device serial number or id." }).optional(),
  ),
  outcome: z.preprocess(blankToUndefined, z.enum(AUDIT_OUTCOMES, { error: "Not an outcome." }).optional()),
};

function checkRange(v: { zone: string; from?: string; to?: string }, ctx: z.RefinementCtx) {
  const from = v.from ? localRangeBound(v.from, v.zone, "start") : null;
  const to = v.to ? localRangeBound(v.to, v.zone, "end") : null;
  if (v.from && !from) ctx.addIssue({ code: "custom", path: ["from"], message: "That date does not exist." });
  if (v.to && !to) ctx.addIssue({ code: "custom", path: ["to"], message: "That date does not exist." });
  if (from && to && to.getTime() <= from.getTime()) {
    ctx.addIssue({ code: "custom", path: ["to"], message: "The end must come after the start." });
  }
}

/** The audit trail filter: every field optional (absent = any). */
export const auditFilterSchema = z.object(filterFields).superRefine(checkRange);
export type AuditFilter = z.infer<typeof auditFilterSchema>;

/** The search page's query: the filter, and a keyset cursor (entries older than `before`, or newer than `after`). */
export const auditSearchQuerySchema = z
  .object({ ...filterFields, before: seqCursor, after: seqCursor })
  .superRefine(checkRange)
  .refine((v) => !(v.before && v.after), { error: "Use one page link at a time.", path: ["after"] });

/** The export route's query: the filter and the file format (CSV when not given). */
export const auditExportQuerySchema = z
  .object({ ...filterFields, format: z.preprocess(blankToUndefined, z.enum(AUDIT_EXPORT_FORMATS, { error: "Choose csv or fhir-ndjson." }).default("csv")) })
  .superRefine(checkRange);

/** Only the filter's fields of a parsed query (drops the cursor or the format). */
export function filterOf(v: AuditFilter): AuditFilter {
  const { zone, from, to, person, role, action, patient, device, outcome } = v;
  return { zone, from, to, person, role, action, patient, device, outcome };
}
