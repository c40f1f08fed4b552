// Seeded pseudo-random numbers for simulation and surrogate tests: the engine never reads a global random source,
// so every result is reproducible from its seed. Generator: mulberry32 (32-bit state; ample for test signals and
// surrogates, not for cryptography).

export interface Rng {
  /** Uniform on [0, 1). */
  next(): number;
  uniform(a: number, b: number): number;
  /** Standard normal (Box–Muller). */
  normal(): number;
  /** Gamma(shape k ≥ 1, scale θ) by Marsaglia & Tsang (ACM TOMS 2000). */
  gamma(shape: number, scale: number): number;
  /** Integer in [0, n). */
  int(n: number): number;
}

export function createRng(seed: number): Rng {
  let a = seed >>> 0;
  let spare: number | null = null;
  const next = () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  const normal = () => {
    if (spare !== null) {
      const s = spare;
      spare = null;
      return s;
    }
    let u = 0;
    while (u === 0) u = next();
    const v = next();
    const r = Math.sqrt(-2 * Math.log(u));
    spare = r * Math.sin(2 * Math.PI * v);
    return r * Math.cos(2 * Math.PI * v);
  };
  const gamma = (shape: number, scale: number): number => {
    if (shape < 1) {
      // Boost: Gamma(k) = Gamma(k + 1) · U^(1/k).
      return gamma(shape + 1, scale) * Math.pow(next(), 1 / shape);
    }
    const d = shape - 1 / 3;
    const c = 1 / Math.sqrt(9 * d);
    for (;;) {
      let x: number;
      let v: number;
      do {
        x = normal();
        v = 1 + c * x;
      } while (v <= 0);
      v = v * v * v;
      const u = next();
      if (u < 1 - 0.0331 * x ** 4 || Math.log(u) < 0.5 * x * x + d * (1 - v + Math.log(v))) return d * v * scale;
    }
  };
  return {
    next,
    uniform: (lo, hi) => lo + (hi - lo) * next(),
    normal,
    gamma,
    int: (n) => Math.floor(next() * n),
  };
}
