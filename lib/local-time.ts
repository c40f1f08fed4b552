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

const LOCAL_DATE_TIME = /^(\d{4})-(\d{2})-(\d{2})T(\d{2}):(\d{2})(?::(\d{2}))?$/;
const DAY_MS = 86_400_000;

/**
 * The wall-clock reading of an instant in a zone, as milliseconds of a UTC date with the same fields. (Through
 * formatInTimeZone: date-fns-tz 3.2's getTimezoneOffset gives the later offset for the hours before a change.)
 */
function wallClock(instant: number, zone: string): number {
  return Date.parse(`${formatInTimeZone(instant, zone, "yyyy-MM-dd'T'HH:mm:ss.SSS")}Z`);
}

/**
 * One end of a range of local times ("YYYY-MM-DDTHH:MM[:SS]" on a zone's clock) → the instant, the widest reading
 * that never guesses: a time repeated when the clocks go back is its first occurrence where the range starts and
 * its second where it ends (so a range over the repeated hour takes in both passes); a time the clocks skipped is
 * the moment of the change (nothing happened in the skipped hour). Null for an impossible date (30 February). The
 * audit trail's search, its exports and its chain check all read their ranges this way.
 */
export function localRangeBound(local: string, zone: string, end: "start" | "end"): Date | null {
  const m = LOCAL_DATE_TIME.exec(local);
  if (!m) return null;
  const [y, mo, d, h, mi, s] = m.slice(1).map((x) => Number(x ?? 0)) as [number, number, number, number, number, number];
  const wall = Date.UTC(y, mo - 1, d, h, mi, s);
  const check = new Date(wall);
  if (check.getUTCFullYear() !== y || check.getUTCMonth() !== mo - 1 || check.getUTCDate() !== d || h > 23 || mi > 59 || s > 59) return null;
  // A zone changes its offset at most once within a day either side (true of every IANA zone since 1970).
  const offsets = [...new Set([-DAY_MS, 0, DAY_MS].map((k) => wallClock(wall + k, zone) - (wall + k)))];
  const exact = offsets.map((o) => wall - o).filter((t) => wallClock(t, zone) === wall);
  if (exact.length) return new Date(end === "start" ? Math.min(...exact) : Math.max(...exact));
  // In a gap: search the instants between the two readings for the first whose clock has passed `wall`.
  let lo = Math.min(...offsets.map((o) => wall - o));
  let hi = Math.max(...offsets.map((o) => wall - o));
  while (hi - lo > 1) {
    const mid = Math.floor((lo + hi) / 2);
    if (wallClock(mid, zone) >= wall) hi = mid;
    else lo = mid;
  }
  return new Date(hi);
}
