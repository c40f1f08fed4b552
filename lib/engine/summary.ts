// Every index for a whole recording, flat and keyed as the command-line tool's JSON documents them. Undefined
// values are null with their reason under `reasons`; `quality` says how far the recording can be trusted.
import { windowQuality, type WindowQuality } from "./clean/window-quality";
import type { CleanCounts } from "./clean/clean-beats";
import type { Population } from "./clean/range-gate";
import { approximateEntropy } from "./entropy/apen";
import { multiscaleEntropy } from "./entropy/mse";
import { sampleEntropy } from "./entropy/sampen";
import { dfa } from "./fractal/dfa";
import { mfdfa } from "./fractal/mfdfa";
import { lombScargle } from "./frequency/lomb-scargle";
import { spectralSlope } from "./frequency/spectral-slope";
import { poincare } from "./poincare/poincare";
import { researchMeasures } from "./research/researchMeasures";
import type { Measured, Params } from "./result";
import { heartRate, meanNN, nn50, pnn50, rmssd, sdnn, sdsd } from "./time-domain";
import { ALGORITHM_VERSION } from "./version";
import { cleanForWindows, seriesStartS, type BeatSeries } from "./windows";

export const WHOLE_KEYS = [
  "n_beats", "mean_nn", "hr", "sdnn", "rmssd", "sdsd", "nn50", "pnn50", "sd1", "sd2", "sampen", "apen", "mse",
  "mse_ci", "dfa_alpha1", "dfa_alpha2", "lf", "hf", "lf_hf", "vlf", "beta", "mfdfa_width", "d2", "lyapunov",
  "power_law_alpha",
] as const;
export type WholeKey = (typeof WHOLE_KEYS)[number];

export interface WholeSummary extends Record<Exclude<WholeKey, "mse">, number | null> {
  /** SampEn per scale τ = 1…20 (null where undefined). */
  mse: (number | null)[] | null;
  reasons: Partial<Record<WholeKey, string>>;
  quality: WindowQuality & { cleaning: CleanCounts | null; cleaned: boolean };
}

export interface SummaryOptions {
  /** SampEn and ApEn embedding dimension and tolerance (fraction of SD). */
  m?: number;
  r?: number;
  clean?: boolean;
  population?: Population;
  /** Seed of the research measures' surrogates and bootstrap. */
  seed?: number;
}

export const SUMMARY_DEFAULTS = { m: 2, r: 0.2, clean: true, population: "adult" as Population, seed: 1 } as const;

export interface RecordingSummary {
  version: string;
  whole: WholeSummary;
  /** Method id → parameters used. */
  methods: Record<string, Params>;
}

export function summariseRecording(series: BeatSeries, options: SummaryOptions = {}): RecordingSummary {
  const o = { ...SUMMARY_DEFAULTS, ...options };
  const { interpolated, deleted } = cleanForWindows(series, o.population, o.clean);
  const methods: Record<string, Params> = { clean: interpolated.params };
  const reasons: WholeSummary["reasons"] = {};
  const values = Object.fromEntries(WHOLE_KEYS.map((k) => [k, null])) as Record<WholeKey, unknown>;
  const set = <V>(key: WholeKey, m: Measured<V>, pick: (v: V) => number | null | (number | null)[]) => {
    methods[m.method] = m.params;
    if (m.value === null) {
      reasons[key] = m.reason ?? "undefined";
      return;
    }
    const v = pick(m.value);
    values[key] = v;
    if (v === null) reasons[key] ??= "undefined for this recording";
  };

  const ci = interpolated.value;
  const cd = deleted.value;
  const nn = ci?.nn ?? new Float64Array(0);
  values.n_beats = nn.length;
  const start = seriesStartS(series);
  const end = ci && ci.inputTimes.length ? ci.inputTimes[ci.inputTimes.length - 1]! : start + 1;
  const quality = ci
    ? windowQuality(ci, { startS: start, endS: Math.max(end, start + 1e-3) }, {
        ...(series.quality && { quality: series.quality }),
        ...(series.leadOff && { leadOff: series.leadOff }),
      }).value!
    : null;

  if (nn.length === 0) {
    for (const k of WHOLE_KEYS) if (k !== "n_beats") reasons[k] = "no beats left after cleaning";
  } else {
    set("mean_nn", meanNN(nn), (v) => v);
    set("hr", heartRate(nn), (v) => v);
    set("sdnn", sdnn(nn), (v) => v);
    set("rmssd", rmssd(nn), (v) => v);
    set("sdsd", sdsd(nn), (v) => v);
    set("nn50", nn50(nn), (v) => v);
    set("pnn50", pnn50(nn), (v) => v);
    const p = poincare(nn);
    set("sd1", p, (v) => v.sd1);
    set("sd2", p, (v) => v.sd2);
    set("sampen", sampleEntropy(nn, { m: o.m, r: o.r }), (v) => v.sampen);
    set("apen", approximateEntropy(nn, { m: o.m, r: o.r }), (v) => v.apen);
    const mse = multiscaleEntropy(nn);
    set("mse", mse, (v) => v.curve.map((c) => c.sampen));
    set("mse_ci", mse, (v) => v.ci);
    if (mse.value?.ciReason) reasons.mse_ci = mse.value.ciReason;
    set("dfa_alpha1", dfa(nn), (v) => v.alpha);
    set("dfa_alpha2", dfa(nn, { exponent: "alpha2" }), (v) => v.alpha);
    const ls = lombScargle(cd!.nn, cd!.times);
    for (const [key, field] of [["lf", "lf"], ["hf", "hf"], ["lf_hf", "lfHf"], ["vlf", "vlf"]] as const) {
      set(key, ls, (v) => v[field]);
      const why = ls.value?.reasons[field];
      if (why) reasons[key] = why;
    }
    set("beta", spectralSlope(cd!.nn, cd!.times), (v) => v.beta);
    set("mfdfa_width", mfdfa(nn), (v) => v.width);
    const research = researchMeasures(nn, { seed: o.seed });
    set("d2", research.correlationDimension, (v) => v.d2);
    if (research.correlationDimension.value?.d2Reason) reasons.d2 = research.correlationDimension.value.d2Reason;
    set("lyapunov", research.lyapunov, (v) => v.perBeat);
    if (research.lyapunov.value?.perBeatReason) reasons.lyapunov = research.lyapunov.value.perBeatReason;
    set("power_law_alpha", research.powerLaw, (v) => v.alpha);
    methods["research-embedding"] = { ...research.embeddingUsed };
  }

  const whole = {
    ...(values as Omit<WholeSummary, "reasons" | "quality">),
    reasons,
    quality: {
      ...(quality ?? emptyQuality(start)),
      cleaning: ci?.counts ?? null,
      cleaned: o.clean,
    },
  } as WholeSummary;
  return { version: ALGORITHM_VERSION, whole, methods };
}

function emptyQuality(start: number): WindowQuality {
  return {
    startS: start, endS: start, nBeats: 0, nInputBeats: 0, coverage: 0, shareEdited: null, shareEctopic: null,
    longestGapS: 0, devicePoorShare: null, grade: "unusable", reasons: ["no beats"],
  } as WindowQuality;
}
