// The classical Lomb–Scargle periodogram (Lomb 1976; Scargle 1982), unnormalised — the same quantity as
// scipy.signal.lombscargle(t, y, ω, normalize=False) — on a regular grid of frequencies.
import { trigSums } from "./trig-sums";

/**
 * P(ω) = ½·{ [Σ y_k cos ω(t_k−τ)]² / Σ cos² ω(t_k−τ) + [Σ y_k sin ω(t_k−τ)]² / Σ sin² ω(t_k−τ) },
 * tan 2ωτ = Σ sin 2ωt_k / Σ cos 2ωt_k, at f_j = f0 + j·df (Hz), j = 0 … count−1. `y` should already have its mean
 * removed. With τ chosen so, Σ cos² = (N + R)/2 and Σ sin² = (N − R)/2 where R = |Σ exp(2iωt_k)|; when Σ sin² is
 * zero to rounding (every 2ωt_k on one line, e.g. even sampling exactly at the Nyquist frequency) the sine term is
 * 0/0 and is taken as 0.
 */
export function lombScarglePower(
  times: Float64Array,
  y: Float64Array,
  f0: number,
  df: number,
  count: number,
): Float64Array {
  const n = times.length;
  const centre = (times[0]! + times[n - 1]!) / 2;
  const s = new Float64Array(n);
  for (let k = 0; k < n; k++) s[k] = times[k]! - centre;
  const omega0 = 2 * Math.PI * f0;
  const dOmega = 2 * Math.PI * df;
  const Y = trigSums(s, y, omega0, dOmega, count);
  const W = trigSums(s, null, 2 * omega0, 2 * dOmega, count);
  const p = new Float64Array(count);
  const tiny = 1e-12 * n;
  for (let j = 0; j < count; j++) {
    const c2 = W.re[j]!;
    const s2 = W.im[j]!;
    const r = Math.sqrt(c2 * c2 + s2 * s2);
    // Half-angle of 2ωτ = atan2(s2, c2): cos ωτ ≥ 0.
    let cosT = 1;
    let sinT = 0;
    if (r > 0) {
      cosT = Math.sqrt(Math.max(0, (1 + c2 / r) / 2));
      sinT = Math.sqrt(Math.max(0, (1 - c2 / r) / 2)) * (s2 < 0 ? -1 : 1);
    }
    const yc = Y.re[j]! * cosT + Y.im[j]! * sinT;
    const ys = Y.im[j]! * cosT - Y.re[j]! * sinT;
    const cc = (n + r) / 2;
    const ss = (n - r) / 2;
    p[j] = 0.5 * ((cc > tiny ? (yc * yc) / cc : 0) + (ss > tiny ? (ys * ys) / ss : 0));
  }
  return p;
}
