// The Handoff summary (GLOSSARY): one patient's review night, or every patient of a unit, in the terms a clinician
// hands over at shift change (DOMAIN §1 "Handoff summary"): how long the patient was monitored and how much of the
// night usable windows cover, how many windows were good, limited or unusable, where the key indices sat against
// the patient's own baseline, flags, annotations, device issues and the clinician's note. Read-only except for the
// note (saveHandoffNoteAs), which is versioned so two people writing at once cannot overwrite each other.
import "server-only";
import type { Knex } from "knex";
import { formatInTimeZone } from "date-fns-tz";
import { auditAs, type Actor } from "@/lib/auth/guard";
import type { ActionResult } from "@/lib/auth/action-result";
import { can } from "@/lib/auth/roles";
import { loadBeats } from "@/lib/compute/beats";
import { db as defaultDb } from "@/lib/db/knex";
import type { IndexWindowRow, WindowKind } from "@/lib/db/tables";
import { median } from "@/lib/engine/stats";
import { ALGORITHM_VERSION } from "@/lib/engine/version";
import { annotationsOf, type AnnotationDTO } from "./annotations";
import { baselinesOf, flagsOfStay, type BaselineDTO, type FlagViewDTO } from "./flags-view";
import type { HandoffNoteInput } from "./handoff.validation";
import { latestNight, reviewNight, type NightTimes, type ReviewNight } from "./night";
import { asActiveStay, stayScope, type StayScopeDTO } from "./stay-scope";

/** A stretch without beats longer than this is listed as a device issue (the brief's 5 min). */
export const GAP_LISTED_AFTER_S = 5 * 60;
/** DOMAIN §4: a device clock more than 1 s off the server's is worth a look. */
const CLOCK_OFFSET_NOTED_MS = 1000;
/** Upper bound on beats read for one stay's night: 5 per second is above any rate the range gates keep (240/min). */
const MAX_BEATS_PER_S = 5;
/** Beats read beyond the monitored span at each end, s, so the intervals crossing its bounds are counted in part. */
const EDGE_READ_S = 5;

/** The indices a handoff reports, with how they are shown. Long ones come from the 60-min windows. */
const HANDOFF_INDICES = [
  { key: "hr", kind: "short", label: "Heart rate", unit: "/min", digits: 0 },
  { key: "sdnn", kind: "short", label: "SDNN", unit: "ms", digits: 0 },
  { key: "rmssd", kind: "short", label: "RMSSD", unit: "ms", digits: 0 },
  { key: "dfa_alpha1", kind: "short", label: "DFA α1", unit: "", digits: 2 },
  { key: "sampen", kind: "short", label: "SampEn", unit: "", digits: 2 },
  { key: "mse_ci", kind: "long", label: "MSE complexity index", unit: "", digits: 1 },
  { key: "dfa_alpha2", kind: "long", label: "DFA α2", unit: "", digits: 2 },
] as const satisfies readonly { key: string; kind: WindowKind; label: string; unit: string; digits: number }[];

/** The direction rule, stated on every Handoff summary beside the arrows it explains. */
export const DIRECTION_RULE =
  "▲ above or ▼ below baseline when the night's median (usable windows only) differs from the patient's own baseline " +
  "median by more than one robust spread of the baseline (median absolute deviation × 1.4826); otherwise ● steady.";

export type Direction = "up" | "down" | "steady";

export interface IndexTrendDTO {
  key: string;
  kind: WindowKind;
  label: string;
  unit: string;
  digits: number;
  /** Median over the night's usable (good or limited) windows that have a value; null without any. */
  nightMedian: number | null;
  nWindows: number;
  baselineMedian: number | null;
  baselineSpread: number | null;
  baselineFrom: string | null;
  baselineTo: string | null;
  /** nightMedian − baselineMedian. */
  change: number | null;
  /** null when either median is missing; see `missing`. */
  direction: Direction | null;
  missing: string | null;
}

export interface GapDTO {
  from: string;
  to: string;
  minutes: number;
  /** The device reported lead-off with the beat that ended the gap. */
  leadOff: boolean;
}

export interface DeviceStreamDTO {
  deviceId: string;
  serial: string;
  model: string;
  assignedFrom: string;
  assignedTo: string | null;
  /** The device's stream status now (counters are the device's totals, not this night's); null before any stream. */
  status: null | {
    connected: boolean;
    lastBeatAt: string | null;
    leadOffNow: boolean;
    gaps: number;
    duplicates: number;
    reconnects: number;
    clockOffsetMs: number | null;
    clockOffsetNoted: boolean;
    lastError: string | null;
    updatedAt: string;
  };
}

export interface HandoffNoteDTO {
  stayId: string;
  unitId: string;
  night: string;
  note: string;
  version: number;
  updatedAt: string;
  updatedBy: string;
}

export interface NightDTO {
  night: string;
  from: string;
  to: string;
  /** Real length, h (7, 8 or 9 for 22:00 → 06:00 across DST changes). */
  hours: number;
  /** The night has not ended yet: figures cover the part until `asOf`. */
  inProgress: boolean;
  /** Hours of the night that have passed (= hours once it is over). */
  elapsedHours: number;
  timeZone: string;
}

export interface PatientHandoffDTO {
  stay: Pick<StayScopeDTO, "stayId" | "unitId" | "unitName" | "bedLabel" | "displayName" | "recordNumber" | "admittedAt" | "dischargedAt">;
  night: NightDTO;
  /** Hours of the (elapsed) night the patient was in the bed. */
  presentHours: number;
  /** Hours with beats: time covered by beat-to-beat intervals inside the night. */
  monitoredHours: number;
  /** Share of the elapsed night covered by usable 5-min windows, 0–1; null before the night starts. */
  coverage: number | null;
  /** 5-min windows starting in the night, by grade. */
  windows: { good: number; limited: number; unusable: number; total: number };
  indices: IndexTrendDTO[];
  flags: FlagViewDTO[];
  annotations: AnnotationDTO[];
  device: {
    /** Stretches without beats longer than GAP_LISTED_AFTER_S, the night's edges included. */
    gaps: GapDTO[];
    /** Minutes from the previous beat to each beat the device marked lead-off. */
    leadOffMinutes: number;
    /** Share of the night's 5-min windows graded unusable; null without windows. */
    unusableShare: number | null;
    streams: DeviceStreamDTO[];
  };
  note: HandoffNoteDTO | null;
  algorithmVersion: string;
  asOf: string;
}

export interface UnitHandoffDTO {
  unit: { unitId: string; unitName: string; unitCode: string };
  night: NightDTO;
  stays: PatientHandoffDTO[];
  asOf: string;
}

const HOUR_MS = 3_600_000;

function nightDTO(night: ReviewNight, timeZone: string, now: Date): NightDTO {
  const end = Math.min(night.to.getTime(), Math.max(now.getTime(), night.from.getTime()));
  return {
    night: night.night,
    from: night.from.toISOString(),
    to: night.to.toISOString(),
    hours: night.hours,
    inProgress: now.getTime() >= night.from.getTime() && now.getTime() < night.to.getTime(),
    elapsedHours: (end - night.from.getTime()) / HOUR_MS,
    timeZone,
  };
}

/** Direction of a change against one robust spread: strictly more than the spread is up or down. */
function directionOf(change: number, spread: number): Direction {
  if (change > spread) return "up";
  if (change < -spread) return "down";
  return "steady";
}

const withUnit = (v: string, unit: string) => (unit === "" ? v : unit.startsWith("/") ? `${v}${unit}` : `${v} ${unit}`);

/** An index value with its unit at the index's precision, e.g. "72/min", "48 ms", "1.09". */
export const formatIndexValue = (v: number, ix: { digits: number; unit: string }) => withUnit(v.toFixed(ix.digits), ix.unit);

/** The change as shape and words, e.g. "▲ above baseline by 14 ms", "● steady (within ±6 ms)". */
export function describeChange(t: IndexTrendDTO): string {
  if (t.direction === null || t.change === null) return `— ${t.missing ?? "no comparison"}`;
  const by = formatIndexValue(Math.abs(t.change), t);
  if (t.direction === "up") return `▲ above baseline by ${by}`;
  if (t.direction === "down") return `▼ below baseline by ${by}`;
  return `● steady (within ±${formatIndexValue(t.baselineSpread ?? 0, t)})`;
}

type WindowPick = Pick<IndexWindowRow, "kind" | "window_start" | "window_end" | "grade" | "values">;

function trendsOf(windows: WindowPick[], night: ReviewNight, baselines: Record<string, BaselineDTO>): IndexTrendDTO[] {
  const inNight = (w: WindowPick) => w.window_start >= night.from && w.window_start < night.to;
  return HANDOFF_INDICES.map((ix) => {
    const values: number[] = [];
    for (const w of windows) {
      if (w.kind !== ix.kind || w.grade === "unusable" || !inNight(w)) continue;
      const v = w.values?.[ix.key];
      if (typeof v === "number" && Number.isFinite(v)) values.push(v);
    }
    const nightMedian = values.length ? median(values) : null;
    const b = baselines[ix.key];
    const base = b?.median ?? null;
    const spread = b?.spread ?? null;
    const change = nightMedian !== null && base !== null ? nightMedian - base : null;
    let missing: string | null = null;
    if (nightMedian === null) missing = "no usable windows this night";
    else if (!b) missing = "no personal baseline yet";
    else if (base === null) missing = "no baseline: too few usable windows at the start of the stay";
    return {
      key: ix.key,
      kind: ix.kind,
      label: ix.label,
      unit: ix.unit,
      digits: ix.digits,
      nightMedian,
      nWindows: values.length,
      baselineMedian: base,
      baselineSpread: spread,
      baselineFrom: b?.from ?? null,
      baselineTo: b?.to ?? null,
      change,
      direction: change !== null && spread !== null ? directionOf(change, spread) : null,
      missing,
    };
  });
}

/** Length of the union of [start, end) of the usable short windows, clipped to [fromMs, toMs), ms. */
function usableUnionMs(windows: WindowPick[], fromMs: number, toMs: number): number {
  let covered = 0;
  let cur = fromMs;
  for (const w of windows) {
    if (w.kind !== "short" || w.grade === "unusable") continue;
    const s = Math.max(w.window_start.getTime(), cur);
    const e = Math.min(w.window_end.getTime(), toMs);
    if (e > s) {
      covered += e - s;
      cur = e;
    }
  }
  return covered;
}

/**
 * Beat times are stored to the millisecond and devices stamp them at a coarser resolution still (up to 1/128 s,
 * DOMAIN §6), so consecutive intervals overlap or miss each other by a few ms; a silent stretch up to this long
 * between intervals is timing, not missing data (well under the shortest interval the range gates keep, 250 ms).
 */
const TIMING_SLACK_S = 0.015;

/**
 * Time with beats, gaps and lead-off over [spanFrom, spanTo] (epoch s), from the stay's beats. Each beat covers its
 * own interval [t − RR, t] (DOMAIN §2.1 coverage); where intervals overlap the time is counted once, and a stretch
 * between intervals no longer than TIMING_SLACK_S counts as covered. A gap is an uncovered stretch before a beat (or
 * after the last one up to the span's end); lead-off time runs from the previous beat to each beat the device marked
 * lead-off.
 */
function beatCoverage(
  beats: { rr: Float64Array; times: Float64Array; leadOff?: Uint8Array },
  spanFrom: number,
  spanTo: number,
  listGapsOverS = GAP_LISTED_AFTER_S,
): { coveredS: number; leadOffS: number; gaps: { fromS: number; toS: number; leadOff: boolean }[] } {
  let coveredS = 0;
  let leadOffS = 0;
  const gaps: { fromS: number; toS: number; leadOff: boolean }[] = [];
  let prev = spanFrom;
  for (let k = 0; k < beats.times.length; k++) {
    const t = beats.times[k]!;
    const own = t - beats.rr[k]! / 1000;
    const start = own - prev <= TIMING_SLACK_S ? prev : own;
    const gapFrom = Math.max(prev, spanFrom);
    const gapTo = Math.min(start, spanTo);
    const leadOff = beats.leadOff?.[k] === 1;
    if (gapTo - gapFrom > listGapsOverS) gaps.push({ fromS: gapFrom, toS: gapTo, leadOff });
    coveredS += Math.max(0, Math.min(t, spanTo) - Math.max(start, spanFrom));
    if (leadOff) leadOffS += Math.max(0, Math.min(t, spanTo) - gapFrom);
    prev = Math.max(prev, t);
    if (prev >= spanTo) break;
  }
  if (spanTo - Math.max(prev, spanFrom) > listGapsOverS) gaps.push({ fromS: Math.max(prev, spanFrom), toS: spanTo, leadOff: false });
  return { coveredS, leadOffS, gaps };
}

async function deviceStreams(knex: Knex, bedId: string, from: Date, to: Date): Promise<DeviceStreamDTO[]> {
  const rows = await knex("device_assignments as a")
    .join("devices as d", "d.id", "a.device_id")
    .leftJoin("device_stream_status as s", "s.device_id", "d.id")
    .where("a.bed_id", bedId)
    .where("a.assigned_from", "<", to)
    .where((q) => q.whereNull("a.assigned_to").orWhere("a.assigned_to", ">", from))
    .orderBy("a.assigned_from")
    .select<{
      device_id: string; serial: string; model: string; assigned_from: Date; assigned_to: Date | null; connected: boolean | null;
      last_beat_at: Date | null; lead_off: boolean | null; gaps: number | null; duplicates: number | null; reconnects: number | null;
      clock_offset_ms: number | null; last_error: string | null; updated_at: Date | null;
    }[]>(
      "d.id as device_id", "d.serial", "d.model", "a.assigned_from", "a.assigned_to", "s.connected", "s.last_beat_at", "s.lead_off",
      "s.gaps", "s.duplicates", "s.reconnects", "s.clock_offset_ms", "s.last_error", "s.updated_at",
    );
  return rows.map((r) => ({
    deviceId: r.device_id,
    serial: r.serial,
    model: r.model,
    assignedFrom: r.assigned_from.toISOString(),
    assignedTo: r.assigned_to?.toISOString() ?? null,
    status: r.updated_at
      ? {
          connected: r.connected ?? false,
          lastBeatAt: r.last_beat_at?.toISOString() ?? null,
          leadOffNow: r.lead_off ?? false,
          gaps: r.gaps ?? 0,
          duplicates: r.duplicates ?? 0,
          reconnects: r.reconnects ?? 0,
          clockOffsetMs: r.clock_offset_ms,
          clockOffsetNoted: r.clock_offset_ms !== null && Math.abs(r.clock_offset_ms) > CLOCK_OFFSET_NOTED_MS,
          lastError: r.last_error,
          updatedAt: r.updated_at.toISOString(),
        }
      : null,
  }));
}

/** The clinician's note on a stay's night, or null. */
async function handoffNoteOf(stay: Pick<StayScopeDTO, "stayId" | "unitId">, night: string, knex: Knex = defaultDb): Promise<HandoffNoteDTO | null> {
  const r = await knex("handoff_notes as n")
    .join("users as u", "u.id", "n.updated_by")
    .where({ "n.stay_id": stay.stayId, "n.night": night })
    // A date column comes back as a Date at local midnight unless read as text.
    .first<{ night: string; note: string; version: number; updated_at: Date; name: string } | undefined>(
      knex.raw("n.night::text AS night"), "n.note", "n.version", "n.updated_at", "u.name",
    );
  return r ? { stayId: stay.stayId, unitId: stay.unitId, night: r.night, note: r.note, version: r.version, updatedAt: r.updated_at.toISOString(), updatedBy: r.name } : null;
}

/** One patient's Handoff summary for a review night, as of `now` (a night in progress is summarised so far). */
export async function patientHandoff(stay: StayScopeDTO, night: ReviewNight, knex: Knex = defaultDb, now: Date = new Date()): Promise<PatientHandoffDTO> {
  const nightInfo = nightDTO(night, stay.night.timeZone, now);
  const fromMs = night.from.getTime();
  const endMs = fromMs + nightInfo.elapsedHours * HOUR_MS;
  // The part of the elapsed night the patient was in the bed.
  const spanFrom = Math.max(fromMs, Date.parse(stay.admittedAt));
  const spanTo = Math.min(endMs, stay.dischargedAt ? Date.parse(stay.dischargedAt) : Infinity);
  const present = spanTo > spanFrom;

  const windows = await knex("index_windows")
    .where({ stay_id: stay.stayId, algorithm_version: ALGORITHM_VERSION })
    .where("window_end", ">", night.from)
    .where("window_start", "<", night.to)
    .orderBy("window_start")
    .select<WindowPick[]>("kind", "window_start", "window_end", "grade", "values");
  const counts = { good: 0, limited: 0, unusable: 0, total: 0 };
  for (const w of windows) {
    if (w.kind !== "short" || w.window_start < night.from) continue;
    counts[w.grade] += 1;
    counts.total += 1;
  }

  let monitoredS = 0;
  let leadOffS = 0;
  let gaps: GapDTO[] = [];
  if (present) {
    const active = asActiveStay(stay);
    const limit = Math.ceil(((spanTo - spanFrom) / 1000 + 2 * EDGE_READ_S) * MAX_BEATS_PER_S);
    const beats = await loadBeats(knex, active, spanFrom - EDGE_READ_S * 1000, spanTo + EDGE_READ_S * 1000, limit);
    // loadBeats always gives beat times (epoch s); the engine's type leaves them optional.
    if (!beats.times) throw new TypeError("loadBeats returned no beat times");
    const c = beatCoverage({ rr: beats.rr, times: beats.times, leadOff: beats.leadOff }, spanFrom / 1000, spanTo / 1000);
    monitoredS = c.coveredS;
    leadOffS = c.leadOffS;
    gaps = c.gaps.map((g) => ({
      from: new Date(Math.round(g.fromS * 1000)).toISOString(),
      to: new Date(Math.round(g.toS * 1000)).toISOString(),
      minutes: (g.toS - g.fromS) / 60,
      leadOff: g.leadOff,
    }));
  }

  const baselines = await baselinesOf(stay.stayId, ALGORITHM_VERSION, knex);
  const flags = await flagsOfStay(stay.stayId, night.from, night.to, knex);
  const annotations = await annotationsOf(stay.stayId, night.from, night.to, knex);
  const streams = present ? await deviceStreams(knex, stay.bedId, new Date(spanFrom), new Date(spanTo)) : [];
  const note = await handoffNoteOf(stay, night.night, knex);

  return {
    stay: {
      stayId: stay.stayId,
      unitId: stay.unitId,
      unitName: stay.unitName,
      bedLabel: stay.bedLabel,
      displayName: stay.displayName,
      recordNumber: stay.recordNumber,
      admittedAt: stay.admittedAt,
      dischargedAt: stay.dischargedAt,
    },
    night: nightInfo,
    presentHours: present ? (spanTo - spanFrom) / HOUR_MS : 0,
    monitoredHours: monitoredS / 3600,
    coverage: endMs > fromMs ? usableUnionMs(windows, fromMs, endMs) / (endMs - fromMs) : null,
    windows: counts,
    indices: trendsOf(windows, night, baselines),
    flags,
    annotations,
    device: { gaps, leadOffMinutes: leadOffS / 60, unusableShare: counts.total ? counts.unusable / counts.total : null, streams },
    note,
    algorithmVersion: ALGORITHM_VERSION,
    asOf: now.toISOString(),
  };
}

export interface HandoffUnitScope {
  unitId: string;
  unitName: string;
  unitCode: string;
  night: NightTimes;
}

/** A unit's name and night times, or null. */
export async function handoffUnit(unitId: string, knex: Knex = defaultDb): Promise<HandoffUnitScope | null> {
  const u = await knex("units").where({ id: unitId }).first("id", "name", "code", "time_zone", "night_starts_at", "night_ends_at");
  return u ? { unitId: u.id, unitName: u.name, unitCode: u.code, night: { timeZone: u.time_zone, startsAt: u.night_starts_at, endsAt: u.night_ends_at } } : null;
}

/**
 * Every patient of a unit for a night, one per bed in bed order. For the unit's latest night: every current stay
 * (also those admitted since the night, so the incoming shift sees every occupied bed) plus stays discharged during
 * the night; patients who left after the night ended are no longer handed over. For an earlier night: every stay
 * that overlapped it (who was there then).
 */
export async function unitHandoff(unitId: string, night: ReviewNight, knex: Knex = defaultDb, now: Date = new Date()): Promise<UnitHandoffDTO | null> {
  const unit = await handoffUnit(unitId, knex);
  if (!unit) return null;
  const isLatest = latestNight(now, unit.night).night === night.night;
  const rows = await knex("stays as s")
    .join("beds as b", "b.id", "s.bed_id")
    .where("b.unit_id", unitId)
    .where((q) => {
      if (isLatest) {
        q.where((c) => c.whereNull("s.discharged_at").where("s.admitted_at", "<=", now)).orWhere((d) =>
          d.where("s.discharged_at", ">", night.from).where("s.discharged_at", "<=", night.to).where("s.admitted_at", "<", night.to),
        );
      } else {
        q.where("s.admitted_at", "<", night.to).where((d) => d.whereNull("s.discharged_at").orWhere("s.discharged_at", ">", night.from));
      }
    })
    .orderBy([{ column: "b.sort_order" }, { column: "b.label" }, { column: "s.admitted_at" }])
    .select<{ id: string }[]>("s.id");
  const stays: PatientHandoffDTO[] = [];
  // One stay after another: each reads a night of beats, and the two cores are shared with the compute job.
  for (const r of rows) {
    const scope = await stayScope(r.id, knex);
    if (scope) stays.push(await patientHandoff(scope, night, knex, now));
  }
  return {
    unit: { unitId: unit.unitId, unitName: unit.unitName, unitCode: unit.unitCode },
    night: nightDTO(night, unit.night.timeZone, now),
    stays,
    asOf: now.toISOString(),
  };
}

/** The default night of a stay's summary: the latest night the stay was in, or the unit's latest night. */
export function defaultNightOf(stay: StayScopeDTO, now: Date = new Date()): ReviewNight {
  const latest = latestNight(now, stay.night);
  if (stay.dischargedAt && Date.parse(stay.dischargedAt) <= latest.from.getTime()) return latestNight(new Date(Date.parse(stay.dischargedAt) - 1), stay.night);
  return latest;
}

const noteTime = (iso: string | Date, timeZone: string) => formatInTimeZone(iso, timeZone, "HH:mm zzz");

/**
 * Saves the clinician's note on a stay's night for `actor`: inserts it (version 0 = a new note) or updates it when
 * the version sent is the one stored. A stale version changes nothing and says who saved what, when. Every save and
 * every refused stale save is audited with the text before and after.
 */
export async function saveHandoffNoteAs(actor: Actor, input: HandoffNoteInput, knex: Knex = defaultDb, now: Date = new Date()): Promise<ActionResult<HandoffNoteDTO>> {
  const stay = await stayScope(input.stayId, knex);
  if (!stay) return { ok: false, code: "not_found", message: "That patient's stay no longer exists." };
  // The action's guard checks the unit already; a service called from elsewhere must not skip it.
  if (!can(actor.grants, "handoff.write", stay.unitId)) return { ok: false, code: "forbidden", message: "Your roles do not allow this in that unit." };
  const night = reviewNight(input.night, stay.night);
  const left = stay.dischargedAt ? Date.parse(stay.dischargedAt) : Infinity;
  if (night.from.getTime() > now.getTime() || night.to.getTime() <= Date.parse(stay.admittedAt) || night.from.getTime() >= left) {
    return { ok: false, code: "invalid_input", message: "Check the highlighted fields.", fieldErrors: { night: ["This patient was not in the unit that night."] } };
  }
  const tz = stay.night.timeZone;
  const audit = { permission: "handoff.write" as const, unitId: stay.unitId, target: { type: "stay", id: stay.stayId } };

  return knex.transaction(async (trx) => {
    const current = await trx("handoff_notes as n")
      .join("users as u", "u.id", "n.updated_by")
      .where({ "n.stay_id": stay.stayId, "n.night": input.night })
      .forUpdate("n")
      .first<{ id: string; note: string; version: number; updated_at: Date; updated_by: string; name: string } | undefined>(
        "n.id", "n.note", "n.version", "n.updated_at", "n.updated_by", "u.name",
      );

    const stale = async (theirs: NonNullable<typeof current>): Promise<ActionResult<HandoffNoteDTO>> => {
      await auditAs(actor, {
        ...audit,
        action: "handoff_note.save",
        outcome: "failure",
        detail: { night: input.night, reason: "stale_version", version_sent: input.version, version_stored: theirs.version },
      }, trx);
      const self = theirs.updated_by === actor.userId;
      const who = self ? "You saved this note in another window" : `Someone else (${theirs.name}) saved this note`;
      return {
        ok: false,
        code: "conflict",
        message:
          `${who} at ${noteTime(theirs.updated_at, tz)}; here is ${self ? "that" : "their"} text:\n\n${theirs.note}\n\n` +
          "Your text is still in the box and was not saved. Merge the two and save again.",
      };
    };

    if (!current) {
      if (input.version !== 0) {
        return { ok: false, code: "conflict", message: "There is no saved note for this night to change. Reload the page and write it again." };
      }
      // A note written by someone else between our read and this insert makes the insert do nothing.
      const [row] = await trx("handoff_notes")
        .insert({ stay_id: stay.stayId, night: input.night, note: input.note, updated_by: actor.userId })
        .onConflict(["stay_id", "night"])
        .ignore()
        .returning(["version", "updated_at"]);
      if (!row) {
        const theirs = await trx("handoff_notes as n").join("users as u", "u.id", "n.updated_by").where({ "n.stay_id": stay.stayId, "n.night": input.night })
          .first<NonNullable<typeof current>>("n.id", "n.note", "n.version", "n.updated_at", "n.updated_by", "u.name");
        return stale(theirs!);
      }
      await auditAs(actor, { ...audit, action: "handoff_note.create", detail: { night: input.night, before: null, after: { note: input.note, version: row.version } } }, trx);
      return {
        ok: true,
        message: `Note saved at ${noteTime(row.updated_at, tz)}.`,
        data: { stayId: stay.stayId, unitId: stay.unitId, night: input.night, note: input.note, version: row.version, updatedAt: row.updated_at.toISOString(), updatedBy: actor.name },
      };
    }

    if (current.version !== input.version) return stale(current);
    const unchanged = { stayId: stay.stayId, unitId: stay.unitId, night: input.night, note: current.note, version: current.version, updatedAt: current.updated_at.toISOString(), updatedBy: current.name };
    if (current.note === input.note) return { ok: true, message: "Nothing changed: the note is as saved.", data: unchanged };

    const [row] = await trx("handoff_notes")
      .where({ id: current.id, version: input.version })
      .update({ note: input.note, version: input.version + 1, updated_by: actor.userId, updated_at: new Date() })
      .returning(["version", "updated_at"]);
    await auditAs(actor, {
      ...audit,
      action: "handoff_note.update",
      detail: {
        night: input.night,
        before: { note: current.note, version: current.version, updated_by: current.updated_by },
        after: { note: input.note, version: row!.version },
      },
    }, trx);
    return {
      ok: true,
      message: `Note saved at ${noteTime(row!.updated_at, tz)}.`,
      data: { ...unchanged, note: input.note, version: row!.version, updatedAt: row!.updated_at.toISOString(), updatedBy: actor.name },
    };
  });
}
