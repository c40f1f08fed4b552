// DOMAIN §6.8: a neonate in intensive care — fast, less variable rhythm with RSA at the neonatal breathing rate —
// and the pre-sepsis pattern: variability falls and transient decelerations appear.
import { assertInteger } from "../assert";
import { createRng } from "../random";
import { runSinus, singleBetaBackground } from "./sinus";
import { assertNonNegative, assertRange, cleanQuality, seriesFromIntervals, subSeed, type SimulatedBeats } from "./types";

export interface NicuOptions {
  seed: number;
  durationS: number;
  beats: number | null;
  startS: number;
  /** Mean interval, ms (420 ms ≈ 143 bpm). */
  mu: number;
  /** Background scale σ, ms (10–20), and its exponent β. */
  sigma: number;
  beta: number;
  /** RSA amplitude, ms (2–5), and respiratory frequency bounds, Hz (0.7–1.0, i.e. 42–60 breaths/min). */
  aHf: number;
  respRange: readonly number[];
  respStep: number;
  /** Mayer-wave amplitude, ms, and frequency, Hz. DOMAIN §6.8 names none: 0 by default. */
  aLf: number;
  fLf: number;
  /** Start of the pre-sepsis pattern, s since the series start; null = none. */
  preSepsisStartS: number | null;
  /** σ falls linearly to `preSepsisSigma` over `preSepsisRampS`. */
  preSepsisRampS: number;
  preSepsisSigma: number;
  /** Transient decelerations after the pre-sepsis start: Poisson rate per hour, peak RR increase as a fraction
   *  (U(lo, hi)), duration, s (U(lo, hi)). */
  decelerationsPerHour: number;
  decelerationDepth: readonly number[];
  decelerationDurationS: readonly number[];
}

export const NICU_DEFAULTS: Readonly<NicuOptions> = {
  seed: 1,
  durationS: 8 * 3600,
  beats: null,
  startS: 0,
  mu: 420,
  sigma: 15,
  beta: 1.0,
  aHf: 3.5,
  respRange: [0.7, 1.0],
  respStep: 0.002,
  aLf: 0,
  fLf: 0.1,
  preSepsisStartS: null,
  preSepsisRampS: 3600,
  preSepsisSigma: 5,
  decelerationsPerHour: 3,
  decelerationDepth: [0.5, 1.5],
  decelerationDurationS: [5, 30],
};

export interface Deceleration {
  startS: number;
  durationS: number;
  /** Peak RR increase as a fraction (0.5 = +50 %). */
  depth: number;
}

/**
 * NICU variant, DOMAIN §6.8 (mem/cp): the §6.1 sinus model with μ = 420 ms, σ = 15 ms, β = 1.0 and RSA of 3.5 ms
 * at 0.7–1.0 Hz. With `preSepsisStartS` set, σ falls to 5 ms over `preSepsisRampS` and decelerations arrive as a
 * Poisson process (3 per hour): each multiplies RR by 1 + d·sin²(π(t − t₀)/D), d ~ U(0.5, 1.5), D ~ U(5, 30) s
 * (+50–150 % at the peak). Decelerations are physiology, so their beats keep the truth label "normal"; the list is
 * returned as `decelerations`; they stay inside the neonatal range gate (250–1500 ms).
 */
export function simulateNicu(options: Partial<NicuOptions> = {}): SimulatedBeats & { decelerations: Deceleration[] } {
  const o: NicuOptions = { ...NICU_DEFAULTS, ...options };
  assertInteger(o.seed, "seed", 0, 0xffffffff);
  if (o.beats !== null) assertInteger(o.beats, "beats", 2);
  else assertNonNegative("durationS", o.durationS);
  assertRange("respRange", o.respRange, 0.01, 3);
  assertRange("decelerationDepth", o.decelerationDepth, 0, 5);
  assertRange("decelerationDurationS", o.decelerationDurationS, 0.5, 600);
  assertNonNegative("decelerationsPerHour", o.decelerationsPerHour);
  assertNonNegative("preSepsisRampS", o.preSepsisRampS);
  if (o.preSepsisStartS !== null) assertNonNegative("preSepsisStartS", o.preSepsisStartS);

  const rng = createRng(o.seed);
  const eventRng = createRng(subSeed(o.seed, 2));
  const decelerations: Deceleration[] = [];
  // Events over the stated duration (or, in the beats form, over the time the beats would span at μ).
  const horizonS = o.beats !== null ? (o.beats * o.mu) / 1000 : o.durationS;
  if (o.preSepsisStartS !== null && o.decelerationsPerHour > 0) {
    const rate = o.decelerationsPerHour / 3600;
    let t = o.preSepsisStartS;
    for (;;) {
      t += -Math.log(1 - eventRng.next()) / rate;
      if (t >= horizonS) break;
      decelerations.push({
        startS: t,
        durationS: eventRng.uniform(o.decelerationDurationS[0]!, o.decelerationDurationS[1]!),
        depth: eventRng.uniform(o.decelerationDepth[0]!, o.decelerationDepth[1]!),
      });
    }
  }
  const pre = o.preSepsisStartS;
  const sigmaAt = (t: number) => {
    if (pre === null || t <= pre) return o.sigma;
    const u = o.preSepsisRampS === 0 ? 1 : Math.min(1, (t - pre) / o.preSepsisRampS);
    return o.sigma + u * (o.preSepsisSigma - o.sigma);
  };
  const multiplier = (t: number) => {
    let m = 1;
    for (const d of decelerations) {
      if (t >= d.startS && t < d.startS + d.durationS) m += d.depth * Math.sin((Math.PI * (t - d.startS)) / d.durationS) ** 2;
    }
    return m;
  };
  const rr = runSinus(
    {
      mu: () => o.mu,
      sigma: sigmaAt,
      aHf: () => o.aHf,
      aLf: () => o.aLf,
      multiplier: decelerations.length > 0 ? multiplier : undefined,
      fLf: o.fLf,
      respRange: [o.respRange[0]!, o.respRange[1]!],
      respStep: o.respStep,
    },
    o.beats !== null ? { beats: o.beats } : { durationS: o.durationS },
    singleBetaBackground(o.beta, rng),
    rng,
  );
  const quality = cleanQuality(rr.length, createRng(subSeed(o.seed, 1)));
  const series = seriesFromIntervals(rr, o.startS, "sinus", "N", quality, { generator: "nicu", params: { ...o } });
  return { ...series, decelerations };
}
