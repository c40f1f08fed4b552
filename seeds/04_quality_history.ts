// Invented history for the Quality metrics (demo data, nothing real): the live demo raises flags only from the moment
// it starts, so a fresh start would show an empty last week. This adds, once, resolved flags on 4 West's demo stays
// over the 7 complete days before seeding, each acknowledged (some escalated) by the demo charge nurse after a chosen
// delay, with the reminder and escalation e-mails the delays would have caused, already sent. Every row is marked
// (flags.details.demo_history, "demo-history:" dedupe keys, "(invented demo history)" in the mail) and one audit entry
// records the seeding; no audit entries are back-dated (the chain runs forward only).
// Only nights before the previous local noon get flags: the live evaluator's per-night cap and its "open flag" logic
// never see them (lib/flags/evaluate-stay.ts), and every one is resolved, so none enters the Review queue or a reminder.
import type { Knex } from "knex";
import { addDays, lastCompleteDays, localMidnight } from "@/lib/quality/stats";
import { demoPerson, DEMO_TIME_ZONE } from "./demo-data";
import { auditSeed } from "./seed-audit";

const MIN = 60_000;
/** Local minutes after midnight at which a history flag may be raised (all before 07:00, the night shift's end). */
const RAISE_AT_MIN = [70, 155, 220, 290, 375];
/** Minutes to the first decision, cycled: mostly quick, a tail past the 30-min target and a few past an hour. */
const DELAYS_MIN = [4, 7, 11, 6, 18, 26, 9, 33, 14, 48, 5, 21, 72, 12, 8, 39];
/** Every 5th flag is escalated to the clinician instead of acknowledged. */
const ESCALATE_EVERY = 5;

export async function seedQualityHistory(knex: Knex, now: Date = new Date()): Promise<{ inserted: number }> {
  return knex.transaction(async (trx) => {
    const already = await trx("flags").whereRaw(`details @> '{"demo_history": true}'::jsonb`).first("id");
    if (already) return { inserted: 0 };
    const unit = await trx("units").where({ code: "4W" }).first("id", "name", "remind_after_minutes", "escalate_after_minutes");
    const ruleSet = unit && (await trx("rule_sets").where({ unit_id: unit.id }).orderBy("version").first("id", "version", "rules"));
    const nurse = await trx("users").where({ email: demoPerson("charge_nurse").email }).first("id", "email");
    const clinician = await trx("users").where({ email: demoPerson("clinician").email }).first("id", "email");
    if (!unit || !ruleSet || !nurse || !clinician) return { inserted: 0 };
    const rules = (ruleSet.rules as { rules?: { id: string; label: string; severity: "watch" | "review" }[] }).rules ?? [];
    if (!rules.length) return { inserted: 0 };
    const stays = await trx("stays as s").join("beds as b", "b.id", "s.bed_id").where("b.unit_id", unit.id).orderBy("b.sort_order").select("s.id", "s.admitted_at", "s.discharged_at");

    const { from, to } = lastCompleteDays(now, DEMO_TIME_ZONE);
    // The previous local day's noon: nothing on or after it (see above).
    const latest = localMidnight(to, DEMO_TIME_ZONE).getTime() + 12 * 60 * MIN;
    let n = 0;
    let mails = 0;
    for (let day = from; day <= to; day = addDays(day, 1)) {
      const midnight = localMidnight(day, DEMO_TIME_ZONE).getTime();
      for (const [i, s] of stays.entries()) {
        // Up to two flags per stay and night, varied by stay and day (the slot past the list is a quiet one).
        const dd = Number(day.slice(-2));
        const slots = new Set([(i * 3 + dd) % (RAISE_AT_MIN.length + 1), (i * 5 + dd + 2) % (RAISE_AT_MIN.length + 1)]);
        for (const slot of slots) {
          if (slot === RAISE_AT_MIN.length) continue;
          const raised = midnight + RAISE_AT_MIN[slot]! * MIN;
          const conditionFrom = raised - 15 * MIN;
          if (raised >= latest || conditionFrom < s.admitted_at.getTime() || (s.discharged_at && raised + 3 * 60 * MIN > s.discharged_at.getTime())) continue;
          const rule = rules[(i + slot) % rules.length]!;
          const delay = DELAYS_MIN[n % DELAYS_MIN.length]!;
          const escalate = n % ESCALATE_EVERY === ESCALATE_EVERY - 1;
          const decided = raised + delay * MIN;
          const resolved = decided + (40 + (n % 4) * 20) * MIN;
          n += 1;
          const [flag] = await trx("flags")
            .insert({
              stay_id: s.id, unit_id: unit.id, rule_set_id: ruleSet.id, rule_set_version: ruleSet.version, rule_id: rule.id, severity: rule.severity,
              state: "resolved", version: 3, condition_from: new Date(conditionFrom), condition_to: new Date(raised + 25 * MIN), raised_at: new Date(raised),
              details: { demo_history: true, rule: { id: rule.id, label: rule.label }, note: "Invented demo history for the Quality metrics (no windows behind it)." },
            })
            .returning("id");
          const first = escalate ? "escalated" : "acknowledged";
          await trx("flag_events").insert([
            { flag_id: flag!.id, from_state: "open", to_state: first, reason: escalate ? null : "reviewed_no_action", note: null, recipient_id: escalate ? clinician.id : null, actor_id: nurse.id, at: new Date(decided) },
            { flag_id: flag!.id, from_state: first, to_state: "resolved", reason: null, note: null, recipient_id: null, actor_id: nurse.id, at: new Date(resolved) },
          ]);
          const mail: { kind: "reminder" | "reminder_escalation" | "escalation"; to: string; at: number }[] = [];
          if (delay >= unit.remind_after_minutes) mail.push({ kind: "reminder", to: nurse.email, at: raised + unit.remind_after_minutes * MIN });
          if (delay >= unit.escalate_after_minutes) mail.push({ kind: "reminder_escalation", to: clinician.email, at: raised + unit.escalate_after_minutes * MIN });
          if (escalate) mail.push({ kind: "escalation", to: clinician.email, at: decided });
          for (const m of mail) {
            // Raw insert: created_at and status are the outbox's own columns, set here to the invented past.
            await trx.raw(
              `INSERT INTO mail_outbox (kind, to_address, subject, body_text, dedupe_key, flag_id, status, attempts, created_at, next_attempt_at, sent_at)
               VALUES (?, ?, ?, ?, ?, ?, 'sent', 1, ?, ?, ?)`,
              [m.kind, m.to, `Corvane ${m.kind.replace("_", " ")} (invented demo history)`, "Invented demo history for the Quality metrics; never delivered to anyone.",
                `demo-history:${flag!.id}:${m.kind}`, flag!.id, new Date(m.at), new Date(m.at), new Date(m.at + MIN)],
            );
            mails += 1;
        }
        }
      }
    }
    if (n > 0) {
      await auditSeed(trx, "demo.seed_quality_history", { flags: n, mails, from, to, unitId: unit.id });
    }
    return { inserted: n };
  });
}
