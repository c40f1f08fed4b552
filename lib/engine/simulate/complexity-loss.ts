// DOMAIN §6.2: loss of complexity over 2–6 h. A ramp λ(t) from 0 to 1 drives β = β₀ + λ(β_end − β₀),
// σ = 45(1 − 0.8λ), A_HF = 12(1 − 0.9λ), A_LF = 20(1 − 0.9λ) and μ = 1000 − 250λ (heart rate 60 → 80 bpm).
// β_end = 2.0 gives the "rigid" variant, β_end = 0 the "decorrelated" one.
import { assertInteger } from "../assert";
import { createRng } from "../random";
import { powerLawNoiseLevels } from "./power-law-noise";
import { runSinus, type BackgroundFactory } from "./sinus";
import { assertNonNegative, assertRange, cleanQuality, seriesFromIntervals, subSeed, type SimulatedBeats } from "./types";

export interface ComplexityLossOptions {
  seed: number;
  durationS: number;
  /** Exact beat count instead of a duration. */
  beats: number | null;
  startS: number;
  /** Ramp start and length, s; the ramp holds at 1 after it ends. */
  rampStartS: number;
  rampDurationS: number;
  rampShape: "linear" | "logistic";
  /** A fixed λ in [0, 1] instead of the ramp (for the §6.2 table of stationary windows); null = use the ramp. */
  lambda: number | null;
  betaStart: number;
  /** 2.0 "rigid", 0 "decorrelated" (COMPLEXITY_LOSS_VARIANTS). */
  betaEnd: number;
  mu0: number;
  muDrop: number;
  sigma0: number;
  /** Fractions by which σ, A_HF and A_LF fall at λ = 1. */
  sigmaDrop: number;
  aHf0: number;
  aHfDrop: number;
  aLf0: number;
  aLfDrop: number;
  fLf: number;
  respRange: readonly number[];
  respStep: number;
}

export const COMPLEXITY_LOSS_VARIANTS = { rigid: 2.0, decorrelated: 0 } as const;

export const COMPLEXITY_LOSS_DEFAULTS: Readonly<ComplexityLossOptions> = {
  seed: 1,
  durationS: 8 * 3600,
  beats: null,
  startS: 0,
  rampStartS: 2 * 3600,
  rampDurationS: 4 * 3600,
  rampShape: "linear",
  lambda: null,
  betaStart: 1.3,
  betaEnd: COMPLEXITY_LOSS_VARIANTS.rigid,
  mu0: 1000,
  muDrop: 250,
  sigma0: 45,
  sigmaDrop: 0.8,
  aHf0: 12,
  aHfDrop: 0.9,
  aLf0: 20,
  aLfDrop: 0.9,
  fLf: 0.1,
  respRange: [0.2, 0.3],
  respStep: 0.002,
};

/** Largest β step between neighbouring background levels; the blend between two levels is renormalised to unit
 *  variance, so a coarser grid only changes how the exponent moves between knots, not the variance. */
const BETA_GRID_STEP = 0.2;
/** The logistic ramp spans x = −6 … 6 of the standard logistic, rescaled to run exactly from 0 to 1. */
const LOGISTIC_SPAN = 6;

/** λ(t) for t in s since the series start. */
export function complexityLossLambda(o: Pick<ComplexityLossOptions, "rampStartS" | "rampDurationS" | "rampShape" | "lambda">, t: number): number {
  if (o.lambda !== null) return o.lambda;
  if (o.rampDurationS === 0) return t >= o.rampStartS ? 1 : 0;
  const u = Math.min(1, Math.max(0, (t - o.rampStartS) / o.rampDurationS));
  if (o.rampShape === "linear") return u;
  const s = (x: number) => 1 / (1 + Math.exp(-x));
  const lo = s(-LOGISTIC_SPAN);
  const hi = s(LOGISTIC_SPAN);
  return (s(LOGISTIC_SPAN * (2 * u - 1)) - lo) / (hi - lo);
}

/**
 * Loss-of-complexity drift, DOMAIN §6.2, on the §6.1 sinus model with μ, σ, A_HF, A_LF and β all driven by λ(t).
 * The background for a moving β blends, beat by beat, two neighbouring members of a family of 1/f^β series that
 * share their random Fourier coefficients (grid step ≤ 0.2 in β), renormalised to unit variance. With a fixed
 * `lambda`, the §6.2 table [C] gives on 5-min windows: rigid λ = 1 SDNN 9.2, RMSSD 2.4 ms; decorrelated λ = 1
 * SDNN 9.2, RMSSD 12.7 ms; λ = 0.5 SDNN 28 ms (RMSSD 11 rigid, 29 decorrelated).
 */
export function simulateComplexityLoss(options: Partial<ComplexityLossOptions> = {}): SimulatedBeats {
  const o: ComplexityLossOptions = { ...COMPLEXITY_LOSS_DEFAULTS, ...options };
  assertInteger(o.seed, "seed", 0, 0xffffffff);
  if (o.beats !== null) assertInteger(o.beats, "beats", 2);
  else assertNonNegative("durationS", o.durationS);
  if (o.lambda !== null && !(o.lambda >= 0 && o.lambda <= 1)) throw new RangeError(`lambda must be in [0, 1], got ${o.lambda}`);
  if (o.rampShape !== "linear" && o.rampShape !== "logistic") throw new RangeError(`rampShape must be "linear" or "logistic"`);
  assertNonNegative("rampDurationS", o.rampDurationS);
  assertRange("respRange", o.respRange, 0.01, 2);
  for (const [name, v] of [["sigmaDrop", o.sigmaDrop], ["aHfDrop", o.aHfDrop], ["aLfDrop", o.aLfDrop]] as const) {
    if (!(v >= 0 && v <= 1)) throw new RangeError(`${name} must be in [0, 1], got ${v}`);
  }
  const rng = createRng(o.seed);
  const lam = (t: number) => complexityLossLambda(o, t);
  const dBeta = o.betaEnd - o.betaStart;
  // Only the exponents λ actually reaches need a level.
  const lamMin = o.lambda ?? 0;
  const lamMax = o.lambda ?? 1;
  const steps = o.lambda !== null || dBeta === 0 ? 0 : Math.ceil(Math.abs(dBeta) / BETA_GRID_STEP);
  const betas = steps === 0 ? [o.betaStart + lamMin * dBeta] : Array.from({ length: steps + 1 }, (_, l) => o.betaStart + (lamMin + ((lamMax - lamMin) * l) / steps) * dBeta);

  const background: BackgroundFactory = (nMax, nStd) => {
    const levels = powerLawNoiseLevels(nMax, betas, rng, nStd);
    if (levels.length === 1) {
      const x = levels[0]!;
      return (k) => x[k]!;
    }
    // Correlation of neighbouring levels (both have mean 0, variance 1 over the first nStd samples).
    const rho = new Float64Array(steps);
    for (let l = 0; l < steps; l++) {
      const a = levels[l]!;
      const b = levels[l + 1]!;
      let s = 0;
      for (let i = 0; i < nStd; i++) s += a[i]! * b[i]!;
      rho[l] = s / (nStd - 1);
    }
    return (k, t) => {
      const pos = ((lam(t) - lamMin) / (lamMax - lamMin)) * steps;
      const l = Math.min(steps - 1, Math.max(0, Math.floor(pos)));
      const w = Math.min(1, Math.max(0, pos - l));
      const norm = Math.sqrt((1 - w) ** 2 + w * w + 2 * w * (1 - w) * rho[l]!);
      return ((1 - w) * levels[l]![k]! + w * levels[l + 1]![k]!) / norm;
    };
  };

  const rr = runSinus(
    {
      mu: (t) => o.mu0 - o.muDrop * lam(t),
      sigma: (t) => o.sigma0 * (1 - o.sigmaDrop * lam(t)),
      aHf: (t) => o.aHf0 * (1 - o.aHfDrop * lam(t)),
      aLf: (t) => o.aLf0 * (1 - o.aLfDrop * lam(t)),
      fLf: o.fLf,
      respRange: [o.respRange[0]!, o.respRange[1]!],
      respStep: o.respStep,
    },
    o.beats !== null ? { beats: o.beats } : { durationS: o.durationS },
    background,
    rng,
  );
  const quality = cleanQuality(rr.length, createRng(subSeed(o.seed, 1)));
  return seriesFromIntervals(rr, o.startS, "sinus", "N", quality, { generator: "complexity-loss", params: { ...o } });
}
