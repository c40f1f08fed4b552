// What a draft rule set would have raised on a unit's last completed review night, before anyone saves it.
//
// How: the preview runs the real flag evaluation (lib/flags/evaluate-stay.ts evaluateStayFlags) — not a copy of its
// logic — inside a transaction that is ALWAYS rolled back, so the number shown is by construction the number the
// saved version raises on the same windows, cap and hysteresis included. Inside that transaction:
// - the draft becomes a rule_sets row (flags need one to point at);
// - each stay of the unit with windows in the night gets a shadow stay (same patient and bed, already discharged)
//   holding a copy of that stay's baselines and of its windows that end by the night's end, from a look-back before
//   the night's start. The shadow has no flags, so the cap and the recurrence logic see a clean night and the
//   recorded flags (acknowledged, escalated, audited) are never touched, not even inside the rolled-back transaction;
// - evaluateStayFlags runs on each shadow with newFrom = the night's start, and what it raised is read back.
// The rollback then removes the shadows, their windows, the draft and its flags: the preview writes nothing.
//
// Why a past night is NOT re-evaluated for real after a save: flags that appear for a night already over would land
// in the Review queue as open prompts for conditions nobody can act on any more, and matching the preview would mean
// setting aside the flags clinicians already acknowledged or escalated — audited records that must stay as they
// were. A saved version therefore applies from the next compute run on; the preview answers "what would it have
// raised", and tests/integration/rule-sets-admin.test.ts checks that answer against the compute job raising flags
// with the saved version on the same data.
import "server-only";
import type { Knex } from "knex";
import { db as defaultDb } from "@/lib/db/knex";
import type { FlagRow, WindowKind } from "@/lib/db/tables";
import { WINDOW_DEFAULTS } from "@/lib/engine/windows";
import { ALGORITHM_VERSION } from "@/lib/engine/version";
import { lookbackMs } from "@/lib/flags/evaluate";
import { evaluateStayFlags } from "@/lib/flags/evaluate-stay";
import { parseRuleSetDocument, rulesInForce, type RuleSet } from "@/lib/flags/rule-sets";
import { windowKindOf, type Rule, type RuleSetDocument } from "@/lib/flags/rules.validation";
import { lastCompletedNight, type ReviewNight } from "@/lib/review/night";

export interface PreviewFlagDTO {
  bedLabel: string;
  ruleId: string;
  ruleLabel: string;
  severity: "watch" | "review";
  /** ISO 8601 UTC; shown in the unit's zone. */
  conditionFrom: string;
  /** Null while the condition still held at the end of the night. */
  conditionTo: string | null;
}

export interface RuleSetPreviewDTO {
  unitId: string;
  timeZone: string;
  night: { night: string; from: string; to: string; hours: number };
  /** Stays of the unit with windows in the night (each evaluated). */
  stays: number;
  draft: { count: number; flags: PreviewFlagDTO[] };
  /** The same evaluation for the version in force; null when the unit has no valid rule set in force. */
  inForce: { version: number; count: number } | null;
}

const KIND_MS: Record<WindowKind, { windowMs: number; strideMs: number }> = {
  short: { windowMs: WINDOW_DEFAULTS.shortWindowS * 1000, strideMs: WINDOW_DEFAULTS.shortStrideS * 1000 },
  long: { windowMs: WINDOW_DEFAULTS.longWindowS * 1000, strideMs: WINDOW_DEFAULTS.longStrideS * 1000 },
};
const kindOf = (rule: Rule): WindowKind => (rule.kind === "data_quality" ? "short" : windowKindOf(rule.index));

/** How far before the night's start the evaluation looks back (the longest look-back of any rule of either set). */
function lookbackOf(docs: RuleSetDocument[]): number {
  let ms = 0;
  for (const d of docs) for (const r of d.rules) ms = Math.max(ms, lookbackMs(r, KIND_MS[kindOf(r)].windowMs, KIND_MS[kindOf(r)].strideMs));
  return ms;
}

/** Thrown out of the transaction so that it always rolls back; carries the result. */
class RollBack<T> extends Error {
  constructor(readonly result: T) {
    super("preview: rolled back on purpose");
  }
}

interface UnitNight {
  unitId: string;
  timeZone: string;
  night: ReviewNight;
}

async function unitNight(knex: Knex, unitId: string, now: Date): Promise<UnitNight | null> {
  const unit = await knex("units").where({ id: unitId }).first("id", "time_zone", "night_starts_at", "night_ends_at");
  if (!unit) return null;
  const night = lastCompletedNight(now, { timeZone: unit.time_zone, startsAt: unit.night_starts_at, endsAt: unit.night_ends_at });
  return { unitId, timeZone: unit.time_zone, night };
}

/**
 * Evaluates `ruleSets` one after the other on shadows of the unit's stays for the night, in `trx`, and returns what
 * each raised. Writes into `trx` only; the caller decides whether it is kept.
 */
async function evaluateOnShadows(trx: Knex.Transaction, at: UnitNight, ruleSets: RuleSet[]): Promise<{ stays: number; raised: PreviewFlagDTO[][] }> {
  const { night } = at;
  const from = new Date(night.from.getTime() - lookbackOf(ruleSets.map((r) => r.document)));
  const stays = await trx("stays as s")
    .join("beds as b", "b.id", "s.bed_id")
    .where("b.unit_id", at.unitId)
    .whereExists(
      trx("index_windows as w")
        .whereRaw("w.stay_id = s.id")
        .where("w.algorithm_version", ALGORITHM_VERSION)
        .where("w.window_start", "<", night.to)
        .where("w.window_end", ">", night.from),
    )
    .orderBy("b.sort_order")
    .select<{ id: string; patient_id: string; bed_id: string; admitted_at: Date; bed_label: string }[]>("s.id", "s.patient_id", "s.bed_id", "s.admitted_at", "b.label as bed_label");

  const raised: PreviewFlagDTO[][] = ruleSets.map(() => []);
  for (const [i, ruleSet] of ruleSets.entries()) {
    for (const stay of stays) {
      // A fresh shadow per rule set, so no rule set sees the flags another raised.
      const [shadow] = await trx("stays")
        .insert({ patient_id: stay.patient_id, bed_id: stay.bed_id, admitted_at: stay.admitted_at, discharged_at: night.to })
        .returning("id");
      const shadowId = shadow!.id as string;
      await trx.raw(
        `INSERT INTO baselines (stay_id, index_key, algorithm_version, median, spread, n_windows, from_at, to_at)
         SELECT ?, index_key, algorithm_version, median, spread, n_windows, from_at, to_at FROM baselines
         WHERE stay_id = ? AND algorithm_version = ?`,
        [shadowId, stay.id, ALGORITHM_VERSION],
      );
      await trx.raw(
        `INSERT INTO index_windows (stay_id, kind, window_start, window_end, algorithm_version, params_hash, grade, quality, "values", reasons, mse, baseline_delta, compute_run_id)
         SELECT ?, kind, window_start, window_end, algorithm_version, params_hash, grade, quality, "values", reasons, mse, baseline_delta, compute_run_id FROM index_windows
         WHERE stay_id = ? AND algorithm_version = ? AND window_start >= ? AND window_end <= ?`,
        [shadowId, stay.id, ALGORITHM_VERSION, from, night.to],
      );
      const outcome = await evaluateStayFlags(trx, {
        stayId: shadowId,
        unitId: at.unitId,
        timeZone: at.timeZone,
        algorithmVersion: ALGORITHM_VERSION,
        ruleSet,
        newFrom: { short: night.from, long: night.from },
        judgedUpTo: { short: null, long: null },
      });
      if (!outcome.raised.length) continue;
      const rows: FlagRow[] = await trx("flags").whereIn("id", outcome.raised).orderBy("condition_from").select("*");
      for (const f of rows) {
        const rule = ruleSet.document.rules.find((r) => r.id === f.rule_id);
        raised[i]!.push({
          bedLabel: stay.bed_label,
          ruleId: f.rule_id,
          ruleLabel: rule?.label ?? f.rule_id,
          severity: f.severity,
          conditionFrom: f.condition_from.toISOString(),
          conditionTo: f.condition_to ? f.condition_to.toISOString() : null,
        });
      }
    }
  }
  for (const list of raised) list.sort((a, b) => a.conditionFrom.localeCompare(b.conditionFrom) || a.bedLabel.localeCompare(b.bedLabel));
  return { stays: stays.length, raised };
}

/** The draft as a rule set row inside the (rolled-back) transaction: flags must name a stored rule set. */
async function draftRuleSet(trx: Knex.Transaction, unitId: string, document: RuleSetDocument): Promise<RuleSet> {
  const last = await trx("rule_sets").where({ unit_id: unitId }).max<{ v: number | null }>("version as v").first();
  const version = (last?.v ?? 0) + 1;
  const [row] = await trx("rule_sets")
    .insert({ unit_id: unitId, version, name: "Preview draft", rules: JSON.stringify(document), is_default: false, note: null, created_by: null })
    .returning("id");
  return { id: row!.id, unitId, version, name: "Preview draft", isDefault: false, document };
}

/**
 * How many flags the draft `document` would raise on the unit's last completed review night (ended by `now`), and
 * where, beside the same evaluation of the version in force. Writes nothing. Null when the unit does not exist.
 * Throws RuleSetInvalidError when the document does not validate.
 */
export async function previewRuleSetOn(unitId: string, document: unknown, now = new Date(), knex: Knex = defaultDb): Promise<RuleSetPreviewDTO | null> {
  const draftDoc = parseRuleSetDocument(document, "the draft rule set does not validate");
  const at = await unitNight(knex, unitId, now);
  if (!at) return null;
  const inForce = (await rulesInForce(knex, [unitId])).ruleSets.get(unitId) ?? null;
  try {
    await knex.transaction(async (trx) => {
      const draft = await draftRuleSet(trx, unitId, draftDoc);
      const sets = inForce ? [draft, inForce] : [draft];
      const { stays, raised } = await evaluateOnShadows(trx, at, sets);
      const result: RuleSetPreviewDTO = {
        unitId,
        timeZone: at.timeZone,
        night: { night: at.night.night, from: at.night.from.toISOString(), to: at.night.to.toISOString(), hours: at.night.hours },
        stays,
        draft: { count: raised[0]!.length, flags: raised[0]! },
        inForce: inForce ? { version: inForce.version, count: raised[1]!.length } : null,
      };
      throw new RollBack(result);
    });
  } catch (err) {
    if (err instanceof RollBack) return err.result as RuleSetPreviewDTO;
    throw err;
  }
  throw new Error("preview transaction ended without rolling back");
}
