// The rolling-window driver: one call turns a beat series into every stored window — the short-term indices on
// 5-min windows every minute, and MSE, DFA α2, MF-DFA and ApEn on 60-min windows every hour. The series is cleaned
// once as a whole (the classifier needs context across window edges), then each window takes its slice. A window
// whose quality is `unusable` keeps its quality and carries no values (DOMAIN §2.1, §5.7).
import { cleanBeats, type CleanedBeats, type CleanInput } from "./clean/clean-beats";
import type { Population } from "./clean/range-gate";
import { windowQuality, type WindowQuality } from "./clean/window-quality";
import { longTermIndices, shortTermIndices, type LongTermKey, type ShortTermKey } from "./indices";
import type { Params } from "./result";
import { ALGORITHM_VERSION } from "./version";

export const WINDOW_DEFAULTS = {
  shortWindowS: 300,
  shortStrideS: 60,
  longWindowS: 3600,
  longStrideS: 3600,
} as const;

export interface WindowOptions {
  shortWindowS?: number;
  shortStrideS?: number;
  longWindowS?: number;
  longStrideS?: number;
  /** Grid origin, s: windows start at origin + k·stride. Default: the start of the first interval, so a file's
   *  windows start at its first beat; a live caller passes a clock-aligned origin (e.g. a whole minute). */
  originS?: number;
  /** true: the grid starts at originS even when the first beat comes later, so a stay already under way stores the
   *  time without beats (a dropout) as unusable windows; false (default): the first window starts with the data. */
  gridFromOrigin?: boolean;
  population?: Population;
  /** false computes on the intervals exactly as given (validation against reference series). */
  clean?: boolean;
  /** false leaves out the 60-min windows. */
  includeLong?: boolean;
  /** SampEn m and r (fraction of SD) for the short windows. */
  entropy?: { m: number; r: number };
}

export interface BeatSeries {
  /** RR intervals, ms. */
  rr: Float64Array;
  /** Time of the beat ending each interval, s (any origin, e.g. epoch seconds); default: running sum of rr. */
  times?: Float64Array;
  /** Device-reported quality (0–1) and lead-off flags per beat, when the device sends them. */
  quality?: Float64Array;
  leadOff?: Uint8Array;
}

interface WindowBase {
  startS: number;
  endS: number;
  quality: WindowQuality;
}
export interface ShortWindow extends WindowBase {
  kind: "short";
  /** Null when the window is unusable; see quality.reasons. */
  values: Record<ShortTermKey, number | null> | null;
  reasons: Partial<Record<ShortTermKey, string>>;
}
export interface LongWindow extends WindowBase {
  kind: "long";
  values: Record<LongTermKey, number | null> | null;
  /** SampEn per scale τ = 1…20; null when the window is unusable. */
  mse: (number | null)[] | null;
  reasons: Partial<Record<LongTermKey, string>>;
}

export interface WindowRun {
  version: string;
  /** Everything needed to reproduce the run: window grid, cleaning and every method's parameters. */
  params: { windows: Required<Omit<WindowOptions, "originS" | "entropy">> & { originS: number }; cleaning: Params; methods: Record<string, Params> };
  cleaning: CleanedBeats["counts"] | null;
  short: ShortWindow[];
  long: LongWindow[];
}

/** Half-open slice [from, to) of the beats whose time lies in [startS, endS). */
function sliceByTime(times: Float64Array, startS: number, endS: number): [number, number] {
  const lower = (v: number) => {
    let lo = 0, hi = times.length;
    while (lo < hi) {
      const mid = (lo + hi) >> 1;
      if (times[mid]! < v) lo = mid + 1;
      else hi = mid;
    }
    return lo;
  };
  return [lower(startS), lower(endS)];
}

/** When the series begins, s: the start of its first interval (its first beat time minus that interval). */
export function seriesStartS(series: BeatSeries): number {
  if (!series.rr.length) return 0;
  return (series.times ? series.times[0]! : series.rr[0]! / 1000) - series.rr[0]! / 1000;
}

/** Cleans the series twice — isolated abnormal beats interpolated (most indices) and deleted (Lomb–Scargle). */
export function cleanForWindows(series: BeatSeries, population: Population, clean: boolean) {
  const base: CleanInput = {
    population,
    ...(series.times && { times: series.times }),
    ...(series.quality && { quality: series.quality }),
    ...(series.leadOff && { leadOff: series.leadOff }),
    // Without cleaning nothing is classified, and the gate lets through every interval a file may hold.
    ...(!clean && { detector: "none" as const, minMs: 0, maxMs: Number.MAX_SAFE_INTEGER }),
  };
  const interpolated = cleanBeats(series.rr, { ...base, mode: "interpolate" });
  const deleted = cleanBeats(series.rr, { ...base, mode: "delete" });
  return { interpolated, deleted };
}

export type CleanedForWindows = ReturnType<typeof cleanForWindows>;

export function computeWindows(series: BeatSeries, options: WindowOptions = {}): WindowRun {
  const population = options.population ?? "adult";
  return windowsFromCleaned(series, cleanForWindows(series, population, options.clean ?? true), options);
}

/** The windows of a series already cleaned by `cleanForWindows` with the same population and clean setting. */
export function windowsFromCleaned(
  series: BeatSeries,
  { interpolated, deleted }: CleanedForWindows,
  options: WindowOptions & { includeShort?: boolean } = {},
): WindowRun {
  const o = { ...WINDOW_DEFAULTS, population: "adult" as Population, clean: true, includeLong: true, includeShort: true, gridFromOrigin: false, entropy: { m: 2, r: 0.2 }, ...options };
  const firstStart = seriesStartS(series);
  const originS = o.originS ?? firstStart;
  const run: WindowRun = {
    version: ALGORITHM_VERSION,
    params: {
      windows: {
        shortWindowS: o.shortWindowS, shortStrideS: o.shortStrideS, longWindowS: o.longWindowS, longStrideS: o.longStrideS,
        population: o.population, clean: o.clean, includeLong: o.includeLong, originS, gridFromOrigin: o.gridFromOrigin,
      },
      cleaning: interpolated.params,
      methods: {},
    },
    cleaning: interpolated.value?.counts ?? null,
    short: [],
    long: [],
  };
  const ci = interpolated.value;
  const cd = deleted.value;
  if (!ci || !cd || ci.times.length === 0) return run;
  const lastT = ci.inputTimes[ci.inputTimes.length - 1]!;
  const qualityOptions = { ...(series.quality && { quality: series.quality }), ...(series.leadOff && { leadOff: series.leadOff }) };

  // Only complete windows: a window is computed once its end has passed the last beat received.
  const grid = (windowS: number, strideS: number) => {
    const out: [number, number][] = [];
    const k0 = o.gridFromOrigin ? 0 : Math.max(0, Math.ceil((firstStart - originS) / strideS - 1e-9));
    for (let k = k0; originS + k * strideS + windowS <= lastT + 1e-9; k++) out.push([originS + k * strideS, originS + k * strideS + windowS]);
    return out;
  };

  for (const [startS, endS] of o.includeShort ? grid(o.shortWindowS, o.shortStrideS) : []) {
    const quality = windowQuality(ci, { startS, endS }, qualityOptions).value!;
    if (quality.grade === "unusable") {
      run.short.push({ kind: "short", startS, endS, quality, values: null, reasons: {} });
      continue;
    }
    const [a, b] = sliceByTime(ci.times, startS, endS);
    const [c, d] = sliceByTime(cd.times, startS, endS);
    const set = shortTermIndices({
      nn: ci.nn.subarray(a, b),
      times: ci.times.subarray(a, b),
      nnDeleted: cd.nn.subarray(c, d),
      timesDeleted: cd.times.subarray(c, d),
      entropy: o.entropy,
    });
    Object.assign(run.params.methods, set.methods);
    run.short.push({ kind: "short", startS, endS, quality, values: set.values, reasons: set.reasons });
  }

  for (const [startS, endS] of o.includeLong ? grid(o.longWindowS, o.longStrideS) : []) {
    const quality = windowQuality(ci, { startS, endS }, qualityOptions).value!;
    if (quality.grade === "unusable") {
      run.long.push({ kind: "long", startS, endS, quality, values: null, mse: null, reasons: {} });
      continue;
    }
    const [a, b] = sliceByTime(ci.times, startS, endS);
    const set = longTermIndices(ci.nn.subarray(a, b));
    Object.assign(run.params.methods, set.methods);
    run.long.push({ kind: "long", startS, endS, quality, values: set.values, mse: set.mse, reasons: set.reasons });
  }
  return run;
}
