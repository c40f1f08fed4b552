// Per-window signal quality (DOMAIN §2.1): is a window's value trustworthy enough to show?
import { measured, type Measured } from "../result";
import type { CleanedBeats } from "./clean-beats";
import { DEVICE_QUALITY_POOR_BELOW } from "./labels";
import { lowerBound } from "../stats";

export type QualityGrade = "good" | "limited" | "unusable";

export interface QualityThresholds {
  /** Fewer output NN beats than this: unusable. */
  minBeats: number;
  /** Good: coverage ≥, share edited ≤, share of time the device reported poor ≤, longest gap ≤ (s). */
  goodMinCoverage: number;
  goodMaxEdited: number;
  goodMaxDevicePoor: number;
  goodMaxGapS: number;
  /** Limited (shown greyed out): coverage ≥, share edited ≤, device-poor share ≤. Below any of these: unusable. */
  limitedMinCoverage: number;
  limitedMaxEdited: number;
  limitedMaxDevicePoor: number;
}

/**
 * Grading thresholds, all bounds inclusive (a value exactly at a bound passes):
 * - good: coverage ≥ 90 % and edits ≤ 5 % (DOMAIN §2.1's acceptance rule, cp); device-reported poor time ≤ 5 % and
 *   no gap over 60 s (DOMAIN §5.7 calls data stale after 60 s without beats, cp) — our choices;
 * - limited: coverage ≥ 80 % and edits ≤ 10 % and device-poor time ≤ 20 % — our choice: the band between the
 *   acceptance rule and DOMAIN §1's data-quality flags (coverage < 80 %, edits > 5 %), shown greyed out;
 * - unusable: anything worse, or fewer than 60 beats (about the 60-s ultra-short minimum of DOMAIN §2.9 at
 *   60 bpm, mem).
 */
export const QUALITY_THRESHOLDS: Readonly<QualityThresholds> = {
  minBeats: 60,
  goodMinCoverage: 0.9,
  goodMaxEdited: 0.05,
  goodMaxDevicePoor: 0.05,
  goodMaxGapS: 60,
  limitedMinCoverage: 0.8,
  limitedMaxEdited: 0.1,
  limitedMaxDevicePoor: 0.2,
};

export interface WindowQuality {
  startS: number;
  endS: number;
  /** Output NN intervals whose beat falls in [startS, endS), and input intervals likewise. */
  nBeats: number;
  nInputBeats: number;
  /** Share of the window covered by NN intervals (after cleaning, corrected ones included), 0–1. */
  coverage: number;
  /** Share of input intervals not kept as measured (interpolated, split, merged, removed); null without input beats. */
  shareEdited: number | null;
  /** Share of input intervals labelled ectopic; null without input beats. */
  shareEctopic: number | null;
  /** Longest stretch of the window not covered by an NN interval, s (window edges included). */
  longestGapS: number;
  /** Share of the window's time in input intervals the device rated poor or lead-off; null when not supplied. */
  devicePoorShare: number | null;
  grade: QualityGrade;
  /** Plain-words reasons the grade is not "good" (empty when good). */
  reasons: string[];
}

export interface WindowQualityOptions {
  /** Device-reported quality per input beat, 0–1, and lead-off flags per input beat. */
  quality?: Float64Array;
  leadOff?: Uint8Array;
  /** Quality below this counts as reported poor. */
  poorBelow?: number;
  thresholds?: Partial<QualityThresholds>;
}


const pct = (x: number) => `${(100 * x).toFixed(1)} %`;

/**
 * Signal quality of one window [startS, endS) of a cleaned series (DOMAIN §2.1, cp):
 * - coverage = length of the union of the NN intervals [t − NN, t] inside the window ÷ window length;
 * - longest gap = longest part of the window outside that union, edges included (no data before the first beat of
 *   the window counts as gap);
 * - share edited and share ectopic count the *input* intervals whose beat falls in the window;
 * - device-poor share = time of input intervals with device quality < `poorBelow` (0.5) or lead-off ÷ window length.
 * The grade follows QUALITY_THRESHOLDS; `reasons` names every threshold missed. Binary search on the beat times
 * keeps a 1-min-stride sweep over a night cheap.
 */
export function windowQuality(
  cleaned: CleanedBeats,
  window: { startS: number; endS: number },
  options: WindowQualityOptions = {},
): Measured<WindowQuality> {
  const { startS, endS } = window;
  if (!(Number.isFinite(startS) && Number.isFinite(endS) && endS > startS)) throw new RangeError(`window needs finite startS < endS, got ${startS}, ${endS}`);
  const th: QualityThresholds = { ...QUALITY_THRESHOLDS, ...options.thresholds };
  const poorBelow = options.poorBelow ?? DEVICE_QUALITY_POOR_BELOW;
  const nIn = cleaned.inputRr.length;
  // Only the type and length are checked here, and each value as the window reads it: a sweep of a night's
  // windows would otherwise re-scan the whole quality array once per window.
  if (options.quality !== undefined) {
    if (!(options.quality instanceof Float64Array)) throw new TypeError("quality must be a Float64Array");
    if (options.quality.length !== nIn) throw new RangeError(`quality has ${options.quality.length} values for ${nIn} input intervals`);
  }
  if (options.leadOff !== undefined && options.leadOff.length !== nIn) throw new RangeError(`leadOff has ${options.leadOff.length} flags for ${nIn} input intervals`);
  const lengthS = endS - startS;

  // Coverage and gaps from the output intervals.
  const { nn, times } = cleaned;
  const first = lowerBound(times, startS);
  let covered = 0;
  let cur = startS;
  let longest = 0;
  let nBeats = 0;
  for (let k = first; k < times.length; k++) {
    const e = Math.min(times[k]!, endS);
    const s = Math.max(times[k]! - nn[k]! / 1000, startS);
    if (s >= endS) break;
    if (times[k]! < endS) nBeats++;
    if (s > cur) longest = Math.max(longest, s - cur);
    if (e > cur) {
      covered += e - Math.max(s, cur);
      cur = e;
    }
  }
  longest = Math.max(longest, endS - cur);
  const coverage = covered / lengthS;

  // Edits, ectopy and device quality from the input intervals.
  const inT = cleaned.inputTimes;
  const a = lowerBound(inT, startS);
  const b = lowerBound(inT, endS);
  const nInputBeats = b - a;
  let edited = 0;
  let ectopic = 0;
  for (let k = a; k < b; k++) {
    if (cleaned.actions[k] !== "kept") edited++;
    if (cleaned.labels[k] === "ectopic") ectopic++;
  }
  let devicePoorShare: number | null = null;
  if (options.quality !== undefined || options.leadOff !== undefined) {
    let poor = 0;
    const { quality, leadOff } = options;
    for (let k = a; k < nIn; k++) {
      const s = Math.max(inT[k]! - cleaned.inputRr[k]! / 1000, startS);
      if (s >= endS) break;
      if (quality !== undefined && !Number.isFinite(quality[k]!)) throw new RangeError(`quality[${k}] is not a finite number`);
      const isPoor = (quality !== undefined && quality[k]! < poorBelow) || (leadOff !== undefined && leadOff[k] === 1);
      if (isPoor) poor += Math.max(0, Math.min(inT[k]!, endS) - s);
    }
    devicePoorShare = poor / lengthS;
  }
  const shareEdited = nInputBeats > 0 ? edited / nInputBeats : null;
  const shareEctopic = nInputBeats > 0 ? ectopic / nInputBeats : null;

  const unusable: string[] = [];
  const limited: string[] = [];
  if (nBeats < th.minBeats) unusable.push(`${nBeats} beats, fewer than ${th.minBeats}`);
  if (coverage < th.limitedMinCoverage) unusable.push(`coverage ${pct(coverage)} below ${pct(th.limitedMinCoverage)}`);
  else if (coverage < th.goodMinCoverage) limited.push(`coverage ${pct(coverage)} below ${pct(th.goodMinCoverage)}`);
  if (shareEdited !== null) {
    if (shareEdited > th.limitedMaxEdited) unusable.push(`${pct(shareEdited)} of beats edited, above ${pct(th.limitedMaxEdited)}`);
    else if (shareEdited > th.goodMaxEdited) limited.push(`${pct(shareEdited)} of beats edited, above ${pct(th.goodMaxEdited)}`);
  }
  if (devicePoorShare !== null) {
    if (devicePoorShare > th.limitedMaxDevicePoor) unusable.push(`device reported poor signal for ${pct(devicePoorShare)} of the time, above ${pct(th.limitedMaxDevicePoor)}`);
    else if (devicePoorShare > th.goodMaxDevicePoor) limited.push(`device reported poor signal for ${pct(devicePoorShare)} of the time, above ${pct(th.goodMaxDevicePoor)}`);
  }
  if (longest > th.goodMaxGapS) limited.push(`a gap of ${longest.toFixed(1)} s, longer than ${th.goodMaxGapS} s`);
  const grade: QualityGrade = unusable.length > 0 ? "unusable" : limited.length > 0 ? "limited" : "good";

  return measured("window-quality", { startS, endS, poorBelow, ...th }, {
    startS,
    endS,
    nBeats,
    nInputBeats,
    coverage,
    shareEdited,
    shareEctopic,
    longestGapS: longest,
    devicePoorShare,
    grade,
    reasons: [...unusable, ...limited],
  });
}
