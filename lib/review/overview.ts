// The Ward overview's read model: every active bed of a unit with its current stay, the stay's latest 5-min window
// (values, change from the patient's own baseline, signal quality), a heart-rate sparkline of the latest review night,
// the bed's stream status and its unresolved review flags. A fixed handful of queries for the whole unit, however
// many beds it has: the per-bed parts are LATERAL joins that each walk one index (stays (bed_id, admitted_at),
// device_assignments (bed_id, assigned_from), index_windows (stay_id, kind, window_start)), and the per-stay parts
// are one query each over all the unit's stays (so baselines are read here for every stay at once rather than through
// flags-view's one-stay baselinesOf).
import "server-only";
import type { Knex } from "knex";
import { db as defaultDb } from "@/lib/db/knex";
import type { IndexWindowRow } from "@/lib/db/tables";
import type { ShortTermKey } from "@/lib/engine/indices";
import { ALGORITHM_VERSION } from "@/lib/engine/version";
import { unresolvedFlagsOf } from "./flags-view";
import { streamStateOf } from "@/lib/devices/stream-state";
import { latestNight, type NightTimes } from "./night";

/** The indices the overview shows, in column order (all from the 5-min windows; none research-only). */
export const OVERVIEW_INDEX_KEYS = ["hr", "rmssd", "dfa_alpha1", "sampen"] as const satisfies readonly ShortTermKey[];
export type OverviewIndexKey = (typeof OVERVIEW_INDEX_KEYS)[number];

/** Most points in a night's sparkline; the bucket is the smallest multiple of SPARKLINE_TILE_S that keeps to it. */
export const SPARKLINE_MAX_POINTS = 120;
/** The sparkline's finest step: one 5-min window (windows start every whole minute, so some start on this grid). */
export const SPARKLINE_TILE_S = 300;

export interface OverviewValueDTO {
  /** null when the window is unusable or the index undefined for it (see `reason`). */
  value: number | null;
  reason: string | null;
  /** value − the stay's baseline median (index_windows.baseline_delta); null without a value or a baseline. */
  delta: number | null;
  /** The stay's baseline median for this index and engine version; null while there is none. */
  baselineMedian: number | null;
}

export interface OverviewWindowDTO {
  windowStart: string;
  windowEnd: string;
  grade: IndexWindowRow["grade"];
  /** Share of the window covered by valid intervals, 0–1; null if not recorded. */
  coverage: number | null;
  /** Plain-words reasons the grade is not good (empty when good). */
  qualityReasons: string[];
  values: Record<OverviewIndexKey, OverviewValueDTO>;
}

/** Heart rate over the latest review night: bucket start times (epoch s) and the median heart rate of the bucket's
 *  usable non-overlapping 5-min windows (for a 5-min bucket, the one window covering it), null where there is none (a
 *  gap, never a value). Buckets run from the night's start to `asOf` or the night's end, whichever is first. */
export interface OverviewSparklineDTO {
  t: number[];
  hr: (number | null)[];
}

/** The bed's device stream by the device screens' rules (lib/devices/stream-state.ts), with offline read as stale: the
 *  ward needs to know that values are not current, not for how long the device has been silent. */
export type OverviewStreamDTO =
  | { state: "live"; deviceId: string; lastBeatAt: string }
  /** The device is heard but says no patient signal (an empty bed, or leads that came off); `lastBeatAt` null: no beat ever. */
  | { state: "leads_off"; deviceId: string; lastBeatAt: string | null }
  /** A device is assigned but its last beat is older than LIVE_WITHIN_MS; `since` null: no beat received at all. */
  | { state: "stale"; deviceId: string; since: string | null }
  | { state: "no_device" };

export interface OverviewFlagsDTO {
  /** Unresolved flags: open, acknowledged or escalated. */
  count: number;
  highestSeverity: "watch" | "review" | null;
  /** Rule labels of those flags, oldest first, each once. */
  labels: string[];
}

export interface OverviewBedDTO {
  bedId: string;
  bedLabel: string;
  stay: null | { stayId: string; displayName: string; recordNumber: string; admittedAt: string };
  /** The stay's latest 5-min window for the current engine version; null without a stay or before its first window. */
  latest: OverviewWindowDTO | null;
  sparkline: OverviewSparklineDTO | null;
  stream: OverviewStreamDTO;
  flags: OverviewFlagsDTO;
}

export interface WardOverviewDTO {
  unit: { id: string; name: string; code: string; timeZone: string };
  /** The instant the overview describes (the server's clock when read). */
  asOf: string;
  algorithmVersion: string;
  /** The latest review night (the sparklines' span) and the sparkline bucket length, s. */
  night: { night: string; from: string; to: string; bucketS: number };
  beds: OverviewBedDTO[];
}

/** Bucket length for a night of `spanS` seconds: a multiple of the finest step, at most SPARKLINE_MAX_POINTS buckets. */
export function sparklineBucketS(spanS: number): number {
  return Math.max(1, Math.ceil(spanS / SPARKLINE_MAX_POINTS / SPARKLINE_TILE_S)) * SPARKLINE_TILE_S;
}

type BedRow = {
  bed_id: string;
  bed_label: string;
  stay_id: string | null;
  admitted_at: Date | null;
  display_name: string | null;
  record_number: string | null;
  device_id: string | null;
  connected: boolean | null;
  last_seen_at: Date | null;
  last_beat_at: Date | null;
  lead_off: boolean | null;
  window_start: Date | null;
  window_end: Date | null;
  grade: IndexWindowRow["grade"] | null;
  values: Record<string, number | null> | null;
  reasons: Record<string, string> | null;
  baseline_delta: Record<string, number | null> | null;
  coverage: number | null;
  quality_reasons: string[] | null;
};

/**
 * One row per active bed, in the unit's bed order: the stay in the bed at `now`, the device assigned to it at `now`
 * with its stream status, and the stay's latest short window of `version` ended by `now`.
 */
function bedsQuery(knex: Knex, unitId: string, now: Date, version: string) {
  return knex.raw<{ rows: BedRow[] }>(
    `SELECT b.id AS bed_id, b.label AS bed_label,
            s.id AS stay_id, s.admitted_at, p.display_name, p.record_number,
            a.device_id, st.connected, st.last_seen_at, st.last_beat_at, st.lead_off,
            w.window_start, w.window_end, w.grade, w.values, w.reasons, w.baseline_delta,
            (w.quality->>'coverage')::float8 AS coverage, w.quality->'reasons' AS quality_reasons
       FROM beds b
       LEFT JOIN LATERAL (
         SELECT s.id, s.admitted_at, s.patient_id FROM stays s
          WHERE s.bed_id = b.id AND s.admitted_at <= :now AND (s.discharged_at IS NULL OR s.discharged_at > :now)
          ORDER BY s.admitted_at DESC LIMIT 1
       ) s ON true
       LEFT JOIN patients p ON p.id = s.patient_id
       LEFT JOIN LATERAL (
         SELECT a.device_id FROM device_assignments a
          WHERE a.bed_id = b.id AND a.assigned_from <= :now AND (a.assigned_to IS NULL OR a.assigned_to > :now)
          ORDER BY a.assigned_from DESC LIMIT 1
       ) a ON true
       LEFT JOIN device_stream_status st ON st.device_id = a.device_id
       LEFT JOIN LATERAL (
         SELECT w.window_start, w.window_end, w.grade, w.values, w.reasons, w.baseline_delta, w.quality
           FROM index_windows w
          WHERE w.stay_id = s.id AND w.kind = 'short' AND w.algorithm_version = :version
            AND w.window_start <= :now AND w.window_end <= :now
          ORDER BY w.window_start DESC LIMIT 1
       ) w ON true
      WHERE b.unit_id = :unitId AND b.active
      ORDER BY b.sort_order, b.label`,
    { now, version, unitId },
  );
}

/**
 * Per stay and bucket of [from, until): the median heart rate of the usable tiling windows (those starting on the
 * SPARKLINE_TILE_S grid from the night's start) in the bucket. The tiling windows cover the night exactly once, so a
 * 5-min point is the heart rate of exactly those 5 minutes; reading one stored window in five (rather than all the
 * overlapping ones) keeps a 48-bed unit's night to a few thousand rows.
 */
function sparklineQuery(knex: Knex, stayIds: string[], version: string, from: Date, until: Date, now: Date, bucketS: number) {
  return knex.raw<{ rows: { stay_id: string; k: number; hr: number }[] }>(
    // Answered from the index_windows_hr_grid index alone (migrations/20261202000200_window_hr.ts).
    `SELECT w.stay_id,
            ((extract(epoch FROM w.window_start)::bigint - :fromS) / :bucketS)::int AS k,
            percentile_cont(0.5) WITHIN GROUP (ORDER BY w.hr) AS hr
       FROM index_windows w
      WHERE w.stay_id = ANY(CAST(:stayIds AS uuid[])) AND w.kind = 'short' AND w.algorithm_version = :version
        AND w.window_start >= :from AND w.window_start < :until
        AND (extract(epoch FROM w.window_start)::bigint - :fromS) % :tileS = 0
        AND w.window_end <= :now AND w.grade <> 'unusable' AND w.hr IS NOT NULL
      GROUP BY 1, 2`,
    { stayIds, version, from, until, now, bucketS, fromS: Math.round(from.getTime() / 1000), tileS: SPARKLINE_TILE_S },
  );
}

const SEVERITY_RANK = { watch: 1, review: 2 } as const;

function streamOf(r: BedRow, now: Date): OverviewStreamDTO {
  if (!r.device_id) return { state: "no_device" };
  const lastBeatAt = r.last_beat_at?.toISOString() ?? null;
  const state = streamStateOf(
    { streamed: true, connected: r.connected ?? false, lastBeatAt: r.last_beat_at, lastSeenAt: r.last_seen_at, leadOff: r.lead_off ?? false },
    now,
  );
  if (state === "live" && lastBeatAt) return { state, deviceId: r.device_id, lastBeatAt };
  if (state === "leads_off") return { state, deviceId: r.device_id, lastBeatAt };
  return { state: "stale", deviceId: r.device_id, since: lastBeatAt };
}

function latestOf(r: BedRow, medians: ReadonlyMap<string, number | null> | undefined): OverviewWindowDTO | null {
  if (!r.window_start || !r.window_end || !r.grade) return null;
  const qualityReasons = Array.isArray(r.quality_reasons) ? r.quality_reasons.map(String) : [];
  const unusable = r.grade === "unusable";
  const values = Object.fromEntries(
    OVERVIEW_INDEX_KEYS.map((key): [OverviewIndexKey, OverviewValueDTO] => {
      const baselineMedian = medians?.get(key) ?? null;
      // An unusable window shows no value (GLOSSARY), whatever the engine stored.
      const raw = unusable ? null : (r.values?.[key] ?? null);
      const value = typeof raw === "number" && Number.isFinite(raw) ? raw : null;
      const reason = value !== null
        ? null
        : unusable
          ? `unusable window${qualityReasons.length ? `: ${qualityReasons.join("; ")}` : ""}`
          : (r.reasons?.[key] ?? "not defined for this window");
      const d = value === null ? null : r.baseline_delta?.[key];
      return [key, { value, reason, delta: typeof d === "number" && Number.isFinite(d) ? d : null, baselineMedian }];
    }),
  ) as Record<OverviewIndexKey, OverviewValueDTO>;
  return {
    windowStart: r.window_start.toISOString(),
    windowEnd: r.window_end.toISOString(),
    grade: r.grade,
    coverage: typeof r.coverage === "number" ? r.coverage : null,
    qualityReasons,
    values,
  };
}

/**
 * The Ward overview of a unit as of `now`; null when there is no such unit. Five queries whatever the number of beds,
 * in two rounds: the unit and its beds (with stays, devices, stream status and latest windows), then the baselines,
 * unresolved flags and night sparklines of all the unit's stays at once.
 */
export async function wardOverview(unitId: string, now: Date = new Date(), knex: Knex = defaultDb): Promise<WardOverviewDTO | null> {
  const version = ALGORITHM_VERSION;
  const [unit, { rows }] = await Promise.all([
    knex("units").where({ id: unitId }).first("id", "name", "code", "time_zone", "night_starts_at", "night_ends_at"),
    bedsQuery(knex, unitId, now, version),
  ]);
  if (!unit) return null;
  const nightTimes: NightTimes = { timeZone: unit.time_zone, startsAt: unit.night_starts_at, endsAt: unit.night_ends_at };
  const night = latestNight(now, nightTimes);
  const bucketS = sparklineBucketS((night.to.getTime() - night.from.getTime()) / 1000);
  const until = new Date(Math.min(night.to.getTime(), now.getTime()));
  const stayIds = rows.flatMap((r) => (r.stay_id ? [r.stay_id] : []));
  const [baselineRows, flags, sparkRows] = await Promise.all([
    stayIds.length
      ? knex("baselines")
          .whereIn("stay_id", stayIds)
          .where({ algorithm_version: version })
          .whereIn("index_key", OVERVIEW_INDEX_KEYS)
          .select("stay_id", "index_key", "median")
      : [],
    unresolvedFlagsOf(stayIds, knex),
    stayIds.length ? sparklineQuery(knex, stayIds, version, night.from, until, now, bucketS).then((r) => r.rows) : [],
  ]);

  const medians = new Map<string, Map<string, number | null>>();
  for (const b of baselineRows) {
    const m = medians.get(b.stay_id) ?? new Map<string, number | null>();
    m.set(b.index_key, b.median);
    medians.set(b.stay_id, m);
  }
  const fromS = night.from.getTime() / 1000;
  const nBuckets = Math.max(0, Math.ceil((until.getTime() / 1000 - fromS) / bucketS));
  const t = Array.from({ length: nBuckets }, (_, k) => fromS + k * bucketS);
  const sparks = new Map<string, (number | null)[]>();
  for (const s of sparkRows) {
    if (s.k < 0 || s.k >= nBuckets) continue;
    let hr = sparks.get(s.stay_id);
    if (!hr) sparks.set(s.stay_id, (hr = new Array<number | null>(nBuckets).fill(null)));
    hr[s.k] = s.hr;
  }

  const beds: OverviewBedDTO[] = rows.map((r) => {
    const stayFlags = r.stay_id ? (flags.get(r.stay_id) ?? []) : [];
    const highest = stayFlags.reduce<"watch" | "review" | null>(
      (h, f) => (h === null || SEVERITY_RANK[f.severity] > SEVERITY_RANK[h] ? f.severity : h),
      null,
    );
    return {
      bedId: r.bed_id,
      bedLabel: r.bed_label,
      stay: r.stay_id
        ? { stayId: r.stay_id, displayName: r.display_name!, recordNumber: r.record_number!, admittedAt: r.admitted_at!.toISOString() }
        : null,
      latest: r.stay_id ? latestOf(r, medians.get(r.stay_id)) : null,
      sparkline: r.stay_id ? { t, hr: sparks.get(r.stay_id) ?? new Array<number | null>(nBuckets).fill(null) } : null,
      stream: streamOf(r, now),
      flags: { count: stayFlags.length, highestSeverity: highest, labels: [...new Set(stayFlags.map((f) => f.label))] },
    };
  });

  return {
    unit: { id: unit.id, name: unit.name, code: unit.code, timeZone: unit.time_zone },
    asOf: now.toISOString(),
    algorithmVersion: version,
    night: { night: night.night, from: night.from.toISOString(), to: night.to.toISOString(), bucketS },
    beds,
  };
}
