// Personal baselines (DOMAIN §1: compare each patient with their own baseline, cp): per stay and index, the median
// and a robust spread of the index over the stay's first valid hours, stored once and then fixed, so that a later
// change is measured against the same reference all night. Every window then carries value − baseline median.
import type { Knex } from "knex";
import { median } from "@/lib/engine/stats";
import { LONG_TERM_KEYS, SHORT_TERM_KEYS } from "@/lib/engine/indices";
import type { WindowKind } from "@/lib/db/tables";

/** MAD × 1.4826 estimates the SD of normally distributed data (1 / Φ⁻¹(3/4) = 1.482602…; common practice). */
export const MAD_TO_SD = 1.4826;

/**
 * The 60-min windows come one per hour, so a 6-h baseline holds at most 6 of them; 3 is our choice for the minimum
 * (half of them). The 5-min windows use the configured minimum (30 by default).
 */
const LONG_BASELINE_MIN_WINDOWS = 3;

export interface BaselineSettings {
  /** Length of the baseline period, h, counted from the stay's first valid (good or limited) window. */
  hours: number;
  /** Fewest values of an index (5-min windows) for a baseline. */
  minWindows: number;
}

/** Median and MAD × 1.4826 of a non-empty list of finite values. */
export function robustBaseline(values: readonly number[]): { median: number; spread: number } {
  if (values.length === 0) throw new RangeError("a baseline needs at least one value");
  for (const v of values) if (!Number.isFinite(v)) throw new RangeError(`baseline values must be finite, got ${v}`);
  const m = median(values);
  const deviations = values.map((v) => Math.abs(v - m));
  return { median: m, spread: median(deviations) * MAD_TO_SD };
}

interface ValuePoint {
  startMs: number;
  endMs: number;
  value: number;
}

type BaselineChoice =
  | { status: "wait" }
  | { status: "ready"; values: number[]; fromMs: number; toMs: number }
  | { status: "insufficient"; n: number; fromMs: number; toMs: number };

/**
 * Which values make an index's baseline. `points` are the index's non-null values on valid windows, ascending;
 * `firstValidStartMs` is the start of the stay's first valid window of the kind, `latestStartMs` the start of its
 * newest stored window (any grade).
 * - The period is [first valid window, + hours). Its values are used once the period is over.
 * - Too few values (unusable stretches): the following values are added in order until the minimum is reached, up
 *   to twice the period; if even that is short, the index gets no baseline ("insufficient", stored so it is not
 *   looked for again) rather than a baseline from a handful of windows.
 */
export function chooseBaselineValues(
  points: readonly ValuePoint[],
  firstValidStartMs: number,
  latestStartMs: number,
  hours: number,
  minWindows: number,
): BaselineChoice {
  const periodEnd = firstValidStartMs + hours * 3_600_000;
  const extendedEnd = firstValidStartMs + 2 * hours * 3_600_000;
  if (latestStartMs < periodEnd) return { status: "wait" };
  const inPeriod = points.filter((p) => p.startMs >= firstValidStartMs && p.startMs < periodEnd);
  if (inPeriod.length >= minWindows) {
    return { status: "ready", values: inPeriod.map((p) => p.value), fromMs: firstValidStartMs, toMs: inPeriod[inPeriod.length - 1]!.endMs };
  }
  const extended = points.filter((p) => p.startMs >= firstValidStartMs && p.startMs < extendedEnd).slice(0, minWindows);
  if (extended.length >= minWindows) {
    return { status: "ready", values: extended.map((p) => p.value), fromMs: firstValidStartMs, toMs: extended[extended.length - 1]!.endMs };
  }
  if (latestStartMs < extendedEnd) return { status: "wait" };
  return { status: "insufficient", n: extended.length, fromMs: firstValidStartMs, toMs: extendedEnd };
}

const KEYS_OF: Record<WindowKind, readonly string[]> = { short: SHORT_TERM_KEYS, long: LONG_TERM_KEYS };

/** The stay's baseline medians for the version (index key → median), leaving out indices with no baseline. */
export async function baselineMedians(db: Knex, stayId: string, version: string): Promise<Map<string, number>> {
  const rows = await db("baselines").where({ stay_id: stayId, algorithm_version: version }).whereNotNull("median").select("index_key", "median");
  return new Map(rows.map((r) => [r.index_key, r.median!]));
}

/** value − baseline median for every index of `values` that has both; null when nothing applies. */
export function baselineDelta(values: Readonly<Record<string, number | null>> | null, medians: ReadonlyMap<string, number>): Record<string, number | null> | null {
  if (!values || medians.size === 0) return null;
  const out: Record<string, number | null> = {};
  let any = false;
  for (const [key, m] of medians) {
    if (!(key in values)) continue;
    const v = values[key];
    out[key] = v === null || v === undefined ? null : v - m;
    any = true;
  }
  return any ? out : null;
}

/**
 * Stores every baseline of the stay that can now be decided (see chooseBaselineValues) and, when any was added,
 * rewrites `baseline_delta` of the stay's windows of that kind from all its baselines. Returns the rows added.
 */
export async function settleBaselines(trx: Knex.Transaction, stayId: string, version: string, settings: BaselineSettings): Promise<number> {
  const have = new Set((await trx("baselines").where({ stay_id: stayId, algorithm_version: version }).select("index_key")).map((r) => r.index_key));
  let added = 0;
  for (const kind of ["short", "long"] as const) {
    const missing = KEYS_OF[kind].filter((k) => !have.has(k));
    if (!missing.length) continue;
    const minWindows = kind === "short" ? settings.minWindows : LONG_BASELINE_MIN_WINDOWS;
    const stats = await trx("index_windows")
      .where({ stay_id: stayId, algorithm_version: version, kind })
      .select(
        trx.raw("max(window_start) AS latest"),
        trx.raw("min(window_start) FILTER (WHERE grade <> 'unusable') AS first_valid"),
      )
      .first<{ latest: Date | null; first_valid: Date | null }>();
    if (!stats?.latest || !stats.first_valid) continue;
    const firstValidMs = stats.first_valid.getTime();
    const latestMs = stats.latest.getTime();
    if (latestMs < firstValidMs + settings.hours * 3_600_000) continue;
    const windows = await trx("index_windows")
      .where({ stay_id: stayId, algorithm_version: version, kind })
      .whereNot("grade", "unusable")
      .where("window_start", "<", new Date(firstValidMs + 2 * settings.hours * 3_600_000))
      .orderBy("window_start")
      .select("window_start", "window_end", "values");
    const rows = [];
    for (const key of missing) {
      const points: ValuePoint[] = [];
      for (const w of windows) {
        const v = w.values?.[key];
        if (typeof v === "number" && Number.isFinite(v)) points.push({ startMs: w.window_start.getTime(), endMs: w.window_end.getTime(), value: v });
      }
      const choice = chooseBaselineValues(points, firstValidMs, latestMs, settings.hours, minWindows);
      if (choice.status === "wait") continue;
      const robust = choice.status === "ready" ? robustBaseline(choice.values) : null;
      rows.push({
        stay_id: stayId,
        index_key: key,
        algorithm_version: version,
        median: robust?.median ?? null,
        spread: robust?.spread ?? null,
        n_windows: choice.status === "ready" ? choice.values.length : choice.n,
        from_at: new Date(choice.fromMs),
        to_at: new Date(choice.toMs),
      });
    }
    if (!rows.length) continue;
    await trx("baselines").insert(rows).onConflict(["stay_id", "index_key", "algorithm_version"]).ignore();
    added += rows.length;
    // Windows stored before the baseline existed get their change from baseline now (float8 arithmetic, the same
    // IEEE subtraction as in JavaScript, so old and new windows agree exactly). node-pg sends the key list as a text[].
    await trx.raw(
      `UPDATE index_windows w SET baseline_delta = (
         SELECT jsonb_object_agg(b.index_key,
                  CASE WHEN jsonb_typeof(w."values" -> b.index_key) = 'number'
                       THEN to_jsonb((w."values" ->> b.index_key)::float8 - b.median) END)
         FROM baselines b
         WHERE b.stay_id = w.stay_id AND b.algorithm_version = w.algorithm_version AND b.median IS NOT NULL
           AND b.index_key = ANY(?::text[]))
       WHERE w.stay_id = ? AND w.algorithm_version = ? AND w.kind = ? AND w."values" IS NOT NULL`,
      [[...KEYS_OF[kind]], stayId, version, kind],
    );
  }
  return added;
}
