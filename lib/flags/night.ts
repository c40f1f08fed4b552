// The "night" a flag counts against for the per-patient cap: from a local time of day in the unit's zone to the same
// local time the next day. Bounds are instants (UTC), so a night across a DST change simply lasts 23 or 25 hours
// (DOMAIN §4, time and clocks).
import { formatInTimeZone, fromZonedTime } from "date-fns-tz";

const HH_MM = /^([01]\d|2[0-3]):([0-5]\d)$/;

/** Calendar date "YYYY-MM-DD" plus `days`. */
function addDays(date: string, days: number): string {
  const [y, m, d] = date.split("-").map(Number) as [number, number, number];
  return new Date(Date.UTC(y, m - 1, d + days)).toISOString().slice(0, 10);
}

/**
 * The night holding `instant`: [local date D at `startsAt`, local date D+1 at `startsAt`) in `timeZone`, where D is
 * the local date of the instant, or the day before when the local time is earlier than `startsAt`. A start time that
 * does not exist on a spring-forward day is moved forward by the gap, as date-fns-tz does for any local time.
 */
export function nightOf(instant: Date, timeZone: string, startsAt: string): { from: Date; to: Date } {
  if (!HH_MM.test(startsAt)) throw new RangeError(`night start must be HH:MM, got "${startsAt}"`);
  if (Number.isNaN(instant.getTime())) throw new RangeError("instant is not a valid date");
  const local = formatInTimeZone(instant, timeZone, "yyyy-MM-dd HH:mm");
  const [date, time] = local.split(" ") as [string, string];
  const day = time < startsAt ? addDays(date, -1) : date;
  return {
    from: fromZonedTime(`${day}T${startsAt}:00`, timeZone),
    to: fromZonedTime(`${addDays(day, 1)}T${startsAt}:00`, timeZone),
  };
}
