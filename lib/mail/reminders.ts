// The reminder job (run every minute by the scheduler): a flag still `open` past its unit's remind_after_minutes is
// brought to every active charge nurse of the unit; past escalate_after_minutes, to every active clinician of the
// unit too. Each message goes through the outbox with a dedupe key naming the flag, its version and the recipient,
// so however often the job runs (or restarts) a person is told once per flag version. Messages carry the minimum
// necessary — bed, unit, rule, severity, time waiting and a link — never a patient's name or record number.
import { randomUUID } from "node:crypto";
import type { Knex } from "knex";
import { recordAudit } from "@/lib/audit/record";
import type { MailKind } from "@/lib/db/tables";
import { logger } from "@/lib/log";
import { appBaseUrl } from "./config";
import { enqueueMail } from "./outbox";

interface WaitingFlag {
  id: string;
  version: number;
  unit_id: string;
  unit_name: string;
  bed: string;
  severity: "watch" | "review";
  rule_label: string | null;
  raised_at: Date;
  remind_after_minutes: number;
  escalate_after_minutes: number;
}

interface Recipient {
  id: string;
  email: string;
}

export interface ReminderCounts {
  /** Open flags past their unit's reminder threshold. */
  waiting: number;
  /** Messages newly enqueued by this run (earlier runs' messages are not counted again). */
  reminders: number;
  escalations: number;
}

const SEVERITY_TEXT = { watch: "watch (lower)", review: "review (higher)" } as const;

function message(kind: Extract<MailKind, "reminder" | "reminder_escalation">, f: WaitingFlag, minutes: number, link: string) {
  const rule = f.rule_label ?? "rule label not recorded";
  const subject =
    kind === "reminder"
      ? `Reminder: ${f.severity} flag waiting ${minutes} min — bed ${f.bed}, ${f.unit_name}`
      : `Unacknowledged ${f.severity} flag, ${minutes} min — bed ${f.bed}, ${f.unit_name}`;
  const lead =
    kind === "reminder"
      ? `A review flag has been open for ${minutes} minutes without acknowledgement (the unit's reminder time is ${f.remind_after_minutes} min).`
      : `A review flag has been open for ${minutes} minutes without acknowledgement, past the unit's escalation time of ${f.escalate_after_minutes} min. You are told as a clinician of the unit.`;
  const text = [
    lead,
    "",
    `Unit: ${f.unit_name}`,
    `Bed: ${f.bed}`,
    `Rule: ${rule}`,
    `Severity: ${SEVERITY_TEXT[f.severity]}`,
    `Waiting: ${minutes} min`,
    "",
    `Review queue: ${link}`,
    "",
    "Corvane is decision support: review flags support a review and never replace bedside monitor alarms.",
    "This message names no patient; sign in to see who the bed holds.",
  ].join("\n");
  return { subject, text };
}

async function activeMembers(trx: Knex.Transaction, unitId: string, role: "charge_nurse" | "clinician"): Promise<Recipient[]> {
  return trx("user_unit_roles as r")
    .join("users as u", "u.id", "r.user_id")
    .where({ "r.unit_id": unitId, "r.role": role, "u.active": true })
    .orderBy("u.id")
    .select("u.id", "u.email");
}

/** One run of the reminder job as of `now`; enqueues only what was never enqueued before. */
export async function runReminders(db: Knex, now: Date = new Date()): Promise<ReminderCounts> {
  if (Number.isNaN(now.getTime())) throw new RangeError("now is not a valid date");
  const base = appBaseUrl();
  return db.transaction(async (trx) => {
    const flags: WaitingFlag[] = await trx("flags as f")
      .join("units as u", "u.id", "f.unit_id")
      .join("stays as s", "s.id", "f.stay_id")
      .join("beds as b", "b.id", "s.bed_id")
      .where("f.state", "open")
      // A patient who has left the unit is not at the bedside to be reviewed: the flag stays in the queue, unreminded.
      .where((q) => q.whereNull("s.discharged_at").orWhere("s.discharged_at", ">", now))
      .andWhereRaw("f.raised_at <= ?::timestamptz - make_interval(mins => u.remind_after_minutes)", [now])
      .orderBy([{ column: "f.raised_at" }, { column: "f.id" }])
      .select(
        "f.id",
        "f.version",
        "f.unit_id",
        "u.name as unit_name",
        "b.label as bed",
        "f.severity",
        trx.raw("f.details->'rule'->>'label' as rule_label"),
        "f.raised_at",
        "u.remind_after_minutes",
        "u.escalate_after_minutes",
      );
    const counts: ReminderCounts = { waiting: flags.length, reminders: 0, escalations: 0 };
    const members = new Map<string, Recipient[]>();
    const membersOf = async (unitId: string, role: "charge_nurse" | "clinician") => {
      const key = `${unitId}:${role}`;
      if (!members.has(key)) members.set(key, await activeMembers(trx, unitId, role));
      return members.get(key)!;
    };
    const flagIds = new Set<string>();
    for (const f of flags) {
      const minutes = Math.floor((now.getTime() - f.raised_at.getTime()) / 60_000);
      const link = `${base}/units/${f.unit_id}/queue`;
      const steps: [Extract<MailKind, "reminder" | "reminder_escalation">, "charge_nurse" | "clinician"][] = [["reminder", "charge_nurse"]];
      if (minutes >= f.escalate_after_minutes) steps.push(["reminder_escalation", "clinician"]);
      for (const [kind, role] of steps) {
        const { subject, text } = message(kind, f, minutes, link);
        for (const person of await membersOf(f.unit_id, role)) {
          const added = await enqueueMail(trx, { kind, to: person.email, subject, text, dedupeKey: `${kind}:${f.id}:${f.version}:${person.id}`, flagId: f.id });
          if (!added) continue;
          flagIds.add(f.id);
          if (kind === "reminder") counts.reminders += 1;
          else counts.escalations += 1;
        }
      }
    }
    if (counts.reminders + counts.escalations > 0) {
      await recordAudit(
        {
          actor: { userId: null, email: null, role: "scheduler" },
          action: "mail.reminders",
          target: null,
          outcome: "success",
          detail: { reminders: counts.reminders, escalations: counts.escalations, flag_ids: [...flagIds].slice(0, 100), as_of: now.toISOString() },
          requestId: randomUUID(),
          clientAddress: null,
        },
        trx,
      );
      logger.info({ reminders: counts.reminders, escalations: counts.escalations, flags: flagIds.size }, "reminders enqueued");
    }
    return counts;
  });
}
