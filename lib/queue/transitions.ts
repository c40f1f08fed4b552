// Working the Review queue, for a known actor: acknowledge, escalate and resolve a flag. The server actions in
// actions.ts add the session, the role and the unit scope. Each transition is one transaction: a conditional update
// that names the version the person saw and the states the transition may start from (optimistic concurrency: of two
// nurses acting at once, one wins and the other is told what happened, and nothing of theirs is written), the
// flag_events row, the audit entry, the live push and, for an escalation, the e-mail in the outbox.
// Acknowledging is not silencing: a flag stays in the queue until its condition has ended and someone resolves it
// (DOMAIN §1).
import "server-only";
import { formatInTimeZone } from "date-fns-tz";
import type { Knex } from "knex";
import type { ActionErrorCode } from "@/lib/auth/action-result";
import { auditAs, type Actor } from "@/lib/auth/guard";
import { db as defaultDb } from "@/lib/db/knex";
import type { AckReason, FlagRow, FlagState } from "@/lib/db/tables";
import { publishLive } from "@/lib/live/events";
import { enqueueMail } from "@/lib/mail/outbox";
import { ACK_REASON_LABELS, type AcknowledgeInput, type EscalateInput, type ResolveInput } from "./queue.validation";
import { lastTransitionsOf, type QueueTransitionDTO } from "./repository";

/** The states each transition may start from (GLOSSARY flag vocabulary). */
export const ALLOWED_FROM: Record<"acknowledged" | "escalated" | "resolved", readonly FlagState[]> = {
  acknowledged: ["open"],
  escalated: ["open", "acknowledged"],
  resolved: ["acknowledged", "escalated"],
};

const VERB: Record<FlagState, string> = { open: "opened", acknowledged: "acknowledged", escalated: "escalated", resolved: "resolved" };

/** A flag as it stands now, returned with a refusal so the screen can show it. */
export interface CurrentFlag {
  state: FlagState;
  version: number;
  conditionTo: string | null;
  lastTransition: QueueTransitionDTO | null;
}

export type TransitionResult =
  | { ok: true; message: string; data: { flagId: string; unitId: string; state: FlagState; version: number } }
  | { ok: false; code: ActionErrorCode; message: string; fieldErrors?: Record<string, string[]>; current?: CurrentFlag };

type FlagWithUnit = FlagRow & { time_zone: string; unit_name: string; bed_label: string };

async function flagWithUnit(knex: Knex | Knex.Transaction, flagId: string, lock = false): Promise<FlagWithUnit | undefined> {
  return knex("flags as f")
    .modify((q) => {
      if (lock) q.forUpdate("f");
    })
    .join("units as u", "u.id", "f.unit_id")
    .join("stays as s", "s.id", "f.stay_id")
    .join("beds as b", "b.id", "s.bed_id")
    .where("f.id", flagId)
    .first<FlagWithUnit | undefined>("f.*", "u.time_zone", "u.name as unit_name", "b.label as bed_label");
}

/** The unit a flag belongs to, for the action guard's unit scope; none for an unknown flag (then: not found). */
export async function unitIdsOfFlag(flagId: string, knex: Knex = defaultDb): Promise<string[]> {
  const f = await knex("flags").where({ id: flagId }).first("unit_id");
  return f ? [f.unit_id] : [];
}

const clock = (at: string | Date, timeZone: string) => formatInTimeZone(at, timeZone, "HH:mm zzz");

/** "Sam Okonkwo-Reyes acknowledged this flag at 02:14 EST (reason: known rhythm)". */
export function describeTransition(t: QueueTransitionDTO, timeZone: string): string {
  const who = t.actorName ?? "Corvane (automatically)";
  let s = `${who} ${VERB[t.to]} this flag at ${clock(t.at, timeZone)}`;
  if (t.reason) s += ` (reason: ${ACK_REASON_LABELS[t.reason].toLowerCase()})`;
  if (t.recipientName) s += ` (to ${t.recipientName})`;
  return s;
}

/**
 * Why the conditional update changed nothing, said plainly, with the flag as it stands now. Read inside the same
 * transaction, after the update, so it describes the state that beat this attempt.
 */
async function refusal(trx: Knex.Transaction, flagId: string, seenVersion: number, to: keyof typeof ALLOWED_FROM): Promise<TransitionResult> {
  const f = await flagWithUnit(trx, flagId);
  if (!f) return { ok: false, code: "not_found", message: "That flag no longer exists." };
  const last = (await lastTransitionsOf([flagId], trx)).get(flagId)?.last ?? null;
  const current: CurrentFlag = { state: f.state, version: f.version, conditionTo: f.condition_to?.toISOString() ?? null, lastTransition: last };
  if (f.version !== seenVersion) {
    const what = last ? `${describeTransition(last, f.time_zone)}.` : "Someone changed this flag after you opened it.";
    return { ok: false, code: "conflict", current, message: `${what} Nothing of yours was saved — here is its state now: ${f.state}. Decide again if you still need to.` };
  }
  if (to === "resolved" && f.condition_to === null && ALLOWED_FROM.resolved.includes(f.state)) {
    return {
      ok: false,
      code: "conflict",
      current,
      message: "This flag cannot be resolved yet: its condition still holds. Acknowledging is not silencing — the flag stays in the queue until its condition ends.",
    };
  }
  const allowed = ALLOWED_FROM[to].join(" or ");
  return { ok: false, code: "conflict", current, message: `This flag is ${f.state}; only a flag that is ${allowed} can be ${VERB[to]}. Nothing was saved.` };
}

interface Transition {
  flagId: string;
  version: number;
  to: keyof typeof ALLOWED_FROM;
  reason?: AckReason;
  note?: string;
  recipientId?: string;
}

/** The conditional update: zero rows when the version moved on, the state does not allow it, or (resolve) the
 *  condition still holds. */
async function claim(trx: Knex.Transaction, t: Transition): Promise<FlagRow | undefined> {
  const [row] = await trx("flags")
    .where({ id: t.flagId, version: t.version })
    .whereIn("state", ALLOWED_FROM[t.to])
    .modify((q) => {
      if (t.to === "resolved") q.whereNotNull("condition_to");
    })
    .update({ state: t.to, version: trx.raw("version + 1") as unknown as number })
    .returning("*");
  return row;
}

async function record(trx: Knex.Transaction, actor: Actor, before: FlagWithUnit, after: FlagRow, t: Transition): Promise<void> {
  const [event] = await trx("flag_events")
    .insert({
      flag_id: after.id,
      from_state: before.state,
      to_state: after.state,
      reason: t.reason ?? null,
      note: t.note ?? null,
      recipient_id: t.recipientId ?? null,
      actor_id: actor.userId,
    })
    .returning("id");
  await auditAs(
    actor,
    {
      action: `flag.${t.to === "acknowledged" ? "acknowledge" : t.to === "escalated" ? "escalate" : "resolve"}`,
      permission: "queue.act",
      unitId: after.unit_id,
      target: { type: "flag", id: after.id },
      // The note itself stays in flag_events: free text may name a patient or a relative, so the trail records that
      // a note was written and how long it is, and links to it, rather than copying it into every audit export.
      detail: {
        stayId: after.stay_id,
        flagEventId: event!.id,
        before: { state: before.state, version: before.version },
        after: { state: after.state, version: after.version },
        reason: t.reason ?? null,
        recipientId: t.recipientId ?? null,
        noteLength: t.note?.length ?? 0,
      },
    },
    trx,
  );
  await publishLive(trx, { type: "flags", unitId: after.unit_id, stayId: after.stay_id, raised: 0 });
}

async function transition(actor: Actor, t: Transition, knex: Knex, extra?: (trx: Knex.Transaction, before: FlagWithUnit, after: FlagRow) => Promise<void>): Promise<TransitionResult> {
  return knex.transaction(async (trx): Promise<TransitionResult> => {
    // Locked first, so `before` is exactly the state this transition changes (a concurrent one waits here, then
    // reads the winner's state and its conditional update matches nothing).
    const before = await flagWithUnit(trx, t.flagId, true);
    if (!before) return { ok: false, code: "not_found", message: "That flag no longer exists." };
    const after = await claim(trx, t);
    if (!after) return refusal(trx, t.flagId, t.version, t.to);
    await record(trx, actor, before, after, t);
    await extra?.(trx, before, after);
    return { ok: true, message: `Flag ${VERB[after.state]}.`, data: { flagId: after.id, unitId: after.unit_id, state: after.state, version: after.version } };
  });
}

export function acknowledgeFlagAs(actor: Actor, input: AcknowledgeInput, knex: Knex = defaultDb): Promise<TransitionResult> {
  return transition(actor, { flagId: input.flagId, version: input.version, to: "acknowledged", reason: input.reason, note: input.note }, knex);
}

export function resolveFlagAs(actor: Actor, input: ResolveInput, knex: Knex = defaultDb): Promise<TransitionResult> {
  return transition(actor, { flagId: input.flagId, version: input.version, to: "resolved", note: input.note }, knex);
}

/** The address people reach Corvane at, for links in e-mail (next-auth's NEXTAUTH_URL; .env.example default). */
function baseUrl(): string {
  return (process.env.NEXTAUTH_URL ?? `http://127.0.0.1:${process.env.PORT ?? 3000}`).replace(/\/+$/, "");
}

/**
 * The escalation e-mail: the minimum necessary — bed, unit, rule, severity, when it started and a link to the
 * window. Never the patient's name or record number, and never the nurse's free-text note (it may hold either).
 */
export function escalationMail(f: FlagWithUnit, escalatedBy: string) {
  const label = (f.details as { rule?: { label?: string } }).rule?.label ?? f.rule_id;
  const trigger = (f.details as { trigger_windows?: { start?: string }[] }).trigger_windows?.[0]?.start;
  const start = typeof trigger === "string" ? trigger : f.condition_from.toISOString();
  const started = formatInTimeZone(f.condition_from, f.time_zone, "EEE d MMM yyyy, HH:mm zzz");
  const link = `${baseUrl()}/stays/${f.stay_id}/window?start=${encodeURIComponent(start)}`;
  return {
    subject: `Corvane review flag escalated to you: bed ${f.bed_label}, ${f.unit_name} (${f.severity})`,
    text: [
      `${escalatedBy} escalated a review flag to you.`,
      "",
      `Bed: ${f.bed_label}`,
      `Unit: ${f.unit_name}`,
      `Flag: ${label}`,
      `Severity: ${f.severity}`,
      `Condition started: ${started}`,
      "",
      `Open the flagged window (sign-in required): ${link}`,
      "",
      "Review flags support a review; they are not alarms and never replace bedside monitor alarms or clinical assessment.",
    ].join("\n"),
  };
}

export async function escalateFlagAs(actor: Actor, input: EscalateInput, knex: Knex = defaultDb): Promise<TransitionResult> {
  const flag = await flagWithUnit(knex, input.flagId);
  if (!flag) return { ok: false, code: "not_found", message: "That flag no longer exists." };
  const recipient = await knex("users as u")
    .join("user_unit_roles as g", "g.user_id", "u.id")
    .where({ "u.id": input.recipientId, "u.active": true, "g.unit_id": flag.unit_id, "g.role": "clinician" })
    .first("u.id", "u.email", "u.name");
  if (!recipient) {
    return {
      ok: false,
      code: "invalid_input",
      message: "Check the highlighted fields.",
      fieldErrors: { recipientId: [`Choose an active clinician of ${flag.unit_name}.`] },
    };
  }
  return transition(actor, { flagId: input.flagId, version: input.version, to: "escalated", note: input.note, recipientId: recipient.id }, knex, async (trx, before, after) => {
    const mail = escalationMail(before, actor.name);
    await enqueueMail(trx, { kind: "escalation", to: recipient.email, subject: mail.subject, text: mail.text, dedupeKey: `escalation:${after.id}:${after.version}`, flagId: after.id });
  });
}
