// DOMAIN §6.1: a healthy adult's night in sleep — falling heart rate early in the night, 90-min sleep cycles with a
// REM stretch at the end of each, a 1/f^β background, respiratory sinus arrhythmia and a 0.1-Hz Mayer wave.
import { assertInteger } from "../assert";
import { createRng } from "../random";
import { runSinus, singleBetaBackground } from "./sinus";
import { assertNonNegative, assertRange, cleanQuality, seriesFromIntervals, subSeed, type SimulatedBeats } from "./types";

export interface HealthySleepOptions {
  seed: number;
  /** Length of the night, s (used when `beats` is null). */
  durationS: number;
  /** Exact beat count instead of a duration (the DOMAIN §6.1 calibration uses 330-beat runs). */
  beats: number | null;
  /** Time origin of the series, s. */
  startS: number;
  /** μ₀, ms: mean interval at sleep onset. */
  mu0: number;
  /** μ rises by this much, ms, as 1 − e^(−t/τ) (heart rate falls early in sleep). */
  sleepDrop: number;
  sleepTauS: number;
  /** Sleep-cycle oscillation 30·sin(2πt/5400 s), ms and s. */
  cycleAmplitude: number;
  cyclePeriodS: number;
  /** The last `remDurationS` of each cycle is REM: μ shifts by `remShift` ms and the background is × `remNoiseGain`. */
  remDurationS: number;
  remShift: number;
  remNoiseGain: number;
  /** Exponent of the 1/f^β background (spectral synthesis over the whole series, unit variance). */
  beta: number;
  /** Background scale σ, ms. */
  sigma: number;
  /** RSA amplitude A_HF (12–25 ms) and Mayer-wave amplitude A_LF, ms; Mayer-wave frequency, Hz. */
  aHf: number;
  aLf: number;
  fLf: number;
  /** Respiratory frequency walk: bounds, Hz, and SD of the step per beat, Hz. */
  respRange: readonly number[];
  respStep: number;
}

/** DOMAIN §6.1 values; A_HF at the low end of 12–25 ms, as in the §6.1 calibration. */
export const HEALTHY_SLEEP_DEFAULTS: Readonly<HealthySleepOptions> = {
  seed: 1,
  durationS: 8 * 3600,
  beats: null,
  startS: 0,
  mu0: 900,
  sleepDrop: 100,
  sleepTauS: 2 * 3600,
  cycleAmplitude: 30,
  cyclePeriodS: 5400,
  remDurationS: 15 * 60,
  remShift: -40,
  remNoiseGain: 1.3,
  beta: 1.3,
  sigma: 45,
  aHf: 12,
  aLf: 20,
  fLf: 0.1,
  respRange: [0.2, 0.3],
  respStep: 0.002,
};

/**
 * Healthy adult sleep, DOMAIN §6.1: RR_k = μ(t) + σ·g(t)·b_k + A_HF·sin φ_k + A_LF·sin(2π·0.1·t + φ₀), with
 * μ(t) = μ₀ + 100(1 − e^(−t/2 h)) + 30 sin(2πt/5400) (− 40 in REM), g = 1.3 in REM else 1, b a 1/f^1.3 background,
 * φ_k = φ_{k−1} + 2π f_resp RR_{k−1}/1000 and f_resp a random walk (σ 0.002 Hz per beat) clipped to 0.2–0.3 Hz.
 * Set sleepDrop = cycleAmplitude = remShift = 0, remNoiseGain = 1 and mu0 = 1000 for the stationary calibration
 * series of §6.1 (330 beats: SDNN ≈ 48 ms, RMSSD ≈ 28 ms [C]). Intervals are not quantised (see quantiseBeats).
 * Same seed → same series.
 */
export function simulateHealthySleep(options: Partial<HealthySleepOptions> = {}): SimulatedBeats {
  const o: HealthySleepOptions = { ...HEALTHY_SLEEP_DEFAULTS, ...options };
  assertInteger(o.seed, "seed", 0, 0xffffffff);
  if (o.beats !== null) assertInteger(o.beats, "beats", 2);
  else assertNonNegative("durationS", o.durationS);
  assertRange("respRange", o.respRange, 0.01, 2);
  for (const [name, v] of [["mu0", o.mu0], ["sigma", o.sigma], ["aHf", o.aHf], ["aLf", o.aLf], ["sleepTauS", o.sleepTauS], ["cyclePeriodS", o.cyclePeriodS], ["remDurationS", o.remDurationS], ["remNoiseGain", o.remNoiseGain], ["respStep", o.respStep]] as const) {
    assertNonNegative(name, v);
  }
  const rng = createRng(o.seed);
  const inRem = (t: number) => o.remDurationS > 0 && t % o.cyclePeriodS >= o.cyclePeriodS - o.remDurationS;
  const rr = runSinus(
    {
      mu: (t) =>
        o.mu0 +
        o.sleepDrop * (1 - Math.exp(-t / o.sleepTauS)) +
        o.cycleAmplitude * Math.sin((2 * Math.PI * t) / o.cyclePeriodS) +
        (inRem(t) ? o.remShift : 0),
      sigma: (t) => o.sigma * (inRem(t) ? o.remNoiseGain : 1),
      aHf: () => o.aHf,
      aLf: () => o.aLf,
      fLf: o.fLf,
      respRange: [o.respRange[0]!, o.respRange[1]!],
      respStep: o.respStep,
    },
    o.beats !== null ? { beats: o.beats } : { durationS: o.durationS },
    singleBetaBackground(o.beta, rng),
    rng,
  );
  const quality = cleanQuality(rr.length, createRng(subSeed(o.seed, 1)));
  return seriesFromIntervals(rr, o.startS, "sinus", "N", quality, { generator: "healthy-sleep", params: { ...o } });
}
