"use server";
// The Review queue's server actions: acknowledge, escalate, resolve. The guard checks the session, the role
// (queue.act: charge nurses) and the flag's unit; the transitions themselves are in transitions.ts.
import { revalidatePath } from "next/cache";
import { guardedAction } from "@/lib/auth/guard";
import { acknowledgeSchema, escalateSchema, resolveSchema } from "./queue.validation";
import { acknowledgeFlagAs, escalateFlagAs, resolveFlagAs, unitIdsOfFlag, type TransitionResult } from "./transitions";

const queuePage = (unitId: string) => `/units/${unitId}/queue`;

function done(result: TransitionResult): TransitionResult {
  if (result.ok) revalidatePath(queuePage(result.data.unitId));
  return result;
}

export const acknowledgeFlag = guardedAction(
  "acknowledgeFlag",
  acknowledgeSchema,
  async (input, actor) => done(await acknowledgeFlagAs(actor, input)),
  { unitIdsOf: (input) => unitIdsOfFlag(input.flagId) },
);

export const escalateFlag = guardedAction(
  "escalateFlag",
  escalateSchema,
  async (input, actor) => done(await escalateFlagAs(actor, input)),
  { unitIdsOf: (input) => unitIdsOfFlag(input.flagId) },
);

export const resolveFlag = guardedAction(
  "resolveFlag",
  resolveSchema,
  async (input, actor) => done(await resolveFlagAs(actor, input)),
  { unitIdsOf: (input) => unitIdsOfFlag(input.flagId) },
);
