// A device stream's state as biomedical engineers and the Ward overview see it. Pure: the caller passes `now`.

/** A stream is live while its last beat is at most this old (DOMAIN §5.7 calls data stale after 60 s, cp). A device
 *  counts as heard, for leads off, while its last record of any kind is at most this old. */
export const LIVE_WITHIN_MS = 60_000;
/** Past this without a record a stream counts as offline rather than stale (our choice: long enough to ride out a
 *  reconnect with backoff, short enough to be noticed within one round). */
export const OFFLINE_AFTER_MS = 10 * 60_000;

/**
 * - `live`: a beat arrived within LIVE_WITHIN_MS;
 * - `leads_off`: no beat within LIVE_WITHIN_MS, but the device is heard (its reader is connected or a record of any
 *   kind arrived within LIVE_WITHIN_MS) and its latest record says lead-off: a healthy monitor with no patient signal;
 * - `stale`: no beat within LIVE_WITHIN_MS, but a record within OFFLINE_AFTER_MS or the reader is connected;
 * - `offline`: nothing for longer and not connected, or never anything;
 * - `not_streaming`: Corvane does not read this device (no open bed assignment, no token, or not active).
 */
export type StreamState = "live" | "leads_off" | "stale" | "offline" | "not_streaming";

export const STREAM_STATE_LABELS: Record<StreamState, string> = {
  live: "Live",
  leads_off: "Leads off",
  stale: "Stale",
  offline: "Offline",
  not_streaming: "Not streaming",
};

interface StreamStateInput {
  /** Whether Corvane reads the device now. */
  streamed: boolean;
  /** Whether the ingest's reader holds a connection to the device (device_stream_status.connected). */
  connected: boolean;
  /** The last beat, on the server's clock (device_stream_status.last_beat_at). */
  lastBeatAt: Date | null;
  /** The last record of any kind (beat or status), as received (device_stream_status.last_seen_at). */
  lastSeenAt: Date | null;
  /** The latest lead-off state the device reported, by status record or beat (device_stream_status.lead_off). */
  leadOff: boolean;
}

export function streamStateOf(s: StreamStateInput, now: Date): StreamState {
  if (!s.streamed) return "not_streaming";
  const ageOf = (t: Date | null) => (t ? now.getTime() - t.getTime() : Infinity);
  const beatAge = ageOf(s.lastBeatAt);
  if (beatAge <= LIVE_WITHIN_MS) return "live";
  // Silence is measured from the last record of any kind; a beat counts as one even where last_seen_at is missing.
  const silence = Math.min(beatAge, ageOf(s.lastSeenAt));
  if (s.leadOff && (s.connected || silence <= LIVE_WITHIN_MS)) return "leads_off";
  if (silence <= OFFLINE_AFTER_MS || s.connected) return "stale";
  return "offline";
}
