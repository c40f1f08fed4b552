// Stream health for biomedical engineers: per device, the stream's state, last beat, beats received per minute, gaps,
// duplicates, malformed events, reconnects, clock offset and drift, and the last 24 h minute by minute. Stream data
// only — no clinical value, no patient. A fixed number of queries whatever the number of devices: the unit table reads
// its devices, their 24-h minute samples (longest gap included: the ingest keeps it per minute, so no beat of the day
// is scanned) and their beats of the last 5 min in three statements (and the unit in a fourth), in parallel.
import "server-only";
import type { Knex } from "knex";
import { db as defaultDb } from "@/lib/db/knex";
import type { DeviceStatus } from "@/lib/db/tables";
import { streamStateOf, type StreamState } from "./stream-state";

const MINUTE_MS = 60_000;
const HOUR_MS = 3_600_000;
/** Minutes in the health window: the 24 h ending with the minute that holds `now`. */
export const HEALTH_MINUTES = 24 * 60;
/** Beats received per minute are averaged over this stretch before `now`. */
export const RATE_WINDOW_MS = 5 * MINUTE_MS;
/** Clock drift needs minute offsets spanning at least this long: over a shorter stretch the offset estimate's own
 *  jitter (network delay varies by milliseconds) would pass for drift (our choice). */
export const DRIFT_MIN_SPAN_MS = 2 * HOUR_MS;
/** A live stream with at least this many gaps, malformed events and reconnects together in 24 h ranks as troubled:
 *  one or two reconnects a day are routine (a cable moved, network maintenance); five is worth a look (our choice). */
export const MANY_EVENTS_24H = 5;

/**
 * Trouble tiers, most trouble first: offline (nothing for longer than OFFLINE_AFTER_MS) > stale > live with many
 * gaps, malformed events or reconnects > leads off (the device is heard and says it has no patient signal: calmer than
 * a silent stream, but worth a look) > live and clean > not streaming (Corvane does not read the device — in
 * maintenance, without a bed or without a token — so its stream cannot be in trouble).
 */
export const TROUBLE_TIERS = { offline: 5, stale: 4, troubled: 3, leads_off: 2, clean: 1, not_streaming: 0 } as const;
export type TroubleTier = keyof typeof TROUBLE_TIERS;
const TIER_SCALE = 1e10;

export interface DriftDTO {
  /** Least-squares slope of the minute clock offsets over the window, ms per hour; null with a reason. */
  msPerHour: number | null;
  /** Value of the fitted line at the window's start (ms), to draw it; null with msPerHour. */
  interceptMs: number | null;
  reason: string | null;
  /** Minutes with an offset sample, and the time between the first and last of them. */
  samples: number;
  spanMinutes: number;
}

export interface StreamHealthRowDTO {
  deviceId: string;
  serial: string;
  model: string;
  status: DeviceStatus;
  bedLabel: string | null;
  state: StreamState;
  /** Why Corvane does not read the device, when state is not_streaming. */
  notStreamingBecause: string | null;
  connected: boolean;
  lastBeatAt: string | null;
  /** Beats stored with a beat time in the RATE_WINDOW_MS before now, per minute (a stream rate, not a heart rate). */
  beatsPerMinute: number;
  /** 24 h: runs of sequence numbers the device never delivered, and the records in them (device_health_minutes). */
  gaps: number;
  missingRecords: number;
  /** 24 h: the longest time between two consecutive stored beats (beat_at), s: the largest of the window's minute
   *  samples (device_health_minutes.longest_gap_ms, kept by the ingest as it stores beats), so a gap counts in the
   *  minute its closing beat was stored, whole even if it began before the window; null when no beat stored in the
   *  window followed an earlier one. */
  longestGapS: number | null;
  duplicates: number;
  malformed: number;
  /** Malformed events by kind since the device's counters began (device_stream_status.malformed_by_kind). */
  malformedByKind: Record<string, number>;
  reconnects: number;
  /** Device clock minus server clock, ms, as last measured. */
  clockOffsetMs: number | null;
  drift: DriftDTO;
  trouble: { tier: TroubleTier; /** Larger = more trouble; sorts the table "most trouble first". */ rank: number };
}

export interface UnitStreamHealthDTO {
  unit: { id: string; name: string; timeZone: string };
  asOf: string;
  /** Start of the 24-h window (a whole UTC minute). */
  from: string;
  counts: Record<StreamState, number>;
  /** MANY_EVENTS_24H, for the page's explanation of the trouble order. */
  manyEvents: number;
  rows: StreamHealthRowDTO[];
}

export interface DeviceHealthSeriesDTO {
  deviceId: string;
  timeZone: string;
  asOf: string;
  from: string;
  latest: StreamHealthRowDTO;
  /** Minute starts, epoch seconds, HEALTH_MINUTES of them; every other column is aligned with it. */
  t: number[];
  /** Beats stored with a beat time in the minute (the beats table, so beats backfilled later count where they belong). */
  beats: number[];
  /** From the writer's minute samples (device_health_minutes): 0 where no sample. */
  gaps: number[];
  duplicates: number[];
  malformed: number[];
  reconnects: number[];
  /** Null where the minute has no sample or no offset. */
  clockOffsetMs: (number | null)[];
}

/** Which devices a read covers: a unit's (not decommissioned) or one device (whatever its status). */
type Scope = { unitId: string } | { deviceId: string };

const scopeSql = (s: Scope) => ("unitId" in s ? { sql: "d.unit_id = :scopeId AND d.status <> 'decommissioned'", id: s.unitId } : { sql: "d.id = :scopeId", id: s.deviceId });

type DeviceRowSql = {
  id: string;
  serial: string;
  model: string;
  status: DeviceStatus;
  has_token: boolean;
  bed_label: string | null;
  assigned: boolean;
  connected: boolean | null;
  last_seen_at: Date | null;
  last_beat_at: Date | null;
  lead_off: boolean | null;
  clock_offset_ms: number | null;
  malformed_by_kind: Record<string, number> | null;
};

/** The devices with their open bed assignment at `now` and their stream status row. */
function devicesQuery(knex: Knex, scope: Scope, now: Date) {
  const s = scopeSql(scope);
  return knex.raw<{ rows: DeviceRowSql[] }>(
    `SELECT d.id, d.serial, d.model, d.status, d.stream_token_hash IS NOT NULL AS has_token,
            a.bed_label, a.device_id IS NOT NULL AS assigned,
            st.connected, st.last_seen_at, st.last_beat_at, st.lead_off, st.clock_offset_ms, st.malformed_by_kind
       FROM devices d
       LEFT JOIN LATERAL (
         SELECT a.device_id, b.label AS bed_label FROM device_assignments a JOIN beds b ON b.id = a.bed_id
          WHERE a.device_id = d.id AND a.assigned_from <= :now AND (a.assigned_to IS NULL OR a.assigned_to > :now)
          ORDER BY a.assigned_from DESC LIMIT 1
       ) a ON true
       LEFT JOIN device_stream_status st ON st.device_id = d.id
      WHERE ${s.sql}
      ORDER BY d.serial`,
    { scopeId: s.id, now },
  );
}

type MinuteTotalsSql = {
  device_id: string;
  gaps: number;
  missing: number;
  duplicates: number;
  malformed: number;
  reconnects: number;
  slope: number | null;
  intercept: number | null;
  samples: number;
  span_s: number | null;
  longest_gap_ms: number | null;
};

/**
 * Per device, the window's minute samples summed, the longest of their gaps, and the least-squares line through the
 * minute clock offsets (PostgreSQL's regr_slope / regr_intercept, x = hours since the window's start, so the slope is
 * in ms per hour).
 */
function minuteTotalsQuery(knex: Knex, scope: Scope, from: Date, now: Date) {
  const s = scopeSql(scope);
  return knex.raw<{ rows: MinuteTotalsSql[] }>(
    `SELECT m.device_id,
            sum(m.gaps)::float8 AS gaps, sum(m.missing_seqs)::float8 AS missing, sum(m.duplicates)::float8 AS duplicates,
            sum(m.malformed)::float8 AS malformed, sum(m.reconnects)::float8 AS reconnects,
            regr_slope(m.clock_offset_ms, extract(epoch FROM m.minute - :from) / 3600) AS slope,
            regr_intercept(m.clock_offset_ms, extract(epoch FROM m.minute - :from) / 3600) AS intercept,
            count(m.clock_offset_ms)::int AS samples,
            extract(epoch FROM max(m.minute) FILTER (WHERE m.clock_offset_ms IS NOT NULL)
                             - min(m.minute) FILTER (WHERE m.clock_offset_ms IS NOT NULL))::float8 AS span_s,
            max(m.longest_gap_ms) AS longest_gap_ms
       FROM device_health_minutes m JOIN devices d ON d.id = m.device_id
      WHERE ${s.sql} AND m.minute >= :from AND m.minute <= :now
      GROUP BY m.device_id`,
    { scopeId: s.id, from, now },
  );
}

/** Per device, beats with a beat time in the rate window (read through the (device_id, beat_at) index). */
function recentBeatsQuery(knex: Knex, scope: Scope, now: Date) {
  const s = scopeSql(scope);
  return knex.raw<{ rows: { device_id: string; recent: number }[] }>(
    `SELECT d.id AS device_id, r.recent
       FROM devices d
       CROSS JOIN LATERAL (
         SELECT count(*)::int AS recent FROM beats b WHERE b.device_id = d.id AND b.beat_at > :rateFrom AND b.beat_at <= :now
       ) r
      WHERE ${s.sql}`,
    { scopeId: s.id, now, rateFrom: new Date(now.getTime() - RATE_WINDOW_MS) },
  );
}

/** Start of the health window: HEALTH_MINUTES whole minutes ending with the one that holds `now`. */
export function healthWindowFrom(now: Date): Date {
  const t = now.getTime();
  return new Date(t - (((t % MINUTE_MS) + MINUTE_MS) % MINUTE_MS) - (HEALTH_MINUTES - 1) * MINUTE_MS);
}

function driftOf(t: MinuteTotalsSql | undefined): DriftDTO {
  const samples = t?.samples ?? 0;
  const spanMinutes = Math.round((t?.span_s ?? 0) / 60);
  if (!t || samples === 0) return { msPerHour: null, interceptMs: null, reason: "No clock offset measured in the last 24 h.", samples: 0, spanMinutes: 0 };
  if ((t.span_s ?? 0) * 1000 < DRIFT_MIN_SPAN_MS || samples < 2 || t.slope === null) {
    return {
      msPerHour: null,
      interceptMs: null,
      reason: `Clock offsets span only ${spanMinutes} min of the last 24 h; drift needs at least ${DRIFT_MIN_SPAN_MS / HOUR_MS} h.`,
      samples,
      spanMinutes,
    };
  }
  return { msPerHour: t.slope, interceptMs: t.intercept, reason: null, samples, spanMinutes };
}

function notStreamingReason(d: DeviceRowSql): string | null {
  if (d.status !== "active") return d.status === "maintenance" ? "in maintenance" : "decommissioned";
  if (!d.assigned) return "not assigned to a bed";
  if (!d.has_token) return "no stream token";
  return null;
}

function troubleOf(state: StreamState, lastBeatAt: Date | null, events: number, now: Date): StreamHealthRowDTO["trouble"] {
  const tier: TroubleTier =
    state === "not_streaming" ? "not_streaming"
    : state === "offline" ? "offline"
    : state === "stale" ? "stale"
    : state === "leads_off" ? "leads_off"
    : events >= MANY_EVENTS_24H ? "troubled"
    : "clean";
  // Within offline and stale, the longer silence first (never a beat: longest); within leads off and live, more events
  // first.
  const silenceS = lastBeatAt ? Math.floor((now.getTime() - lastBeatAt.getTime()) / 1000) : TIER_SCALE - 1;
  const within = tier === "offline" || tier === "stale" ? silenceS : tier === "not_streaming" ? 0 : events;
  return { tier, rank: TROUBLE_TIERS[tier] * TIER_SCALE + Math.max(0, Math.min(within, TIER_SCALE - 1)) };
}

async function healthRows(knex: Knex, scope: Scope, now: Date, from: Date): Promise<StreamHealthRowDTO[]> {
  const [devices, totals, recent] = await Promise.all([
    devicesQuery(knex, scope, now),
    minuteTotalsQuery(knex, scope, from, now),
    recentBeatsQuery(knex, scope, now),
  ]);
  const totalsOf = new Map(totals.rows.map((t) => [t.device_id, t]));
  const recentOf = new Map(recent.rows.map((r) => [r.device_id, r.recent]));
  return devices.rows.map((d) => {
    const t = totalsOf.get(d.id);
    const longestGapMs = t?.longest_gap_ms ?? null;
    const because = notStreamingReason(d);
    const state = streamStateOf(
      { streamed: because === null, connected: d.connected ?? false, lastBeatAt: d.last_beat_at, lastSeenAt: d.last_seen_at, leadOff: d.lead_off ?? false },
      now,
    );
    const gaps = t?.gaps ?? 0;
    const malformed = t?.malformed ?? 0;
    const reconnects = t?.reconnects ?? 0;
    return {
      deviceId: d.id,
      serial: d.serial,
      model: d.model,
      status: d.status,
      bedLabel: d.bed_label,
      state,
      notStreamingBecause: because,
      connected: d.connected ?? false,
      lastBeatAt: d.last_beat_at?.toISOString() ?? null,
      beatsPerMinute: (recentOf.get(d.id) ?? 0) / (RATE_WINDOW_MS / MINUTE_MS),
      gaps,
      missingRecords: t?.missing ?? 0,
      longestGapS: longestGapMs === null ? null : longestGapMs / 1000,
      duplicates: t?.duplicates ?? 0,
      malformed,
      malformedByKind: d.malformed_by_kind ?? {},
      reconnects,
      clockOffsetMs: d.clock_offset_ms,
      drift: driftOf(t),
      trouble: troubleOf(state, d.last_beat_at, gaps + malformed + reconnects, now),
    };
  });
}

/**
 * Stream health of every device of a unit (home unit; decommissioned devices left out) as of `now`, in serial order;
 * null when there is no such unit. Four queries in one parallel round, whatever the number of devices.
 */
export async function unitStreamHealth(unitId: string, now: Date = new Date(), knex: Knex = defaultDb): Promise<UnitStreamHealthDTO | null> {
  const from = healthWindowFrom(now);
  const [unit, rows] = await Promise.all([
    knex("units").where({ id: unitId }).first("id", "name", "time_zone"),
    healthRows(knex, { unitId }, now, from),
  ]);
  if (!unit) return null;
  const counts: Record<StreamState, number> = { live: 0, leads_off: 0, stale: 0, offline: 0, not_streaming: 0 };
  for (const r of rows) counts[r.state] += 1;
  return { unit: { id: unit.id, name: unit.name, timeZone: unit.time_zone }, asOf: now.toISOString(), from: from.toISOString(), counts, manyEvents: MANY_EVENTS_24H, rows };
}

/**
 * One device's last 24 h minute by minute, with its latest figures (as in the unit table); null when there is no
 * such device. The caller has checked that the device belongs to the unit in the address (lib/devices/device-scope.ts).
 */
export async function deviceHealthSeries(deviceId: string, now: Date = new Date(), knex: Knex = defaultDb): Promise<DeviceHealthSeriesDTO | null> {
  const from = healthWindowFrom(now);
  const [rows, unit, perMinuteBeats, minutes] = await Promise.all([
    healthRows(knex, { deviceId }, now, from),
    knex("devices as d").join("units as u", "u.id", "d.unit_id").where("d.id", deviceId).first("u.time_zone"),
    knex.raw<{ rows: { k: number; n: number }[] }>(
      `SELECT floor(extract(epoch FROM beat_at - :from) / 60)::int AS k, count(*)::int AS n
         FROM beats WHERE device_id = :deviceId AND beat_at >= :from AND beat_at <= :now GROUP BY 1`,
      { deviceId, from, now },
    ),
    knex("device_health_minutes")
      .where({ device_id: deviceId })
      .andWhere("minute", ">=", from)
      .andWhere("minute", "<=", now)
      .select("minute", "gaps", "duplicates", "malformed", "reconnects", "clock_offset_ms"),
  ]);
  const latest = rows[0];
  if (!latest || !unit) return null;
  const fromS = from.getTime() / 1000;
  const t = Array.from({ length: HEALTH_MINUTES }, (_, k) => fromS + k * 60);
  const zeros = () => new Array<number>(HEALTH_MINUTES).fill(0);
  const out: DeviceHealthSeriesDTO = {
    deviceId,
    timeZone: unit.time_zone,
    asOf: now.toISOString(),
    from: from.toISOString(),
    latest,
    t,
    beats: zeros(),
    gaps: zeros(),
    duplicates: zeros(),
    malformed: zeros(),
    reconnects: zeros(),
    clockOffsetMs: new Array<number | null>(HEALTH_MINUTES).fill(null),
  };
  for (const r of perMinuteBeats.rows) if (r.k >= 0 && r.k < HEALTH_MINUTES) out.beats[r.k] = r.n;
  for (const m of minutes) {
    const k = Math.round((m.minute.getTime() - from.getTime()) / MINUTE_MS);
    if (k < 0 || k >= HEALTH_MINUTES) continue;
    out.gaps[k] = m.gaps;
    out.duplicates[k] = m.duplicates;
    out.malformed[k] = m.malformed;
    out.reconnects[k] = m.reconnects;
    out.clockOffsetMs[k] = m.clock_offset_ms;
  }
  return out;
}
