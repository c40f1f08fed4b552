import { describe, expect, it } from "vitest";
import { boxVariances } from "@/lib/engine/fractal/boxes";
import { DFA_DEFAULTS, dfa, type DfaOptions } from "@/lib/engine/fractal/dfa";
import { MFDFA_DEFAULTS, mfdfa } from "@/lib/engine/fractal/mfdfa";
import { createRng } from "@/lib/engine/random";
import { linearFit } from "@/lib/engine/stats";
import { ALGORITHM_VERSION } from "@/lib/engine/version";
import { loadFixture } from "../../support/fixtures";

// ---------------------------------------------------------------------------------------------------------------
// Generators (seeded, bounded)

/** Gaussian white noise around an RR-like level: N(mean, sd²). */
function whiteNoise(n: number, seed: number, mean = 800, sd = 50): Float64Array {
  const rng = createRng(seed);
  return Float64Array.from({ length: n }, () => mean + sd * rng.normal());
}

/** AR(1) noise x_k = φ·x_{k−1} + e_k around `mean` (short-range correlated). */
function ar1(n: number, phi: number, seed: number, mean = 800, sd = 30): Float64Array {
  const rng = createRng(seed);
  const x = new Float64Array(n);
  let prev = 0;
  for (let k = 0; k < n; k++) {
    prev = phi * prev + sd * rng.normal();
    x[k] = mean + prev;
  }
  return x;
}

/**
 * Deterministic binomial multifractal cascade of Kantelhardt et al., Physica A 2002;316:87 (from memory):
 * x_k = a^{n(k)} (1−a)^{L−n(k)}, k = 0…2^L − 1, with n(k) the number of 1-digits in the binary form of k. It is the
 * L-th generation of the cascade that gives share a of each interval's mass to one half and 1 − a to the other.
 */
function binomialCascade(a: number, levels: number): Float64Array {
  const x = new Float64Array(2 ** levels);
  for (let k = 0; k < x.length; k++) {
    let ones = 0;
    for (let v = k; v > 0; v >>= 1) ones += v & 1;
    x[k] = a ** ones * (1 - a) ** (levels - ones);
  }
  return x;
}

const meanOf = (v: readonly number[]) => v.reduce((s, x) => s + x, 0) / v.length;
const sdOf = (v: readonly number[]) => {
  const m = meanOf(v);
  return Math.sqrt(v.reduce((s, x) => s + (x - m) ** 2, 0) / (v.length - 1));
};
const range = (from: number, to: number) => Array.from({ length: to - from + 1 }, (_, i) => from + i);
const defined = <V>(r: { value: V | null; reason: string | null }): V => {
  expect(r.reason).toBeNull();
  return r.value!;
};

// ---------------------------------------------------------------------------------------------------------------
// DOMAIN §3.1 A5: DFA-1 of white noise, exact. E[F²(n)] = σ²(n² − 4)/(15n) for non-overlapping boxes of n profile
// points with linear detrending. (The global mean drops out exactly under linear detrending, so the formula holds
// box by box; by hand for n = 4: trace of the residual projector times the random-walk covariance = 0.8 / 4 = 0.2.)

const a5 = (n: number) => (n * n - 4) / (15 * n);
/** Slope of ln √(A5) against ln n: the α the exact formula implies over a set of box sizes. */
const a5Alpha = (scales: readonly number[]) =>
  linearFit(scales.map(Math.log), scales.map((n) => 0.5 * Math.log(a5(n)))).slope;

describe("DFA-1 of white noise against the exact result (DOMAIN §3.1 A5)", () => {
  const SIGMA = 50;
  const SEEDS = 8;
  const LONG = 65_536;
  /** Relative standard error of the 8-series mean of F²(n) is at most 0.8 % (n = 64, measured); 2.5 % ≈ 3 SE. */
  const A5_F2_REL_TOL = 0.025;

  it.each([false, true])("E[F²(n)] = σ²(n² − 4)/(15n) at n = 4, 8, 16, 64 (bothEnds = %s)", (bothEnds) => {
    const scales = [4, 8, 16, 64];
    const sums = [0, 0, 0, 0];
    for (let seed = 1; seed <= SEEDS; seed++) {
      const v = defined(dfa(whiteNoise(LONG, seed, 800, SIGMA), { scales, bothEnds }));
      v.fluctuation.forEach((F, i) => (sums[i]! += F * F));
    }
    scales.forEach((n, i) => {
      const observed = sums[i]! / SEEDS / SIGMA ** 2;
      expect(Math.abs(observed / a5(n) - 1)).toBeLessThan(A5_F2_REL_TOL);
    });
    // The formula's own values as DOMAIN lists them (checks that A5 was copied correctly).
    expect([4, 8, 16, 64].map(a5)).toEqual([0.2, 0.5, 1.05, 4.2625]);
  });

  it("the implied exponents are α1 = 0.583 and α2 = 0.505 (DOMAIN §3.1 A5)", () => {
    expect(a5Alpha(DFA_DEFAULTS.alpha1Scales)).toBeCloseTo(0.583, 3);
    expect(a5Alpha(DFA_DEFAULTS.alpha2Scales)).toBeCloseTo(0.505, 3);
  });

  it("long white-noise series give α1 and α2 of the exact formula", () => {
    // SD of α over one 65,536-beat series: 0.0038 (α1), 0.0069 (α2), measured; tolerances ≈ 4 SE of the 8-seed mean.
    const ALPHA1_LONG_TOL = 0.006;
    const ALPHA2_LONG_TOL = 0.01;
    const a1: number[] = [];
    const a2: number[] = [];
    for (let seed = 1; seed <= SEEDS; seed++) {
      const x = whiteNoise(LONG, 100 + seed);
      a1.push(defined(dfa(x)).alpha);
      a2.push(defined(dfa(x, { exponent: "alpha2" })).alpha);
    }
    expect(Math.abs(meanOf(a1) - a5Alpha(DFA_DEFAULTS.alpha1Scales))).toBeLessThan(ALPHA1_LONG_TOL);
    expect(Math.abs(meanOf(a2) - a5Alpha(DFA_DEFAULTS.alpha2Scales))).toBeLessThan(ALPHA2_LONG_TOL);
  });

  it("1000-beat series reproduce DOMAIN's Monte Carlo: α1 0.586 ± 0.035, α2 0.502 ± 0.052", () => {
    const RUNS = 100;
    // Mean: 3 standard errors of a 100-run mean under DOMAIN's spread. SD: a 100-run SD has a relative SE of ≈ 7 %,
    // so a ratio outside 0.75–1.3 would mean a different estimator, not bad luck.
    const meanTol = (sd: number) => (3 * sd) / Math.sqrt(RUNS);
    const a1: number[] = [];
    const a2: number[] = [];
    for (let seed = 1; seed <= RUNS; seed++) {
      const x = whiteNoise(1000, 5000 + seed);
      a1.push(defined(dfa(x)).alpha);
      a2.push(defined(dfa(x, { exponent: "alpha2" })).alpha);
    }
    expect(Math.abs(meanOf(a1) - 0.586)).toBeLessThan(meanTol(0.035));
    expect(Math.abs(meanOf(a2) - 0.502)).toBeLessThan(meanTol(0.052));
    expect(sdOf(a1) / 0.035).toBeGreaterThan(0.75);
    expect(sdOf(a1) / 0.035).toBeLessThan(1.3);
    expect(sdOf(a2) / 0.052).toBeGreaterThan(0.75);
    expect(sdOf(a2) / 0.052).toBeLessThan(1.3);
  });
});

// ---------------------------------------------------------------------------------------------------------------
// R fracdiff, run live (tests/reference/fracdiff_dfa.R): ARFIMA(0,d,0) series of known d; H = d + ½ (DOMAIN §3.4).

interface FracdiffCase {
  d: number;
  seed: number;
  n: number;
  series: number[];
  fracdiff_d_hat: number;
}

describe("DFA on ARFIMA(0,d,0) series from R fracdiff (DOMAIN §3.4)", () => {
  const fixture = loadFixture<FracdiffCase>("fracdiff_dfa");
  // 15 log-spaced box sizes 16…800 (= N/10). Above 16 beats the short-range part of ARFIMA(0,d,0) no longer bends the
  // curve: the exact expected DFA-1 slope over these sizes, from Hosking's autocovariance (Biometrika 1981) and the
  // A5 trace formula, is d + ½ − 0.001…0.004 for d = 0…0.4 (computed here with numpy).
  const scales = [...new Set(range(0, 14).map((i) => Math.round(16 * 50 ** (i / 14))))];
  const options: DfaOptions = { exponent: "alpha2", scales, bothEnds: true };
  /** SD of α over one 8000-beat series: 0.024 at d = 0, 0.032 at d = 0.4 (100 fracdiff.sim series, measured), plus a
   *  −0.01 finite-sample bias at d = 0.4; 0.07 is ≈ 3 SD of the mean of the two seeds. */
  const H_TOL = 0.07;
  /** fracdiff's ML d̂ has SD 0.009 here (measured), DFA's α 0.032: their difference has SD ≈ 0.033; 0.1 ≈ 3 SD. */
  const FRACDIFF_TOL = 0.1;
  const alphaOf = (c: FracdiffCase) => defined(dfa(Float64Array.from(c.series), options)).alpha;

  it("reads a fixture that R fracdiff produced", () => {
    expect(fixture.source).toMatch(/fracdiff::fracdiff\.sim/);
    expect(fixture.tool_versions.fracdiff).toBeTruthy();
    expect(new Set(fixture.cases.map((c) => c.d))).toEqual(new Set([0, 0.2, 0.4]));
    for (const c of fixture.cases) expect(c.series).toHaveLength(c.n);
  });

  it("α ≈ d + ½ for d = 0, 0.2, 0.4, and α agrees with fracdiff's own estimate of d", () => {
    for (const d of [0, 0.2, 0.4]) {
      const cases = fixture.cases.filter((c) => c.d === d);
      expect(cases.length).toBeGreaterThanOrEqual(2);
      expect(Math.abs(meanOf(cases.map(alphaOf)) - (d + 0.5))).toBeLessThan(H_TOL);
      for (const c of cases) expect(Math.abs(alphaOf(c) - (c.fracdiff_d_hat + 0.5))).toBeLessThan(FRACDIFF_TOL);
    }
  });

  it("α increases with d", () => {
    const byD = [0, 0.2, 0.4].map((d) => meanOf(fixture.cases.filter((c) => c.d === d).map(alphaOf)));
    expect(byD[1]!).toBeGreaterThan(byD[0]!);
    expect(byD[2]!).toBeGreaterThan(byD[1]!);
  });

  it("F(n) is positive and increasing in n for long-range correlated noise (d = 0.4)", () => {
    for (const c of fixture.cases.filter((k) => k.d === 0.4)) {
      const F = defined(dfa(Float64Array.from(c.series), options)).fluctuation;
      F.forEach((f, i) => {
        expect(f).toBeGreaterThan(0);
        if (i > 0) expect(f).toBeGreaterThan(F[i - 1]!);
      });
    }
  });
});

// ---------------------------------------------------------------------------------------------------------------
// MF-DFA on the binomial multifractal cascade (Kantelhardt et al., Physica A 2002;316:87). Analytic (from memory,
// derived and checked below): τ(q) = −log2(a^q + (1−a)^q), h(q) = (τ(q) + 1)/q = 1/q − ln(a^q + (1−a)^q)/(q ln 2).

const A = 0.75;
const tauExact = (q: number) => -Math.log2(A ** q + (1 - A) ** q);
/** h(q) = (τ + 1)/q; at q = 0 its limit −(log2 a + log2(1−a))/2. */
const hExact = (q: number) => (q === 0 ? -(Math.log2(A) + Math.log2(1 - A)) / 2 : (tauExact(q) + 1) / q);
/** α(q) = τ′(q) = −(a^q ln a + b^q ln b) / ((a^q + b^q) ln 2), b = 1 − a; f(α) = qα − τ. */
const alphaExact = (q: number) =>
  -(A ** q * Math.log(A) + (1 - A) ** q * Math.log(1 - A)) / ((A ** q + (1 - A) ** q) * Math.LN2);
const fExact = (q: number) => q * alphaExact(q) - tauExact(q);

describe("MF-DFA on the binomial multifractal cascade (Kantelhardt et al. 2002)", () => {
  it("the generator is the cascade: Σ_ν μ_ν(s)^q = (a^q + (1−a)^q)^(L−k) at every dyadic scale s = 2^k", () => {
    // This is the derivation of τ(q): the 2^(L−k) aligned boxes carry masses a^j (1−a)^(L−k−j), so the partition sum is
    // the binomial expansion above, Z_q ∝ s^τ(q) with τ(q) = −log2(a^q + (1−a)^q), and h(q) = (τ(q) + 1)/q.
    const L = 12;
    const x = binomialCascade(A, L);
    for (const k of [0, 3, 6, 9]) {
      const s = 2 ** k;
      for (const q of [-5, -2, 0.5, 2, 5]) {
        let z = 0;
        for (let b = 0; b < x.length; b += s) {
          let mass = 0;
          for (let i = b; i < b + s; i++) mass += x[i]!;
          z += mass ** q;
        }
        expect(z / (A ** q + (1 - A) ** q) ** (L - k)).toBeCloseTo(1, 10);
      }
    }
  });

  it("every aligned box has the same detrended shape, so F_q(s) = c(s)·[mean μ^q]^(1/q) and Δh is exact", () => {
    // Each box of s = 2^k aligned points holds the same k-level staircase scaled by its mass μ_ν; hence F(s, ν)/μ_ν
    // is one number c(s) for all ν, and h(q) = h_exact(q) + d ln c / d ln s — an offset common to every q.
    const L = 12;
    const x = binomialCascade(A, L);
    for (const s of [16, 256]) {
      const f2 = new Float64Array(x.length / s);
      expect(boxVariances(x, s, 1, false, new Float64Array(s), f2)).toBe(x.length / s);
      const ratios = Array.from(f2, (v, b) => {
        let mass = 0;
        for (let i = b * s; i < (b + 1) * s; i++) mass += x[i]!;
        return Math.sqrt(v) / mass;
      });
      for (const r of ratios) expect(r / ratios[0]!).toBeCloseTo(1, 9);
    }
  });

  // At s ≥ 256 the common offset d ln c/d ln s is −0.009 for order 1 and −0.024 / −0.023 for orders 2 / 3 (measured;
  // it shrinks toward 0 as s grows). H tolerances sit just above those offsets.
  it.each([
    [1, 0.015],
    [2, 0.03],
    [3, 0.03],
  ])("order %i: h(q), τ(q), α and f(α) match the analytic spectrum at large dyadic scales (a = 0.75, 2^16 points)", (order, hTol) => {
    // α carries the offset plus the error of the 3-point derivative with Δq = 0.5 (≤ 0.008, measured).
    const alphaTol = hTol + 0.01;
    // f(α) = qα − τ cancels the offset; what remains is the derivative's error (≤ 0.012, measured).
    const F_TOL = 0.02;
    // With aligned dyadic boxes the offset is identical for every q, so the width is exact up to rounding.
    const WIDTH_TOL = 1e-6;
    const dyadic = [256, 512, 1024, 2048, 4096, 8192, 16384];
    const v = defined(mfdfa(binomialCascade(A, 16), { order, scales: dyadic, maxScaleFraction: 0.25 }));
    expect(v.scales).toEqual(dyadic);
    v.q.forEach((q, i) => {
      expect(Math.abs(v.h[i]! - hExact(q))).toBeLessThan(hTol);
      expect(Math.abs(v.tau[i]! - (q * v.h[i]! - 1))).toBeLessThan(1e-12);
      expect(Math.abs(v.alpha[i]! - alphaExact(q))).toBeLessThan(alphaTol);
      expect(Math.abs(v.f[i]! - fExact(q))).toBeLessThan(F_TOL);
    });
    expect(Math.abs(v.width - (hExact(-5) - hExact(5)))).toBeLessThan(WIDTH_TOL);
    expect(hExact(-5) - hExact(5)).toBeCloseTo(1.1873, 4);
  });

  it("with the default settings on 2^14 points the spectrum is close to analytic", () => {
    // Default scales are log-spaced, not dyadic: boxes cut the deterministic cascade out of alignment and F_q(s)
    // shows log-periodic oscillations (Kantelhardt et al. 2002 discuss them); measured: |h − h_exact| ≤ 0.078 and
    // Δh 1.259 against 1.187.
    const DEFAULT_SCALES_TOL = 0.1;
    const v = defined(mfdfa(binomialCascade(A, 14)));
    expect(v.q).toEqual([...MFDFA_DEFAULTS.q]);
    v.q.forEach((q, i) => expect(Math.abs(v.h[i]! - hExact(q))).toBeLessThan(DEFAULT_SCALES_TOL));
    expect(Math.abs(v.width - (hExact(-5) - hExact(5)))).toBeLessThan(DEFAULT_SCALES_TOL);
    // h(q) of a multifractal falls with q (Kantelhardt et al. 2002).
    v.h.forEach((h, i) => i > 0 && expect(h).toBeLessThan(v.h[i - 1]!));
    for (const r2 of v.r2) expect(r2).toBeGreaterThan(0.99);
  });
});

// ---------------------------------------------------------------------------------------------------------------
// Monofractal check: white noise has h(q) = ½ for every q (Kantelhardt et al. 2002) and Δh ≈ 0.

describe("MF-DFA of white noise is monofractal", () => {
  it("h(q) ≈ 0.5 for all q and Δh is small", () => {
    const SEEDS = 10;
    // Over 50 series of 8192 beats (measured): h(−5) 0.528 ± 0.017 (small-box bias of negative q), h(5)
    // 0.492 ± 0.024, Δh 0.035 ± 0.019, never above 0.08. 0.05 on the 10-seed mean of h is > 4 SE from those means.
    const H_TOL = 0.05;
    const MEAN_WIDTH_MAX = 0.1;
    const WIDTH_MAX = 0.15;
    const runs = range(1, SEEDS).map((seed) => defined(mfdfa(whiteNoise(8192, 300 + seed))));
    MFDFA_DEFAULTS.q.forEach((_, i) => {
      expect(Math.abs(meanOf(runs.map((v) => v.h[i]!)) - 0.5)).toBeLessThan(H_TOL);
    });
    expect(meanOf(runs.map((v) => v.width))).toBeLessThan(MEAN_WIDTH_MAX);
    for (const v of runs) expect(Math.abs(v.width)).toBeLessThan(WIDTH_MAX);
  });

  it("F_2(s) and h(2) equal DFA's F(n) and α on the same scales with boxes from both ends (definition)", () => {
    const x = whiteNoise(4000, 77);
    const m = defined(mfdfa(x));
    const d = defined(dfa(x, { exponent: "alpha2", scales: m.scales, maxScaleFraction: 0.2, bothEnds: true }));
    const i2 = m.q.indexOf(2);
    expect(d.scales).toEqual(m.scales);
    d.fluctuation.forEach((F, j) => expect(m.fluctuation[i2]![j]! / F).toBeCloseTo(1, 12));
    expect(m.h[i2]!).toBeCloseTo(d.alpha, 12);
  });
});

// ---------------------------------------------------------------------------------------------------------------
// Properties (common practice: scaling exponents do not depend on the unit or the level of the series).

describe("properties", () => {
  /** Shifting or scaling changes only rounding: the box residuals are scaled exactly. */
  const INVARIANCE_TOL = 1e-9;

  it("DFA α1, α2 and MF-DFA h(q) are invariant to shifting and scaling the series", () => {
    const rng = createRng(2024);
    for (let trial = 0; trial < 12; trial++) {
      const n = 2000 + rng.int(1500);
      const x = ar1(n, rng.uniform(0, 0.9), 500 + trial, rng.uniform(500, 1100), rng.uniform(10, 80));
      const shift = rng.uniform(-400, 400);
      const scale = rng.uniform(0.05, 20);
      const y = x.map((v) => scale * v + shift);
      for (const exponent of ["alpha1", "alpha2"] as const) {
        const a = defined(dfa(x, { exponent }));
        const b = defined(dfa(y, { exponent }));
        expect(Math.abs(a.alpha - b.alpha)).toBeLessThan(INVARIANCE_TOL);
        a.fluctuation.forEach((F, i) => expect(b.fluctuation[i]! / (scale * F)).toBeCloseTo(1, 9));
      }
      const hx = defined(mfdfa(x)).h;
      const hy = defined(mfdfa(y)).h;
      hx.forEach((h, i) => expect(Math.abs(h - hy[i]!)).toBeLessThan(INVARIANCE_TOL));
    }
  });

  it("MF-DFA of order m ignores polynomial trends of degree m − 1 in the series (Kantelhardt et al. 2001, from memory)", () => {
    // Detrending order m removes degree-m trends of the profile, i.e. degree m − 1 trends of the series itself.
    const x = whiteNoise(4000, 3, 800, 40);
    const linear = x.map((v, k) => v + 0.05 * k);
    const quadratic = x.map((v, k) => v + 0.05 * k - 1e-5 * k * k);
    const maxChange = (a: Float64Array, b: Float64Array, order: number) => {
      const ha = defined(mfdfa(a, { order })).h;
      const hb = defined(mfdfa(b, { order })).h;
      return Math.max(...ha.map((h, i) => Math.abs(h - hb[i]!)));
    };
    expect(maxChange(x, linear, 2)).toBeLessThan(INVARIANCE_TOL);
    expect(maxChange(x, linear, 3)).toBeLessThan(INVARIANCE_TOL);
    expect(maxChange(x, quadratic, 3)).toBeLessThan(INVARIANCE_TOL);
    // …while order 1 does see a linear trend of the series (measured change 0.25), so the option is really applied.
    expect(maxChange(x, linear, 1)).toBeGreaterThan(0.1);
  });

  it("outputs are finite and within their ranges; F(n) rises with n for correlated noise", () => {
    const rng = createRng(99);
    for (let trial = 0; trial < 10; trial++) {
      const x = ar1(2000 + rng.int(2000), rng.uniform(0.3, 0.95), 900 + trial);
      for (const exponent of ["alpha1", "alpha2"] as const) {
        const v = defined(dfa(x, { exponent }));
        expect(Number.isFinite(v.alpha) && Number.isFinite(v.intercept)).toBe(true);
        expect(v.r2).toBeGreaterThanOrEqual(0);
        expect(v.r2).toBeLessThanOrEqual(1);
        for (const F of v.fluctuation) expect(F).toBeGreaterThan(0);
      }
      // E[F(n)] grows at least like √n for positively correlated noise (white noise is the √n limit, A5), so doubling n
      // raises F by ≈ 1.4× or more — far beyond sampling noise, unlike neighbouring integers (a few % apart).
      const doubling = defined(dfa(x, { scales: [4, 8, 16, 32, 64, 128] })).fluctuation;
      doubling.forEach((F, i) => i > 0 && expect(F).toBeGreaterThan(doubling[i - 1]!));
      const m = defined(mfdfa(x));
      for (const arr of [m.h, m.tau, m.alpha, m.f, m.r2]) for (const v of arr) expect(Number.isFinite(v)).toBe(true);
      for (const row of m.fluctuation) for (const F of row) expect(F).toBeGreaterThan(0);
      // A generalised mean rises with its order, so F_q(s) does not fall as q grows (Hölder's inequality).
      m.scales.forEach((_, j) =>
        m.q.forEach((_, i) => i > 0 && expect(m.fluctuation[i]![j]!).toBeGreaterThanOrEqual(m.fluctuation[i - 1]![j]! * (1 - 1e-12))),
      );
    }
  });
});

// ---------------------------------------------------------------------------------------------------------------
// Undefined values and programming errors (README conventions; minimum lengths DOMAIN §2.9).

describe("undefined values and invalid input", () => {
  it("returns null with a reason below the minimum number of beats, and records the parameters used", () => {
    const r1 = dfa(whiteNoise(199, 1));
    expect(r1.value).toBeNull();
    expect(r1.reason).toBe("fewer than 200 beats (199)");
    expect(r1.method).toBe("dfa-alpha1");
    expect(r1.version).toBe(ALGORITHM_VERSION);
    expect(r1.params).toMatchObject({ minBeats: 200, bothEnds: false, order: 1, maxScaleFraction: 0.25 });
    expect(dfa(whiteNoise(200, 1)).reason).toBeNull();
    expect(dfa(whiteNoise(999, 1), { exponent: "alpha2" }).reason).toBe("fewer than 1000 beats (999)");
    expect(dfa(whiteNoise(1000, 1), { exponent: "alpha2" }).reason).toBeNull();
    expect(mfdfa(whiteNoise(1999, 1)).reason).toBe("fewer than 2000 beats (1999)");
    expect(mfdfa(whiteNoise(2000, 1)).reason).toBeNull();
  });

  it("drops box sizes above N/4 and says so when too few remain", () => {
    const r = dfa(whiteNoise(20, 1), { minBeats: 10 }); // N/4 = 5 leaves n = 4, 5 only
    expect(r.value).toBeNull();
    expect(r.reason).toMatch(/fewer than 3 box sizes/);
    const ok = defined(dfa(whiteNoise(40, 1), { minBeats: 10, scales: [4, 6, 8, 10, 12] }));
    expect(ok.scales).toEqual([4, 6, 8, 10]);
  });

  it("a constant series has no scaling exponent: null, never NaN or 0", () => {
    const flat = new Float64Array(3000).fill(800);
    for (const r of [dfa(flat), dfa(flat, { exponent: "alpha2" }), mfdfa(flat)]) {
      expect(r.value).toBeNull();
      expect(r.reason).toMatch(/zero fluctuation/);
    }
  });

  it("MF-DFA with negative q is undefined when a segment has zero variance, defined for q > 0", () => {
    const x = whiteNoise(3000, 5);
    x.fill(850, 1000, 1100); // 100 identical intervals: a fixed-rate paced stretch
    const r = mfdfa(x);
    expect(r.value).toBeNull();
    expect(r.reason).toMatch(/zero detrended variance.*q ≤ 0/);
    expect(defined(mfdfa(x, { q: [1, 2, 3, 4] })).h.every(Number.isFinite)).toBe(true);
  });

  it("throws on programming errors", () => {
    expect(() => dfa([800, 810] as unknown as Float64Array)).toThrow(TypeError);
    expect(() => dfa(Float64Array.from([800, NaN, 810]))).toThrow(RangeError);
    const x = whiteNoise(3000, 1);
    expect(() => dfa(x, { scales: [4, 4, 5] })).toThrow(RangeError);
    expect(() => dfa(x, { scales: [2, 3, 4] })).toThrow(RangeError);
    expect(() => dfa(x, { maxScaleFraction: 0 })).toThrow(RangeError);
    expect(() => mfdfa(x, { order: 4 })).toThrow(RangeError);
    expect(() => mfdfa(x, { q: [2, 1, 3] })).toThrow(RangeError);
    expect(() => mfdfa(x, { q: [1, 2] })).toThrow(RangeError);
  });
});
