// Rule sets of one unit for the Rule sets screen: the version in force, its history, and saving a change as the
// next version (lib/flags/rule-sets.ts saveRuleSetVersion) with an audit entry that carries before/after and what
// changed. DTOs with ISO 8601 UTC instants.
import "server-only";
import type { Knex } from "knex";
import { db as defaultDb } from "@/lib/db/knex";
import { saveRuleSetVersion, type RuleSet } from "@/lib/flags/rule-sets";
import { ruleSetDocumentSchema, type RuleSetDocument } from "@/lib/flags/rules.validation";
import { recordAudit, type AuditEntry } from "@/lib/audit/record";

export interface RuleSetVersionDTO {
  id: string;
  version: number;
  name: string;
  isDefault: boolean;
  note: string | null;
  savedBy: string | null;
  savedAt: string;
  /** Null when the stored document no longer validates (it is then not in force for flags either). */
  document: RuleSetDocument | null;
}

export interface UnitRuleSetsDTO {
  unit: { id: string; code: string; name: string; timeZone: string; nightStartsAt: string; nightEndsAt: string };
  /** Newest first; the first is the version in force. */
  versions: RuleSetVersionDTO[];
}

/** The unit's rule-set versions, newest first (a unit keeps few; capped at `limit`). Null when there is no unit. */
export async function unitRuleSets(unitId: string, knex: Knex = defaultDb, limit = 100): Promise<UnitRuleSetsDTO | null> {
  const unit = await knex("units").where({ id: unitId }).first("id", "code", "name", "time_zone", "night_starts_at", "night_ends_at");
  if (!unit) return null;
  const rows = await knex("rule_sets as r")
    .leftJoin("users as u", "u.id", "r.created_by")
    .where("r.unit_id", unitId)
    .orderBy("r.version", "desc")
    .limit(limit)
    .select("r.id", "r.version", "r.name", "r.is_default", "r.note", "r.created_at", "r.rules", "u.name as saved_by");
  return {
    unit: { id: unit.id, code: unit.code, name: unit.name, timeZone: unit.time_zone, nightStartsAt: unit.night_starts_at, nightEndsAt: unit.night_ends_at },
    versions: rows.map((r) => {
      const doc = ruleSetDocumentSchema.safeParse(r.rules);
      return {
        id: r.id,
        version: r.version,
        name: r.name,
        isDefault: r.is_default,
        note: r.note,
        savedBy: r.saved_by ?? null,
        savedAt: new Date(r.created_at).toISOString(),
        document: doc.success ? doc.data : null,
      };
    }),
  };
}

/** Flags recorded for the unit with a condition starting in [from, to), by the rule-set version that raised them. */
export async function recordedFlagsBetween(unitId: string, from: Date, to: Date, knex: Knex = defaultDb): Promise<{ version: number; count: number }[]> {
  const rows = await knex("flags")
    .where({ unit_id: unitId })
    .where("condition_from", ">=", from)
    .where("condition_from", "<", to)
    .groupBy("rule_set_version")
    .orderBy("rule_set_version")
    .select("rule_set_version")
    .count<{ rule_set_version: number; n: string }[]>("* as n");
  return rows.map((r) => ({ version: r.rule_set_version, count: Number(r.n) }));
}

/** What a new version changes, by rule id (rules keep their id across versions). */
export function summariseChange(before: RuleSetDocument | null, after: RuleSetDocument) {
  const old = new Map((before?.rules ?? []).map((r) => [r.id, JSON.stringify(r)]));
  const now = new Map(after.rules.map((r) => [r.id, JSON.stringify(r)]));
  return {
    added: [...now.keys()].filter((id) => !old.has(id)),
    removed: [...old.keys()].filter((id) => !now.has(id)),
    changed: [...now.keys()].filter((id) => old.has(id) && old.get(id) !== now.get(id)),
    maxFlagsPerNight: { before: before?.maxFlagsPerNight ?? null, after: after.maxFlagsPerNight },
    nightStartsAt: { before: before?.nightStartsAt ?? null, after: after.nightStartsAt },
  };
}

export class RuleSetConflictError extends Error {
  constructor(readonly inForceVersion: number | null) {
    super(`the rule set in force is now version ${inForceVersion}`);
    this.name = "RuleSetConflictError";
  }
}

/**
 * Saves `document` as the unit's next rule-set version, in the caller's transaction, and audits the change
 * (`rule_set.change`: versions before/after and what changed) beside saveRuleSetVersion's own `rule_set.create`.
 * When `basedOnVersion` is given and another version was saved meanwhile, throws RuleSetConflictError and saves
 * nothing, so one administrator's edit never silently replaces another's.
 */
export async function saveRuleSetChange(
  trx: Knex.Transaction,
  input: { unitId: string; document: RuleSetDocument; note: string; basedOnVersion?: number; createdBy: string | null; audit: Pick<AuditEntry, "actor" | "requestId" | "clientAddress"> },
): Promise<{ saved: RuleSet; before: { id: string; version: number } | null; change: ReturnType<typeof summariseChange> }> {
  // Lock the unit first: saveRuleSetVersion locks it too, so the version read here is the one this save follows.
  await trx("units").where({ id: input.unitId }).forUpdate().first("id");
  const prev = await trx("rule_sets").where({ unit_id: input.unitId }).orderBy("version", "desc").first("id", "version", "name", "is_default", "rules");
  if (input.basedOnVersion !== undefined && (prev?.version ?? 0) !== input.basedOnVersion) throw new RuleSetConflictError(prev?.version ?? null);
  const beforeDoc = prev ? ruleSetDocumentSchema.safeParse(prev.rules) : null;
  const change = summariseChange(beforeDoc?.success ? beforeDoc.data : null, input.document);
  // A version edited from the seeded DEFAULT is the unit's own protocol: it no longer carries the DEFAULT name.
  const name = prev && !prev.is_default ? prev.name : "Local review rules";
  const saved = await saveRuleSetVersion(trx, { unitId: input.unitId, name, document: input.document, isDefault: false, note: input.note, createdBy: input.createdBy, audit: input.audit });
  await recordAudit(
    {
      ...input.audit,
      action: "rule_set.change",
      target: { type: "rule_set", id: saved.id },
      unitId: input.unitId,
      outcome: "success",
      detail: {
        before: prev ? { id: prev.id, version: prev.version } : null,
        after: { id: saved.id, version: saved.version },
        note: input.note,
        ...change,
      },
    },
    trx,
  );
  return { saved, before: prev ? { id: prev.id, version: prev.version } : null, change };
}
