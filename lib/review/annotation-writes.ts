// Writing clinical event annotations, for a known actor: the service behind the server actions in
// annotation-actions.ts (which add the session, the role check and the unit scope). Each write and its audit entry
// (before/after) commit together; an edit names the version it changes, so of two people editing at once the second
// is told and nothing of theirs overwrites the first.
import "server-only";
import type { Knex } from "knex";
import type { ActionResult } from "@/lib/auth/action-result";
import { auditAs, type Actor } from "@/lib/auth/guard";
import { db as defaultDb } from "@/lib/db/knex";
import type { ClinicalAnnotationRow } from "@/lib/db/tables";
import { annotationInstant, type AnnotationInput, type AnnotationUpdateInput, type StayWindow } from "./annotations.validation";

interface StayOfAnnotation extends StayWindow {
  unitId: string;
}

async function stayWindow(knex: Knex, stayId: string): Promise<StayOfAnnotation | null> {
  const r = await knex("stays as s")
    .join("beds as b", "b.id", "s.bed_id")
    .join("units as u", "u.id", "b.unit_id")
    .where("s.id", stayId)
    .first<{ unit_id: string; time_zone: string; admitted_at: Date; discharged_at: Date | null } | undefined>("b.unit_id", "u.time_zone", "s.admitted_at", "s.discharged_at");
  return r ? { unitId: r.unit_id, timeZone: r.time_zone, admittedAt: r.admitted_at, dischargedAt: r.discharged_at } : null;
}

/** The unit of a stay, for the action guard's unit scope; none for an unknown stay (the action then says not found). */
export async function unitIdsOfStay(stayId: string, knex: Knex = defaultDb): Promise<string[]> {
  const s = await stayWindow(knex, stayId);
  return s ? [s.unitId] : [];
}

/** What an audit entry records of an annotation. */
const snapshot = (r: Pick<ClinicalAnnotationRow, "occurred_at" | "kind" | "note" | "version">) => ({
  occurredAt: r.occurred_at.toISOString(),
  kind: r.kind,
  note: r.note,
  version: r.version,
});

type Placed = { ok: true; stay: StayOfAnnotation; at: Date } | { ok: false; result: ActionResult<never> };

async function place(knex: Knex, input: AnnotationInput, now: Date): Promise<Placed> {
  const stay = await stayWindow(knex, input.stayId);
  if (!stay) return { ok: false, result: { ok: false, code: "not_found", message: "That stay no longer exists." } };
  const when = annotationInstant(input, stay, now);
  if (!when.ok) return { ok: false, result: { ok: false, code: "invalid_input", message: "Check the highlighted fields.", fieldErrors: { [when.field]: [when.message] } } };
  return { ok: true, stay, at: when.at };
}

export async function createAnnotationAs(actor: Actor, input: AnnotationInput, knex: Knex = defaultDb, now = new Date()): Promise<ActionResult<{ id: string }>> {
  const placed = await place(knex, input, now);
  if (!placed.ok) return placed.result;
  const id = await knex.transaction(async (trx) => {
    const [row] = await trx("clinical_annotations")
      .insert({ stay_id: input.stayId, occurred_at: placed.at, kind: input.kind, note: input.note, created_by: actor.userId })
      .returning<ClinicalAnnotationRow[]>("*");
    await auditAs(actor, {
      action: "annotation.create",
      permission: "annotations.write",
      unitId: placed.stay.unitId,
      target: { type: "clinical_annotation", id: row!.id },
      detail: { stayId: input.stayId, before: null, after: snapshot(row!) },
    }, trx);
    return row!.id;
  });
  return { ok: true, message: "Annotation added.", data: { id } };
}

export async function updateAnnotationAs(actor: Actor, input: AnnotationUpdateInput, knex: Knex = defaultDb, now = new Date()): Promise<ActionResult> {
  const placed = await place(knex, input, now);
  if (!placed.ok) return placed.result;
  return knex.transaction(async (trx): Promise<ActionResult> => {
    // The row is locked so the version check and the update see the same version.
    const before = await trx("clinical_annotations").where({ id: input.id, stay_id: input.stayId }).forUpdate().first();
    if (!before) return { ok: false, code: "not_found", message: "That annotation no longer exists on this stay." };
    if (before.version !== input.version) {
      return {
        ok: false,
        code: "conflict",
        message: `Someone else changed this annotation after you opened it (it is now at version ${before.version}). Nothing was saved: reload to see their change, then edit again.`,
      };
    }
    const [after] = await trx("clinical_annotations")
      .where({ id: input.id, version: input.version })
      .update({ occurred_at: placed.at, kind: input.kind, note: input.note, updated_by: actor.userId, updated_at: now, version: input.version + 1 })
      .returning<ClinicalAnnotationRow[]>("*");
    await auditAs(actor, {
      action: "annotation.update",
      permission: "annotations.write",
      unitId: placed.stay.unitId,
      target: { type: "clinical_annotation", id: input.id },
      detail: { stayId: input.stayId, before: snapshot(before), after: snapshot(after!) },
    }, trx);
    return { ok: true, message: "Annotation saved." };
  });
}
