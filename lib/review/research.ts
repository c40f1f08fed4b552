// The Research panel of a window: chaos and power-law measures on the hour around it (DOMAIN §2.7, §2.8), each with
// its caveat. Research only: nothing here is stored, and nothing here can raise a flag. The measures are the
// engine's (lib/engine/research/researchMeasures.ts); this module only picks the hour, seeds the random parts per
// window, and shapes the results into compact arrays for the plots.
import "server-only";
import type { Knex } from "knex";
import { db as defaultDb } from "@/lib/db/knex";
import {
  CORRELATION_DIMENSION_CAVEAT,
  EMBEDDING_CAVEAT,
  LYAPUNOV_CAVEAT,
  POWER_LAW_CAVEAT,
  SURROGATE_CAVEAT,
} from "@/lib/engine/research/caveats";
import { logNormalSf } from "@/lib/engine/research/normal";
import type { LikelihoodRatio } from "@/lib/engine/research/powerLaw";
import { researchMeasures } from "@/lib/engine/research/researchMeasures";
import { runSizes } from "@/lib/engine/research/runSizes";
import type { Measured, Params } from "@/lib/engine/result";
import { linearFit } from "@/lib/engine/stats";
import { windowQuality } from "@/lib/engine/clean/window-quality";
import type { StayScopeDTO } from "./stay-scope";
import { beatsAroundWindow, findShortWindow, NO_WINDOWS_MESSAGE, spanOf, type HourDTO, type NoWindowsDTO } from "./window-detail";

/** Points along each fitted CCDF line (log-spaced from x_min to the largest size). */
const FIT_LINE_POINTS = 40;

interface PartBase {
  /** Why the value is null. */
  reason: string | null;
  /** The measure's caveat (lib/engine/research/caveats.ts), present even when the value is null. */
  caveat: string;
  method: string;
  params: Params;
  version: string;
  research: true;
}

export interface ResearchPart<V> extends PartBase {
  value: V | null;
}

export interface CorrelationDimensionDTO {
  d2: number | null;
  d2Reason: string | null;
  verdict: "saturated" | "not saturated";
  saturationDim: number | null;
  /** Embedding dimension m = 1…maxDim and the slope of ln C(r) against ln r at each (null where no scaling region). */
  m: number[];
  slopes: (number | null)[];
  eckmannRuelleBound: number;
  theiler: number;
  vectors: number;
}

export interface LyapunovDTO {
  perBeat: number | null;
  perBeatReason: string | null;
  perSecond: number | null;
  perSecondReason: string | null;
  /** ⟨ln d(i)⟩ against the step i (beats), and the fitted line over [fitFrom, fitTo] (null outside it). */
  steps: number[];
  meanLogDivergence: number[];
  fitLine: (number | null)[];
  fitFrom: number | null;
  fitTo: number | null;
  r2: number | null;
  theiler: number;
}

export interface FalseNeighboursDTO {
  dimension: number | null;
  dimensionReason: string | null;
  /** m and the share (0–1) of nearest neighbours in m dimensions that are false in m + 1. */
  dims: number[];
  falseFraction: number[];
  threshold: number;
}

export interface SurrogateDTO {
  structureBeyondLinear: "yes" | "no";
  pValueBound: number;
  atLeastAsExtreme: number;
  surrogates: number;
  statistic: string;
  dataStatistic: number;
  surrogateStatistics: number[];
  segmentLength: number;
}

export interface PowerLawFitDTO {
  alpha: number;
  alphaSE: number;
  xmin: number;
  nTail: number;
  decades: number;
  bootstrap: { p: number; simulations: number; plausible: boolean; note: string } | null;
  lognormal: Pick<LikelihoodRatio, "parameters" | "logLikelihoodRatio" | "statistic" | "pTwoSided" | "favours" | "note">;
  /** The fitted power law and the fitted lognormal as CCDF lines over the tail, scaled to the tail's share n_tail/n. */
  line: { x: number[]; powerLaw: number[]; lognormal: number[] };
}

export interface PowerLawDTO {
  /** Runs counted (increases and decreases pooled). */
  runs: number;
  /** Empirical CCDF P(X ≥ x) of the run sizes (cumulative |ΔRR| of runs of increases and decreases, pooled), ms. */
  ccdf: { x: number[]; p: number[] };
  fit: ResearchPart<PowerLawFitDTO>;
}

export interface ResearchDTO {
  window: { start: string; end: string };
  hour: Omit<HourDTO, "values" | "quality"> & { grade: "good" | "limited" | "unusable" | null; beats: number };
  /** Null with `reason` when the hour has no usable beats; otherwise every part with its own value or reason. */
  reason: string | null;
  /** Seed of the surrogates and the bootstrap, derived from the stay and the window start: same window, same result. */
  seed: number;
  embedding: { tau: number; tauSource: string; m: number; mSource: string; caveat: string } | null;
  correlationDimension: ResearchPart<CorrelationDimensionDTO> | null;
  lyapunov: ResearchPart<LyapunovDTO> | null;
  falseNeighbours: ResearchPart<FalseNeighboursDTO> | null;
  surrogate: ResearchPart<SurrogateDTO> | null;
  powerLaw: PowerLawDTO | null;
}

/** FNV-1a over the window's identity: a seed fixed per window, different between windows. */
function researchSeed(stayId: string, startIso: string): number {
  let h = 0x811c9dc5;
  for (const ch of `${stayId}|${startIso}`) {
    h ^= ch.codePointAt(0)!;
    h = Math.imul(h, 0x01000193) >>> 0;
  }
  return h >>> 0;
}

function part<V, D>(m: Measured<V>, caveat: string, shape: (v: V) => D): ResearchPart<D> {
  return {
    value: m.value === null ? null : shape(m.value),
    reason: m.reason,
    caveat,
    method: m.method,
    params: m.params,
    version: m.version,
    research: true,
  };
}

/** Empirical CCDF at each distinct value of the sorted sizes: P(X ≥ x). */
function ccdfOf(sorted: Float64Array): PowerLawDTO["ccdf"] {
  const x: number[] = [];
  const p: number[] = [];
  const n = sorted.length;
  for (let i = 0; i < n; i++) {
    if (i > 0 && sorted[i] === sorted[i - 1]) continue;
    x.push(sorted[i]!);
    p.push((n - i) / n);
  }
  return { x, p };
}

/**
 * Fitted CCDF lines for the plot, over x from x_min to the largest size, each scaled by the tail's share n_tail/n so
 * they sit on the empirical CCDF: continuous power law (x/x_min)^(1−α) (Clauset et al. 2009, Eq. 2.6), lognormal
 * truncated at x_min Q((ln x − μ)/σ) / Q((ln x_min − μ)/σ) with the engine's fitted μ, σ.
 */
function fitLines(alpha: number, xmin: number, xmax: number, share: number, lognormal: Record<string, number>): PowerLawFitDTO["line"] {
  const { meanlog, sdlog } = lognormal as { meanlog: number; sdlog: number };
  const x: number[] = [];
  const powerLaw: number[] = [];
  const ln: number[] = [];
  const base = logNormalSf((Math.log(xmin) - meanlog) / sdlog);
  for (let i = 0; i < FIT_LINE_POINTS; i++) {
    const v = xmin * (xmax / xmin) ** (i / (FIT_LINE_POINTS - 1));
    x.push(v);
    powerLaw.push(share * (v / xmin) ** (1 - alpha));
    ln.push(share * Math.exp(logNormalSf((Math.log(v) - meanlog) / sdlog) - base));
  }
  return { x, powerLaw, lognormal: ln };
}

/**
 * The Research panel of a stay's window (default: its latest): every research measure of
 * lib/engine/research on the NN intervals of the hour around the window (the same hour as the Window detail's MSE
 * and DFA α2), with the seed derived from the window. `{ window: null, message }` when the stay has no window; null
 * when `startIso` names no stored window.
 */
export async function windowResearch(scope: StayScopeDTO, startIso: string | null, knex: Knex = defaultDb): Promise<ResearchDTO | NoWindowsDTO | null> {
  const found = await findShortWindow(scope.stayId, startIso, knex);
  if (found.kind === "no_windows") return { window: null, message: NO_WINDOWS_MESSAGE };
  if (found.kind === "not_found") return null;
  const row = found.row;
  const start = row.window_start.toISOString();
  const seed = researchSeed(scope.stayId, start);
  const beats = await beatsAroundWindow(scope, row, knex);
  const { hour } = beats;
  const out: ResearchDTO = {
    window: { start, end: row.window_end.toISOString() },
    hour: { start: new Date(hour.startS * 1000).toISOString(), end: new Date(hour.endS * 1000).toISOString(), source: hour.source, note: hour.note, grade: null, beats: 0 },
    reason: null,
    seed,
    embedding: null,
    correlationDimension: null,
    lyapunov: null,
    falseNeighbours: null,
    surrogate: null,
    powerLaw: null,
  };
  const ci = beats.cleaned?.interpolated.value;
  if (!ci) {
    out.reason = "the beats behind this window are no longer held (beats are dropped after the retention period) or never arrived";
    return out;
  }
  const quality = windowQuality(ci, { startS: hour.startS, endS: hour.endS }, beats.qualityOptions).value!;
  const [a, b] = spanOf(ci.times, hour.startS, hour.endS);
  out.hour.grade = quality.grade;
  out.hour.beats = b - a;
  if (quality.grade === "unusable") {
    out.reason = `the hour is graded unusable: ${quality.reasons.join("; ")}`;
    return out;
  }
  const nn = ci.nn.slice(a, b);
  const r = researchMeasures(nn, { seed });

  out.embedding = { ...r.embeddingUsed, caveat: EMBEDDING_CAVEAT };
  out.correlationDimension = part(r.correlationDimension, CORRELATION_DIMENSION_CAVEAT, (v) => ({
    d2: v.d2,
    d2Reason: v.d2Reason,
    verdict: v.verdict,
    saturationDim: v.saturationDim,
    m: v.slopes.map((_, i) => i + 1),
    slopes: v.slopes,
    eckmannRuelleBound: v.eckmannRuelleBound,
    theiler: v.theiler,
    vectors: v.vectors,
  }));
  out.lyapunov = part(r.lyapunov, LYAPUNOV_CAVEAT, (v) => {
    let fitLine: (number | null)[] = v.steps.map(() => null);
    if (v.fitFrom !== null && v.fitTo !== null && v.fitTo > v.fitFrom) {
      const xs = v.steps.slice(v.fitFrom, v.fitTo + 1);
      // The engine's fit over the same range: its slope is λ1 per beat; the intercept places the line on the curve.
      const fit = linearFit(xs, v.meanLogDivergence.slice(v.fitFrom, v.fitTo + 1));
      fitLine = v.steps.map((s, i) => (i >= v.fitFrom! && i <= v.fitTo! ? fit.intercept + fit.slope * s : null));
    }
    return {
      perBeat: v.perBeat,
      perBeatReason: v.perBeatReason,
      perSecond: v.perSecond,
      perSecondReason: v.perSecondReason,
      steps: v.steps,
      meanLogDivergence: v.meanLogDivergence,
      fitLine,
      fitFrom: v.fitFrom,
      fitTo: v.fitTo,
      r2: v.r2,
      theiler: v.theiler,
    };
  });
  out.falseNeighbours = part(r.embedding, EMBEDDING_CAVEAT, (v) => ({
    dimension: v.dimension,
    dimensionReason: v.dimensionReason,
    dims: v.dims,
    falseFraction: v.falseFraction,
    threshold: r.embedding.params.threshold as number,
  }));
  out.surrogate = part(r.surrogateTest, SURROGATE_CAVEAT, (v) => ({
    structureBeyondLinear: v.structureBeyondLinear,
    pValueBound: v.pValueBound,
    atLeastAsExtreme: v.atLeastAsExtreme,
    surrogates: v.surrogates,
    statistic: v.statistic,
    dataStatistic: v.dataStatistic,
    surrogateStatistics: v.surrogateStatistics,
    segmentLength: v.segmentLength,
  }));
  // The same pooled run sizes researchMeasures fits, for the empirical CCDF.
  const runs = runSizes(nn);
  const sizes = new Float64Array(runs.increases.sizes.length + runs.decreases.sizes.length);
  sizes.set(runs.increases.sizes);
  sizes.set(runs.decreases.sizes, runs.increases.sizes.length);
  sizes.sort();
  out.powerLaw = {
    runs: sizes.length,
    ccdf: ccdfOf(sizes),
    fit: part(r.powerLaw, POWER_LAW_CAVEAT, (v) => ({
      alpha: v.alpha,
      alphaSE: v.alphaSE,
      xmin: v.xmin,
      nTail: v.nTail,
      decades: v.decades,
      bootstrap: v.bootstrap,
      lognormal: {
        parameters: v.lognormal.parameters,
        logLikelihoodRatio: v.lognormal.logLikelihoodRatio,
        statistic: v.lognormal.statistic,
        pTwoSided: v.lognormal.pTwoSided,
        favours: v.lognormal.favours,
        note: v.lognormal.note,
      },
      line: fitLines(v.alpha, v.xmin, sizes[sizes.length - 1]!, v.nTail / v.n, v.lognormal.parameters),
    })),
  };
  return out;
}
