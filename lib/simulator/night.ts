// The simulator's calendar. Each device generates its beats one "night block" at a time: from 19:00 local time of
// one evening to 19:00 of the next, in the unit's IANA zone, so a block lasts 23, 24 or 25 h across DST changes
// (DOMAIN §4: nights are defined by instants, the zone only names them). Every block begins LEAD_IN_MS before the
// 19:00 anchor, so a window that starts at 19:00 already has beats before it.
import { formatInTimeZone, fromZonedTime } from "date-fns-tz";
import { lastCompletedNight, type NightTimes as UnitNightTimes } from "@/lib/review/night";

/** A unit's review night, local "HH:MM" start and end (units.night_starts_at / night_ends_at). */
export type NightTimes = Omit<UnitNightTimes, "timeZone">;

const NIGHT_START_LOCAL = "19:00:00";
/** Blocks begin this long before 19:00 local: the first beat of an evening comes before 19:00. */
export const LEAD_IN_MS = 60_000;
const DAY_MS = 86_400_000;

export interface NightBlock {
  /** Local calendar date of the evening the block starts, "yyyy-MM-dd". */
  evening: string;
  /** Days since 1970-01-01 of that date: a stable number for seeding the block. */
  dayNumber: number;
  /** True time, epoch ms: [startMs, endMs). */
  startMs: number;
  endMs: number;
}

function assertZone(timeZone: string): void {
  try {
    new Intl.DateTimeFormat("en-US", { timeZone });
  } catch {
    throw new RangeError(`unknown IANA time zone "${timeZone}"`);
  }
}

function parseDate(evening: string): number {
  const m = /^(\d{4})-(\d{2})-(\d{2})$/.exec(evening);
  if (!m) throw new RangeError(`not a calendar date (yyyy-MM-dd): "${evening}"`);
  return Date.UTC(Number(m[1]), Number(m[2]) - 1, Number(m[3])) / DAY_MS;
}

function dateOfDayNumber(day: number): string {
  return new Date(day * DAY_MS).toISOString().slice(0, 10);
}

/** 19:00 local on `evening` in `timeZone`, epoch ms (date-fns-tz resolves the zone's offset on that date). */
export function eveningAnchor(evening: string, timeZone: string): number {
  assertZone(timeZone);
  parseDate(evening);
  return fromZonedTime(`${evening}T${NIGHT_START_LOCAL}`, timeZone).getTime();
}

/** The block that starts on the evening of `evening`. */
export function nightBlock(evening: string, timeZone: string): NightBlock {
  const day = parseDate(evening);
  return {
    evening,
    dayNumber: day,
    startMs: eveningAnchor(evening, timeZone) - LEAD_IN_MS,
    endMs: eveningAnchor(dateOfDayNumber(day + 1), timeZone) - LEAD_IN_MS,
  };
}

/** The block that follows `block`. */
export function nextNightBlock(block: NightBlock, timeZone: string): NightBlock {
  return nightBlock(dateOfDayNumber(block.dayNumber + 1), timeZone);
}

/** The block holding the instant `t` (epoch ms). */
export function nightBlockAt(t: number, timeZone: string): NightBlock {
  if (!Number.isFinite(t)) throw new RangeError(`not an instant: ${t}`);
  assertZone(timeZone);
  const local = formatInTimeZone(t, timeZone, "yyyy-MM-dd");
  const today = nightBlock(local, timeZone);
  return t >= today.startMs ? today : nightBlock(dateOfDayNumber(today.dayNumber - 1), timeZone);
}

/**
 * Where a backfill starts: the block of the evening before `now`'s local calendar date ("the previous evening",
 * 19:00 local minus the lead-in). At 07:00 that is 12 h back (the night just ended); at 23:00 it is 28 h back (the
 * whole previous night, the day and this evening so far); just after midnight it is this evening's start.
 * With the unit's review night (`night`), the block holding the start of the last night that has ended by `now`
 * instead, so a full night is there to review at any hour: at 01:00 that is the evening before yesterday's, 30 h
 * back; from the night's end (say 06:00) it is the previous evening again.
 */
export function backfillStartBlock(now: number, timeZone: string, night?: NightTimes): NightBlock {
  if (!Number.isFinite(now)) throw new RangeError(`not an instant: ${now}`);
  assertZone(timeZone);
  if (night) return nightBlockAt(lastCompletedNight(new Date(now), { ...night, timeZone }).from.getTime(), timeZone);
  const local = formatInTimeZone(now, timeZone, "yyyy-MM-dd");
  return nightBlock(dateOfDayNumber(parseDate(local) - 1), timeZone);
}

/** Instants of `hh:mm:ss` local on every calendar date whose local day overlaps [fromMs, toMs), ascending. */
export function dailyLocalInstants(fromMs: number, toMs: number, localTime: string, timeZone: string): number[] {
  assertZone(timeZone);
  const out: number[] = [];
  const first = parseDate(formatInTimeZone(fromMs, timeZone, "yyyy-MM-dd")) - 1;
  const last = parseDate(formatInTimeZone(toMs, timeZone, "yyyy-MM-dd")) + 1;
  for (let d = first; d <= last; d++) out.push(fromZonedTime(`${dateOfDayNumber(d)}T${localTime}`, timeZone).getTime());
  return out;
}
