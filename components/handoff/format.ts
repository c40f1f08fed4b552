// Wording of times and amounts on the Handoff summary: local times with the zone abbreviation (lib/time.ts).
import { formatInTimeZone } from "date-fns-tz";

/** "06:41 EST". */
export const clockTime = (iso: string, timeZone: string) => formatInTimeZone(iso, timeZone, "HH:mm zzz");

/** "Sat 7 Mar 2026, 22:00 EST → Sun 8 Mar, 06:00 EDT". */
export function nightSpan(n: { from: string; to: string }, timeZone: string): string {
  return `${formatInTimeZone(n.from, timeZone, "EEE d MMM yyyy, HH:mm zzz")} → ${formatInTimeZone(n.to, timeZone, "EEE d MMM, HH:mm zzz")}`;
}

/** Hours the wall clock shows between the night's start and end, which a DST change makes differ from the real length. */
function clockHours(n: { from: string; to: string }, timeZone: string): number {
  const minutes = (iso: string) => {
    const [h, m] = formatInTimeZone(iso, timeZone, "HH:mm").split(":").map(Number) as [number, number];
    return h * 60 + m;
  };
  return (((minutes(n.to) - minutes(n.from)) % 1440) + 1440) % 1440 / 60;
}

/** "real length 7 h (the clocks changed: the wall clock shows 8 h)". */
export function nightLength(n: { from: string; to: string; hours: number }, timeZone: string): string {
  const wall = clockHours(n, timeZone);
  const real = `real length ${hoursAndMinutes(n.hours)}`;
  return wall === n.hours ? real : `${real} (the clocks changed: the wall clock shows ${hoursAndMinutes(wall)})`;
}

/** "6 h 42 min", "7 h", "18 min". */
export function hoursAndMinutes(hours: number): string {
  const total = Math.round(hours * 60);
  const h = Math.floor(total / 60);
  const m = total % 60;
  if (h === 0) return `${m} min`;
  return m === 0 ? `${h} h` : `${h} h ${m} min`;
}

/** "94 %". */
export const percent = (share: number) => `${Math.round(share * 100)} %`;

/** Option text of the night picker: "Sat 7 Mar → Sun 8 Mar (7 h)". */
export function nightOption(n: { from: string; to: string; hours: number }, timeZone: string): string {
  return `${formatInTimeZone(n.from, timeZone, "EEE d MMM")} → ${formatInTimeZone(n.to, timeZone, "EEE d MMM")} (${hoursAndMinutes(n.hours)})`;
}
