// Review flags as the review screens show them: rule label, severity, state, when the condition held. The flag
// life cycle itself (raising, clearing, acknowledging) lives in lib/flags.
import type { Knex } from "knex";
import { db as defaultDb } from "@/lib/db/knex";
import type { FlagState } from "@/lib/db/tables";

export interface FlagViewDTO {
  id: string;
  ruleId: string;
  /** The rule's own label as it was when the flag was raised (rule sets are versioned). */
  label: string;
  severity: "watch" | "review";
  state: FlagState;
  /** The index the rule watches (null for a data-quality rule). */
  index: string | null;
  conditionFrom: string;
  /** null while the condition still holds. */
  conditionTo: string | null;
  raisedAt: string;
  ruleSetVersion: number;
  previousFlagId: string | null;
}

/** Flags of the given states still open to review (not resolved). */
export const UNRESOLVED_STATES: readonly FlagState[] = ["open", "acknowledged", "escalated"];

type Row = {
  id: string; rule_id: string; severity: "watch" | "review"; state: FlagState; condition_from: Date; condition_to: Date | null;
  raised_at: Date; rule_set_version: number; previous_flag_id: string | null; details: { rule?: { label?: string; index?: string } };
};

const toDTO = (r: Row): FlagViewDTO => ({
  id: r.id,
  ruleId: r.rule_id,
  label: r.details?.rule?.label ?? r.rule_id,
  severity: r.severity,
  state: r.state,
  index: r.details?.rule?.index ?? null,
  conditionFrom: r.condition_from.toISOString(),
  conditionTo: r.condition_to?.toISOString() ?? null,
  raisedAt: r.raised_at.toISOString(),
  ruleSetVersion: r.rule_set_version,
  previousFlagId: r.previous_flag_id,
});

const COLUMNS = ["id", "rule_id", "severity", "state", "condition_from", "condition_to", "raised_at", "rule_set_version", "previous_flag_id", "details"] as const;

/** Flags of a stay whose condition overlapped [from, to), oldest first. */
export async function flagsOfStay(stayId: string, from: Date, to: Date, knex: Knex = defaultDb): Promise<FlagViewDTO[]> {
  const rows = await knex("flags")
    .where("stay_id", stayId)
    .where("condition_from", "<", to)
    .where((q) => q.whereNull("condition_to").orWhere("condition_to", ">", from))
    .orderBy("condition_from")
    .select<Row[]>(...COLUMNS);
  return rows.map(toDTO);
}

/** Unresolved flags of the given stays, oldest first, grouped by stay. */
export async function unresolvedFlagsOf(stayIds: readonly string[], knex: Knex = defaultDb): Promise<Map<string, FlagViewDTO[]>> {
  const out = new Map<string, FlagViewDTO[]>();
  if (!stayIds.length) return out;
  const rows = await knex("flags")
    .whereIn("stay_id", stayIds)
    .whereIn("state", UNRESOLVED_STATES)
    .orderBy("condition_from")
    .select<(Row & { stay_id: string })[]>("stay_id", ...COLUMNS);
  for (const r of rows) {
    const list = out.get(r.stay_id) ?? [];
    list.push(toDTO(r));
    out.set(r.stay_id, list);
  }
  return out;
}

export interface BaselineDTO {
  index: string;
  median: number | null;
  /** Robust spread (MAD × 1.4826). */
  spread: number | null;
  nWindows: number;
  from: string;
  to: string;
}

/** A stay's personal baselines for one engine version, by index key. */
export async function baselinesOf(stayId: string, algorithmVersion: string, knex: Knex = defaultDb): Promise<Record<string, BaselineDTO>> {
  const rows = await knex("baselines").where({ stay_id: stayId, algorithm_version: algorithmVersion }).select("*");
  return Object.fromEntries(
    rows.map((r) => [r.index_key, { index: r.index_key, median: r.median, spread: r.spread, nWindows: r.n_windows, from: r.from_at.toISOString(), to: r.to_at.toISOString() }]),
  );
}
