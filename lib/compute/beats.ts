// A stay's beats: the beats of every device assigned to the stay's bed, inside the assignment period and the stay
// period, in beat_at order (device time corrected to the server clock, DOMAIN §4). This is how beats reach a
// patient: device → assignment → bed → stay.
import type { Knex } from "knex";
import type { Population } from "@/lib/engine/clean/range-gate";
import type { BeatSeries } from "@/lib/engine/windows";

/** The part of a stay the compute job reads. */
export interface ActiveStay {
  stayId: string;
  bedId: string;
  unitId: string;
  timeZone: string;
  population: Population;
  admittedAt: Date;
  dischargedAt: Date | null;
}

/** Stays in progress at `now`, and stays discharged within `recentMs` before it (their last windows may be due). */
export async function activeStays(db: Knex, now: Date, recentMs: number): Promise<ActiveStay[]> {
  const rows = await db("stays as s")
    .join("beds as b", "b.id", "s.bed_id")
    .join("units as u", "u.id", "b.unit_id")
    .where("s.admitted_at", "<=", now)
    .where((q) => q.whereNull("s.discharged_at").orWhere("s.discharged_at", ">", new Date(now.getTime() - recentMs)))
    .orderBy("s.admitted_at")
    .select<{ id: string; bed_id: string; unit_id: string; time_zone: string; kind: string; admitted_at: Date; discharged_at: Date | null }[]>(
      "s.id", "s.bed_id", "b.unit_id", "u.time_zone", "u.kind", "s.admitted_at", "s.discharged_at",
    );
  return rows.map((r) => ({
    stayId: r.id,
    bedId: r.bed_id,
    unitId: r.unit_id,
    timeZone: r.time_zone,
    population: r.kind === "neonatal" ? "neonatal" : "adult",
    admittedAt: r.admitted_at,
    dischargedAt: r.discharged_at,
  }));
}

/** One device's share of a stay: its assignment to the bed ∩ the stay ∩ the requested span, [fromMs, toMs). */
interface Segment {
  deviceId: string;
  fromMs: number;
  toMs: number;
}

/**
 * Where the stay's beats are, for beat_at in [fromMs, untilMs]. Looked up first, so each beats query names one
 * device and a time range, which the (device_id, beat_at) index of every partition answers directly; a join would
 * leave the planner no choice but to scan whole day partitions of every device.
 */
async function segments(db: Knex, stay: ActiveStay, fromMs: number, untilMs: number): Promise<Segment[]> {
  const lo = Math.max(fromMs, stay.admittedAt.getTime());
  // beat_at has millisecond precision, so "at or before untilMs" is "before untilMs + 1".
  const hi = Math.min(untilMs + 1, stay.dischargedAt?.getTime() ?? Infinity);
  if (!(hi > lo)) return [];
  const rows = await db("device_assignments")
    .where({ bed_id: stay.bedId })
    .where("assigned_from", "<", new Date(hi))
    .where((q) => q.whereNull("assigned_to").orWhere("assigned_to", ">", new Date(lo)))
    .select("device_id", "assigned_from", "assigned_to");
  return rows
    .map((a) => ({ deviceId: a.device_id, fromMs: Math.max(lo, a.assigned_from.getTime()), toMs: Math.min(hi, a.assigned_to?.getTime() ?? Infinity) }))
    .filter((x) => x.toMs > x.fromMs);
}

const inSegment = (db: Knex, s: Segment) =>
  db("beats").where("device_id", s.deviceId).where("beat_at", ">=", new Date(s.fromMs)).where("beat_at", "<", new Date(s.toMs));

/** Time of the stay's last beat at or before `untilMs`, epoch s; null without beats. */
export async function lastBeatS(db: Knex, stay: ActiveStay, untilMs: number): Promise<number | null> {
  let last: number | null = null;
  for (const s of await segments(db, stay, stay.admittedAt.getTime(), untilMs)) {
    const row = await inSegment(db, s).select(db.raw("extract(epoch FROM max(beat_at))::float8 AS t")).first<{ t: number | null }>();
    if (row?.t != null && (last === null || row.t > last)) last = row.t;
  }
  return last;
}

/**
 * Up to `limit` beats with beat_at in [fromMs, untilMs], in time order, as the engine's series: times in epoch seconds
 * (the time of the beat ending each interval), intervals in ms, device quality and lead-off per beat.
 */
export async function loadBeats(db: Knex, stay: ActiveStay, fromMs: number, untilMs: number, limit: number): Promise<BeatSeries & { count: number }> {
  type Row = { t: number; seq: string; rr_ms: number; quality: number; lead_off: boolean };
  let rows: Row[] = [];
  for (const s of await segments(db, stay, fromMs, untilMs)) {
    rows.push(
      ...(await inSegment(db, s)
        .orderBy("beat_at")
        .orderBy("seq")
        .limit(limit)
        .select<Row[]>(db.raw("extract(epoch FROM beat_at)::float8 AS t"), "seq", "rr_ms", "quality", "lead_off")),
    );
  }
  // Several devices in turn (a swap at the bedside): merge them in time order.
  if (rows.length > limit || rows.some((r, k) => k > 0 && r.t < rows[k - 1]!.t)) {
    rows = rows.sort((a, b) => a.t - b.t).slice(0, limit);
  }
  // A device clock corrected backwards (DOMAIN §4: one step a night is expected) re-times a few beats onto or
  // before ones already placed; the engine needs strictly increasing beat times, so those few beats are left out
  // (at most the size of the step, typically under a second) rather than stopping the stay's computation.
  let lastT = -Infinity;
  rows = rows.filter((r) => {
    if (r.t <= lastT) return false;
    lastT = r.t;
    return true;
  });
  const n = rows.length;
  const rr = new Float64Array(n);
  const times = new Float64Array(n);
  const quality = new Float64Array(n);
  const leadOff = new Uint8Array(n);
  rows.forEach((r, k) => {
    rr[k] = r.rr_ms;
    times[k] = r.t;
    quality[k] = r.quality;
    leadOff[k] = r.lead_off ? 1 : 0;
  });
  return { rr, times, quality, leadOff, count: n };
}
