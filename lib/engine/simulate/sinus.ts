// The sinus-rhythm model shared by the healthy-sleep, loss-of-complexity and NICU generators (DOMAIN §6.1, §6.2,
// §6.8): RR_k = [μ(t) + σ(t)·b_k + A_HF(t)·sin φ_k + A_LF(t)·sin(2π f_LF t + φ₀)] · m(t), beat after beat, where
// b is a unit-variance 1/f^β background, φ advances by 2π f_resp RR_{k−1} (respiratory sinus arrhythmia with a
// respiratory rate that wanders), and m(t) is an optional multiplier (transient decelerations).
import type { Rng } from "../random";
import { powerLawNoise } from "./power-law-noise";

export interface SinusModel {
  /** Mean interval at time t (s since the series start), ms. */
  mu(t: number): number;
  /** Scale of the background at time t, ms. */
  sigma(t: number): number;
  /** RSA amplitude at time t, ms. */
  aHf(t: number): number;
  /** Mayer-wave (LF) amplitude at time t, ms. */
  aLf(t: number): number;
  /** Multiplier on the whole interval (1 = none). */
  multiplier?(t: number): number;
  /** LF oscillation frequency, Hz. */
  fLf: number;
  /** Respiratory frequency bounds, Hz; the walk is clipped to them. */
  respRange: readonly [number, number];
  /** SD of the respiratory frequency's random-walk step per beat, Hz. */
  respStep: number;
}

/** Makes a background b_k (unit variance) for up to `nMax` beats, standardised over its first `nStandardise`. */
export type BackgroundFactory = (nMax: number, nStandardise: number) => (k: number, t: number) => number;

export type SinusLength = { beats: number } | { durationS: number };

/**
 * Runs the model for a fixed number of beats, or until the beat time passes `durationS`. Returns the intervals, ms.
 * In the duration form the background is standardised over the expected beat count, estimated from the mean of
 * μ(t) (sampled every 10 s); in the beats form exactly over the beats produced.
 */
export function runSinus(model: SinusModel, length: SinusLength, background: BackgroundFactory, rng: Rng): Float64Array {
  let nMax: number;
  let nStd: number;
  let durationMs = Infinity;
  if ("beats" in length) {
    nMax = length.beats;
    nStd = length.beats;
  } else {
    durationMs = length.durationS * 1000;
    let sum = 0;
    let min = Infinity;
    let count = 0;
    for (let t = 0; t <= length.durationS; t += 10) {
      const m = model.mu(t) * (model.multiplier?.(t) ?? 1);
      sum += m;
      min = Math.min(min, m);
      count++;
    }
    nStd = Math.max(2, Math.round(durationMs / (sum / count)));
    // Generous headroom: running out would need the whole night's mean interval to fall 25 % below the lowest μ.
    nMax = Math.ceil(durationMs / (0.75 * min)) + 16;
  }
  const b = background(nMax, Math.min(nStd, nMax));
  const rr = new Float64Array(nMax);
  const [fLo, fHi] = model.respRange;
  let fResp = rng.uniform(fLo, fHi);
  let phi = rng.uniform(0, 2 * Math.PI);
  const phiLf = rng.uniform(0, 2 * Math.PI);
  let t = 0;
  let prev = 0;
  let k = 0;
  for (; k < nMax; k++) {
    if (k > 0) {
      phi += (2 * Math.PI * fResp * prev) / 1000;
      fResp = Math.min(fHi, Math.max(fLo, fResp + model.respStep * rng.normal()));
    }
    const ts = t / 1000;
    let v =
      model.mu(ts) +
      model.sigma(ts) * b(k, ts) +
      model.aHf(ts) * Math.sin(phi) +
      model.aLf(ts) * Math.sin(2 * Math.PI * model.fLf * ts + phiLf);
    if (model.multiplier) v *= model.multiplier(ts);
    rr[k] = v;
    prev = v;
    t += v;
    if (t > durationMs) break;
  }
  if ("durationS" in length) {
    if (k === nMax) throw new Error("sinus model ran past its beat budget: check μ, σ and the multiplier");
    // The beat that crossed the end belongs to the next period; keep the beats that end by durationS.
    return rr.slice(0, k);
  }
  return rr;
}

/** A background of one exponent β, standardised as `runSinus` asks. */
export function singleBetaBackground(beta: number, rng: Rng): BackgroundFactory {
  return (nMax, nStd) => {
    const x = powerLawNoise(nMax, beta, rng, nStd);
    return (k) => x[k]!;
  };
}
