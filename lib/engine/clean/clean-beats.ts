// RR → NN: the whole cleaning chain of DOMAIN §2.1 in one call — range gate, beat classification (Lipponen &
// Tarvainen 2019 and/or a percentage rule), then the correction policy — with every parameter recorded.
import { assertSeries } from "../assert";
import { measured, notDefined, type Measured } from "../result";
import { CORRECTION_DEFAULTS, correctBeats, type CorrectionMode, type EditEntry } from "./correct-beats";
import { BEAT_ACTIONS, BEAT_LABELS, DEVICE_QUALITY_POOR_BELOW, type BeatAction, type BeatLabel } from "./labels";
import { LIPPONEN_TARVAINEN_DEFAULTS, lipponenTarvainen } from "./lipponen-tarvainen";
import { PERCENTAGE_RULE_DEFAULTS, percentageRule, type PercentageVariant } from "./percentage-rule";
import { RANGE_GATE_DEFAULTS, rangeGate, type Population } from "./range-gate";

export type Detector = "lipponen-tarvainen" | "percentage" | "both" | "none";

export interface CleanOptions {
  /** Range-gate preset (adult 300–2000 ms, neonatal 250–1000 ms); minMs / maxMs override it when not null. */
  population: Population;
  minMs: number | null;
  maxMs: number | null;
  /** Which classifier flags abnormal in-range intervals. "both" = the union, Lipponen–Tarvainen labels first. */
  detector: Detector;
  percentageVariant: PercentageVariant;
  percentageTolerance: number;
  /** Percentage-rule details (see PERCENTAGE_RULE_DEFAULTS): Xu & Schuckers neighbourhood, reference restart. */
  percentageSurrounding: number;
  percentageResetAfter: number;
  percentageReferenceWindow: number;
  mode: CorrectionMode;
  maxIsolated: number;
  /** A time gap precedes beat k when times[k] − times[k−1] exceeds rr[k]/1000 by more than this, s. Far above
   *  timestamp rounding (a few ms), below any single lost beat (≥ 250 ms). */
  gapToleranceS: number;
  /** Time of the start of the first interval, s, when beat times are not given. */
  startS: number;
  /** With per-beat device quality supplied: beats rated below this (or with lead-off) are `poor_signal`. */
  minDeviceQuality: number;
  /** Lipponen–Tarvainen parameters (see LIPPONEN_TARVAINEN_DEFAULTS). */
  alpha: number;
  thresholdWindow: number;
  medianWindow: number;
  c1: number;
  c2: number;
  mrrsLimit: number;
  minThresholdMs: number;
}

export const CLEAN_DEFAULTS: Readonly<CleanOptions> = {
  population: RANGE_GATE_DEFAULTS.population,
  minMs: null,
  maxMs: null,
  detector: "lipponen-tarvainen",
  percentageVariant: PERCENTAGE_RULE_DEFAULTS.variant,
  percentageTolerance: PERCENTAGE_RULE_DEFAULTS.tolerance,
  percentageSurrounding: PERCENTAGE_RULE_DEFAULTS.surrounding,
  percentageResetAfter: PERCENTAGE_RULE_DEFAULTS.resetAfter,
  percentageReferenceWindow: PERCENTAGE_RULE_DEFAULTS.referenceWindow,
  mode: CORRECTION_DEFAULTS.mode,
  maxIsolated: CORRECTION_DEFAULTS.maxIsolated,
  gapToleranceS: 0.2,
  startS: 0,
  minDeviceQuality: DEVICE_QUALITY_POOR_BELOW,
  ...LIPPONEN_TARVAINEN_DEFAULTS,
};

export interface CleanCounts {
  input: number;
  output: number;
  byLabel: Record<BeatLabel, number>;
  byAction: Record<BeatAction, number>;
  /** Input intervals not kept as measured (interpolated, split, merged or removed), and their share of the input. */
  edited: number;
  shareEdited: number;
}

export interface CleanedBeats {
  /** Cleaned NN intervals, ms, and the time of the beat ending each, s. */
  nn: Float64Array;
  times: Float64Array;
  /** Input index behind each output interval. */
  source: Int32Array;
  /** 1 where the output value was interpolated, split or merged. */
  edited: Uint8Array;
  /** 1 where the previous output interval is not the one directly before (removal or time gap in between). */
  afterBreak: Uint8Array;
  /** Per input interval: label, action, and its beat time (given, or the running sum from startS), s. */
  labels: BeatLabel[];
  actions: BeatAction[];
  inputTimes: Float64Array;
  /** Input intervals, ms, as given (not copied). */
  inputRr: Float64Array;
  edits: EditEntry[];
  counts: CleanCounts;
  /** Plain-words notes on steps that could not run (e.g. too few beats for the classifier). */
  notes: string[];
}

export type CleanInput = Partial<CleanOptions> & {
  /** Beat times, s, one per interval, non-decreasing; default: startS + running sum of rr. */
  times?: Float64Array;
  /** Device-reported quality per beat, 0–1, and lead-off flags per beat (1 = lead-off), when the device sends them. */
  quality?: Float64Array;
  leadOff?: Uint8Array;
};

/**
 * Cleans RR intervals (ms) into NN intervals, DOMAIN §2.1:
 * 1. Range gate (`rangeGate`): intervals outside the preset are `out_of_range` and are always removed. When the
 *    device's per-beat quality or lead-off flags are given, beats it rated below `minDeviceQuality` or flagged
 *    lead-off are `poor_signal` and are removed too (a motion burst's random intervals are often in range and
 *    would otherwise also inflate the classifier's adaptive thresholds).
 * 2. The remaining intervals, in order, are classified by Lipponen & Tarvainen 2019 (`lipponenTarvainen`) and/or a
 *    percentage rule (`percentageRule`); an "extra" pair whose halves are not adjacent in the input (an
 *    out-of-range interval between them) cannot be merged and is removed with its cluster.
 * 3. The correction policy (`correctBeats`): isolated clusters of ≤ 2 abnormal intervals are corrected (mode
 *    "interpolate") or removed ("delete", for Lomb–Scargle; extra pairs are still merged); runs are never bridged.
 * Beat times, when given, are used to find gaps: a cluster next to a gap is never corrected.
 * Undefined (null) only for an empty input. A series too short for the classifier is range-gated only and says so
 * in `notes`.
 */
export function cleanBeats(rr: Float64Array, options: CleanInput = {}): Measured<CleanedBeats> {
  assertSeries(rr, "rr");
  const { times: givenTimes, quality, leadOff, ...rest } = options;
  const o: CleanOptions = { ...CLEAN_DEFAULTS, ...rest };
  if (!["lipponen-tarvainen", "percentage", "both", "none"].includes(o.detector)) throw new RangeError(`unknown detector "${o.detector}"`);
  if (!(o.gapToleranceS > 0)) throw new RangeError("gapToleranceS must be > 0");
  if (!(o.minDeviceQuality >= 0 && o.minDeviceQuality <= 1)) throw new RangeError("minDeviceQuality must be in [0, 1]");
  const gate = rangeGate(rr, { population: o.population, ...(o.minMs !== null && { minMs: o.minMs }), ...(o.maxMs !== null && { maxMs: o.maxMs }) });
  const params = {
    ...o,
    gateMinMs: gate.params.minMs!,
    gateMaxMs: gate.params.maxMs!,
    timesGiven: givenTimes !== undefined,
    deviceQualityGiven: quality !== undefined,
    leadOffGiven: leadOff !== undefined,
  };
  const n = rr.length;
  if (n === 0) return notDefined("clean", params, "no beats to clean");

  let times: Float64Array;
  if (givenTimes !== undefined) {
    assertSeries(givenTimes, "times");
    if (givenTimes.length !== n) throw new RangeError(`times has ${givenTimes.length} values for ${n} intervals`);
    for (let k = 1; k < n; k++) if (givenTimes[k]! < givenTimes[k - 1]!) throw new RangeError(`times must not decrease (index ${k})`);
    times = givenTimes;
  } else {
    times = new Float64Array(n);
    let t = o.startS;
    for (let k = 0; k < n; k++) times[k] = t += rr[k]! / 1000;
  }
  const gapBefore = new Uint8Array(n);
  for (let k = 1; k < n; k++) if (times[k]! - times[k - 1]! - rr[k]! / 1000 > o.gapToleranceS) gapBefore[k] = 1;

  const notes: string[] = [];
  const labels = new Array<BeatLabel>(n).fill("normal");
  const inRange = gate.value!.inRange;
  if (quality !== undefined) {
    assertSeries(quality, "quality");
    if (quality.length !== n) throw new RangeError(`quality has ${quality.length} values for ${n} intervals`);
  }
  if (leadOff !== undefined && (!(leadOff instanceof Uint8Array) || leadOff.length !== n)) throw new RangeError(`leadOff must be a Uint8Array of ${n} flags`);
  const idx: number[] = [];
  for (let k = 0; k < n; k++) {
    if (!inRange[k]) labels[k] = "out_of_range";
    else if ((quality !== undefined && quality[k]! < o.minDeviceQuality) || (leadOff !== undefined && leadOff[k] === 1)) labels[k] = "poor_signal";
    else idx.push(k);
  }
  const x = new Float64Array(idx.length);
  for (let m = 0; m < idx.length; m++) x[m] = rr[idx[m]!]!;

  if (o.detector === "lipponen-tarvainen" || o.detector === "both") {
    const lt = lipponenTarvainen(x, { alpha: o.alpha, thresholdWindow: o.thresholdWindow, medianWindow: o.medianWindow, c1: o.c1, c2: o.c2, mrrsLimit: o.mrrsLimit, minThresholdMs: o.minThresholdMs });
    if (lt.value === null) notes.push(`Lipponen–Tarvainen classification skipped: ${lt.reason}`);
    else lt.value.labels.forEach((l, m) => l !== "normal" && (labels[idx[m]!] = l));
  }
  if (o.detector === "percentage" || o.detector === "both") {
    const pr = percentageRule(x, {
      variant: o.percentageVariant,
      tolerance: o.percentageTolerance,
      surrounding: o.percentageSurrounding,
      resetAfter: o.percentageResetAfter,
      referenceWindow: o.percentageReferenceWindow,
    });
    pr.value!.rejected.forEach((r, m) => {
      if (r && labels[idx[m]!] === "normal") labels[idx[m]!] = "percentage";
    });
  }

  const c = correctBeats(rr, times, labels, gapBefore, { mode: o.mode, maxIsolated: o.maxIsolated });
  const byLabel = Object.fromEntries(BEAT_LABELS.map((l) => [l, 0])) as Record<BeatLabel, number>;
  const byAction = Object.fromEntries(BEAT_ACTIONS.map((a) => [a, 0])) as Record<BeatAction, number>;
  for (let k = 0; k < n; k++) {
    byLabel[c.labels[k]!]++;
    byAction[c.actions[k]!]++;
  }
  const edited = n - byAction.kept;
  return measured("clean", params, {
    nn: c.nn,
    times: c.times,
    source: c.source,
    edited: c.edited,
    afterBreak: c.afterBreak,
    labels: c.labels,
    actions: c.actions,
    inputTimes: times,
    inputRr: rr,
    edits: c.edits,
    counts: { input: n, output: c.nn.length, byLabel, byAction, edited, shareEdited: edited / n },
    notes,
  });
}
