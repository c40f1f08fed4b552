import { assertInteger, assertPositive, assertSeries } from "../assert";
import { measured, notDefined, type Measured } from "../result";
import { linearFit } from "../stats";
import { boxVariances } from "./boxes";

/** DFA-1: the trend removed in each box is a straight line (Peng et al. 1995). */
const ORDER = 1;

/** Short-term (α1) and long-term (α2) scaling exponents, each over its own box sizes. */
export type DfaExponent = "alpha1" | "alpha2";

const range = (from: number, to: number): readonly number[] => Array.from({ length: to - from + 1 }, (_, i) => from + i);

/**
 * Default parameters.
 * - α1 over every integer n = 4…16 and α2 over the log-spaced set 16…64 of DOMAIN §3.1 A5 (Peng et al. 1995 give the
 *   ranges; the exact sets are common practice).
 * - Minimum beats 200 for α1 and 1000 for α2 (DOMAIN §2.9, common practice).
 * - Box sizes never above N/4 (common practice: fewer than four boxes give F(n) too noisy to fit).
 * - One pass from the start (`bothEnds: false`), as Peng et al. 1995 define the method and as the published clinical
 *   cut-offs (e.g. Huikuri et al. 2000, α1 < 0.75) were computed; a second pass from the end (Kantelhardt et al. 2001)
 *   is available and changes no expectation (DOMAIN §3.1 A5 holds box by box), only lowers the variance a little.
 */
export const DFA_DEFAULTS = {
  exponent: "alpha1" as DfaExponent,
  alpha1Scales: range(4, 16),
  alpha2Scales: [16, 19, 22, 25, 30, 35, 40, 47, 55, 64] as readonly number[],
  minBeatsAlpha1: 200,
  minBeatsAlpha2: 1000,
  maxScaleFraction: 0.25,
  bothEnds: false,
} as const;

export interface DfaOptions {
  /** Which exponent (and so which default box sizes and minimum); default "alpha1". */
  exponent?: DfaExponent;
  /** Box sizes n in beats (ascending integers ≥ 3), replacing the exponent's default set. */
  scales?: readonly number[];
  /** Fewest beats for which the exponent is reported. */
  minBeats?: number;
  /** Largest box size as a share of N; sizes above it are dropped. */
  maxScaleFraction?: number;
  /** Also cut boxes from the end of the series (2⌊N/n⌋ boxes instead of ⌊N/n⌋). */
  bothEnds?: boolean;
}

export interface DfaValue {
  /** Scaling exponent: slope of ln F(n) against ln n (dimensionless). */
  alpha: number;
  /** Intercept of that fit, ln F in ln ms. */
  intercept: number;
  /** Coefficient of determination of the log-log fit. */
  r2: number;
  /** Box sizes n actually used (beats), for the log-log plot. */
  scales: number[];
  /** F(n) in ms, one per box size. */
  fluctuation: number[];
}

/** Fewest box sizes for a slope worth reporting (two points always fit exactly; common practice). */
const MIN_SCALES = 3;

/**
 * Detrended fluctuation analysis, first order (DFA-1; Peng, Havlin, Stanley & Goldberger, Chaos 1995;5:82).
 *
 * Profile y(k) = Σ_{i≤k} (NN_i − mean NN), k = 1…N. For each box size n the profile is cut into ⌊N/n⌋ non-overlapping
 * boxes from the start (and, with `bothEnds`, again from the end); a least-squares line is fitted in each box and
 * F(n) = √( mean over all boxes and points of the squared residual ). α is the least-squares slope of ln F(n) against
 * ln n over the exponent's box sizes: α1 over n = 4…16, α2 over n = 16…64. White noise gives α → 0.5 (but ≈ 0.58 for
 * α1, a small-box bias, DOMAIN §3.1 A5), 1/f noise 1.0, Brownian noise 1.5.
 *
 * @param nn NN intervals in ms (any unit: α is invariant to shifting and scaling the series; F(n) has its unit).
 * @returns α with the fit and the F(n) points; null with a reason for fewer than `minBeats` beats, fewer than three box
 *   sizes within N·maxScaleFraction, or a series every box of which is fitted exactly (constant intervals: F(n) = 0).
 * @throws TypeError / RangeError for a non-Float64Array, a non-finite value, or invalid options.
 */
export function dfa(nn: Float64Array, options: DfaOptions = {}): Measured<DfaValue> {
  assertSeries(nn, "nn");
  const exponent = options.exponent ?? DFA_DEFAULTS.exponent;
  if (exponent !== "alpha1" && exponent !== "alpha2") throw new RangeError(`exponent must be "alpha1" or "alpha2"`);
  const isAlpha1 = exponent === "alpha1";
  const requested = options.scales ?? (isAlpha1 ? DFA_DEFAULTS.alpha1Scales : DFA_DEFAULTS.alpha2Scales);
  const minBeats = options.minBeats ?? (isAlpha1 ? DFA_DEFAULTS.minBeatsAlpha1 : DFA_DEFAULTS.minBeatsAlpha2);
  const maxScaleFraction = options.maxScaleFraction ?? DFA_DEFAULTS.maxScaleFraction;
  const bothEnds = options.bothEnds ?? DFA_DEFAULTS.bothEnds;
  requested.forEach((n, i) => {
    assertInteger(n, `scales[${i}]`, ORDER + 2);
    if (i > 0 && n <= requested[i - 1]!) throw new RangeError("scales must be strictly increasing");
  });
  assertInteger(minBeats, "minBeats", 1);
  assertPositive(maxScaleFraction, "maxScaleFraction");
  if (maxScaleFraction > 1) throw new RangeError(`maxScaleFraction must be ≤ 1, got ${maxScaleFraction}`);

  const N = nn.length;
  const largest = Math.floor(maxScaleFraction * N);
  const scales = requested.filter((n) => n <= largest);
  const method = `dfa-${exponent}`;
  const params = { exponent, scales, minBeats, maxScaleFraction, bothEnds, order: ORDER };
  if (N < minBeats) return notDefined(method, params, `fewer than ${minBeats} beats (${N})`);
  if (scales.length < MIN_SCALES) {
    return notDefined(method, params, `fewer than ${MIN_SCALES} box sizes fit within N·${maxScaleFraction} = ${largest} beats`);
  }

  const scratch = new Float64Array(scales[scales.length - 1]!);
  const f2 = new Float64Array(2 * Math.floor(N / scales[0]!));
  const fluctuation: number[] = [];
  for (const n of scales) {
    const boxes = boxVariances(nn, n, ORDER, bothEnds, scratch, f2);
    let sum = 0;
    for (let b = 0; b < boxes; b++) sum += f2[b]!;
    const F = Math.sqrt(sum / boxes);
    if (F === 0) {
      return notDefined(method, params, `zero fluctuation at n = ${n}: every box is fitted exactly by its trend (constant intervals)`);
    }
    fluctuation.push(F);
  }
  const fit = linearFit(scales.map(Math.log), fluctuation.map(Math.log));
  return measured(method, params, { alpha: fit.slope, intercept: fit.intercept, r2: fit.r2, scales, fluctuation });
}
