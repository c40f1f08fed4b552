// A device stream's state as biomedical engineers and the Ward overview see it. Pure: the caller passes `now`.

/** A stream is live while its last beat is at most this old (DOMAIN §5.7 calls data stale after 60 s, cp). */
export const LIVE_WITHIN_MS = 60_000;
/** Past this without a beat a stream counts as offline rather than stale (our choice: long enough to ride out a
 *  reconnect with backoff, short enough to be noticed within one round). */
export const OFFLINE_AFTER_MS = 10 * 60_000;

/**
 * - `live`: a beat arrived within LIVE_WITHIN_MS;
 * - `stale`: the last beat is older than that but not older than OFFLINE_AFTER_MS, or the reader is connected yet
 *   no beat has come;
 * - `offline`: nothing for longer, or never;
 * - `not_streaming`: Corvane does not read this device (no open bed assignment, no token, or not active).
 */
export type StreamState = "live" | "stale" | "offline" | "not_streaming";

export const STREAM_STATE_LABELS: Record<StreamState, string> = {
  live: "Live",
  stale: "Stale",
  offline: "Offline",
  not_streaming: "Not streaming",
};

export function streamStateOf(
  s: { streamed: boolean; connected: boolean; lastBeatAt: Date | null },
  now: Date,
): StreamState {
  if (!s.streamed) return "not_streaming";
  const age = s.lastBeatAt ? now.getTime() - s.lastBeatAt.getTime() : Infinity;
  if (age <= LIVE_WITHIN_MS) return "live";
  if (age <= OFFLINE_AFTER_MS || s.connected) return "stale";
  return "offline";
}
