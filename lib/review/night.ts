// A unit's review night: from its local start time on the evening's date to its local end time on the next date, in
// the unit's IANA zone. Bounds are instants, so a night across a DST change is an hour shorter or longer (DOMAIN W5:
// 22:00 → 06:00 in America/New_York lasts 7 h on 2026-03-07 and 9 h on 2026-10-31). A night is named by the local
// date of its evening ("2026-11-30" = the night of 30 November into 1 December).
import { formatInTimeZone, fromZonedTime } from "date-fns-tz";
import { z } from "zod";

export interface NightTimes {
  timeZone: string;
  /** Local "HH:MM". */
  startsAt: string;
  endsAt: string;
}

export interface ReviewNight {
  /** Local date of the evening, "YYYY-MM-DD". */
  night: string;
  from: Date;
  to: Date;
  /** Real length, h (7, 8 or 9 for 22:00 → 06:00). */
  hours: number;
}

const DATE = /^\d{4}-\d{2}-\d{2}$/;

/** One schema for the `night` query parameter of every review route and page. */
export const nightParamSchema = z
  .string()
  .regex(DATE, "night must be a date YYYY-MM-DD")
  .refine((d) => !Number.isNaN(Date.parse(`${d}T00:00:00Z`)) && new Date(`${d}T00:00:00Z`).toISOString().startsWith(d), "not a calendar date");

/** Calendar date "YYYY-MM-DD" plus `days`. */
export function addDays(date: string, days: number): string {
  const [y, m, d] = date.split("-").map(Number) as [number, number, number];
  return new Date(Date.UTC(y, m - 1, d + days)).toISOString().slice(0, 10);
}

/** Whether the night ends on the next calendar date (start later than end, as for 22:00 → 06:00). */
const crossesMidnight = (t: NightTimes) => t.startsAt >= t.endsAt;

/** The review night named by the local date of its evening. */
export function reviewNight(night: string, t: NightTimes): ReviewNight {
  if (!DATE.test(night)) throw new RangeError(`night must be YYYY-MM-DD, got "${night}"`);
  const from = fromZonedTime(`${night}T${t.startsAt}:00`, t.timeZone);
  const to = fromZonedTime(`${crossesMidnight(t) ? addDays(night, 1) : night}T${t.endsAt}:00`, t.timeZone);
  return { night, from, to, hours: (to.getTime() - from.getTime()) / 3_600_000 };
}

/** The latest night that has started by `now`: last night in the morning, tonight once the evening start has passed. */
export function latestNight(now: Date, t: NightTimes): ReviewNight {
  const today = formatInTimeZone(now, t.timeZone, "yyyy-MM-dd");
  const tonight = reviewNight(today, t);
  return tonight.from.getTime() <= now.getTime() ? tonight : reviewNight(addDays(today, -1), t);
}

/** The latest night that has ended by `now` (the morning review's night, even while tonight is in progress). */
export function lastCompletedNight(now: Date, t: NightTimes): ReviewNight {
  const latest = latestNight(now, t);
  return latest.to.getTime() <= now.getTime() ? latest : reviewNight(addDays(latest.night, -1), t);
}

/** The nights a stay can be reviewed for, newest first: from the night holding admission to the latest started. */
export function nightsOfStay(admittedAt: Date, until: Date, t: NightTimes, max = 14): ReviewNight[] {
  const out: ReviewNight[] = [];
  let n = latestNight(until, t);
  while (out.length < max && n.to.getTime() > admittedAt.getTime()) {
    out.push(n);
    n = reviewNight(addDays(n.night, -1), t);
  }
  return out;
}
