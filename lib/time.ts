// Instants are stored and passed in UTC; people read them in the unit's IANA zone, with the offset shown.
import { formatInTimeZone } from "date-fns-tz";

/** e.g. "Mon 30 Nov, 18:22 EST" — the zone abbreviation makes DST nights unambiguous. */
export function formatLocal(iso: string | Date, timeZone: string): string {
  return formatInTimeZone(iso, timeZone, "EEE d MMM, HH:mm zzz");
}

/** e.g. "2026-11-30 18:22:05 -05:00", for audit listings. */
export function formatLocalPrecise(iso: string | Date, timeZone: string): string {
  return formatInTimeZone(iso, timeZone, "yyyy-MM-dd HH:mm:ss xxx");
}

/** Whole hours and days between two instants, e.g. "3 d 4 h", "11 h", "under 1 h". */
export function formatDuration(fromIso: string, toIso: string): string {
  const hours = Math.floor((Date.parse(toIso) - Date.parse(fromIso)) / 3_600_000);
  if (hours < 1) return "under 1 h";
  const d = Math.floor(hours / 24);
  const h = hours % 24;
  return d ? `${d} d ${h} h` : `${h} h`;
}
