// 1/f^β noise by spectral synthesis (DOMAIN §6.1): complex Gaussian Fourier coefficients — Rayleigh amplitudes with
// uniform random phases — scaled by f^(−β/2), inverse FFT (fili), then standardised.
import Fili from "fili";
import { assertInteger } from "../assert";
import type { Rng } from "../random";

/**
 * Several 1/f^β series that share one set of random Fourier coefficients and differ only in β: the background
 * for a drift whose exponent changes over the night (DOMAIN §6.2) is a beat-by-beat blend of neighbouring levels,
 * and because the draws are shared the blend changes smoothly.
 *
 * Synthesis length L is the next power of two ≥ 1.25·n, and the first n samples are kept: a synthesis exactly n
 * long would be periodic, tying the end of the night to its start, and discarding at least a fifth of it loosens
 * that tie while keeping a 10-h night to one 65,536-point transform (our choice). Coefficients X_k = f_k^(−β/2)(g₁ + i g₂),
 * f_k = k/L for k = 1 … L/2 − 1 (no DC, no Nyquist term); the real part of the inverse transform is a sum of
 * cosines with Rayleigh amplitudes and uniform phases. Each returned series is then standardised over
 * `standardiseOver` samples (default n) to mean 0 and sample variance 1 (ddof 1): with β > 0 most of the variance
 * sits at the lowest frequencies, so a 5-min stretch of a night-long series has less than unit variance.
 */
export function powerLawNoiseLevels(
  n: number,
  betas: readonly number[],
  rng: Rng,
  standardiseOver: number = n,
): Float64Array[] {
  assertInteger(n, "n", 2);
  assertInteger(standardiseOver, "standardiseOver", 2, n);
  for (const b of betas) {
    if (!(Number.isFinite(b) && b >= 0 && b <= 4)) throw new RangeError(`β must be in [0, 4], got ${b}`);
  }
  let size = 2;
  while (size < 1.25 * n) size *= 2;
  const half = size / 2;
  const g1 = new Float64Array(half);
  const g2 = new Float64Array(half);
  for (let k = 1; k < half; k++) {
    g1[k] = rng.normal();
    g2[k] = rng.normal();
  }
  const fft = new Fili.Fft(size);
  const re = new Float64Array(size);
  const im = new Float64Array(size);
  const logF = new Float64Array(half);
  for (let k = 1; k < half; k++) logF[k] = Math.log(k / size);
  return betas.map((beta) => {
    for (let k = 1; k < half; k++) {
      const a = Math.exp((-beta / 2) * logF[k]!);
      re[k] = a * g1[k]!;
      im[k] = a * g2[k]!;
    }
    const full = fft.inverse(re, im);
    const out = full.slice(0, n);
    standardise(out, standardiseOver);
    return out;
  });
}

/** One 1/f^β series of length n, unit variance over its first `standardiseOver` samples (see powerLawNoiseLevels). */
export function powerLawNoise(n: number, beta: number, rng: Rng, standardiseOver: number = n): Float64Array {
  return powerLawNoiseLevels(n, [beta], rng, standardiseOver)[0]!;
}

function standardise(x: Float64Array, over: number): void {
  let m = 0;
  for (let i = 0; i < over; i++) m += x[i]!;
  m /= over;
  let s = 0;
  for (let i = 0; i < over; i++) s += (x[i]! - m) ** 2;
  const scale = 1 / Math.sqrt(s / (over - 1));
  for (let i = 0; i < x.length; i++) x[i] = (x[i]! - m) * scale;
}
