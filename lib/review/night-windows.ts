// The Night review's data: one patient's review night as compact columns for the stacked charts — the 5-min and
// 60-min windows of the current engine version, the personal baselines, the flags and the clinical event
// annotations of the night — plus the nights the stay can be reviewed for and how much of the night had usable
// signal. An unusable window carries no value (DOMAIN §2.1, §5.7): its values are null, drawn as a gap.
import "server-only";
import type { Knex } from "knex";
import { z } from "zod";
import { db as defaultDb } from "@/lib/db/knex";
import type { IndexWindowRow, WindowKind } from "@/lib/db/tables";
import { ALGORITHM_VERSION } from "@/lib/engine/version";
import { annotationsOf, type AnnotationDTO } from "./annotations";
import { baselinesOf, flagsOfStay, type FlagViewDTO } from "./flags-view";
import { latestNight, nightParamSchema, nightsOfStay, reviewNight, type ReviewNight } from "./night";
import type { StayScopeDTO } from "./stay-scope";

/** Short-term indices the Night review draws, in chart order. */
export const NIGHT_SHORT_KEYS = ["hr", "sdnn", "rmssd", "lf_hf", "sampen", "dfa_alpha1"] as const;
/** Long-term (60-min window) indices the Night review draws. */
export const NIGHT_LONG_KEYS = ["mse_ci", "dfa_alpha2"] as const;
type NightShortKey = (typeof NIGHT_SHORT_KEYS)[number];
type NightLongKey = (typeof NIGHT_LONG_KEYS)[number];
export type NightKey = NightShortKey | NightLongKey;

type WindowGrade = IndexWindowRow["grade"];

/** One kind of window as columns: index i of every array is the same window. */
export interface WindowColumns<K extends string> {
  /** Window start and end, epoch s; charts plot a window at its end. */
  start: number[];
  t: number[];
  grade: WindowGrade[];
  /** Share of the window's input beats cleaning edited (null without beats), shown beside each value (DOMAIN §5.2). */
  shareEdited: (number | null)[];
  /** null where the window is unusable or the index is undefined for it. */
  values: Record<K, (number | null)[]>;
}

export interface NightBoundsDTO {
  night: string;
  from: string;
  to: string;
  /** Real length, h: 7, 8 or 9 for 22:00 → 06:00. */
  hours: number;
}

interface NightBaselineDTO {
  median: number;
  /** Robust spread (MAD × 1.4826); null when it could not be estimated. */
  spread: number | null;
  nWindows: number;
  from: string;
  to: string;
}

export interface NightDTO {
  stayId: string;
  timeZone: string;
  algorithmVersion: string;
  night: NightBoundsDTO;
  /** Nights the stay can be reviewed for, newest first. */
  nights: NightBoundsDTO[];
  short: WindowColumns<NightShortKey>;
  long: WindowColumns<NightLongKey>;
  /** The patient's own baseline per drawn index (absent while it is still being gathered). */
  baselines: Partial<Record<NightKey, NightBaselineDTO>>;
  flags: FlagViewDTO[];
  annotations: AnnotationDTO[];
  coverage: {
    /** Share of the observed part of the night covered by usable (good or limited) 5-min windows, 0–1; null when
     *  none of the night has been observed yet. */
    share: number | null;
    /** The observed part: the night ∩ the stay, up to `asOf` while the night is in progress. */
    observedFrom: string | null;
    observedTo: string | null;
    usableWindows: number;
    windows: number;
  };
  /** When this was read; a night still in progress grows. */
  asOf: string;
}

/** The `night` query parameter of the Night review page and route; absent means the latest night of the stay. */
export const nightQuerySchema = z.object({ night: nightParamSchema.optional() });

const toBounds = (n: ReviewNight): NightBoundsDTO => ({ night: n.night, from: n.from.toISOString(), to: n.to.toISOString(), hours: n.hours });

/** The instant up to which a stay can have data: its discharge, or now. */
const stayUntil = (stay: StayScopeDTO, now: Date) => new Date(Math.min(now.getTime(), stay.dischargedAt ? Date.parse(stay.dischargedAt) : Infinity));

/** The night to show: the named one, or the stay's latest (the one holding its discharge, for a closed stay). */
export function chosenNight(stay: StayScopeDTO, night: string | undefined, now = new Date()): ReviewNight {
  return night ? reviewNight(night, stay.night) : latestNight(stayUntil(stay, now), stay.night);
}

type WindowRow = Pick<IndexWindowRow, "window_start" | "window_end" | "grade" | "quality" | "values">;

function columns<K extends string>(rows: WindowRow[], keys: readonly K[]): WindowColumns<K> {
  const out: WindowColumns<K> = {
    start: [],
    t: [],
    grade: [],
    shareEdited: [],
    values: Object.fromEntries(keys.map((k) => [k, [] as (number | null)[]])) as Record<K, (number | null)[]>,
  };
  for (const r of rows) {
    out.start.push(r.window_start.getTime() / 1000);
    out.t.push(r.window_end.getTime() / 1000);
    out.grade.push(r.grade);
    const edited = (r.quality as { shareEdited?: unknown }).shareEdited;
    out.shareEdited.push(typeof edited === "number" ? edited : null);
    // An unusable window shows no value, whatever its row holds.
    const usable = r.grade !== "unusable" && r.values !== null;
    for (const k of keys) {
      const v = usable ? r.values![k] : null;
      out.values[k].push(typeof v === "number" && Number.isFinite(v) ? v : null);
    }
  }
  return out;
}

/** Total length, s, of the union of [start, end) spans clipped to [lo, hi); spans sorted by start. */
function unionLength(spans: [number, number][], lo: number, hi: number): number {
  let total = 0;
  let curFrom = -Infinity;
  let curTo = -Infinity;
  for (const [a0, b0] of spans) {
    const a = Math.max(a0, lo);
    const b = Math.min(b0, hi);
    if (b <= a) continue;
    if (a > curTo) {
      if (curTo > curFrom) total += curTo - curFrom;
      curFrom = a;
      curTo = b;
    } else if (b > curTo) curTo = b;
  }
  if (curTo > curFrom) total += curTo - curFrom;
  return total;
}

function windowsOfNight(knex: Knex, stayId: string, kind: WindowKind, night: ReviewNight) {
  return knex("index_windows")
    .where({ stay_id: stayId, kind, algorithm_version: ALGORITHM_VERSION })
    .where("window_start", ">=", night.from)
    .where("window_start", "<", night.to)
    .orderBy("window_start")
    .select<WindowRow[]>("window_start", "window_end", "grade", "quality", "values");
}

/**
 * The Night review's data for one night of a stay: the 5-min and 60-min windows of the current engine version whose
 * start lies in the night, the baselines, flags whose condition overlapped the night and annotations in it.
 */
export async function nightWindows(stay: StayScopeDTO, night: ReviewNight, knex: Knex = defaultDb, now = new Date()): Promise<NightDTO> {
  const [shortRows, longRows, baselineRows, flags, annotations] = await Promise.all([
    windowsOfNight(knex, stay.stayId, "short", night),
    windowsOfNight(knex, stay.stayId, "long", night),
    baselinesOf(stay.stayId, ALGORITHM_VERSION, knex),
    flagsOfStay(stay.stayId, night.from, night.to, knex),
    annotationsOf(stay.stayId, night.from, night.to, knex),
  ]);
  const short = columns(shortRows, NIGHT_SHORT_KEYS);
  const long = columns(longRows, NIGHT_LONG_KEYS);

  const baselines: NightDTO["baselines"] = {};
  for (const key of [...NIGHT_SHORT_KEYS, ...NIGHT_LONG_KEYS]) {
    const b = baselineRows[key];
    // A baseline stored as "insufficient" has no median: nothing to draw.
    if (b && b.median !== null) baselines[key] = { median: b.median, spread: b.spread, nWindows: b.nWindows, from: b.from, to: b.to };
  }

  const until = stayUntil(stay, now);
  const observedFromMs = Math.max(night.from.getTime(), Date.parse(stay.admittedAt));
  const observedToMs = Math.min(night.to.getTime(), until.getTime());
  const observed = observedToMs > observedFromMs;
  const usable: [number, number][] = [];
  short.grade.forEach((g, i) => g !== "unusable" && usable.push([short.start[i]!, short.t[i]!]));
  const usableS = observed ? unionLength(usable, observedFromMs / 1000, observedToMs / 1000) : 0;

  return {
    stayId: stay.stayId,
    timeZone: stay.night.timeZone,
    algorithmVersion: ALGORITHM_VERSION,
    night: toBounds(night),
    nights: nightsOfStay(new Date(stay.admittedAt), until, stay.night).map(toBounds),
    short,
    long,
    baselines,
    flags,
    annotations,
    coverage: {
      share: observed ? usableS / ((observedToMs - observedFromMs) / 1000) : null,
      observedFrom: observed ? new Date(observedFromMs).toISOString() : null,
      observedTo: observed ? new Date(observedToMs).toISOString() : null,
      usableWindows: usable.length,
      windows: short.grade.length,
    },
    asOf: now.toISOString(),
  };
}
