// The one schema of a rule set: which conditions raise a review flag, for how long, how they clear, and how many
// flags one patient may get per night. Shared by the seed, the rule-set store, the evaluator and any future
// editing form. Review flags are prompts to look, never alarms (GLOSSARY "Flag vocabulary").
import { z } from "zod";
import { LONG_TERM_KEYS, SHORT_TERM_KEYS, type LongTermKey, type ShortTermKey } from "@/lib/engine/indices";

/**
 * The engine's research-only measures (DOMAIN §2.7, §2.8, §5.6: correlation dimension D2, the largest Lyapunov
 * exponent and the power-law fit of run sizes), under the keys the engine reports them by (lib/engine/summary.ts).
 * They carry `research: true` and can never drive a flag; the schema names them in its refusal.
 */
export const RESEARCH_INDEX_KEYS = ["d2", "lyapunov", "power_law_alpha"] as const;

/** Every index a rule may watch: the per-window indices the compute job stores. None of them is research-only. */
export const FLAGGABLE_INDEX_KEYS: readonly (ShortTermKey | LongTermKey)[] = [...SHORT_TERM_KEYS, ...LONG_TERM_KEYS];
type FlaggableIndexKey = ShortTermKey | LongTermKey;

/** Which stored windows carry an index: the 5-min windows every minute, or the 60-min windows every hour. */
export function windowKindOf(key: FlaggableIndexKey): "short" | "long" {
  return (SHORT_TERM_KEYS as readonly string[]).includes(key) ? "short" : "long";
}

const isFlaggable = (key: string): key is FlaggableIndexKey => (FLAGGABLE_INDEX_KEYS as readonly string[]).includes(key);

const indexKeySchema = z
  .string()
  .superRefine((key, ctx) => {
    if ((RESEARCH_INDEX_KEYS as readonly string[]).includes(key)) {
      ctx.addIssue({
        code: "custom",
        message: `"${key}" is a research-only index: it is shown with its caveats and can never drive a flag (DOMAIN §5.6)`,
      });
    } else if (!isFlaggable(key)) {
      ctx.addIssue({ code: "custom", message: `"${key}" is not an index Corvane stores per window (one of: ${FLAGGABLE_INDEX_KEYS.join(", ")})` });
    }
  })
  // Only keys that passed the check above reach the transform.
  .transform((key) => key as FlaggableIndexKey);

const finite = z.number().finite();
const positive = finite.gt(0);

/**
 * How a window's value is compared. Baseline comparisons use the stay's own baseline median (lib/compute/baseline.ts);
 * a window is not judged while the stay has no baseline for the index.
 * - `below_baseline_minus` / `above_baseline_plus`: value < median − amount / value > median + amount (index units);
 * - `below_baseline_percent` / `above_baseline_percent`: value < median × percent/100 / value > median × percent/100;
 * - `below_value` / `above_value`: an absolute threshold in the index's units.
 */
const comparisonSchema = z.discriminatedUnion("type", [
  z.object({ type: z.literal("below_baseline_minus"), amount: positive }).strict(),
  z.object({ type: z.literal("above_baseline_plus"), amount: positive }).strict(),
  z.object({ type: z.literal("below_baseline_percent"), percent: positive.lt(100, "below a percentage of baseline needs a percentage under 100") }).strict(),
  z.object({ type: z.literal("above_baseline_percent"), percent: finite.gt(100, "above a percentage of baseline needs a percentage over 100").max(10_000) }).strict(),
  z.object({ type: z.literal("below_value"), value: finite }).strict(),
  z.object({ type: z.literal("above_value"), value: finite }).strict(),
]);
export type Comparison = z.infer<typeof comparisonSchema>;

/**
 * How long the condition must hold before a flag is raised, as the time spanned by consecutive valid windows that
 * all meet it (from the start of the first to the end of the last):
 * - `windows: N` — as long as N back-to-back windows: N × 5 min for an index of the 5-min windows (which are
 *   stored every minute, so 3 windows = 15 min = 11 overlapping windows), N × 60 min for the 60-min windows. This is
 *   DOMAIN §1's "≥ 3 consecutive valid 5-min windows";
 * - `minutes: M` — at least M minutes.
 * A window that is unusable, has no value, or falls between threshold and recovery breaks the run.
 */
const minDurationSchema = z
  .object({ unit: z.enum(["windows", "minutes"]), value: z.number().int().min(1).max(24 * 60) })
  .strict();

/**
 * Hysteresis: once raised, the condition ends only after `clearWindows` consecutive valid windows have recovered
 * past the threshold by `margin` — in the comparison's own units: index units for the `_minus`, `_plus` and `_value`
 * comparisons, percentage points of baseline for the `_percent` ones, a coverage fraction (0–1) for the coverage
 * rule. A value hovering at the threshold therefore keeps one condition (one flag) instead of raising many.
 */
const hysteresisSchema = z
  .object({ margin: finite.min(0), clearWindows: z.number().int().min(1).max(120) })
  .strict();

const ruleBase = {
  /** Stable within a unit's rule sets: a flag names the rule that raised it, and recurrences are matched by it. */
  id: z.string().regex(/^[a-z0-9][a-z0-9_-]{0,63}$/, "lower-case letters, digits, - and _ (at most 64)"),
  label: z.string().trim().min(1).max(200),
  severity: z.enum(["watch", "review"]),
  minDuration: minDurationSchema,
  hysteresis: hysteresisSchema,
};

/** A change of one index. Evaluation is suppressed on unusable windows (they carry no value, DOMAIN §5.7). */
const indexRuleSchema = z
  .object({ ...ruleBase, kind: z.literal("index"), index: indexKeySchema, comparison: comparisonSchema })
  .strict();

/** A data-quality flag (DOMAIN §1 trigger c): coverage of the 5-min windows below `below` (0–1). Judged on every
 *  window, unusable ones included — low coverage is what makes them unusable. */
const dataQualityRuleSchema = z
  .object({ ...ruleBase, kind: z.literal("data_quality"), metric: z.literal("coverage"), below: finite.gt(0).max(1) })
  .strict();

export const ruleSchema = z.discriminatedUnion("kind", [indexRuleSchema, dataQualityRuleSchema]);
export type Rule = z.infer<typeof ruleSchema>;

/** "HH:MM", 24-hour local time. */
const localTime = z.string().regex(/^([01]\d|2[0-3]):[0-5]\d$/, "a local time as HH:MM (24-hour)");

/** A unit's rule set, as stored in `rule_sets.rules`. */
export const ruleSetDocumentSchema = z
  .object({
    rules: z
      .array(ruleSchema)
      .min(1, "a rule set needs at least one rule")
      .max(50)
      .superRefine((rules, ctx) => {
        const seen = new Set<string>();
        rules.forEach((r, i) => {
          if (seen.has(r.id)) ctx.addIssue({ code: "custom", path: [i, "id"], message: `rule id "${r.id}" is used twice` });
          seen.add(r.id);
        });
      }),
    /** At most this many new flags per patient per night, all rules together (alarm fatigue, DOMAIN §1). */
    maxFlagsPerNight: z.number().int().min(1).max(50),
    /** A night runs from this local time (the unit's zone) to the same local time the next day; noon to noon keeps
     *  a whole night in one. */
    nightStartsAt: localTime,
  })
  .strict();
export type RuleSetDocument = z.infer<typeof ruleSetDocumentSchema>;

/** Plain-words list of what is wrong with a rule set, one line per problem (for a form or an error). */
export function describeRuleSetIssues(error: z.ZodError): string[] {
  return error.issues.map((i) => `${i.path.length ? i.path.join(".") : "rule set"}: ${i.message}`);
}
