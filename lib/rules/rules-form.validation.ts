// The Rule sets edit form ↔ the stored rule-set document (lib/flags/rules.validation.ts). One schema, shared by the
// form and the server actions. Every rule is one fieldset whose inputs are named "rules.<i>.<field>"; issues are
// reported under the same flat names, so the form shows each message beside its own field. A form that passes is
// mapped onto a document and checked against ruleSetDocumentSchema in the same parse, so a saved document always
// validates, and that schema's refusals (research-only index, a percentage on the wrong side of 100 …) come back
// as field errors too.
import { z } from "zod";
import { FLAGGABLE_INDEX_KEYS, ruleSetDocumentSchema, RESEARCH_INDEX_KEYS, type Rule, type RuleSetDocument } from "@/lib/flags/rules.validation";

/** The one data-quality measure a rule can watch, offered in the same list as the indices. */
export const COVERAGE_CHOICE = "quality:coverage";

export const COMPARATORS = ["below", "above"] as const;
/** Absolute value, or relative to the patient's own baseline median: minus/plus an amount, or a percentage of it. */
export const THRESHOLD_TYPES = ["absolute", "baseline_amount", "baseline_percent"] as const;
export const DURATION_UNITS = ["windows", "minutes"] as const;
export const SEVERITIES = ["watch", "review"] as const;

/** The form's values for one rule, as strings (what the inputs hold). */
export interface RuleFields {
  id: string;
  label: string;
  index: string;
  comparator: string;
  threshold: string;
  value: string;
  durationUnit: string;
  durationValue: string;
  hysteresisMargin: string;
  clearWindows: string;
  severity: string;
}

export interface RuleSetFields {
  maxFlagsPerNight: string;
  nightStartsAt: string;
  rules: RuleFields[];
}

/** A number typed into a text input: blank is "missing", not zero. */
const num = (what: string) =>
  z.preprocess(
    (v) => (typeof v === "string" ? (v.trim() === "" ? undefined : Number(v.trim())) : v),
    z.number({ error: `Enter ${what}.` }).finite({ error: `Enter ${what} as a number.` }),
  );
const int = (what: string, min: number, max: number) =>
  num(what).pipe(z.number().int({ error: `Enter ${what} as a whole number.` }).min(min, { error: `${what} must be at least ${min}.` }).max(max, { error: `${what} must be at most ${max}.` }));

const indexChoice = z.string({ error: "Choose an index." }).superRefine((v, ctx) => {
  if ((RESEARCH_INDEX_KEYS as readonly string[]).includes(v)) {
    ctx.addIssue({ code: "custom", message: `"${v}" is a research-only index: it is shown with its caveats and can never drive a flag.` });
  } else if (v !== COVERAGE_CHOICE && !(FLAGGABLE_INDEX_KEYS as readonly string[]).includes(v)) {
    ctx.addIssue({ code: "custom", message: "Choose one of the listed indices." });
  }
});

const ruleFieldsSchema = z.object({
  id: z.string().trim().max(64).optional().default(""),
  label: z.string({ error: "Name the rule." }).trim().min(3, { error: "Name the rule in a few words (it is shown on every flag)." }).max(200, { error: "Keep the name under 200 characters." }),
  index: indexChoice,
  comparator: z.enum(COMPARATORS, { error: "Choose below or above." }),
  threshold: z.enum(THRESHOLD_TYPES, { error: "Choose how the threshold is set." }),
  value: num("a threshold"),
  durationUnit: z.enum(DURATION_UNITS, { error: "Choose windows or minutes." }),
  durationValue: int("the minimum duration", 1, 24 * 60),
  hysteresisMargin: num("a margin").pipe(z.number().min(0, { error: "The margin cannot be negative." })),
  clearWindows: int("the number of windows to clear", 1, 120),
  severity: z.enum(SEVERITIES, { error: "Choose watch or review." }),
});
type RuleInput = z.infer<typeof ruleFieldsSchema>;

/** A rule id from its label, for a rule added in the form (existing rules keep theirs: flags are matched by it). */
function slug(label: string): string {
  const s = label
    .normalize("NFKD")
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, "-")
    .replace(/^-+|-+$/g, "")
    .slice(0, 56);
  return /^[a-z0-9]/.test(s) ? s : `rule-${s}`.slice(0, 56);
}

function toRule(r: RuleInput, id: string): Rule | Record<string, unknown> {
  const common = { id, label: r.label, severity: r.severity, minDuration: { unit: r.durationUnit, value: r.durationValue }, hysteresis: { margin: r.hysteresisMargin, clearWindows: r.clearWindows } };
  if (r.index === COVERAGE_CHOICE) return { ...common, kind: "data_quality", metric: "coverage", below: r.value };
  const below = r.comparator === "below";
  const comparison =
    r.threshold === "absolute"
      ? { type: below ? "below_value" : "above_value", value: r.value }
      : r.threshold === "baseline_amount"
        ? below ? { type: "below_baseline_minus", amount: r.value } : { type: "above_baseline_plus", amount: r.value }
        : { type: below ? "below_baseline_percent" : "above_baseline_percent", percent: r.value };
  return { ...common, kind: "index", index: r.index, comparison };
}

/** Where a document issue belongs on the form. */
function formPath(path: readonly PropertyKey[]): string {
  const [head, i, field, sub] = path;
  if (head !== "rules" || typeof i !== "number") return String(head ?? "rules");
  const at = (name: string) => `rules.${i}.${name}`;
  switch (field) {
    case "comparison":
    case "below":
      return at("value");
    case "minDuration":
      return at(sub === "unit" ? "durationUnit" : "durationValue");
    case "hysteresis":
      return at(sub === "margin" ? "hysteresisMargin" : "clearWindows");
    case "id":
      return at("label");
    case "index":
    case "label":
    case "severity":
      return at(field);
    default:
      return `rules.${i}`;
  }
}

function buildSchema(requireNote: boolean) {
  return z
    .object({
      unitId: z.uuid({ error: "Not a unit id." }),
      note: requireNote
        ? z.string({ error: "Say what changed and why (it is kept with the version)." }).trim().min(3, { error: "Say what changed and why (it is kept with the version)." }).max(1000, { error: "Keep the note under 1000 characters." })
        : z.string().trim().max(1000).optional(),
      /** The version the form was edited from; a save fails when another version was saved meanwhile. */
      basedOnVersion: z.preprocess((v) => (v === "" ? undefined : v), int("the version", 0, 1_000_000).optional()),
      maxFlagsPerNight: int("the cap per night", 1, 50),
      nightStartsAt: z.string({ error: "Enter a time as HH:MM." }).regex(/^([01]\d|2[0-3]):[0-5]\d$/, { error: "Enter a local time as HH:MM (24-hour)." }),
      rules: z.array(ruleFieldsSchema, { error: "A rule set needs at least one rule." }).min(1, { error: "A rule set needs at least one rule." }).max(50, { error: "At most 50 rules." }),
    })
    .transform((f, ctx) => {
      const taken = new Set(f.rules.map((r) => r.id).filter(Boolean));
      const rules = f.rules.map((r, i) => {
        if (r.index === COVERAGE_CHOICE && (r.comparator !== "below" || r.threshold !== "absolute")) {
          ctx.addIssue({ code: "custom", path: [`rules.${i}.threshold`], message: "Coverage is judged below an absolute fraction (0–1), e.g. below 0.8." });
        }
        let id = r.id;
        if (!id) {
          const base = slug(r.label);
          id = base;
          for (let n = 2; taken.has(id); n += 1) id = `${base}-${n}`;
          taken.add(id);
        }
        return toRule(r, id);
      });
      const doc = ruleSetDocumentSchema.safeParse({ rules, maxFlagsPerNight: f.maxFlagsPerNight, nightStartsAt: f.nightStartsAt });
      if (!doc.success) for (const issue of doc.error.issues) ctx.addIssue({ code: "custom", path: [formPath(issue.path)], message: issue.message });
      if (!doc.success || ctx.issues.length) return z.NEVER;
      return { unitId: f.unitId, note: f.note ?? "", basedOnVersion: f.basedOnVersion, document: doc.data };
    });
}

/** "rules.0.value" → { rules: [{ value }] }: the form's flat names back into the nested shape. */
function unflatten(raw: unknown): unknown {
  if (typeof raw !== "object" || raw === null) return raw;
  const out: Record<string, unknown> = {};
  const rules = new Map<number, Record<string, unknown>>();
  for (const [key, value] of Object.entries(raw)) {
    const m = /^rules\.(\d{1,2})\.(\w+)$/.exec(key);
    if (!m) {
      out[key] = value;
      continue;
    }
    const i = Number(m[1]);
    if (!rules.has(i)) rules.set(i, {});
    rules.get(i)![m[2]!] = value;
  }
  out.rules = [...rules.entries()].sort(([a], [b]) => a - b).map(([, r]) => r);
  return out;
}

/** Wraps the nested schema so every issue is reported under one flat field name ("rules.0.value"). */
function flatForm<T extends z.ZodType>(inner: T) {
  return z.unknown().transform((raw, ctx): z.output<T> => {
    const parsed = inner.safeParse(unflatten(raw));
    if (parsed.success) return parsed.data;
    for (const issue of parsed.error.issues) {
      // Field issues come as ["rules", 0, "value"], document issues already as ["rules.0.value"].
      ctx.addIssue({ code: "custom", path: [issue.path.length ? issue.path.map(String).join(".") : "rules"], message: issue.message });
    }
    return z.NEVER;
  });
}

/** The form when saving: a change note is required. Output: { unitId, note, document } with a valid document. */
export const ruleSetSaveSchema = flatForm(buildSchema(true));
/** The same form when previewing: no note needed. */
export const ruleSetPreviewSchema = flatForm(buildSchema(false));
export type RuleSetFormOutput = z.output<typeof ruleSetSaveSchema>;

/** A stored document as the form's values (the edit form starts from the version in force). */
export function documentToFields(doc: RuleSetDocument): RuleSetFields {
  return {
    maxFlagsPerNight: String(doc.maxFlagsPerNight),
    nightStartsAt: doc.nightStartsAt,
    rules: doc.rules.map((r): RuleFields => {
      const common = {
        id: r.id,
        label: r.label,
        severity: r.severity,
        durationUnit: r.minDuration.unit,
        durationValue: String(r.minDuration.value),
        hysteresisMargin: String(r.hysteresis.margin),
        clearWindows: String(r.hysteresis.clearWindows),
      };
      if (r.kind === "data_quality") return { ...common, index: COVERAGE_CHOICE, comparator: "below", threshold: "absolute", value: String(r.below) };
      const c = r.comparison;
      const comparator = c.type.startsWith("below") ? "below" : "above";
      switch (c.type) {
        case "below_value":
        case "above_value":
          return { ...common, index: r.index, comparator, threshold: "absolute", value: String(c.value) };
        case "below_baseline_minus":
        case "above_baseline_plus":
          return { ...common, index: r.index, comparator, threshold: "baseline_amount", value: String(c.amount) };
        case "below_baseline_percent":
        case "above_baseline_percent":
          return { ...common, index: r.index, comparator, threshold: "baseline_percent", value: String(c.percent) };
      }
    }),
  };
}

/** The form's values as the flat name → value pairs the form submits (what FormData carries). */
export function fieldsToFormEntries(unitId: string, fields: RuleSetFields, note?: string): Record<string, string> {
  const out: Record<string, string> = { unitId, maxFlagsPerNight: fields.maxFlagsPerNight, nightStartsAt: fields.nightStartsAt };
  if (note !== undefined) out.note = note;
  fields.rules.forEach((r, i) => {
    for (const [k, v] of Object.entries(r)) out[`rules.${i}.${k}`] = v;
  });
  return out;
}
