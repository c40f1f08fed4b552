// How the Quality metrics print their numbers, one way everywhere (summary, tables, chart tables): minutes to one
// decimal, shares as whole-ish percentages, rates to one decimal; "—" where a figure is undefined (no flags, no time).

const DASH = "—";

export const fmtMinutes = (v: number | null) => (v === null ? DASH : `${v.toFixed(1)} min`);
export const fmtPercent = (v: number | null) => (v === null ? DASH : `${(100 * v).toFixed(1)} %`);
export const fmtRate = (v: number | null) => (v === null ? DASH : v.toFixed(1));
export const fmtHours = (v: number) => `${v.toFixed(1)} h`;
export const fmtCount = (v: number) => v.toLocaleString("en-US");

/** "Sat 7 Mar" for a calendar date "2026-03-07" (the date itself, no zone: it is already a local date). */
export function fmtDay(date: string): string {
  const d = new Date(`${date}T12:00:00Z`);
  return d.toLocaleDateString("en-GB", { weekday: "short", day: "numeric", month: "short", timeZone: "UTC" });
}
