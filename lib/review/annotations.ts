// Clinical event annotations of a stay (medication, procedure, repositioning, other), read by the Night review and
// the Handoff summary. Writes go through lib/review/annotation-actions.ts.
import type { Knex } from "knex";
import { db as defaultDb } from "@/lib/db/knex";
import type { AnnotationKind } from "@/lib/db/tables";

export interface AnnotationDTO {
  id: string;
  occurredAt: string;
  kind: AnnotationKind;
  note: string;
  /** Who wrote it last (display name), and when. */
  author: string;
  updatedAt: string;
  version: number;
}

/** Annotations of a stay with occurred_at in [from, to), oldest first. */
export async function annotationsOf(stayId: string, from: Date, to: Date, knex: Knex = defaultDb): Promise<AnnotationDTO[]> {
  const rows = await knex("clinical_annotations as a")
    .join("users as u", "u.id", knex.raw("coalesce(a.updated_by, a.created_by)"))
    .where("a.stay_id", stayId)
    .where("a.occurred_at", ">=", from)
    .where("a.occurred_at", "<", to)
    .orderBy("a.occurred_at")
    .select<{ id: string; occurred_at: Date; kind: AnnotationKind; note: string; display_name: string; created_at: Date; updated_at: Date | null; version: number }[]>(
      "a.id", "a.occurred_at", "a.kind", "a.note", "u.name as display_name", "a.created_at", "a.updated_at", "a.version",
    );
  return rows.map((r) => ({
    id: r.id,
    occurredAt: r.occurred_at.toISOString(),
    kind: r.kind,
    note: r.note,
    author: r.display_name,
    updatedAt: (r.updated_at ?? r.created_at).toISOString(),
    version: r.version,
  }));
}
