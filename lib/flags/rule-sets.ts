// Rule sets per unit, versioned: saving a rule set always adds a new version (an edit never rewrites one), and a
// flag keeps the id and version of the rule set that raised it. Every new version is audited.
import type { Knex } from "knex";
import { recordAudit, type AuditEntry } from "@/lib/audit/record";
import { describeRuleSetIssues, ruleSetDocumentSchema, type RuleSetDocument } from "./rules.validation";

export interface RuleSet {
  id: string;
  unitId: string;
  version: number;
  name: string;
  isDefault: boolean;
  document: RuleSetDocument;
}

/** A rule set that does not pass lib/flags/rules.validation.ts; `issues` are plain-words lines. */
export class RuleSetInvalidError extends Error {
  constructor(
    readonly issues: string[],
    context: string,
  ) {
    super(`${context}: ${issues.join("; ")}`);
    this.name = "RuleSetInvalidError";
  }
}

/** Validates a rule-set document; throws RuleSetInvalidError listing every problem. */
export function parseRuleSetDocument(input: unknown, context = "invalid rule set"): RuleSetDocument {
  const parsed = ruleSetDocumentSchema.safeParse(input);
  if (!parsed.success) throw new RuleSetInvalidError(describeRuleSetIssues(parsed.error), context);
  return parsed.data;
}

export interface SaveRuleSetInput {
  unitId: string;
  name: string;
  document: unknown;
  isDefault?: boolean;
  note?: string | null;
  createdBy?: string | null;
  audit: Pick<AuditEntry, "actor" | "requestId" | "clientAddress">;
}

/**
 * Adds the next version of a unit's rule set, in the caller's transaction, with its `rule_set.create` audit entry.
 * The unit row is locked so two saves cannot take the same version number.
 */
export async function saveRuleSetVersion(trx: Knex.Transaction, input: SaveRuleSetInput): Promise<RuleSet> {
  const document = parseRuleSetDocument(input.document);
  const name = input.name.trim();
  if (!name) throw new RuleSetInvalidError(["name: a rule set needs a name"], "invalid rule set");
  const unit = await trx("units").where({ id: input.unitId }).forUpdate().first("id");
  if (!unit) throw new RangeError(`no unit ${input.unitId}`);
  const last = await trx("rule_sets").where({ unit_id: input.unitId }).max<{ v: number | null }>("version as v").first();
  const version = (last?.v ?? 0) + 1;
  const [row] = await trx("rule_sets")
    .insert({
      unit_id: input.unitId,
      version,
      name,
      rules: JSON.stringify(document),
      is_default: input.isDefault ?? false,
      note: input.note ?? null,
      created_by: input.createdBy ?? null,
    })
    .returning("id");
  await recordAudit(
    {
      ...input.audit,
      action: "rule_set.create",
      target: { type: "rule_set", id: row!.id },
      unitId: input.unitId,
      outcome: "success",
      detail: { version, name, is_default: input.isDefault ?? false, rules: document.rules.map((r) => r.id), max_flags_per_night: document.maxFlagsPerNight },
    },
    trx,
  );
  return { id: row!.id, unitId: input.unitId, version, name, isDefault: input.isDefault ?? false, document };
}

/** The newest version of each unit's rule set (the one in force), keyed by unit id. A stored rule set that no longer
 *  validates is reported in `invalid` rather than used. */
export async function rulesInForce(db: Knex, unitIds: readonly string[]): Promise<{ ruleSets: Map<string, RuleSet>; invalid: Map<string, RuleSetInvalidError> }> {
  const ruleSets = new Map<string, RuleSet>();
  const invalid = new Map<string, RuleSetInvalidError>();
  if (!unitIds.length) return { ruleSets, invalid };
  const rows = await db("rule_sets")
    .distinctOn("unit_id")
    .whereIn("unit_id", unitIds)
    .orderBy([{ column: "unit_id" }, { column: "version", order: "desc" }])
    .select("id", "unit_id", "version", "name", "is_default", "rules");
  for (const r of rows) {
    try {
      const document = parseRuleSetDocument(r.rules, `rule set ${r.id} (unit ${r.unit_id}, version ${r.version}) no longer validates`);
      ruleSets.set(r.unit_id, { id: r.id, unitId: r.unit_id, version: r.version, name: r.name, isDefault: r.is_default, document });
    } catch (err) {
      if (!(err instanceof RuleSetInvalidError)) throw err;
      invalid.set(r.unit_id, err);
    }
  }
  return { ruleSets, invalid };
}
