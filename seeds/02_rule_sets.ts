// Seeds a DEFAULT review-rule set for every unit that has none, idempotently (a unit with any rule set is left alone,
// so a unit's own versions are never overwritten). The default is a starting point for local protocol to set: its
// thresholds are DOMAIN §1's suggested triggers (common practice), not a validated clinical protocol.
import type { Knex } from "knex";
import { randomUUID } from "node:crypto";
import { saveRuleSetVersion } from "@/lib/flags/rule-sets";
import type { RuleSetDocument } from "@/lib/flags/rules.validation";

const DEFAULT_RULE_SET_NAME = "DEFAULT review rules — for local protocol to set";

const DEFAULT_RULE_SET_NOTE =
  "DEFAULT, not a clinical protocol. Thresholds follow DOMAIN §1's suggested triggers (common practice): a change " +
  "from the patient's own baseline held for about 15 minutes, and a data-quality flag for low coverage. Unit " +
  "leadership must review them and replace them with local protocol. Review flags support a review; they are not " +
  "alarms and never replace bedside monitor alarms.";

export const DEFAULT_RULE_SET: RuleSetDocument = {
  rules: [
    {
      id: "alpha1-below-baseline",
      kind: "index",
      label: "DFA α1 more than 0.3 below the patient's baseline for 3 consecutive 5-min windows",
      index: "dfa_alpha1",
      comparison: { type: "below_baseline_minus", amount: 0.3 },
      minDuration: { unit: "windows", value: 3 },
      severity: "review",
      // Ends once α1 is back within 0.2 of baseline (0.1 past the threshold) for 5 windows in a row.
      hysteresis: { margin: 0.1, clearWindows: 5 },
    },
    {
      id: "sdnn-below-half-baseline",
      kind: "index",
      label: "SDNN below 50 % of the patient's baseline for 15 minutes",
      index: "sdnn",
      comparison: { type: "below_baseline_percent", percent: 50 },
      minDuration: { unit: "minutes", value: 15 },
      severity: "watch",
      // Ends once SDNN is back to 60 % of baseline or more for 5 windows in a row.
      hysteresis: { margin: 10, clearWindows: 5 },
    },
    {
      id: "coverage-below-80",
      kind: "data_quality",
      label: "Data quality: beat coverage below 80 % for 10 minutes",
      metric: "coverage",
      below: 0.8,
      minDuration: { unit: "minutes", value: 10 },
      severity: "watch",
      hysteresis: { margin: 0.05, clearWindows: 5 },
    },
  ],
  // Alarm fatigue (DOMAIN §1): a patient gets at most 6 new flags from noon to noon.
  maxFlagsPerNight: 6,
  nightStartsAt: "12:00",
};

/** Adds version 1 (the default) for each unit without a rule set; returns how many were added. */
export async function seedRuleSets(knex: Knex): Promise<{ inserted: number }> {
  let inserted = 0;
  await knex.transaction(async (trx) => {
    // Locking the units first makes a concurrent second seed wait, then find the rule sets and add nothing.
    const units = await trx("units").orderBy("code").forUpdate().select("id");
    const requestId = randomUUID();
    for (const u of units) {
      if (await trx("rule_sets").where({ unit_id: u.id }).first("id")) continue;
      await saveRuleSetVersion(trx, {
        unitId: u.id,
        name: DEFAULT_RULE_SET_NAME,
        document: DEFAULT_RULE_SET,
        isDefault: true,
        note: DEFAULT_RULE_SET_NOTE,
        audit: { actor: { userId: null, email: null, role: "system" }, requestId, clientAddress: null },
      });
      inserted += 1;
    }
  });
  return { inserted };
}
