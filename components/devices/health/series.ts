// Pure reshaping of one device's 24-h minute series for its charts and its hourly table.
import { formatInTimeZone } from "date-fns-tz";
import type { DeviceHealthSeriesDTO } from "@/lib/devices/health";

/** "14:05" in the unit's zone, from epoch seconds. */
export const clockOf = (s: number, timeZone: string) => formatInTimeZone(s * 1000, timeZone, "HH:mm");

export const EVENT_KINDS = [
  { key: "gaps", label: "Gaps" },
  { key: "duplicates", label: "Duplicates" },
  { key: "malformed", label: "Malformed" },
  { key: "reconnects", label: "Reconnects" },
] as const;
type EventKey = (typeof EVENT_KINDS)[number]["key"];

const sumRange = (xs: readonly number[], from: number, to: number) => {
  let n = 0;
  for (let i = from; i < to && i < xs.length; i++) n += xs[i]!;
  return n;
};

/** The event counts summed per `minutes`-long bucket from the window's start. */
export function eventBuckets(s: DeviceHealthSeriesDTO, minutes: number): { t: number[] } & Record<EventKey, number[]> {
  const n = Math.ceil(s.t.length / minutes);
  const t = Array.from({ length: n }, (_, b) => s.t[b * minutes]!);
  const per = (key: EventKey) => Array.from({ length: n }, (_, b) => sumRange(s[key], b * minutes, (b + 1) * minutes));
  return { t, gaps: per("gaps"), duplicates: per("duplicates"), malformed: per("malformed"), reconnects: per("reconnects") };
}

export interface HourRow {
  fromS: number;
  toS: number;
  beats: number;
  minutesWithoutBeats: number;
  gaps: number;
  duplicates: number;
  malformed: number;
  reconnects: number;
  /** The last clock offset measured in the hour. */
  lastOffsetMs: number | null;
}

/** The window hour by hour (60 minutes from its start each). */
export function hourlyRows(s: DeviceHealthSeriesDTO): HourRow[] {
  const rows: HourRow[] = [];
  for (let i = 0; i < s.t.length; i += 60) {
    const end = Math.min(i + 60, s.t.length);
    let last: number | null = null;
    let empty = 0;
    for (let k = i; k < end; k++) {
      if (s.clockOffsetMs[k] !== null) last = s.clockOffsetMs[k]!;
      if (s.beats[k] === 0) empty++;
    }
    rows.push({
      fromS: s.t[i]!,
      toS: s.t[i]! + (end - i) * 60,
      beats: sumRange(s.beats, i, end),
      minutesWithoutBeats: empty,
      gaps: sumRange(s.gaps, i, end),
      duplicates: sumRange(s.duplicates, i, end),
      malformed: sumRange(s.malformed, i, end),
      reconnects: sumRange(s.reconnects, i, end),
      lastOffsetMs: last,
    });
  }
  return rows;
}
