// Heart rate of a stay over a chosen span, for the Night review's zoom panel: single beats for a short span (the
// tachogram, with what the engine's cleaning did to each beat), heart rate per time bucket for a longer one. The
// cleaning is the engine's own (cleanForWindows, as the stored windows use it), run on the span plus context either
// side, so a beat is marked edited here exactly when the windows treated it as edited.
import "server-only";
import type { Knex } from "knex";
import { z } from "zod";
import { loadBeats } from "@/lib/compute/beats";
import { LEFT_CONTEXT_S } from "@/lib/compute/stay-windows";
import { db as defaultDb } from "@/lib/db/knex";
import type { BeatRow } from "@/lib/db/tables";
import type { BeatAction, BeatLabel } from "@/lib/engine/clean/labels";
import { heartRate } from "@/lib/engine/time-domain";
import { cleanForWindows } from "@/lib/engine/windows";
import { asActiveStay, type StayScopeDTO } from "./stay-scope";
import { lowerBound } from "@/lib/engine/stats";

/** Spans up to this long come as single beats (a 15-min tachogram holds about 900–3,600 beats). */
export const SINGLE_BEATS_MAX_S = 15 * 60;
/** Longest span served: a 9-h DST night (DOMAIN W5). */
const BEATS_MAX_SPAN_S = 9 * 3600;
/** Most buckets returned for a long span: about one per pixel of a wide chart. */
export const MAX_BUCKETS = 1500;
/** Bucket lengths, s, the smallest that keeps a span within MAX_BUCKETS is used (8 h → 20 s, 1 h → 5 s). */
const BUCKET_STEPS_S = [1, 2, 5, 10, 15, 20, 30, 60, 120, 300] as const;
/**
 * Beats read either side of the span so every beat in it is classified from the same neighbours as in the stored
 * windows (the compute job reads the same LEFT_CONTEXT_S before each chunk; the classifier looks ~45 beats each way).
 */
const CONTEXT_S = LEFT_CONTEXT_S;
/** Upper bound on beats read: 9 h + 20 min of context at the neonatal gate's 240 bpm is 134,400. */
const MAX_BEATS = 140_000;

export type BeatType = BeatRow["beat_type"];

interface SpanDTO {
  stayId: string;
  from: string;
  to: string;
}

/** One entry per beat whose time lies in the span, as columns. */
export interface SingleBeatsDTO extends SpanDTO {
  mode: "beats";
  /** Beat time, epoch s (the beat ending each interval). */
  t: number[];
  /** Interval as the device reported it, ms, and the rate it implies, 60000 / rr, per minute. */
  rr: number[];
  hr: number[];
  /** The device's beat label: N normal, V ventricular, S supraventricular, P paced, ? unknown. */
  type: BeatType[];
  /** True when the engine's cleaning did not keep the interval as measured (interpolated, split, merged, removed). */
  edited: boolean[];
  /** What the cleaning concluded about each interval, and what it did. */
  label: BeatLabel[];
  action: BeatAction[];
}

/** Heart rate per bucket of `bucketS` seconds, from the cleaned NN intervals whose beat lies in the bucket. */
export interface HeartRateBucketsDTO extends SpanDTO {
  mode: "buckets";
  bucketS: number;
  /** Bucket start, epoch s. */
  t: number[];
  /** 60000 / mean NN (the engine's heart-rate definition), and the rates of the longest and shortest NN; null when
   *  the bucket holds no beat. */
  mean: (number | null)[];
  min: (number | null)[];
  max: (number | null)[];
  n: number[];
}

export type BeatsViewDTO = SingleBeatsDTO | HeartRateBucketsDTO;

const instant = z.iso.datetime({ offset: true, error: "must be an ISO 8601 date-time, e.g. 2026-11-30T03:00:00Z" });

/** The query of the beats route: both `from` and `to`, or neither (then: the last 5 min of the latest night). */
export const beatsQuerySchema = z
  .object({ from: instant.optional(), to: instant.optional() })
  .refine((q) => (q.from === undefined) === (q.to === undefined), { error: "Give both from and to, or neither." })
  .refine((q) => q.from === undefined || Date.parse(q.to!) > Date.parse(q.from), { error: "to must be later than from." })
  .refine((q) => q.from === undefined || Date.parse(q.to!) - Date.parse(q.from) <= BEATS_MAX_SPAN_S * 1000, {
    error: `The span must not exceed ${BEATS_MAX_SPAN_S / 3600} h.`,
  });

/** The smallest bucket length from BUCKET_STEPS_S that keeps a span within MAX_BUCKETS buckets. */
export function bucketSeconds(spanS: number): number {
  for (const s of BUCKET_STEPS_S) if (Math.ceil(spanS / s) + 1 <= MAX_BUCKETS) return s;
  return BUCKET_STEPS_S[BUCKET_STEPS_S.length - 1]!;
}


/**
 * Device beat labels by beat time (epoch ms) for the stay's bed in [fromMs, toMs): beats of devices while assigned
 * to the bed, as loadBeats reads them (it returns intervals, not labels).
 */
async function beatTypes(knex: Knex, stay: StayScopeDTO, fromMs: number, toMs: number): Promise<Map<number, BeatType>> {
  const rows = await knex("beats as b")
    .join("device_assignments as a", "a.device_id", "b.device_id")
    .where("a.bed_id", stay.bedId)
    .whereRaw("b.beat_at >= a.assigned_from")
    .where((q) => q.whereNull("a.assigned_to").orWhereRaw("b.beat_at < a.assigned_to"))
    .where("b.beat_at", ">=", new Date(fromMs))
    .where("b.beat_at", "<", new Date(toMs))
    .select<{ ms: number; beat_type: BeatType }[]>(knex.raw("round(extract(epoch FROM b.beat_at) * 1000)::float8 AS ms"), "b.beat_type");
  return new Map(rows.map((r) => [r.ms, r.beat_type]));
}


/**
 * The stay's heart rate over [fromMs, toMs): single beats when the span is at most SINGLE_BEATS_MAX_S, else heart
 * rate per bucket. Beats come through loadBeats (device assignments and stay bounds); spans reaching outside the
 * stay simply hold fewer beats.
 */
export async function beatsView(stay: StayScopeDTO, fromMs: number, toMs: number, knex: Knex = defaultDb): Promise<BeatsViewDTO> {
  if (!(Number.isFinite(fromMs) && Number.isFinite(toMs) && toMs > fromMs)) throw new RangeError("the span must run forwards");
  const spanS = (toMs - fromMs) / 1000;
  if (spanS > BEATS_MAX_SPAN_S) throw new RangeError(`the span must not exceed ${BEATS_MAX_SPAN_S} s`);
  const fromS = fromMs / 1000;
  const toS = toMs / 1000;
  const base = { stayId: stay.stayId, from: new Date(fromMs).toISOString(), to: new Date(toMs).toISOString() };

  const series = await loadBeats(knex, asActiveStay(stay), fromMs - CONTEXT_S * 1000, toMs + CONTEXT_S * 1000, MAX_BEATS);
  const cleaned = series.count ? cleanForWindows(series, stay.population, true).interpolated.value : null;
  // loadBeats always gives beat times (the type leaves them optional for series built from intervals alone).
  const times = series.times ?? new Float64Array(0);

  if (spanS <= SINGLE_BEATS_MAX_S) {
    const out: SingleBeatsDTO = { mode: "beats", ...base, t: [], rr: [], hr: [], type: [], edited: [], label: [], action: [] };
    if (!cleaned) return out;
    const a = lowerBound(times, fromS);
    const b = lowerBound(times, toS);
    const types = b > a ? await beatTypes(knex, stay, fromMs, toMs) : new Map<number, BeatType>();
    for (let k = a; k < b; k++) {
      const t = times[k]!;
      const rr = series.rr[k]!;
      out.t.push(t);
      out.rr.push(rr);
      out.hr.push(60000 / rr);
      out.type.push(types.get(Math.round(t * 1000)) ?? "?");
      out.label.push(cleaned.labels[k]!);
      out.action.push(cleaned.actions[k]!);
      out.edited.push(cleaned.actions[k] !== "kept");
    }
    return out;
  }

  const bucketS = bucketSeconds(spanS);
  const originS = Math.floor(fromS / bucketS) * bucketS;
  const count = Math.ceil((toS - originS) / bucketS);
  const out: HeartRateBucketsDTO = { mode: "buckets", ...base, bucketS, t: [], mean: [], min: [], max: [], n: [] };
  for (let j = 0; j < count; j++) {
    // The first and last buckets are clipped to the span.
    const lo = Math.max(fromS, originS + j * bucketS);
    const hi = Math.min(toS, originS + (j + 1) * bucketS);
    out.t.push(originS + j * bucketS);
    const a = cleaned ? lowerBound(cleaned.times, lo) : 0;
    const b = cleaned ? lowerBound(cleaned.times, hi) : 0;
    out.n.push(b - a);
    if (!cleaned || b <= a) {
      out.mean.push(null);
      out.min.push(null);
      out.max.push(null);
      continue;
    }
    const nn = cleaned.nn.subarray(a, b);
    let shortest = Infinity;
    let longest = -Infinity;
    for (const v of nn) {
      if (v < shortest) shortest = v;
      if (v > longest) longest = v;
    }
    out.mean.push(heartRate(nn).value);
    out.min.push(60000 / longest);
    out.max.push(60000 / shortest);
  }
  return out;
}
