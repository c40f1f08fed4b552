// The stream a bedside device (or the simulator) serves over Server-Sent Events, one record per event:
//   id: <seq>            the device's own sequence number, strictly increasing, shared by every record kind
//   event: beat|status
//   data: <JSON, below>
// Beats carry the interval ending at tDevice (device clock, epoch ms). Status records report lead-off or noise
// with no beat. A reader resumes with Last-Event-ID and must store each (device, seq) exactly once.
import { z } from "zod";

/** Largest data line accepted, bytes: a beat record is about 150 bytes; anything far larger is hostile. */
export const MAX_EVENT_BYTES = 2048;

export const BEAT_TYPES = ["N", "V", "S", "P", "?"] as const;
export type BeatType = (typeof BEAT_TYPES)[number];

const seq = z.number().int().min(0).max(Number.MAX_SAFE_INTEGER);
// Device time: from 2000-01-01 to 2100-01-01, epoch ms — anything else is a broken clock or a unit error.
const tDevice = z.number().finite().min(946_684_800_000).max(4_102_444_800_000);

export const beatRecordSchema = z
  .object({
    kind: z.literal("beat"),
    seq,
    tDevice,
    /** RR interval ending at tDevice, ms. Values outside any physiology are refused here; plausible-but-wrong
     *  values are the cleaning's job. */
    rr: z.number().finite().gt(0).max(10_000),
    type: z.enum(BEAT_TYPES),
    /** Device-reported signal quality, 0–1. */
    quality: z.number().finite().min(0).max(1),
    leadOff: z.boolean(),
  })
  .strict();

export const statusRecordSchema = z
  .object({
    kind: z.literal("status"),
    seq,
    tDevice,
    leadOff: z.boolean(),
    /** Rhythm label from the device's own detector, when it has one. */
    rhythm: z.enum(["sinus", "af", "paced", "unknown"]).optional(),
  })
  .strict();

export const streamRecordSchema = z.discriminatedUnion("kind", [beatRecordSchema, statusRecordSchema]);
export type BeatRecord = z.infer<typeof beatRecordSchema>;
export type StatusRecord = z.infer<typeof statusRecordSchema>;
export type StreamRecord = z.infer<typeof streamRecordSchema>;

export type MalformedKind = "oversized" | "bad_json" | "invalid_fields" | "id_mismatch" | "missing_id";

/** Parses one SSE event; never throws. `lastEventId` is the event's `id:` field. */
export function parseStreamEvent(
  data: string,
  lastEventId: string | undefined,
): { ok: true; record: StreamRecord } | { ok: false; kind: MalformedKind; detail: string } {
  if (data.length > MAX_EVENT_BYTES) return { ok: false, kind: "oversized", detail: `${data.length} bytes` };
  if (!lastEventId) return { ok: false, kind: "missing_id", detail: "event without id" };
  let json: unknown;
  try {
    json = JSON.parse(data);
  } catch {
    return { ok: false, kind: "bad_json", detail: "data is not JSON" };
  }
  const parsed = streamRecordSchema.safeParse(json);
  if (!parsed.success) {
    return { ok: false, kind: "invalid_fields", detail: parsed.error.issues.map((i) => `${i.path.join(".") || "record"}: ${i.message}`).join("; ").slice(0, 300) };
  }
  if (String(parsed.data.seq) !== lastEventId) return { ok: false, kind: "id_mismatch", detail: `id ${lastEventId.slice(0, 30)} ≠ seq ${parsed.data.seq}` };
  return { ok: true, record: parsed.data };
}

/** How the simulator formats a record (and what a conforming device sends). */
export function formatStreamEvent(record: StreamRecord): string {
  return `id: ${record.seq}\nevent: ${record.kind}\ndata: ${JSON.stringify(record)}\n\n`;
}
