// How Stream health writes its figures (stream data only: rates, counts, seconds, milliseconds) and sorts its table.
// The trouble order is the repository's (lib/devices/health.ts, TROUBLE_TIERS); every other column sorts on its value,
// nulls last, ties most trouble first.
import { formatInTimeZone } from "date-fns-tz";
import type { StreamHealthRowDTO } from "@/lib/devices/health";
import type { SortDirection } from "@/components/table/SortableHeader";

const MINUS = "\u2212";
const signed = (v: number, digits: number) => {
  const s = Math.abs(v).toFixed(digits);
  return Number(s) === 0 ? s : `${v < 0 ? MINUS : "+"}${s}`;
};

/** Beats received per minute: a stream rate, one decimal. */
export const formatRate = (v: number) => v.toFixed(1);

/** "38.5 s", "2 min 5 s", "3 h 4 min". */
export function formatSeconds(s: number): string {
  if (s < 60) return `${Number(s.toFixed(1))} s`;
  const whole = Math.round(s);
  if (whole < 3600) return `${Math.floor(whole / 60)} min ${whole % 60} s`;
  return `${Math.floor(whole / 3600)} h ${Math.floor((whole % 3600) / 60)} min`;
}

/** Clock offset (device minus server): "+12.5 ms", "−1,250 ms". */
export function formatOffset(ms: number | null): string {
  if (ms === null) return "—";
  const digits = Math.abs(ms) < 100 ? 1 : 0;
  const text = signed(ms, digits);
  return `${text.replace(/\B(?=(\d{3})+(?!\d))/g, ",")} ms`;
}

/** Drift: "+3.2 ms per hour". */
export const formatDrift = (msPerHour: number) => `${signed(msPerHour, Math.abs(msPerHour) < 10 ? 2 : 1)} ms per hour`;

/** "12 s ago", "5 min ago", "3 h 4 min ago". */
export function formatAge(iso: string, asOf: string): string {
  const s = Math.max(0, (Date.parse(asOf) - Date.parse(iso)) / 1000);
  return `${formatSeconds(Math.round(s))} ago`;
}

/** "14:02:09 CET", with the date when more than 20 h before `asOf`. */
export function formatInstant(iso: string, timeZone: string, asOf: string): string {
  const old = Date.parse(asOf) - Date.parse(iso) > 20 * 3_600_000;
  return formatInTimeZone(iso, timeZone, old ? "EEE d MMM, HH:mm:ss zzz" : "HH:mm:ss zzz");
}

export const plural = (n: number, one: string, many = `${one}s`) => `${n.toLocaleString("en")} ${n === 1 ? one : many}`;

export type HealthSortKey =
  | "trouble" | "serial" | "bed" | "lastBeat" | "rate" | "gaps" | "longestGap" | "duplicates" | "malformed" | "reconnects" | "offset" | "drift";

/** The direction a column sorts in first: counts, gaps and trouble largest first; names and the rest smallest first.
 *  The last beat sorts oldest first (longest silence), offsets and drift by size whatever their sign. */
export const FIRST_DIRECTION: Record<HealthSortKey, SortDirection> = {
  trouble: "descending", serial: "ascending", bed: "ascending", lastBeat: "ascending", rate: "ascending",
  gaps: "descending", longestGap: "descending", duplicates: "descending", malformed: "descending", reconnects: "descending",
  offset: "descending", drift: "descending",
};

function sortValue(r: StreamHealthRowDTO, key: HealthSortKey): number | string | null {
  switch (key) {
    case "trouble": return r.trouble.rank;
    case "serial": return r.serial;
    case "bed": return r.bedLabel;
    case "lastBeat": return r.lastBeatAt ? Date.parse(r.lastBeatAt) : null;
    case "rate": return r.beatsPerMinute;
    case "gaps": return r.gaps;
    case "longestGap": return r.longestGapS;
    case "duplicates": return r.duplicates;
    case "malformed": return r.malformed;
    case "reconnects": return r.reconnects;
    case "offset": return r.clockOffsetMs === null ? null : Math.abs(r.clockOffsetMs);
    case "drift": return r.drift.msPerHour === null ? null : Math.abs(r.drift.msPerHour);
  }
}

/** Rows sorted by a column; nulls last in both directions; ties most trouble first, then by serial. */
export function sortRows(rows: readonly StreamHealthRowDTO[], key: HealthSortKey, direction: SortDirection): StreamHealthRowDTO[] {
  const sign = direction === "ascending" ? 1 : -1;
  return [...rows].sort((a, b) => {
    const va = sortValue(a, key);
    const vb = sortValue(b, key);
    if (va === null || vb === null) {
      if (va !== vb) return va === null ? 1 : -1;
    } else if (va !== vb) {
      return sign * (typeof va === "string" ? va.localeCompare(String(vb), "en", { numeric: true }) : va - (vb as number));
    }
    return b.trouble.rank - a.trouble.rank || a.serial.localeCompare(b.serial, "en", { numeric: true });
  });
}
