// Reading the audit trail for people who may (quality officers, administrators): the entries of the units where they
// hold audit.view, and the entries with no unit (sign-ins, system jobs). Search is keyset-paginated on seq, newest
// first, and every filter is served by an index (migrations/20261201000200_audit_events.ts and
// 20261202000600_audit_search_indexes.ts): no OFFSET, and no count over the whole trail per page.
import "server-only";
import type { Knex } from "knex";
import { db as defaultDb } from "@/lib/db/knex";
import type { AuditEventRow, AuditOutcome } from "@/lib/db/tables";
import { localRangeBound } from "@/lib/local-time";
import { isUuid, type AuditFilter } from "./audit.validation";
import { chainHash, type ChainedFields } from "./chain";

export interface AuditScope {
  /** Units where the reader holds audit.view; entries with no unit are always in scope. */
  unitIds: string[];
}

export interface AuditEventDTO {
  seq: string;
  occurredAt: string;
  actorEmail: string | null;
  actorRole: string | null;
  action: string;
  targetType: string | null;
  targetId: string | null;
  unitId: string | null;
  outcome: AuditOutcome;
  clientAddress: string | null;
}

export interface AuditSearchPage {
  events: AuditEventDTO[];
  /** Cursor for the next page of older entries (`before`), null on the oldest page. */
  older: string | null;
  /** Cursor for the next page of newer entries (`after`), null on the newest page. */
  newer: string | null;
}

/** A filter turned into SQL: the patient, stay and device it names are looked up once. */
export type ResolvedAuditFilter =
  | { ok: true; from: Date | null; to: Date | null; apply: (qb: Knex.QueryBuilder) => void }
  | { ok: false; field: "patient" | "device"; message: string };

const LIST_COLUMNS = [
  "seq", "occurred_at", "actor_email", "actor_role", "action", "target_type", "target_id", "unit_id", "outcome", "client_address",
] as const;

type ListRow = Pick<AuditEventRow, (typeof LIST_COLUMNS)[number]>;

const toDTO = (r: ListRow): AuditEventDTO => ({
  seq: String(r.seq),
  occurredAt: r.occurred_at.toISOString(),
  actorEmail: r.actor_email,
  actorRole: r.actor_role,
  action: r.action,
  targetType: r.target_type,
  targetId: r.target_id,
  unitId: r.unit_id,
  outcome: r.outcome,
  clientAddress: r.client_address,
});

/** Entries of the reader's units and unit-less entries. */
export function inScope(qb: Knex.QueryBuilder, scope: AuditScope): void {
  qb.where((w) => {
    w.whereNull("unit_id");
    if (scope.unitIds.length) w.orWhereIn("unit_id", scope.unitIds);
  });
}

/** LIKE treats % and _ as wildcards and \ as escape; action codes contain _ (auth.sign_in). */
const likePrefix = (prefix: string) => `${prefix.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;

/**
 * Where audit writes name a stay: as the target (night, window, beats, handoff views and notes), as `stayId` in the
 * detail (flag transitions, annotations), or in a list (`stayIds` of ward overview reads, `stays` of handoff reads).
 */
function namesStays(w: Knex.QueryBuilder, stayIds: string[], patientIds: string[]): void {
  w.where((t) => t.where("target_type", "stay").whereIn("target_id", stayIds));
  if (patientIds.length) w.orWhere((t) => t.where("target_type", "patient").whereIn("target_id", patientIds));
  for (const id of stayIds) {
    for (const doc of [{ stayId: id }, { stayIds: [id] }, { stays: [id] }]) w.orWhereRaw("detail @> ?::jsonb", [JSON.stringify(doc)]);
  }
}

/** Looks up what the filter names and returns the conditions; an unknown patient, stay or device is an error. */
export async function resolveAuditFilter(filter: AuditFilter, knex: Knex = defaultDb): Promise<ResolvedAuditFilter> {
  const from = filter.from ? localRangeBound(filter.from, filter.zone, "start") : null;
  const to = filter.to ? localRangeBound(filter.to, filter.zone, "end") : null;

  let stays: { stayIds: string[]; patientIds: string[] } | null = null;
  if (filter.patient) {
    const p = filter.patient;
    const asStay = isUuid(p) ? await knex("stays").where({ id: p }).select("id", "patient_id") : [];
    const rows = asStay.length
      ? asStay
      : await knex("stays")
          .join("patients", "patients.id", "stays.patient_id")
          .where((w) => {
            w.where("patients.record_number", p);
            if (isUuid(p)) w.orWhere("patients.id", p);
          })
          .select("stays.id", "stays.patient_id");
    if (!rows.length) return { ok: false, field: "patient", message: `No patient has record number ${p}, and no stay has that id.` };
    stays = { stayIds: rows.map((r) => r.id), patientIds: asStay.length ? [] : [...new Set(rows.map((r) => r.patient_id))] };
  }

  let deviceIds: string[] | null = null;
  if (filter.device) {
    const d = filter.device;
    const rows = await knex("devices")
      .where((w) => {
        w.where("serial", d);
        if (isUuid(d)) w.orWhere("id", d);
      })
      .select("id");
    if (!rows.length) return { ok: false, field: "device", message: `No device has serial number or id ${d}.` };
    deviceIds = rows.map((r) => r.id);
  }

  const apply = (qb: Knex.QueryBuilder) => {
    if (from) qb.where("occurred_at", ">=", from);
    if (to) qb.where("occurred_at", "<", to);
    if (filter.person) {
      if (isUuid(filter.person)) qb.where("actor_user_id", filter.person);
      else qb.whereRaw("lower(actor_email) = ?", [filter.person]);
    }
    if (filter.role) qb.where("actor_role", filter.role);
    if (filter.action) qb.whereRaw("action LIKE ?", [likePrefix(filter.action)]);
    if (filter.outcome) qb.where("outcome", filter.outcome);
    if (stays) qb.where((w) => namesStays(w, stays.stayIds, stays.patientIds));
    if (deviceIds) {
      const ids = deviceIds;
      qb.where((w) => {
        w.where((t) => t.where("target_type", "device").whereIn("target_id", ids));
        for (const id of ids) w.orWhereRaw("detail @> ?::jsonb", [JSON.stringify({ deviceId: id })]);
      });
    }
  };
  return { ok: true, from, to, apply };
}

/**
 * One page of the filtered trail, newest first. `before` gives the entries older than that seq, `after` those newer
 * (read oldest first from the cursor, then turned round), so a page never repeats or skips an entry while new ones
 * are appended: the cursor is a position in the trail, not a row count.
 */
export async function searchAuditEvents(
  resolved: Extract<ResolvedAuditFilter, { ok: true }>,
  scope: AuditScope,
  page: { before?: string; after?: string; size: number },
  knex: Knex = defaultDb,
): Promise<AuditSearchPage> {
  const base = () => knex("audit_events").modify(inScope, scope).modify(resolved.apply);
  if (page.after) {
    const rows: ListRow[] = await base().where("seq", ">", page.after).orderBy("seq", "asc").limit(page.size + 1).select(...LIST_COLUMNS);
    const more = rows.length > page.size;
    const shown = rows.slice(0, page.size).reverse();
    // Fewer than a page of newer entries: show the newest page instead of a short one.
    if (!more && shown.length < page.size) return searchAuditEvents(resolved, scope, { size: page.size }, knex);
    return {
      events: shown.map(toDTO),
      newer: more ? String(shown[0]!.seq) : null,
      older: shown.length ? String(shown.at(-1)!.seq) : null,
    };
  }
  const q = base().orderBy("seq", "desc").limit(page.size + 1);
  if (page.before) q.where("seq", "<", page.before);
  const rows: ListRow[] = await q.select(...LIST_COLUMNS);
  const shown = rows.slice(0, page.size);
  return {
    events: shown.map(toDTO),
    older: rows.length > page.size ? String(shown.at(-1)!.seq) : null,
    // The cursor entry itself matched, so there is something newer whenever a cursor was given.
    newer: page.before && shown.length ? String(shown[0]!.seq) : page.before ? String(BigInt(page.before) - 1n) : null,
  };
}

/** The action codes in the trail, for the filter's list: a loose index scan (one probe per distinct action). */
export async function knownActions(knex: Knex = defaultDb): Promise<string[]> {
  const res = await knex.raw<{ rows: { action: string }[] }>(`
    WITH RECURSIVE a(action) AS (
      (SELECT action FROM audit_events ORDER BY action LIMIT 1)
      UNION ALL
      SELECT (SELECT e.action FROM audit_events e WHERE e.action > a.action ORDER BY e.action LIMIT 1) FROM a WHERE a.action IS NOT NULL
    )
    SELECT action FROM a WHERE action IS NOT NULL`);
  return res.rows.map((r) => r.action);
}

export interface AuditChange {
  field: string;
  before: string;
  after: string;
  changed: boolean;
}

export interface AuditEventDetailDTO extends AuditEventDTO {
  actorUserId: string | null;
  actorName: string | null;
  requestId: string | null;
  detail: Record<string, unknown>;
  prevHash: string;
  hash: string;
  /** The entry's hash recomputed from its contents and its prev_hash equals the stored one. */
  hashMatches: boolean;
  /** Field by field, when the detail holds `before` and `after` values (either may be null: created, removed). */
  changes: AuditChange[] | null;
}

const shown = (v: unknown) => (v === undefined ? "—" : typeof v === "string" ? v : JSON.stringify(v));

/** `before` / `after` objects of a detail, side by side over the union of their fields. */
function changesOf(detail: Record<string, unknown>): AuditChange[] | null {
  if (!("before" in detail) || !("after" in detail) || (detail.before === null && detail.after === null)) return null;
  const asObject = (v: unknown): Record<string, unknown> | null =>
    v === null ? {} : typeof v === "object" && !Array.isArray(v) ? (v as Record<string, unknown>) : null;
  const before = asObject(detail.before);
  const after = asObject(detail.after);
  if (!before || !after) {
    return [{ field: "value", before: shown(detail.before), after: shown(detail.after), changed: shown(detail.before) !== shown(detail.after) }];
  }
  const fields = [...new Set([...Object.keys(before), ...Object.keys(after)])];
  return fields.map((field) => {
    const b = field in before ? shown(before[field]) : "—";
    const a = field in after ? shown(after[field]) : "—";
    return { field, before: b, after: a, changed: b !== a };
  });
}

/** The fields of a row that its hash covers (lib/audit/chain.ts), as the writer hashed them. */
export function chainedFieldsOf(r: AuditEventRow): ChainedFields {
  return {
    seq: String(r.seq),
    occurred_at: r.occurred_at.toISOString(),
    actor_user_id: r.actor_user_id,
    actor_email: r.actor_email,
    actor_role: r.actor_role,
    action: r.action,
    target_type: r.target_type,
    target_id: r.target_id,
    unit_id: r.unit_id,
    outcome: r.outcome,
    detail: r.detail,
    request_id: r.request_id,
    client_address: r.client_address,
  };
}

/** One entry with every field, or null when there is none or it lies outside the reader's units. */
export async function auditEventDetail(seq: string, scope: AuditScope, knex: Knex = defaultDb): Promise<AuditEventDetailDTO | null> {
  const row = await knex("audit_events as e")
    .leftJoin("users as u", "u.id", "e.actor_user_id")
    .where("e.seq", seq)
    .where((w) => {
      w.whereNull("e.unit_id");
      if (scope.unitIds.length) w.orWhereIn("e.unit_id", scope.unitIds);
    })
    .first<(AuditEventRow & { actor_name: string | null }) | undefined>("e.*", "u.name as actor_name");
  if (!row) return null;
  return {
    ...toDTO(row),
    actorUserId: row.actor_user_id,
    actorName: row.actor_name,
    requestId: row.request_id,
    detail: row.detail,
    prevHash: row.prev_hash,
    hash: row.hash,
    hashMatches: chainHash(row.prev_hash, chainedFieldsOf(row)) === row.hash,
    changes: changesOf(row.detail),
  };
}

/** The newest seq now: an export's upper bound, taken before the export writes its own audit entry. */
export async function newestSeq(knex: Knex = defaultDb): Promise<string | null> {
  const r = await knex("audit_events").max<{ max: string | null }>("seq as max").first();
  return r?.max ?? null;
}

/** How many entries match, up to a seq (once per export, for its progress bar; never per page). */
export async function countAuditEvents(
  resolved: Extract<ResolvedAuditFilter, { ok: true }>,
  scope: AuditScope,
  upToSeq: string,
  knex: Knex = defaultDb,
): Promise<number> {
  const r = await knex("audit_events")
    .modify(inScope, scope)
    .modify(resolved.apply)
    .where("seq", "<=", upToSeq)
    .count<{ n: string }>({ n: "*" })
    .first();
  return Number(r?.n ?? 0);
}

/** The next batch of whole rows after a seq, oldest first (an export's keyset read). */
export async function auditRowsAfter(
  resolved: Extract<ResolvedAuditFilter, { ok: true }>,
  scope: AuditScope,
  range: { afterSeq: string; upToSeq: string },
  limit: number,
  knex: Knex = defaultDb,
): Promise<AuditEventRow[]> {
  return knex("audit_events")
    .modify(inScope, scope)
    .modify(resolved.apply)
    .where("seq", ">", range.afterSeq)
    .where("seq", "<=", range.upToSeq)
    .orderBy("seq", "asc")
    .limit(limit)
    .select("*");
}
