import { assertInteger, assertSeries } from "../assert";
import type { Measured } from "../result";
import { correlationDimension, type CorrelationDimensionValue } from "./correlationDimension";
import { falseNearestNeighbours, type FalseNearestNeighboursValue } from "./falseNearestNeighbours";
import { largestLyapunovExponent, LYAPUNOV_DEFAULTS, type LyapunovValue } from "./lyapunov";
import { mutualInformationDelay, type MutualInformationValue } from "./mutualInformation";
import { powerLawFit, type PowerLawValue } from "./powerLaw";
import { runSizes } from "./runSizes";
import { surrogateTest, type SurrogateTestValue } from "./surrogateTest";

export const RESEARCH_MEASURES_DEFAULTS = {
  /** Seed of the surrogates and of the power-law bootstrap. */
  seed: 1,
  surrogates: 19,
  bootstrap: 100,
  /** Delay when the mutual information has no first minimum: one beat (common practice for beat series). */
  fallbackDelay: 1,
  /** Embedding dimension for the Lyapunov exponent when false nearest neighbours find none. */
  fallbackDimension: LYAPUNOV_DEFAULTS.m,
} as const;

export type ResearchMeasuresOptions = {
  seed?: number;
  surrogates?: number;
  bootstrap?: number;
  fallbackDelay?: number;
  fallbackDimension?: number;
};

export interface ResearchMeasures {
  delay: Measured<MutualInformationValue>;
  embedding: Measured<FalseNearestNeighboursValue>;
  correlationDimension: Measured<CorrelationDimensionValue>;
  lyapunov: Measured<LyapunovValue>;
  surrogateTest: Measured<SurrogateTestValue>;
  /** Power-law fit of the run sizes: cumulative |ΔRR| of runs of increases and of decreases, pooled. */
  powerLaw: Measured<PowerLawValue>;
  /** The embedding actually used by D2 and λ1, and where each number came from. */
  embeddingUsed: { tau: number; tauSource: string; m: number; mSource: string };
}

/**
 * Every research-only measure on one stretch of NN intervals (ms), typically one hour (DOMAIN §2.9: 10³–10⁴
 * beats): delay by mutual information, embedding dimension by false nearest neighbours, D2 over m = 1…10 with
 * that delay, λ1 with that delay and dimension (per beat, and per second from the beat times the intervals imply),
 * the IAAFT surrogate test, and a continuous power-law fit of run sizes. All results carry `research: true` and
 * their caveats; none may drive a flag. Each part returns its own null and reason, so one undefined measure does
 * not hide the others.
 */
export function researchMeasures(rr: Float64Array, options: ResearchMeasuresOptions = {}): ResearchMeasures {
  assertSeries(rr, "rr");
  const o = { ...RESEARCH_MEASURES_DEFAULTS, ...options };
  assertInteger(o.fallbackDelay, "fallbackDelay", 1);
  assertInteger(o.fallbackDimension, "fallbackDimension", 1);
  const delay = mutualInformationDelay(rr);
  const tau = delay.value?.delay ?? o.fallbackDelay;
  const tauSource = delay.value?.delay != null ? "first minimum of the mutual information" : `fallback (${delay.value?.delayReason ?? delay.reason})`;
  const embedding = falseNearestNeighbours(rr, { tau });
  const m = embedding.value?.dimension ?? o.fallbackDimension;
  const mSource = embedding.value?.dimension != null ? "false nearest neighbours" : `fallback (${embedding.value?.dimensionReason ?? embedding.reason})`;
  const beatTimes = new Float64Array(rr.length);
  let t = 0;
  for (let i = 0; i < rr.length; i++) {
    t += rr[i]! / 1000;
    beatTimes[i] = t;
  }
  const runs = runSizes(rr);
  const sizes = new Float64Array(runs.increases.sizes.length + runs.decreases.sizes.length);
  sizes.set(runs.increases.sizes);
  sizes.set(runs.decreases.sizes, runs.increases.sizes.length);
  return {
    delay,
    embedding,
    correlationDimension: correlationDimension(rr, { tau }),
    lyapunov: largestLyapunovExponent(rr, { m, tau, beatTimes: rr.length > 0 && rr.every((v) => v > 0) ? beatTimes : undefined }),
    surrogateTest: surrogateTest(rr, { surrogates: o.surrogates, seed: o.seed }),
    powerLaw: powerLawFit(sizes, { kind: "continuous", bootstrap: o.bootstrap, seed: o.seed }),
    embeddingUsed: { tau, tauSource, m, mSource },
  };
}
