// Pure calendar arithmetic for the quality metrics: a range of local calendar dates in a unit's IANA zone becomes
// instants, day by day, DST-aware (a local day is 23, 24 or 25 h long). No database, no clock: `now` is passed in.
import { formatInTimeZone, fromZonedTime } from "date-fns-tz";

const DAY_MS = 86_400_000;
const DATE_RE = /^(\d{4})-(\d{2})-(\d{2})$/;

/** "YYYY-MM-DD" → days since 1970-01-01 (calendar arithmetic in UTC, where every day has 24 h). */
function dayNumber(date: string): number {
  const m = DATE_RE.exec(date);
  if (!m) throw new RangeError(`not a calendar date: ${date}`);
  const t = Date.UTC(Number(m[1]), Number(m[2]) - 1, Number(m[3]));
  if (new Date(t).toISOString().slice(0, 10) !== date) throw new RangeError(`not a calendar date: ${date}`);
  return t / DAY_MS;
}

const dateOf = (n: number) => new Date(n * DAY_MS).toISOString().slice(0, 10);

/** The calendar date `n` days after `date` (n may be negative). */
export function addDays(date: string, n: number): string {
  return dateOf(dayNumber(date) + n);
}

/** Calendar days from `from` to `to`, both included (0 when `to` is before `from`). */
export function daysBetweenInclusive(from: string, to: string): number {
  return Math.max(0, dayNumber(to) - dayNumber(from) + 1);
}

/** One local calendar day of a unit: [00:00, next 00:00) in its zone, as UTC instants. */
export interface LocalDay {
  date: string;
  from: Date;
  to: Date;
}

/** 00:00 local of `date` in `timeZone` (date-fns-tz resolves the zone's offset on that date). */
export function localMidnight(date: string, timeZone: string): Date {
  dayNumber(date);
  const t = fromZonedTime(`${date}T00:00:00`, timeZone);
  if (Number.isNaN(t.getTime())) throw new RangeError(`unknown time zone: ${timeZone}`);
  return t;
}

/**
 * Every local day from `from` to `to` (inclusive) in `timeZone`: each from its 00:00 to the next day's 00:00, so the
 * day of a spring-forward change is 23 h and of a fall-back change 25 h long (America/New_York 2026-03-08 and
 * 2026-11-01, for instance).
 */
export function localDays(from: string, to: string, timeZone: string): LocalDay[] {
  const n = daysBetweenInclusive(from, to);
  const out: LocalDay[] = [];
  let start = localMidnight(from, timeZone);
  for (let i = 0; i < n; i++) {
    const date = addDays(from, i);
    const end = localMidnight(addDays(date, 1), timeZone);
    out.push({ date, from: start, to: end });
    start = end;
  }
  return out;
}

/** The default range: the last 7 complete local days before `now`'s local date (today is never complete). */
export function lastCompleteDays(now: Date, timeZone: string, days = 7): { from: string; to: string } {
  const today = formatInTimeZone(now, timeZone, "yyyy-MM-dd");
  return { from: addDays(today, -days), to: addDays(today, -1) };
}

/** n / d, or null when there is nothing to divide by (a share of nothing is not 0 %). */
export function ratio(n: number, d: number): number | null {
  return d > 0 ? n / d : null;
}
