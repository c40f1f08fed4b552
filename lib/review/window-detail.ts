// Window detail: one stored 5-min window of a stay — its stored values, reasons, quality, grade, change from the
// patient's baseline and the parameters behind them — with the plots a clinician needs to judge it. The plots are
// recomputed by the engine from the stay's beats with the compute job's cleaning, context and parameters, so every
// plotted number is the stored one (tests/integration/window-detail.test.ts); a mismatch (beats that arrived late,
// or were dropped by retention) is reported, never hidden.
import "server-only";
import type { Knex } from "knex";
import { z } from "zod";
import { loadBeats, type ActiveStay } from "@/lib/compute/beats";
import { LEFT_CONTEXT_S, LONG_S } from "@/lib/compute/stay-windows";
import { db as defaultDb } from "@/lib/db/knex";
import type { IndexWindowRow } from "@/lib/db/tables";
import type { BeatAction, BeatLabel } from "@/lib/engine/clean/labels";
import type { Population } from "@/lib/engine/clean/range-gate";
import { windowQuality, type WindowQuality, type WindowQualityOptions } from "@/lib/engine/clean/window-quality";
import { multiscaleEntropy } from "@/lib/engine/entropy/mse";
import { dfa, type DfaValue } from "@/lib/engine/fractal/dfa";
import { BANDS_HZ, integrateLinear } from "@/lib/engine/frequency/bands";
import { lombScargle } from "@/lib/engine/frequency/lomb-scargle";
import { LONG_TERM_KEYS, longTermIndices, SHORT_TERM_KEYS, SHORT_WINDOW_LOMB_SCARGLE, shortTermIndices } from "@/lib/engine/indices";
import { poincare } from "@/lib/engine/poincare/poincare";
import type { Measured, Params } from "@/lib/engine/result";
import { lowerBound, mean } from "@/lib/engine/stats";
import { ALGORITHM_VERSION } from "@/lib/engine/version";
import { cleanForWindows, seriesStartS, type BeatSeries, type CleanedForWindows } from "@/lib/engine/windows";
import { addDays, latestNight, reviewNight, type NightTimes } from "./night";
import { asActiveStay, type StayScopeDTO } from "./stay-scope";

/** One schema for the query of the Window detail page and of both window routes: `start` of a stored 5-min window. */
export const windowQuerySchema = z.object({
  start: z.iso.datetime({ offset: true, message: "start must be an ISO 8601 date-time" }).optional(),
});

export const NO_WINDOWS_MESSAGE = "No windows computed for this stay yet.";

/** Upper bound on beats read for one window: 2 h 20 min (the widest span read, below) at the neonatal gate's 240 bpm. */
const MAX_BEATS = 40_000;

/**
 * A recomputed value counts as equal to the stored one within this relative difference. Same engine, same beats and
 * same parameters give the same double; the stored value has been through jsonb, whose decimal text round-trips a
 * double exactly, so the bound only allows for the last binary digit.
 */
const STORED_MATCH_REL_TOL = 1e-12;

/**
 * Neonatal HF band, Hz: respiration at 40–60/min moves HF up to about 0.24–1.04 Hz (DOMAIN §1, NICU, after a table
 * footnote in Front Physiol 2011, PMC3225923). The engine's band powers use the Task Force bands for every
 * population, so this band is drawn for orientation only and its power is never stored.
 */
const NEONATAL_HF_HZ = [0.24, 1.04] as const;

/** Why the MSE curve is computed on the hour (DOMAIN §2.9: ≥ 200 coarse-grained points per scale). */
const MSE_ON_HOUR_NOTE =
  "Computed on the hour around this window: a 5-min window holds about 300 beats, which leaves 15 points at τ = 20 " +
  "where SampEn needs at least 200, so multiscale entropy is never computed on 5 minutes.";

// ---------------------------------------------------------------------------------------------------------------
// DTOs

export interface QualityDTO {
  grade: "good" | "limited" | "unusable";
  /** Plain-words reasons the grade is not good (empty when good). */
  reasons: string[];
  coverage: number | null;
  shareEdited: number | null;
  shareEctopic: number | null;
  longestGapS: number | null;
  nBeats: number | null;
  nInputBeats: number | null;
  devicePoorShare: number | null;
}

export interface IndexValueDTO {
  /** SHORT_TERM_KEYS or LONG_TERM_KEYS (lib/engine/indices.ts). */
  key: string;
  /** The stored value; null when undefined for this window or when the window is unusable (see reason). */
  value: number | null;
  reason: string | null;
  /** Stored value − the patient's baseline median; null without a baseline. */
  baselineDelta: number | null;
  /** The same value recomputed now from the beats; null when undefined or not recomputed. */
  recomputed: number | null;
  /** Engine method id, and the parameters it used on this window (from the recomputation); null when not recomputed. */
  method: string;
  params: Params | null;
  /** Where the method's parameters sit in the stored parameter document (`parameters`), e.g. "methods.sampen". */
  documentKey: string | null;
  version: string;
}

export interface TachogramDTO {
  /** Every input interval whose beat falls in the window: beat time (epoch s), RR (ms), what cleaning concluded, what
   *  it did, and the device's own beat type (N, V, S, P, ?; null when the beat row was not found). */
  t: number[];
  rr: number[];
  label: BeatLabel[];
  action: BeatAction[];
  deviceType: (string | null)[];
  /** The NN series the indices were computed on (isolated abnormal beats interpolated); 1 where a value was edited. */
  nnT: number[];
  nn: number[];
  nnEdited: number[];
}

export interface PoincareDTO {
  /** Points (NN_i, NN_i+1), ms; edited 1 where either interval of the pair was edited by cleaning. */
  x: number[];
  y: number[];
  edited: number[];
  sd1: number;
  sd2: number;
  sd1Sd2: number | null;
  /** Centre of the fitted ellipse: the mean of the points (Brennan et al. 2001). */
  centre: [number, number];
  /** The ellipse (SD2 along the line of identity, SD1 across it) as an upper and a lower arc over shared x, ms. */
  ellipse: { x: number[]; upper: number[]; lower: number[] };
  /** End points of the two 45° axes through the centre, [[x0, y0], [x1, y1]], ms. */
  axes: { sd1: [[number, number], [number, number]]; sd2: [[number, number], [number, number]] };
  method: string;
  params: Params;
  version: string;
}

export interface DfaFitDTO {
  /** Box sizes n (beats) and log10 n, log10 F(n) (F in ms), and the fitted line at each n. */
  scales: number[];
  log10n: number[];
  log10F: number[];
  fitLog10F: number[];
  alpha: number;
  r2: number;
  /** Beats in the series fitted. */
  beats: number;
  method: string;
  params: Params;
  version: string;
}

export interface DfaDTO {
  /** α1 over n = 4…16 on this window; α2 over n = 16…64 on the hour (a 5-min window is too short for it). */
  alpha1: DfaFitDTO | null;
  alpha1Reason: string | null;
  alpha2: DfaFitDTO | null;
  alpha2Reason: string | null;
}

export interface MseDTO {
  /** τ = 1…20, SampEn per scale (null with its reason), coarse-grained points per scale. */
  scales: number[];
  sampen: (number | null)[];
  reasons: (string | null)[];
  points: number[];
  /** The stored hour's curve, when a stored 60-min window is the hour used. */
  stored: (number | null)[] | null;
  /** Tolerance r (ms; 0.15 × SD of the hour, fixed across scales), that SD, m and the hour's beats. */
  rMs: number;
  sdMs: number;
  m: number;
  n: number;
  note: string;
  method: string;
  params: Params;
  version: string;
}

export interface BandDTO {
  key: string;
  label: string;
  loHz: number;
  hiHz: number;
  /** ∫ PSD over the band, ms²; null with a reason. */
  powerMs2: number | null;
  reason: string | null;
  /** true: drawn for orientation only, not a stored value. */
  reference: boolean;
  note: string | null;
}

export interface SpectrumDTO {
  /** Lomb–Scargle PSD of the window (abnormal beats deleted), Hz and ms²/Hz, up to the mean Nyquist frequency. */
  f: number[];
  psd: number[];
  nyquistHz: number;
  bands: BandDTO[];
  lfPeakHz: number | null;
  hfPeakHz: number | null;
  method: string;
  params: Params;
  version: string;
}

export type PlotName = "tachogram" | "poincare" | "dfa" | "mse" | "spectrum";

export interface HourDTO {
  start: string;
  end: string;
  /** stored: the stored 60-min window holding this window's midpoint; otherwise a 60-min span chosen here. */
  source: "stored" | "preceding" | "stay-start";
  note: string;
  /** Quality of the hour as recomputed (null without beats). */
  quality: QualityDTO | null;
  /** The stored hour's values (empty when the hour is not a stored window). */
  values: IndexValueDTO[];
}

export interface WindowDetailDTO {
  window: {
    id: string;
    start: string;
    end: string;
    /** The review night the window belongs to (local date of its evening), for the link back to the Night review. */
    night: string;
    grade: QualityDTO["grade"];
    algorithmVersion: string;
    paramsHash: string;
    computedAt: string;
    quality: QualityDTO;
    values: IndexValueDTO[];
  };
  neighbours: { previous: string | null; next: string | null };
  /** The stored parameter document (computation_params) behind every value of this window. */
  parameters: Record<string, unknown> | null;
  timeZone: string;
  population: Population;
  /** Did recomputing from the beats give the stored values? */
  recomputed: { available: boolean; reason: string | null; matchesStored: boolean | null; differing: string[]; beatsRead: number };
  hour: HourDTO;
  plots: {
    tachogram: TachogramDTO | null;
    poincare: PoincareDTO | null;
    dfa: DfaDTO | null;
    mse: MseDTO | null;
    spectrum: SpectrumDTO | null;
  };
  /** Why a plot is null. */
  plotReasons: Partial<Record<PlotName, string>>;
}

export type NoWindowsDTO = { window: null; message: string };

// ---------------------------------------------------------------------------------------------------------------
// Finding the window and the beats around it (shared with the Research panel, research.ts)

export type WindowLookup = { kind: "found"; row: IndexWindowRow } | { kind: "no_windows" } | { kind: "not_found" };

/** The stored short window of the current engine version starting at `startIso`, or else the stay's latest one. */
export async function findShortWindow(stayId: string, startIso: string | null, knex: Knex = defaultDb): Promise<WindowLookup> {
  const current = () => knex("index_windows").where({ stay_id: stayId, kind: "short", algorithm_version: ALGORITHM_VERSION });
  const row = startIso
    ? await current().where("window_start", new Date(startIso)).first()
    : await current().orderBy("window_start", "desc").first();
  if (row) return { kind: "found", row };
  if (startIso) return { kind: "not_found" };
  return { kind: "no_windows" };
}

export interface HourSpan {
  startS: number;
  endS: number;
  source: HourDTO["source"];
  note: string;
}

export interface WindowBeats {
  stay: ActiveStay;
  series: BeatSeries & { count: number };
  /** Null without beats. */
  cleaned: CleanedForWindows | null;
  qualityOptions: WindowQualityOptions;
  hour: HourSpan;
  /** The stored 60-min window that is `hour`, when there is one. */
  storedHour: IndexWindowRow | null;
}


/** Half-open index range [from, to) of the ascending `times` that lie in [startS, endS). */
export function spanOf(times: Float64Array, startS: number, endS: number): [number, number] {
  return [lowerBound(times, startS), lowerBound(times, endS)];
}

const iso = (s: number) => new Date(s * 1000).toISOString();

/**
 * The review night a window belongs to, for the link back to the Night review: the night holding its start, or for a
 * daytime window the nearer of the night before and the night after (an evening window leads into the coming night).
 */
function nightOfWindow(at: Date, t: NightTimes): string {
  const prior = latestNight(at, t);
  if (at.getTime() < prior.to.getTime()) return prior.night;
  const following = reviewNight(addDays(prior.night, 1), t);
  return at.getTime() - prior.to.getTime() <= following.from.getTime() - at.getTime() ? prior.night : following.night;
}

/**
 * The beats around a window, cleaned as the compute job cleans them, and "the hour around the window" that MSE,
 * DFA α2 and the Research panel use:
 * - the stored 60-min window (whole UTC hours) holding the window's midpoint, so the hour's plots show stored values;
 * - else, when none is stored yet (the hour is still running, or began before the stay's first beat), the 60 min
 *   ending with this window, or the stay's first 60 min when the stay is younger than that.
 * Beats are read from LEFT_CONTEXT_S before to as long after what is shown: the cleaning classifies each beat from
 * about 45 beats either side, and with that context it gives the same NN series as when the windows were stored.
 */
export async function beatsAroundWindow(scope: StayScopeDTO, row: Pick<IndexWindowRow, "window_start" | "window_end">, knex: Knex = defaultDb): Promise<WindowBeats> {
  const stay = asActiveStay(scope);
  const startS = row.window_start.getTime() / 1000;
  const endS = row.window_end.getTime() / 1000;
  const gridHourS = Math.floor((startS + endS) / 2 / LONG_S) * LONG_S;
  const storedHour =
    (await knex("index_windows")
      .where({ stay_id: stay.stayId, kind: "long", algorithm_version: ALGORITHM_VERSION, window_start: new Date(gridHourS * 1000) })
      .first()) ?? null;
  const [fromS, untilS] = storedHour
    ? [Math.min(startS, gridHourS), Math.max(endS, gridHourS + LONG_S)]
    : [endS - LONG_S, endS + LONG_S];
  const series = await loadBeats(knex, stay, (fromS - LEFT_CONTEXT_S) * 1000, (untilS + LEFT_CONTEXT_S) * 1000, MAX_BEATS);
  const qualityOptions: WindowQualityOptions = { quality: series.quality!, leadOff: series.leadOff! };
  const cleaned = series.count > 0 ? cleanForWindows(series, stay.population, true) : null;

  let hour: HourSpan;
  if (storedHour) {
    hour = { startS: gridHourS, endS: gridHourS + LONG_S, source: "stored", note: "The stored 60-min window that holds this window's midpoint." };
  } else {
    const firstS = series.count > 0 ? Math.max(seriesStartS(series), stay.admittedAt.getTime() / 1000) : stay.admittedAt.getTime() / 1000;
    hour = endS - LONG_S >= firstS
      ? { startS: endS - LONG_S, endS, source: "preceding", note: "No stored 60-min window holds this window yet, so the 60 min ending with it are used (computed now, not stored)." }
      : { startS: firstS, endS: firstS + LONG_S, source: "stay-start", note: "The stay is younger than an hour at this window, so its first 60 min of beats are used (computed now, not stored)." };
  }
  return { stay, series, cleaned, qualityOptions, hour, storedHour };
}

// ---------------------------------------------------------------------------------------------------------------
// Values, quality and parameters

const SHORT_METHOD: Record<(typeof SHORT_TERM_KEYS)[number], string> = {
  mean_nn: "mean-nn", hr: "hr", sdnn: "sdnn", rmssd: "rmssd", sdsd: "sdsd", nn50: "nn50", pnn50: "pnn50",
  sd1: "poincare", sd2: "poincare", sd1_sd2: "poincare", sampen: "sampen", dfa_alpha1: "dfa-alpha1",
  vlf: "lomb-scargle", lf: "lomb-scargle", hf: "lomb-scargle", lf_hf: "lomb-scargle", lf_nu: "lomb-scargle",
  hf_nu: "lomb-scargle", lf_peak_hz: "lomb-scargle", hf_peak_hz: "lomb-scargle",
};

const LONG_METHOD: Record<(typeof LONG_TERM_KEYS)[number], string> = {
  mse_ci: "mse", mse_slope_short: "mse", mse_slope_long: "mse", dfa_alpha2: "dfa-alpha2", mfdfa_width: "mfdfa", apen: "apen",
};

/** Engine method id → its section of the parameter document (lib/compute/params.ts); null: a method without options. */
const DOCUMENT_KEY: Record<string, string | null> = {
  "mean-nn": null, hr: null, rmssd: null, sdnn: "methods.sdnn", sdsd: "methods.sdsd", nn50: "methods.nn50", pnn50: "methods.pnn50",
  poincare: "methods.poincare", sampen: "methods.sampen", "dfa-alpha1": "methods.dfa", "dfa-alpha2": "methods.dfa",
  "lomb-scargle": "methods.lombScargle", mse: "methods.mse", mfdfa: "methods.mfdfa", apen: "methods.apen",
};

const num = (v: unknown): number | null => (typeof v === "number" && Number.isFinite(v) ? v : null);

function qualityOf(q: Record<string, unknown> | WindowQuality, grade: QualityDTO["grade"]): QualityDTO {
  const r = q as Record<string, unknown>;
  return {
    grade,
    reasons: Array.isArray(r.reasons) ? r.reasons.filter((x): x is string => typeof x === "string") : [],
    coverage: num(r.coverage),
    shareEdited: num(r.shareEdited),
    shareEctopic: num(r.shareEctopic),
    longestGapS: num(r.longestGapS),
    nBeats: num(r.nBeats),
    nInputBeats: num(r.nInputBeats),
    devicePoorShare: num(r.devicePoorShare),
  };
}

const sameValue = (a: number | null, b: number | null) =>
  a === null || b === null ? a === b : Math.abs(a - b) <= STORED_MATCH_REL_TOL * Math.max(Math.abs(a), Math.abs(b), Number.MIN_VALUE);

interface Recomputed {
  values: Record<string, number | null>;
  methods: Record<string, Params>;
}

function valuesOf(
  keys: readonly string[],
  methodOf: Record<string, string>,
  row: IndexWindowRow,
  recomputed: Recomputed | null,
): IndexValueDTO[] {
  const unusable = row.grade === "unusable" ? `window graded unusable: ${qualityOf(row.quality, row.grade).reasons.join("; ")}` : null;
  return keys.map((key) => {
    const method = methodOf[key]!;
    const value = row.values?.[key] ?? null;
    let params = recomputed?.methods[method] ?? null;
    if (key === "mse_ci" && params) params = { ...params, ...recomputed!.methods["mse-ci"] };
    return {
      key,
      value,
      reason: value === null ? (unusable ?? row.reasons?.[key] ?? "undefined for this window") : null,
      baselineDelta: num(row.baseline_delta?.[key]),
      recomputed: recomputed?.values[key] ?? null,
      method,
      params,
      documentKey: DOCUMENT_KEY[method] ?? null,
      version: row.algorithm_version,
    };
  });
}

// ---------------------------------------------------------------------------------------------------------------
// Plots

const toArray = (a: ArrayLike<number>) => Array.from(a);

/** The Poincaré ellipse as two arcs over shared x: in rotated coordinates v = (dx + dy)/√2 (along the line of identity)
 *  and u = (dy − dx)/√2, v²/SD2² + u²/SD1² = 1, solved for dy at each dx (a quadratic; |dx| ≤ √((SD1² + SD2²)/2)). */
function ellipseArcs(cx: number, cy: number, sd1: number, sd2: number, samples = 73): PoincareDTO["ellipse"] {
  const a = 1 / (sd2 * sd2);
  const b = 1 / (sd1 * sd1);
  const half = Math.sqrt((sd1 * sd1 + sd2 * sd2) / 2);
  const out = { x: [] as number[], upper: [] as number[], lower: [] as number[] };
  for (let i = 0; i < samples; i++) {
    // Cosine spacing puts more samples near the two ends, where the arcs turn.
    const dx = -half * Math.cos((Math.PI * i) / (samples - 1));
    const disc = Math.max(0, 2 * (a + b) - 4 * a * b * dx * dx);
    const mid = (-dx * (a - b)) / (a + b);
    const spread = Math.sqrt(disc) / (a + b);
    out.x.push(cx + dx);
    out.upper.push(cy + mid + spread);
    out.lower.push(cy + mid - spread);
  }
  return out;
}

function poincarePlot(nn: Float64Array, edited: Uint8Array): PoincareDTO | string {
  const p = poincare(nn);
  if (!p.value) return p.reason ?? "undefined";
  const v = p.value;
  const cx = mean(v.x);
  const cy = mean(v.y);
  const d2 = v.sd2 / Math.SQRT2;
  const d1 = v.sd1 / Math.SQRT2;
  return {
    x: toArray(v.x),
    y: toArray(v.y),
    edited: toArray(v.x).map((_, i) => (edited[i] || edited[i + 1] ? 1 : 0)),
    sd1: v.sd1,
    sd2: v.sd2,
    sd1Sd2: v.sd1Sd2,
    centre: [cx, cy],
    ellipse: ellipseArcs(cx, cy, v.sd1, v.sd2),
    axes: { sd2: [[cx - d2, cy - d2], [cx + d2, cy + d2]], sd1: [[cx + d1, cy - d1], [cx - d1, cy + d1]] },
    method: p.method,
    params: p.params,
    version: p.version,
  };
}

function dfaFit(m: Measured<DfaValue>, beats: number): DfaFitDTO | string {
  if (!m.value) return m.reason ?? "undefined";
  const { scales, fluctuation, alpha, intercept, r2 } = m.value;
  return {
    scales,
    log10n: scales.map(Math.log10),
    log10F: fluctuation.map(Math.log10),
    // The fit is ln F = α·ln n + b; in log10 the slope stays α and the intercept is b / ln 10.
    fitLog10F: scales.map((n) => (alpha * Math.log(n) + intercept) / Math.LN10),
    alpha,
    r2,
    beats,
    method: m.method,
    params: m.params,
    version: m.version,
  };
}

function spectrumPlot(nnDeleted: Float64Array, timesDeleted: Float64Array, population: Population): SpectrumDTO | string {
  const ls = lombScargle(nnDeleted, timesDeleted, SHORT_WINDOW_LOMB_SCARGLE);
  if (!ls.value) return ls.reason ?? "undefined";
  const v = ls.value;
  const names = { vlf: "VLF", lf: "LF", hf: "HF" } as const;
  const bands: BandDTO[] = (["vlf", "lf", "hf"] as const).map((k) => ({
    key: k,
    label: names[k],
    loHz: BANDS_HZ[k][0],
    hiHz: BANDS_HZ[k][1],
    powerMs2: v[k],
    reason: v[k] === null ? (v.reasons[k] ?? "undefined") : null,
    reference: false,
    note: null,
  }));
  if (population === "neonatal") {
    const [lo, hi] = NEONATAL_HF_HZ;
    const last = v.frequencyHz[v.frequencyHz.length - 1]!;
    const covered = hi <= last;
    bands.push({
      key: "hf_neonatal",
      label: "Neonatal HF",
      loHz: lo,
      hiHz: hi,
      powerMs2: covered ? integrateLinear(v.frequencyHz, v.psd, lo, hi) : null,
      reason: covered ? null : `the spectrum ends at the mean Nyquist frequency, ${last.toFixed(3)} Hz, below ${hi} Hz`,
      reference: true,
      note: "Neonatal breathing moves high-frequency power up to about 0.24–1.04 Hz; shown for orientation. Stored band powers use the Task Force bands.",
    });
  }
  return {
    f: toArray(v.frequencyHz),
    psd: toArray(v.psd),
    nyquistHz: v.nyquistHz,
    bands,
    lfPeakHz: v.lfPeakHz,
    hfPeakHz: v.hfPeakHz,
    method: ls.method,
    params: ls.params,
    version: ls.version,
  };
}

/** Device beat types of the bed's devices in [fromMs, toMs), by beat time in whole ms (as loadBeats reads them). */
async function deviceBeatTypes(knex: Knex, bedId: string, fromMs: number, toMs: number): Promise<Map<number, string>> {
  const rows = await knex("beats as b")
    .join("device_assignments as a", "a.device_id", "b.device_id")
    .where("a.bed_id", bedId)
    .whereRaw("b.beat_at >= a.assigned_from")
    .where((q) => q.whereNull("a.assigned_to").orWhereRaw("b.beat_at < a.assigned_to"))
    .where("b.beat_at", ">=", new Date(fromMs))
    .where("b.beat_at", "<", new Date(toMs))
    .select<{ t: number; beat_type: string }[]>(knex.raw("extract(epoch FROM b.beat_at)::float8 AS t"), "b.beat_type");
  return new Map(rows.map((r) => [Math.round(r.t * 1000), r.beat_type]));
}

// ---------------------------------------------------------------------------------------------------------------

/**
 * The Window detail of a stay: the stored short window of the current engine version starting at `startIso`
 * (default: the stay's latest), or `{ window: null, message }` when the stay has no window at all, or null when
 * `startIso` names no stored window.
 */
export async function windowDetail(scope: StayScopeDTO, startIso: string | null, knex: Knex = defaultDb): Promise<WindowDetailDTO | NoWindowsDTO | null> {
  const found = await findShortWindow(scope.stayId, startIso, knex);
  if (found.kind === "no_windows") return { window: null, message: NO_WINDOWS_MESSAGE };
  if (found.kind === "not_found") return null;
  const row = found.row;
  const startS = row.window_start.getTime() / 1000;
  const endS = row.window_end.getTime() / 1000;

  const current = () => knex("index_windows").where({ stay_id: scope.stayId, kind: "short", algorithm_version: ALGORITHM_VERSION });
  const [previous, next, document, beats] = await Promise.all([
    current().where("window_start", "<", row.window_start).orderBy("window_start", "desc").first("window_start"),
    current().where("window_start", ">", row.window_start).orderBy("window_start", "asc").first("window_start"),
    knex("computation_params").where({ params_hash: row.params_hash }).first<{ params: Record<string, unknown> } | undefined>("params"),
    beatsAroundWindow(scope, row, knex),
  ]);

  const plots: WindowDetailDTO["plots"] = { tachogram: null, poincare: null, dfa: null, mse: null, spectrum: null };
  const plotReasons: WindowDetailDTO["plotReasons"] = {};
  const recomputed: WindowDetailDTO["recomputed"] = { available: false, reason: null, matchesStored: null, differing: [], beatsRead: beats.series.count };
  let shortSet: Recomputed | null = null;
  let longSet: Recomputed | null = null;
  let hourQuality: QualityDTO | null = null;
  const { cleaned, hour } = beats;

  if (!cleaned?.interpolated.value || !cleaned.deleted.value) {
    const why = "the beats behind this window are no longer held (beats are dropped after the retention period) or never arrived";
    recomputed.reason = why;
    for (const k of ["tachogram", "poincare", "dfa", "mse", "spectrum"] as const) plotReasons[k] = why;
  } else {
    const ci = cleaned.interpolated.value;
    const cd = cleaned.deleted.value;
    const [a, b] = spanOf(ci.times, startS, endS);
    const [c, d] = spanOf(cd.times, startS, endS);
    const [p, q] = spanOf(ci.inputTimes, startS, endS);
    const types = await deviceBeatTypes(knex, scope.bedId, row.window_start.getTime() - 1000, row.window_end.getTime() + 1000);
    plots.tachogram = {
      t: toArray(ci.inputTimes.subarray(p, q)),
      rr: toArray(ci.inputRr.subarray(p, q)),
      label: ci.labels.slice(p, q),
      action: ci.actions.slice(p, q),
      deviceType: toArray(ci.inputTimes.subarray(p, q)).map((t) => types.get(Math.round(t * 1000)) ?? null),
      nnT: toArray(ci.times.subarray(a, b)),
      nn: toArray(ci.nn.subarray(a, b)),
      nnEdited: toArray(ci.edited.subarray(a, b)),
    };

    // The window as the compute job computed it: same quality grading, same index set.
    const quality = windowQuality(ci, { startS, endS }, beats.qualityOptions).value!;
    const nn = ci.nn.subarray(a, b);
    if (quality.grade !== "unusable") {
      const set = shortTermIndices({ nn, times: ci.times.subarray(a, b), nnDeleted: cd.nn.subarray(c, d), timesDeleted: cd.times.subarray(c, d) });
      shortSet = { values: set.values, methods: set.methods };
      const poin = poincarePlot(nn, ci.edited.subarray(a, b));
      if (typeof poin === "string") plotReasons.poincare = poin;
      else plots.poincare = poin;
      const spec = spectrumPlot(cd.nn.subarray(c, d), cd.times.subarray(c, d), scope.population);
      if (typeof spec === "string") plotReasons.spectrum = spec;
      else plots.spectrum = spec;
    } else {
      const why = `window graded unusable: ${quality.reasons.join("; ")}`;
      plotReasons.poincare = why;
      plotReasons.spectrum = why;
    }

    // The hour around the window: DFA α2, the MSE curve and the stored hour's values.
    const hq = windowQuality(ci, { startS: hour.startS, endS: hour.endS }, beats.qualityOptions).value!;
    hourQuality = qualityOf(hq, hq.grade);
    const [h0, h1] = spanOf(ci.times, hour.startS, hour.endS);
    const hourNN = ci.nn.subarray(h0, h1);
    const alpha1 = quality.grade === "unusable" ? `window graded unusable: ${quality.reasons.join("; ")}` : dfaFit(dfa(nn), nn.length);
    let alpha2: DfaFitDTO | string;
    if (hq.grade === "unusable") {
      alpha2 = `the hour is graded unusable: ${hq.reasons.join("; ")}`;
      plotReasons.mse = alpha2;
    } else {
      const set = longTermIndices(hourNN);
      longSet = { values: set.values, methods: set.methods };
      alpha2 = dfaFit(dfa(hourNN, { exponent: "alpha2" }), hourNN.length);
      const mse = multiscaleEntropy(hourNN);
      if (!mse.value) plotReasons.mse = mse.reason ?? "undefined";
      else {
        plots.mse = {
          scales: mse.value.curve.map((s) => s.scale),
          sampen: mse.value.curve.map((s) => s.sampen),
          reasons: mse.value.curve.map((s) => s.reason),
          points: mse.value.curve.map((s) => s.points),
          stored: beats.storedHour?.mse ?? null,
          rMs: mse.value.r,
          sdMs: mse.value.sd,
          m: mse.value.m,
          n: mse.value.n,
          note: MSE_ON_HOUR_NOTE,
          method: mse.method,
          params: mse.params,
          version: mse.version,
        };
      }
    }
    if (typeof alpha1 === "string" && typeof alpha2 === "string") plotReasons.dfa = `α1: ${alpha1}. α2: ${alpha2}`;
    else {
      plots.dfa = {
        alpha1: typeof alpha1 === "string" ? null : alpha1,
        alpha1Reason: typeof alpha1 === "string" ? alpha1 : null,
        alpha2: typeof alpha2 === "string" ? null : alpha2,
        alpha2Reason: typeof alpha2 === "string" ? alpha2 : null,
      };
    }

    recomputed.available = true;
    if (quality.grade !== row.grade) recomputed.differing.push("grade");
    for (const key of SHORT_TERM_KEYS) {
      if (!sameValue(row.values?.[key] ?? null, shortSet?.values[key] ?? null)) recomputed.differing.push(key);
    }
    if (beats.storedHour && longSet) {
      for (const key of LONG_TERM_KEYS) {
        if (!sameValue(beats.storedHour.values?.[key] ?? null, longSet.values[key] ?? null)) recomputed.differing.push(`hour ${key}`);
      }
    }
    recomputed.matchesStored = recomputed.differing.length === 0;
  }

  return {
    window: {
      id: row.id,
      start: row.window_start.toISOString(),
      end: row.window_end.toISOString(),
      night: nightOfWindow(row.window_start, scope.night),
      grade: row.grade,
      algorithmVersion: row.algorithm_version,
      paramsHash: row.params_hash,
      computedAt: row.computed_at.toISOString(),
      quality: qualityOf(row.quality, row.grade),
      values: valuesOf(SHORT_TERM_KEYS, SHORT_METHOD, row, shortSet),
    },
    neighbours: { previous: previous?.window_start.toISOString() ?? null, next: next?.window_start.toISOString() ?? null },
    parameters: document?.params ?? null,
    timeZone: scope.night.timeZone,
    population: scope.population,
    recomputed,
    hour: {
      start: iso(hour.startS),
      end: iso(hour.endS),
      source: hour.source,
      note: hour.note,
      quality: hourQuality,
      values: beats.storedHour ? valuesOf(LONG_TERM_KEYS, LONG_METHOD, beats.storedHour, longSet) : [],
    },
    plots,
    plotReasons,
  };
}
