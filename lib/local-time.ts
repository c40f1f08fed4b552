// A local date-time on a unit's wall clock → the instant it names. A local time can be missing (the spring-forward gap)
// or occur twice (the autumn repeat, DOMAIN W5); forms that take one say so to the person and never guess. Pure.
import { formatInTimeZone, fromZonedTime } from "date-fns-tz";

const MINUTE = 60_000;
const MINUTE_FORMAT = "yyyy-MM-dd'T'HH:mm";

type LocalInstant =
  | { kind: "ok"; at: Date }
  /** The local time occurs twice (clocks went back): the two instants, earlier first, with their zone abbreviations. */
  | { kind: "ambiguous"; earlier: Date; later: Date; earlierZone: string; laterZone: string }
  /** The local time does not exist (clocks went forward over it). */
  | { kind: "missing" };

/**
 * The instant(s) a local "YYYY-MM-DDTHH:MM" names in `timeZone`. Candidates are fromZonedTime's answer and the
 * instants 30 and 60 min either side (the DST shifts in use are 30 or 60 min); those whose local time reads the same
 * are the instants meant.
 */
export function localToInstant(local: string, timeZone: string): LocalInstant {
  const minute = local.slice(0, 16);
  const guess = fromZonedTime(minute, timeZone).getTime();
  const same = [-60, -30, 0, 30, 60]
    .map((d) => guess + d * MINUTE)
    .filter((ms) => formatInTimeZone(ms, timeZone, MINUTE_FORMAT) === minute)
    .sort((a, b) => a - b);
  if (same.length === 0) return { kind: "missing" };
  if (same.length === 1) return { kind: "ok", at: new Date(same[0]!) };
  const earlier = new Date(same[0]!);
  const later = new Date(same[same.length - 1]!);
  return { kind: "ambiguous", earlier, later, earlierZone: formatInTimeZone(earlier, timeZone, "zzz"), laterZone: formatInTimeZone(later, timeZone, "zzz") };
}

/**
 * The instant a form's local time names, with the person's choice for a repeated time ("earlier" or "later"); or the
 * field ("time", or "occurrence" for the missing choice) and the message to show beside it.
 */
export function chosenLocalInstant(
  local: string,
  which: "earlier" | "later" | undefined,
  timeZone: string,
): { ok: true; at: Date } | { ok: false; field: "time" | "occurrence"; message: string } {
  const r = localToInstant(local, timeZone);
  if (r.kind === "missing") {
    return { ok: false, field: "time", message: "This local time does not exist: the clocks went forward over it. Enter the time as the clock on the wall showed it." };
  }
  if (r.kind === "ok") return { ok: true, at: r.at };
  if (!which) return { ok: false, field: "occurrence", message: `This time occurred twice (the clocks went back): choose the first (${r.earlierZone}) or the second (${r.laterZone}).` };
  return { ok: true, at: which === "earlier" ? r.earlier : r.later };
}
