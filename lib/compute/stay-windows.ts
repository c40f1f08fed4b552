// A stay's next windows from a chunk of its beats that starts a little before the first window not yet stored: the
// engine cleans the chunk and lays the short (every whole UTC minute) or long (every whole UTC hour) grid from there.
import { cleanForWindows, windowsFromCleaned, WINDOW_DEFAULTS, type BeatSeries, type LongWindow, type ShortWindow } from "@/lib/engine/windows";
import type { Population } from "@/lib/engine/clean/range-gate";

/**
 * Beats read before the first new window, s: the cleaning classifies each beat from about 45 beats either side
 * (Lipponen–Tarvainen's 91-beat threshold window), so 10 min (≥ 300 beats at 30 bpm) gives every new window the same
 * neighbours it would have in a whole-night computation.
 */
export const LEFT_CONTEXT_S = 600;

/**
 * Beats that must follow a window's end before it is stored, while the stay is open: the same classifier needs the
 * beats after the window too. 100 is twice its half-width (about 100 s at 60 bpm). With this and LEFT_CONTEXT_S the
 * windows computed minute by minute equal those of one pass over the night (tests/integration/compute.test.ts).
 */
const RIGHT_CONTEXT_BEATS = 100;

export const SHORT_S = WINDOW_DEFAULTS.shortWindowS;
export const SHORT_STRIDE_S = WINDOW_DEFAULTS.shortStrideS;
export const LONG_S = WINDOW_DEFAULTS.longWindowS;
export const LONG_STRIDE_S = WINDOW_DEFAULTS.longStrideS;

/** Next multiple of `step` at or after `t` (both s). */
export const alignUp = (t: number, step: number) => Math.ceil(t / step) * step;

/**
 * The complete windows of one kind in a chunk of beats, from `nextS` (the first window not yet stored) onwards.
 * `continues` says the stay already has windows of this kind before nextS. `final` says that no later beat can join (a closed stay whose last beat is in the chunk): then every window ending
 * by the last beat is complete; otherwise only those ending by the beat RIGHT_CONTEXT_BEATS before the last.
 */
export function windowsOfChunk(series: BeatSeries, population: Population, kind: "short", nextS: number, final: boolean, continues: boolean): ShortWindow[];
export function windowsOfChunk(series: BeatSeries, population: Population, kind: "long", nextS: number, final: boolean, continues: boolean): LongWindow[];
export function windowsOfChunk(series: BeatSeries, population: Population, kind: "short" | "long", nextS: number, final: boolean, continues: boolean): (ShortWindow | LongWindow)[] {
  const n = series.rr.length;
  if (n === 0) return [];
  const horizonS = final ? series.times![n - 1]! : n > RIGHT_CONTEXT_BEATS ? series.times![n - 1 - RIGHT_CONTEXT_BEATS]! : -Infinity;
  const cleaned = cleanForWindows(series, population, true);
  // The grid origin is the next window's start: a whole minute (hour) keeps the grid aligned, and no earlier window
  // is computed again.
  // Once the stay has windows, the grid goes on from nextS even when this chunk's first beat comes later (it starts
  // inside a dropout): those windows are stored as unusable, as one pass over the whole stay would give them.
  const run = windowsFromCleaned(series, cleaned, {
    population, clean: true, originS: nextS, gridFromOrigin: continues, includeShort: kind === "short", includeLong: kind === "long",
  });
  const windows: (ShortWindow | LongWindow)[] = kind === "short" ? run.short : run.long;
  return windows.filter((w) => w.startS >= nextS && w.endS <= horizonS);
}
