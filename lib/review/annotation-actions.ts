"use server";
// Clinical event annotations on the Night review: add and edit. The guard checks the session, the role and the
// stay's unit; the writing itself (time check, optimistic concurrency, audit with before/after) is in
// annotation-writes.ts.
import { revalidatePath } from "next/cache";
import { guardedAction } from "@/lib/auth/guard";
import { createAnnotationAs, unitIdsOfStay, updateAnnotationAs } from "./annotation-writes";
import { annotationSchema, annotationUpdateSchema } from "./annotations.validation";

const nightPage = (stayId: string) => `/stays/${stayId}/night`;

export const createAnnotation = guardedAction(
  "createAnnotation",
  annotationSchema,
  async (input, actor) => {
    const result = await createAnnotationAs(actor, input);
    if (!result.ok) return result;
    revalidatePath(nightPage(input.stayId));
    return { ok: true, message: result.message };
  },
  { unitIdsOf: (input) => unitIdsOfStay(input.stayId) },
);

export const updateAnnotation = guardedAction(
  "updateAnnotation",
  annotationUpdateSchema,
  async (input, actor) => {
    const result = await updateAnnotationAs(actor, input);
    if (result.ok) revalidatePath(nightPage(input.stayId));
    return result;
  },
  { unitIdsOf: (input) => unitIdsOfStay(input.stayId) },
);
