// Words and formats shared by the Review queue's client pieces.
import { formatInTimeZone } from "date-fns-tz";
import { INDEX_META } from "@/components/night/format";
import type { NightKey } from "@/lib/review/night-windows";
import type { QueueFlagDTO } from "@/lib/queue/repository";

/** "02:14 EST" from an ISO instant or epoch s. */
export const clock = (t: string | number, timeZone: string) => formatInTimeZone(typeof t === "number" ? t * 1000 : t, timeZone, "HH:mm zzz");

/** "42 min", "1 h 5 min". */
export function minutesWords(min: number): string {
  if (min < 60) return `${min} min`;
  const h = Math.floor(min / 60);
  const m = min % 60;
  return m ? `${h} h ${m} min` : `${h} h`;
}

/** "42 min — 12 min over the 30-min target" / "10 min — within the 30-min target". */
export function waitingWords(f: Pick<QueueFlagDTO, "waitingMinutes" | "overTarget" | "waitingStopped">, targetMinutes: number): string {
  const target = `the ${targetMinutes}-min target`;
  const lead = f.waitingStopped ? `waited ${minutesWords(f.waitingMinutes)} for a first decision` : `waiting ${minutesWords(f.waitingMinutes)}`;
  return f.overTarget ? `${lead} — ${minutesWords(f.waitingMinutes - targetMinutes)} over ${target}` : `${lead} — within ${target}`;
}

export interface ChartMeta {
  short: string;
  unit: string;
  digits: number;
  /** Multiplier from stored value to shown value (coverage is stored 0–1, shown in %). */
  scale: number;
}

export function chartMeta(key: string): ChartMeta {
  if (key === "coverage") return { short: "Coverage", unit: "%", digits: 0, scale: 100 };
  const m = INDEX_META[key as NightKey];
  return m ? { short: m.short, unit: m.unit, digits: m.digits, scale: 1 } : { short: key, unit: "", digits: 2, scale: 1 };
}

export const withUnit = (v: string, unit: string) => (unit ? (unit === "%" || unit.startsWith("/") ? `${v}${unit}` : `${v} ${unit}`) : v);

/** The Window detail page of the 5-min window starting at an ISO instant. */
export const windowHref = (stayId: string, startIso: string) => `/stays/${stayId}/window?start=${encodeURIComponent(startIso)}`;
