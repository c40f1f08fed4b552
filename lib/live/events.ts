// Live events pushed to browsers: what changed, where — never patient data (ids and counts only; the browser
// fetches details through guarded routes). Published with PostgreSQL NOTIFY, so every server process hears them.
import type { Knex } from "knex";
import { z } from "zod";

export const LIVE_CHANNEL = "corvane_live";

export const liveEventSchema = z.discriminatedUnion("type", [
  z.object({ type: z.literal("windows"), unitId: z.uuid(), stayId: z.uuid(), count: z.number().int().min(0), until: z.string() }),
  z.object({ type: z.literal("flags"), unitId: z.uuid(), stayId: z.uuid(), raised: z.number().int().min(0) }),
  z.object({ type: z.literal("stream"), unitId: z.uuid(), deviceId: z.uuid(), connected: z.boolean(), lastBeatAt: z.string().nullable() }),
]);
export type LiveEvent = z.infer<typeof liveEventSchema>;

/** Publishes one event to every listening server process (inside `trx`, it is sent on commit). */
export async function publishLive(knex: Knex | Knex.Transaction, event: LiveEvent): Promise<void> {
  await knex.raw("SELECT pg_notify(?, ?)", [LIVE_CHANNEL, JSON.stringify(liveEventSchema.parse(event))]);
}
