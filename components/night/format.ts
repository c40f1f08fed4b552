// Names, units and formatting shared by the Night review's client pieces.
import { formatInTimeZone } from "date-fns-tz";
import type { NightKey } from "@/lib/review/night-windows";

interface IndexMeta {
  /** Chart heading. */
  label: string;
  /** Short name for legends and tables. */
  short: string;
  unit: string;
  digits: number;
  /** 5-min windows every minute, or 60-min windows every hour. */
  kind: "short" | "long";
  /** Method and parameters, shown under the heading (DOMAIN §5.5: show parameters). */
  method: string;
}

export const INDEX_META: Record<NightKey, IndexMeta> = {
  hr: { label: "Heart rate", short: "HR", unit: "/min", digits: 0, kind: "short", method: "60000 / mean NN, 5-min windows" },
  sdnn: { label: "SDNN", short: "SDNN", unit: "ms", digits: 0, kind: "short", method: "SD of NN intervals, 5-min windows" },
  rmssd: { label: "RMSSD", short: "RMSSD", unit: "ms", digits: 0, kind: "short", method: "root mean square of successive differences, 5-min windows" },
  lf_hf: { label: "LF/HF", short: "LF/HF", unit: "", digits: 2, kind: "short", method: "Lomb–Scargle, LF 0.04–0.15 Hz over HF 0.15–0.40 Hz, 5-min windows; not a reliable balance measure" },
  sampen: { label: "Sample entropy", short: "SampEn", unit: "", digits: 2, kind: "short", method: "SampEn m = 2, r = 0.2 × SD, 5-min windows" },
  mse_ci: { label: "MSE complexity index", short: "MSE CI", unit: "", digits: 1, kind: "long", method: "sum of SampEn over scales τ = 1–10, r = 0.15 × SD, 60-min windows" },
  dfa_alpha1: { label: "DFA α1", short: "α1", unit: "", digits: 2, kind: "short", method: "DFA-1 slope over boxes of 4–16 beats, 5-min windows" },
  dfa_alpha2: { label: "DFA α2", short: "α2", unit: "", digits: 2, kind: "long", method: "DFA-1 slope over boxes of 16–64 beats, 60-min windows" },
};

/** Chart order on the Night review. */
export const CHART_KEYS: NightKey[] = ["hr", "sdnn", "rmssd", "lf_hf", "sampen", "mse_ci", "dfa_alpha1", "dfa_alpha2"];

export const formatValue = (v: number | null | undefined, digits: number) => (v == null || !Number.isFinite(v) ? "—" : v.toFixed(digits));

const toDate = (t: number | string) => (typeof t === "number" ? t * 1000 : t);

/** "01:30 EST" from epoch s or an ISO string. */
export const clock = (t: number | string, timeZone: string) => formatInTimeZone(toDate(t), timeZone, "HH:mm zzz");
/** "01:30:05 EST" for single beats. */
export const clockSeconds = (t: number | string, timeZone: string) => formatInTimeZone(toDate(t), timeZone, "HH:mm:ss zzz");
/** "Sun 2 Nov, 01:30 EST". */
export const dayClock = (t: number | string, timeZone: string) => formatInTimeZone(toDate(t), timeZone, "EEE d MMM, HH:mm zzz");

/** A span's length in words: "5 min", "1 h", "8 h 20 min". */
export function spanWords(seconds: number): string {
  const min = Math.round(seconds / 60);
  if (min < 60) return `${min} min`;
  const h = Math.floor(min / 60);
  const m = min % 60;
  return m ? `${h} h ${m} min` : `${h} h`;
}

/** The Window detail page of the 5-min window starting at `startS` (epoch s). */
export const windowHref = (stayId: string, startS: number) => `/stays/${stayId}/window?start=${encodeURIComponent(new Date(startS * 1000).toISOString())}`;

/** The index of the value in the ascending `xs` nearest to `x` (−1 for an empty list). */
export function nearestIndex(xs: readonly number[], x: number): number {
  if (!xs.length) return -1;
  let lo = 0;
  let hi = xs.length - 1;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (xs[mid]! < x) lo = mid + 1;
    else hi = mid;
  }
  return lo > 0 && Math.abs(xs[lo - 1]! - x) <= Math.abs(xs[lo]! - x) ? lo - 1 : lo;
}
