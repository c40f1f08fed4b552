// Frequency domain checked against outside sources: the analytic two-tone test A9 (DOMAIN §3.1), scipy run live
// (tests/reference/scipy_spectra.py: lombscargle, CubicSpline natural, welch, and the spectral-slope fit), Octave's
// pwelch run live (tests/reference/octave_pwelch.m), the direct evaluation of the trigonometric sums, 1/f^β noise of
// known β made by spectral synthesis, the Task Force minimum lengths, and invariance properties.
import Fili from "fili";
import { describe, expect, it } from "vitest";
import { BANDS_HZ } from "@/lib/engine/frequency/bands";
import { lombScargle, LOMB_SCARGLE_DEFAULTS } from "@/lib/engine/frequency/lomb-scargle";
import { lombScarglePower } from "@/lib/engine/frequency/lomb-scargle-power";
import { resampleNaturalSpline } from "@/lib/engine/frequency/resample";
import { spectralSlope } from "@/lib/engine/frequency/spectral-slope";
import { trigSums } from "@/lib/engine/frequency/trig-sums";
import { welch } from "@/lib/engine/frequency/welch";
import type { Spectrum } from "@/lib/engine/frequency/bands";
import { createRng } from "@/lib/engine/random";
import { ALGORITHM_VERSION } from "@/lib/engine/version";
import { loadFixture } from "@/tests/support/fixtures";

// ---------------------------------------------------------------------------------------------------------------
// Tolerances
/** A9 (DOMAIN §3.1): band powers and LF/HF within ±5 % of the analytic 450 / 1250 ms² and 0.36. */
const A9_REL_TOL = 0.05;
/** A9 numbers that DOMAIN prints to 3 decimals (first RR values, ΣRR): half a unit in the last place. */
const A9_PRINTED_TOL = 5e-4;
/** DOMAIN §3.1 A9 prints scipy's raw Lomb–Scargle peak as a whole number (186 321): half a unit. */
const A9_RAW_PRINTED_TOL = 0.5;
/** DOMAIN §3.1 A9 prints the scipy/Octave Welch band powers to one decimal (449.7, 1212.1). */
const A9_WELCH_PRINTED_TOL = 0.05;
/**
 * Ours against scipy/Octave on the same input: the trigonometric sums come from a non-uniform FFT accurate to
 * ~1e-11 of their largest value (below), and summation orders differ; 1e-9 of the largest PSD value leaves two
 * orders of margin and still catches any difference of method (a window, a scaling, a grid step).
 */
const REFERENCE_REL_TOL = 1e-9;
/** The same spline solved by another tridiagonal routine: values ~1000 ms agree to rounding. */
const SPLINE_ABS_TOL_MS = 1e-8;
/**
 * Gaussian-gridding non-uniform FFT (16 points per side, oversampling R ≥ 1.5) against the direct sums, relative to
 * the largest |Z|: measured ≤ 1.6e-11, worst at the outermost frequencies, where dividing out the Gaussian multiplies
 * the FFT's rounding by up to exp(π·16 / (4·R·(R − ½))) ≈ 4400 at R = 1.5.
 */
const TRIG_SUMS_REL_TOL = 5e-11;
/**
 * β of Gaussian 1/f^β noise (Rayleigh amplitudes, random phases), mean of 8 series of 32 768 beats: one series
 * scatters by SD ≈ 0.10–0.12 (measured over 10 seeds for β = 0, 1, 2), so the mean of 8 by ≈ 0.04; ±0.12 is 3 SD.
 */
const BETA_MEAN_TOL = 0.12;
/** Invariance checks: rounding differences of sums over a few hundred values. */
const INVARIANCE_REL_TOL = 1e-9;

// ---------------------------------------------------------------------------------------------------------------
// Inputs

/** DOMAIN §3.1 A9: RR_k = 1000 + 30·sin(2π·0.1·t_{k−1}) + 50·sin(2π·0.25·t_{k−1}) ms, t_k = t_{k−1} + RR_k/1000. */
function twoTone(seconds = 300): { nn: Float64Array; times: Float64Array } {
  const rr: number[] = [];
  const ts: number[] = [];
  let t = 0;
  for (;;) {
    const r = 1000 + 30 * Math.sin(2 * Math.PI * 0.1 * t) + 50 * Math.sin(2 * Math.PI * 0.25 * t);
    const next = t + r / 1000;
    if (next > seconds) break;
    rr.push(r);
    ts.push(next);
    t = next;
  }
  return { nn: Float64Array.from(rr), times: Float64Array.from(ts) };
}

/** t_k = (Σ_{i≤k} RR_i)/1000: the fixtures' convention for whole-ms intervals (exact, so it matches numpy's cumsum). */
function cumulativeTimes(nn: ArrayLike<number>): Float64Array {
  const t = new Float64Array(nn.length);
  let ms = 0;
  for (let i = 0; i < nn.length; i++) {
    ms += nn[i]!;
    t[i] = ms / 1000;
  }
  return t;
}

/**
 * Gaussian 1/f^β noise by spectral synthesis (DOMAIN §6.1): random phases and Rayleigh amplitudes ∝ k^(−β/2) at
 * k = 1 … n/2, inverse FFT by fili, unit variance. n a power of two.
 */
function powerLawNoise(n: number, beta: number, seed: number): Float64Array {
  const rng = createRng(seed);
  const re = new Float64Array(n);
  const im = new Float64Array(n);
  for (let k = 1; k <= n / 2; k++) {
    const amplitude = k ** (-beta / 2) * Math.sqrt(-2 * Math.log(1 - rng.next()));
    const phase = 2 * Math.PI * rng.next();
    re[k] = amplitude * Math.cos(phase);
    im[k] = k === n / 2 ? 0 : amplitude * Math.sin(phase);
    if (k < n / 2) {
      re[n - k] = re[k]!;
      im[n - k] = -im[k]!;
    }
  }
  const x = new Fili.Fft(n).inverse(re, im).slice();
  let m = 0;
  for (const v of x) m += v;
  m /= n;
  let s = 0;
  for (const v of x) s += (v - m) ** 2;
  s = Math.sqrt(s / n);
  return x.map((v) => (v - m) / s);
}

/** A realistic 5-min window (seeded, up to 300 s): 1/f-like wander, a 0.1 Hz wave and breathing at 0.25 Hz, whole-ms RR. */
function realisticWindow(seed: number): { nn: Float64Array; times: Float64Array } {
  const rng = createRng(seed);
  const rr: number[] = [];
  let t = 0;
  let wander = 0;
  const phase = rng.uniform(0, 2 * Math.PI);
  for (;;) {
    wander = 0.95 * wander + 12 * rng.normal();
    const r = Math.round(
      950 + wander + 20 * Math.sin(2 * Math.PI * 0.1 * t + phase) + 15 * Math.sin(2 * Math.PI * 0.25 * t),
    );
    if (t + r / 1000 > 300) break;
    rr.push(r);
    t += r / 1000;
  }
  return { nn: Float64Array.from(rr), times: cumulativeTimes(rr) };
}

const relDiff = (a: number, b: number) => Math.abs(a - b) / Math.max(Math.abs(a), Math.abs(b));

function maxAbsDiff(a: ArrayLike<number>, b: ArrayLike<number>): number {
  expect(a.length).toBe(b.length);
  let d = 0;
  for (let i = 0; i < a.length; i++) d = Math.max(d, Math.abs(a[i]! - b[i]!));
  return d;
}

const maxOf = (a: ArrayLike<number>) => Array.from(a).reduce((m, v) => Math.max(m, v), -Infinity);

// ---------------------------------------------------------------------------------------------------------------
// Fixtures

interface BandFields {
  vlf?: number;
  lf?: number;
  hf?: number;
  lf_peak_hz?: number;
  hf_peak_hz?: number;
}
interface WindowCase {
  name: string;
  kind: "window";
  rr_ms: number[];
  t_s: number[] | null;
  lomb_scargle: BandFields & { count: number; nyquist_hz: number; raw_max: number; psd: number[] };
  resampled: { start_s: number; rate_hz: number; values: number[] };
  welch: BandFields & { f: number[]; psd: number[] };
}
interface SlopeCase {
  name: string;
  kind: "slope";
  rr_ms: number[];
  frequency_hz: number[];
  psd: number[];
  log10_f: number[];
  log10_psd: number[];
  counts: number[];
  beta: number;
  intercept: number;
}
interface OctaveCase extends BandFields {
  name: string;
  f: number[];
  psd: number[];
}

const scipy = loadFixture<WindowCase | SlopeCase>("scipy_spectra");
const octave = loadFixture<OctaveCase>("octave_pwelch");
const windowCases = scipy.cases.filter((c): c is WindowCase => c.kind === "window");
const slopeCases = scipy.cases.filter((c): c is SlopeCase => c.kind === "slope");

function inputsOf(c: WindowCase | SlopeCase): { nn: Float64Array; times: Float64Array } {
  const nn = Float64Array.from(c.rr_ms);
  const t = "t_s" in c && c.t_s !== null ? Float64Array.from(c.t_s) : cumulativeTimes(nn);
  return { nn, times: t };
}

/** Band powers and peaks the reference wrote, against ours (the reference leaves out bands above the Nyquist). */
function expectBandsMatch(ours: Spectrum, ref: BandFields): void {
  for (const band of ["vlf", "lf", "hf"] as const) {
    if (ref[band] === undefined) continue;
    expect(ours[band], band).not.toBeNull();
    expect(relDiff(ours[band]!, ref[band]!), band).toBeLessThan(REFERENCE_REL_TOL);
  }
  if (ref.lf_peak_hz !== undefined) expect(ours.lfPeakHz).toBeCloseTo(ref.lf_peak_hz, 12);
  if (ref.hf_peak_hz !== undefined) expect(ours.hfPeakHz).toBeCloseTo(ref.hf_peak_hz, 12);
}

// ---------------------------------------------------------------------------------------------------------------

describe("A9 two-tone test (DOMAIN §3.1)", () => {
  const { nn, times } = twoTone();
  it("generates 300 beats: 1000.000, 1067.634, 1023.598 ms first, ΣRR = 299598.528 ms", () => {
    expect(nn.length).toBe(300);
    expect(Math.abs(nn[0]! - 1000)).toBeLessThan(A9_PRINTED_TOL);
    expect(Math.abs(nn[1]! - 1067.634)).toBeLessThan(A9_PRINTED_TOL);
    expect(Math.abs(nn[2]! - 1023.598)).toBeLessThan(A9_PRINTED_TOL);
    expect(Math.abs(nn.reduce((a, b) => a + b, 0) - 299598.528)).toBeLessThan(A9_PRINTED_TOL);
  });

  it.each([
    ["Lomb–Scargle", () => lombScargle(nn, times).value!],
    ["spline + Welch", () => welch(nn, times).value!],
  ])("%s: LF ≈ 30²/2 = 450 ms², HF ≈ 50²/2 = 1250 ms², LF/HF ≈ 0.36 (±5 %)", (_name, run) => {
    const v = run();
    expect(relDiff(v.lf!, 450)).toBeLessThan(A9_REL_TOL);
    expect(relDiff(v.hf!, 1250)).toBeLessThan(A9_REL_TOL);
    expect(relDiff(v.lfHf!, 450 / 1250)).toBeLessThan(A9_REL_TOL);
    expect(v.lfNu! + v.hfNu!).toBeCloseTo(100, 12);
  });

  // DOMAIN's scipy figures for Lomb–Scargle (LF 448.3, HF 1242.7 ms²) were taken on a grid ending at 0.500 Hz; ours
  // ends at the mean Nyquist frequency (0.5007 Hz here), which changes the normalising integral slightly. The scipy
  // fixture below checks our spectrum on the identical grid.
  it("Lomb–Scargle peaks at 0.100 and 0.250 Hz (both on the 0.0005 Hz grid)", () => {
    const v = lombScargle(nn, times).value!;
    expect(v.lfPeakHz).toBeCloseTo(0.1, 12);
    expect(v.hfPeakHz).toBeCloseTo(0.25, 12);
  });

  it("Welch peaks in the bins nearest 0.100 and 0.250 Hz (bin width 4/256 = 0.015625 Hz)", () => {
    const v = welch(nn, times).value!;
    expect(Math.abs(v.lfPeakHz! - 0.1)).toBeLessThanOrEqual(0.015625 / 2);
    expect(v.hfPeakHz).toBe(0.25);
  });

  it("Welch gives DOMAIN's LF 449.7 and HF 1212.1 ms² (scipy and Octave pwelch, printed to 0.1)", () => {
    const v = welch(nn, times).value!;
    expect(Math.abs(v.lf! - 449.7)).toBeLessThan(A9_WELCH_PRINTED_TOL);
    expect(Math.abs(v.hf! - 1212.1)).toBeLessThan(A9_WELCH_PRINTED_TOL);
  });

  it("raw periodogram peak 186 321 ≈ N·A²/4 = 187 500 (DOMAIN §3.1, scipy normalize=False)", () => {
    const y = nn.map((v) => v - nn.reduce((a, b) => a + b, 0) / nn.length);
    const p = lombScarglePower(times, y, 0.001, 0.0005, 999);
    expect(Math.abs(maxOf(p) - 186321)).toBeLessThan(A9_RAW_PRINTED_TOL);
  });

  it("records parameters and version", () => {
    const r = lombScargle(nn, times);
    expect(r).toMatchObject({ method: "lomb-scargle", version: ALGORITHM_VERSION, reason: null });
    expect(r.params).toMatchObject({ fMinHz: LOMB_SCARGLE_DEFAULTS.fMinHz, fStepHz: LOMB_SCARGLE_DEFAULTS.fStepHz });
    expect(welch(nn, times).params).toMatchObject({ resampleHz: 4, segmentLength: 256, overlap: 0.5 });
  });
});

describe("scipy run live (tests/reference/scipy_spectra.py)", () => {
  it("the fixture comes from scipy", () => {
    expect(scipy.source).toMatch(/scipy\.signal\.lombscargle/);
    expect(scipy.tool_versions.scipy).toMatch(/^\d+\.\d+/);
    expect(windowCases.length).toBeGreaterThanOrEqual(4);
  });

  describe.each(windowCases.map((c) => [c.name, c] as const))("%s", (_name, c) => {
    const { nn, times } = inputsOf(c);

    it("Lomb–Scargle: same grid up to the mean Nyquist frequency, same PSD, same band powers and peaks", () => {
      const v = lombScargle(nn, times).value!;
      expect(v.nyquistHz).toBeCloseTo(c.lomb_scargle.nyquist_hz, 12);
      expect(v.frequencyHz.length).toBe(c.lomb_scargle.count);
      expect(maxAbsDiff(v.psd, c.lomb_scargle.psd) / maxOf(c.lomb_scargle.psd)).toBeLessThan(REFERENCE_REL_TOL);
      expectBandsMatch(v, c.lomb_scargle);
    });

    it("raw Lomb–Scargle periodogram: same largest value as scipy's normalize=False", () => {
      const m = nn.reduce((a, b) => a + b, 0) / nn.length;
      const p = lombScarglePower(times, nn.map((u) => u - m), 0.001, 0.0005, c.lomb_scargle.count);
      expect(relDiff(maxOf(p), c.lomb_scargle.raw_max)).toBeLessThan(REFERENCE_REL_TOL);
    });

    it("natural cubic spline at 4 Hz: same samples as scipy's CubicSpline(bc_type='natural')", () => {
      const r = resampleNaturalSpline(times, nn, 4);
      expect(r.startS).toBe(c.resampled.start_s);
      expect(maxAbsDiff(r.values, c.resampled.values)).toBeLessThan(SPLINE_ABS_TOL_MS);
    });

    it("Welch: same frequencies, PSD and band powers as scipy.signal.welch", () => {
      const v = welch(nn, times).value!;
      expect(maxAbsDiff(v.frequencyHz, c.welch.f)).toBe(0);
      expect(maxAbsDiff(v.psd, c.welch.psd) / maxOf(c.welch.psd)).toBeLessThan(REFERENCE_REL_TOL);
      // scipy's Welch output carries HF even when the beats' mean Nyquist frequency is below 0.40 Hz; ours withholds it.
      const ref = v.nyquistHz >= BANDS_HZ.hf[1] ? c.welch : { ...c.welch, hf: undefined, hf_peak_hz: undefined };
      expectBandsMatch(v, ref);
    });
  });

  it("45 bpm: HF is null with a reason in both routes — the band passes the mean Nyquist frequency (Laguna 1998)", () => {
    const c = windowCases.find((w) => w.name.startsWith("45 bpm"))!;
    const { nn, times } = inputsOf(c);
    expect(c.lomb_scargle.nyquist_hz).toBeLessThan(0.4);
    for (const v of [lombScargle(nn, times).value!, welch(nn, times).value!]) {
      expect(v.hf).toBeNull();
      expect(v.reasons.hf).toMatch(/Nyquist/);
      expect(v.lfHf).toBeNull();
      expect(v.lf).not.toBeNull();
    }
  });

  it.each(slopeCases.map((c) => [c.name, c] as const))("spectral slope on %s: same periodogram, bins and β", (_n, c) => {
    const { nn, times } = inputsOf(c);
    const v = spectralSlope(nn, times).value!;
    expect(v.frequencyHz.length).toBe(c.frequency_hz.length);
    expect(maxAbsDiff(v.frequencyHz, c.frequency_hz)).toBe(0); // j / T, the same division on the same numbers
    expect(maxAbsDiff(v.psd, c.psd) / maxOf(c.psd)).toBeLessThan(REFERENCE_REL_TOL);
    expect(Array.from(v.binCounts)).toEqual(c.counts);
    expect(maxAbsDiff(v.log10FrequencyHz, c.log10_f)).toBeLessThan(REFERENCE_REL_TOL);
    expect(maxAbsDiff(v.log10Psd, c.log10_psd)).toBeLessThan(REFERENCE_REL_TOL);
    expect(Math.abs(v.beta - c.beta)).toBeLessThan(REFERENCE_REL_TOL);
    expect(Math.abs(v.intercept - c.intercept)).toBeLessThan(REFERENCE_REL_TOL);
  });
});

describe("Octave signal pwelch run live (tests/reference/octave_pwelch.m)", () => {
  it("the fixture comes from Octave's signal package and covers every window case", () => {
    expect(octave.source).toMatch(/pwelch/);
    expect(octave.tool_versions.signal).toMatch(/^\d+\.\d+/);
    expect(octave.cases.map((c) => c.name)).toEqual(windowCases.map((c) => c.name));
  });
  it.each(octave.cases.map((c) => [c.name, c] as const))("%s: same PSD and band powers", (name, oc) => {
    const { nn, times } = inputsOf(windowCases.find((c) => c.name === name)!);
    const v = welch(nn, times).value!;
    expect(maxAbsDiff(v.frequencyHz, oc.f)).toBe(0);
    expect(maxAbsDiff(v.psd, oc.psd) / maxOf(oc.psd)).toBeLessThan(REFERENCE_REL_TOL);
    for (const band of ["vlf", "lf", "hf"] as const) {
      if (v[band] === null) continue; // withheld above the mean Nyquist frequency (see the 45 bpm case)
      // DOMAIN §3.1 A9 reports agreement to 0.1 ms²; the relative tolerance here is far tighter.
      expect(relDiff(v[band]!, oc[band]!)).toBeLessThan(REFERENCE_REL_TOL);
    }
  });
});

describe("non-uniform FFT of the trigonometric sums against their direct evaluation (the definition)", () => {
  it.each([
    [330, 0.001, 0.0005, 700],
    [330, 0.001, 0.0005, 1100],
    [330, 0.001, 0.0005, 1365],
    [70, 0.001, 0.0005, 1000],
    [4000, 1e-4, 1 / 4000, 300],
  ])("N = %i, f0 = %f Hz, step %f Hz, %i frequencies", (n, f0, df, count) => {
    const rng = createRng(n + count);
    const s = new Float64Array(n);
    const w = new Float64Array(n);
    let t = 0;
    for (let k = 0; k < n; k++) {
      t += rng.uniform(0.6, 1.4);
      s[k] = t;
      w[k] = rng.normal();
    }
    for (let k = 0; k < n; k++) s[k] = s[k]! - t / 2;
    const fast = trigSums(s, w, 2 * Math.PI * f0, 2 * Math.PI * df, count);
    let worst = 0;
    let largest = 0;
    for (let j = 0; j < count; j++) {
      const om = 2 * Math.PI * (f0 + j * df);
      let re = 0;
      let im = 0;
      for (let k = 0; k < n; k++) {
        re += w[k]! * Math.cos(om * s[k]!);
        im += w[k]! * Math.sin(om * s[k]!);
      }
      largest = Math.max(largest, Math.hypot(re, im));
      worst = Math.max(worst, Math.hypot(fast.re[j]! - re, fast.im[j]! - im));
    }
    expect(worst / largest).toBeLessThan(TRIG_SUMS_REL_TOL);
  });
});

describe("spectral slope β on 1/f^β noise of known β (spectral synthesis, seeded)", () => {
  it.each([0, 1, 2])("β = %i gives a slope of −β (mean of 8 nights of 32 768 beats)", (beta) => {
    const slopes: number[] = [];
    for (let seed = 1; seed <= 8; seed++) {
      const nn = powerLawNoise(32768, beta, 100 * beta + seed).map((b) => 1000 + 40 * b);
      const v = spectralSlope(nn, cumulativeTimes(nn)).value!;
      expect(Number.isFinite(v.beta) && v.r2 >= 0 && v.r2 <= 1).toBe(true);
      slopes.push(v.beta);
    }
    const mean = slopes.reduce((a, b) => a + b, 0) / slopes.length;
    expect(Math.abs(mean + beta)).toBeLessThan(BETA_MEAN_TOL);
  });
  it("is null under 3 h, with a reason", () => {
    const nn = new Float64Array(3 * 3600 - 100).map((_, i) => 1000 + 30 * Math.sin(i / 50));
    const r = spectralSlope(nn, cumulativeTimes(nn));
    expect(r.value).toBeNull();
    expect(r.reason).toMatch(/shorter than 3 h/);
  });
});

describe("minimum lengths (Task Force 1996, mem: HF ≥ 1 min, LF ≥ 2 min, VLF ≥ 5 min)", () => {
  it.each([
    ["Lomb–Scargle", lombScargle],
    ["Welch", welch],
  ])("%s on a 90-s window: HF only; 150 s: LF and HF; 300 s: all three", (_name, method) => {
    const at = (seconds: number) => {
      const { nn, times } = twoTone(seconds);
      return method(nn, times).value!;
    };
    const short = at(90);
    expect(short.hf).not.toBeNull();
    expect(short.lf).toBeNull();
    expect(short.reasons.lf).toMatch(/2 min/);
    expect(short.vlf).toBeNull();
    expect(short.reasons.vlf).toMatch(/5 min/);
    expect(short.lfHf).toBeNull();
    const middle = at(150);
    expect(middle.lf).not.toBeNull();
    expect(middle.vlf).toBeNull();
    const full = at(300);
    expect(full.vlf).not.toBeNull();
  });
  it("a 50-s window gives no spectrum at all; Welch also needs one 64-s segment", () => {
    const { nn, times } = twoTone(50);
    expect(lombScargle(nn, times).reason).toMatch(/shorter than 1 min/);
    expect(welch(nn, times).reason).toMatch(/256 resampled points/);
  });
});

describe("degenerate inputs", () => {
  it("zero variance: null with a reason", () => {
    const nn = new Float64Array(300).fill(1000);
    const t = cumulativeTimes(nn);
    expect(lombScargle(nn, t).reason).toMatch(/zero variance/);
    expect(welch(nn, t).reason).toMatch(/zero variance/);
  });
  it("times that do not increase, or do not pair with the intervals, throw", () => {
    const { nn, times } = twoTone();
    const bad = times.slice();
    bad[10] = bad[9]!;
    expect(() => lombScargle(nn, bad)).toThrow(RangeError);
    expect(() => welch(nn, times.subarray(1))).toThrow(RangeError);
  });
  it("the natural spline through points on a line is that line", () => {
    const t = Float64Array.from([0, 0.8, 1.9, 2.7, 3.1, 4.4, 5.0]);
    const r = resampleNaturalSpline(t, t.map((u) => 700 + 3 * u), 4);
    expect(r.values.length).toBe(21);
    r.values.forEach((v, i) => expect(v).toBeCloseTo(700 + 3 * (i / 4), 10));
  });
});

describe("properties on seeded realistic windows", () => {
  const seeds = [31, 32, 33, 34];
  it.each([
    ["Lomb–Scargle", lombScargle],
    ["Welch", welch],
  ])("%s: finite, non-negative, ranges; shift-invariant; scaling by k scales powers by k²", (_name, method) => {
    for (const seed of seeds) {
      const { nn, times } = realisticWindow(seed);
      const v = method(nn, times).value!;
      for (const p of v.psd) expect(Number.isFinite(p) && p >= 0).toBe(true);
      for (const q of [v.vlf!, v.lf!, v.hf!, v.lfHf!]) expect(Number.isFinite(q) && q > 0).toBe(true);
      expect(v.lfNu! + v.hfNu!).toBeCloseTo(100, 10);
      expect(v.lfNu!).toBeGreaterThan(0);
      expect(v.lfNu!).toBeLessThan(100);
      expect(v.lfPeakHz!).toBeGreaterThanOrEqual(BANDS_HZ.lf[0]);
      expect(v.lfPeakHz!).toBeLessThanOrEqual(BANDS_HZ.lf[1]);
      expect(v.hfPeakHz!).toBeGreaterThanOrEqual(BANDS_HZ.hf[0]);
      expect(v.hfPeakHz!).toBeLessThanOrEqual(BANDS_HZ.hf[1]);

      const shifted = method(nn.map((u) => u + 123), times).value!;
      expect(maxAbsDiff(shifted.psd, v.psd) / maxOf(v.psd)).toBeLessThan(INVARIANCE_REL_TOL);
      const k = 1.5;
      const scaled = method(nn.map((u) => u * k), times).value!;
      for (const band of ["vlf", "lf", "hf"] as const) {
        expect(relDiff(scaled[band]!, k * k * v[band]!)).toBeLessThan(INVARIANCE_REL_TOL);
      }
    }
  });
  it("Lomb–Scargle: the PSD integrates to the variance, so VLF + LF + HF cannot exceed it", () => {
    for (const seed of seeds) {
      const { nn, times } = realisticWindow(seed);
      const v = lombScargle(nn, times).value!;
      const m = nn.reduce((a, b) => a + b, 0) / nn.length;
      const variance = nn.reduce((a, b) => a + (b - m) ** 2, 0) / nn.length;
      let integral = 0;
      for (let j = 1; j < v.psd.length; j++) integral += (v.psd[j - 1]! + v.psd[j]!) * 0.5 * LOMB_SCARGLE_DEFAULTS.fStepHz;
      expect(relDiff(integral, variance)).toBeLessThan(INVARIANCE_REL_TOL);
      expect(v.vlf! + v.lf! + v.hf!).toBeLessThanOrEqual(variance * (1 + INVARIANCE_REL_TOL));
    }
  });
});
