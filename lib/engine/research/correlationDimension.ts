import { assertInteger, assertPositive, assertSeries } from "../assert";
import { measured, notDefined, type Measured } from "../result";
import { linearFit } from "../stats";
import { CORRELATION_DIMENSION_CAVEAT } from "./caveats";
import { delayVectorCount, meanPeriod } from "./embedding";

export const CORRELATION_DIMENSION_DEFAULTS = {
  /** Embedding delay (samples). */
  tau: 1,
  /** Embedding dimensions m = 1 … maxDim. */
  maxDim: 10,
  /** Pairs closer in time than this are excluded (Theiler window W); null: the mean period, rounded up. */
  theiler: null as number | null,
  /** Scaling region: the radii where C(r) lies in [cLow, cHigh] (common practice: well below the attractor size and
   *  well above the sparsest pair counts). cLow is raised to minPairs/P when the pair count P is small. */
  cLow: 1e-4,
  cHigh: 1e-2,
  /** Fewest pairs below a radius used in the fit (binomial error of C ≤ 10 %). */
  minPairs: 100,
  /** Saturation: three successive slopes whose spread is at most this share of their mean. */
  plateauTolerance: 0.1,
  /** At most this many reference vectors, evenly spaced in time, are paired with all others (all when fewer):
   *  500 × 4000 vectors give 2·10⁶ pairs, C(r) down to 10⁻⁴ from ≥ 200 pairs, in about 0.1 s. */
  maxReferences: 500,
  /** Radii below this multiple of the data resolution (smallest gap between distinct values: 1 ms for integer-ms
   *  RR intervals) are left out of the fit, because there C(r) is a staircase of the quantisation. */
  resolutionMultiple: 4,
} as const;

export type CorrelationDimensionOptions = {
  tau?: number;
  maxDim?: number;
  theiler?: number | null;
  cLow?: number;
  cHigh?: number;
  minPairs?: number;
  plateauTolerance?: number;
  maxReferences?: number;
  resolutionMultiple?: number;
};

/** Fewer delay vectors than this make C(r) meaningless even at m = 1 (DOMAIN §2.9: 10³–10⁴ points for D2). */
const MIN_VECTORS = 500;
/** Slopes are fitted only with at least this many radii in the scaling region. */
const MIN_FIT_POINTS = 4;
/** Squared distances are binned by their 4 leading mantissa bits: 16 bins per factor 2 of r², i.e. r grows by
 *  2^(1/32) ≈ 2.2 % from one radius to the next. */
const MANTISSA_BITS = 4;

export interface CorrelationCurve {
  m: number;
  /** ln r and ln C(r) at every bin edge with C > 0, for the log-log plot. */
  lnR: number[];
  lnC: number[];
  /** Slope of ln C against ln r over the scaling region; null when the region holds fewer than 4 radii. */
  slope: number | null;
  /** The fitted range of ln r (null with the slope). */
  fitFrom: number | null;
  fitTo: number | null;
}

export interface CorrelationDimensionValue {
  /** The plateau value (mean of the three saturating slopes); null when there is no plateau (see d2Reason). */
  d2: number | null;
  d2Reason: string | null;
  verdict: "saturated" | "not saturated";
  /** First m of the saturating triple; null when not saturated. */
  saturationDim: number | null;
  /** Slope per m (index 0 is m = 1). */
  slopes: (number | null)[];
  curves: CorrelationCurve[];
  /** 2·log10 N_vectors: the largest dimension the series can show (Eckmann & Ruelle 1992). */
  eckmannRuelleBound: number;
  theiler: number;
  vectors: number;
  pairs: number;
  caveat: string;
}

/**
 * Correlation dimension D2 by the Grassberger–Procaccia algorithm (Physica D 1983;9:189; PRL 1983;50:346).
 *
 * Delay vectors y_i = (x_i, x_{i+τ}, …, x_{i+(m−1)τ}), the same N_v = N − (maxDim−1)τ vectors for every m. The
 * correlation sum C_m(r) = (number of pairs i < j, j − i > W, with ‖y_i − y_j‖ < r) / (number of such pairs),
 * Euclidean norm, strict "<". One pass over the pairs serves every m: the squared distance in m dimensions is the
 * one in m − 1 plus one term, and it is binned by its floating-point exponent and leading mantissa bits, so C_m(r)
 * is exact at each bin edge r² = 2^e·(1 + k/16). When N_v exceeds `maxReferences`, that many reference vectors
 * evenly spaced in time are paired with every other vector (an unbiased estimate of the same C(r)).
 *
 * Slope: least squares of ln C on ln r over the radii with C in [max(cLow, minPairs/P), cHigh] and r at least
 * `resolutionMultiple` × the data resolution.
 * Saturation rule (stated here, common practice in form): the first m such that the slopes at m, m+1, m+2 all exist
 * and their spread (max − min) is at most `plateauTolerance` × their mean; D2 is their mean. Otherwise "not
 * saturated" — what stochastic data do. A plateau above the Eckmann–Ruelle bound 2·log10 N_v is reported as
 * saturated but D2 is null: the series is too short to support it.
 *
 * Null with a reason for a constant series or fewer than 500 delay vectors. Research only.
 */
export function correlationDimension(x: Float64Array, options: CorrelationDimensionOptions = {}): Measured<CorrelationDimensionValue> {
  assertSeries(x, "x");
  const o = { ...CORRELATION_DIMENSION_DEFAULTS, ...options };
  assertInteger(o.tau, "tau", 1);
  assertInteger(o.maxDim, "maxDim", 1, 30);
  assertPositive(o.cLow, "cLow");
  assertPositive(o.cHigh, "cHigh");
  if (!(o.cHigh > o.cLow && o.cHigh <= 1)) throw new RangeError(`need cLow < cHigh ≤ 1, got ${o.cLow}, ${o.cHigh}`);
  assertInteger(o.minPairs, "minPairs", 1);
  assertPositive(o.plateauTolerance, "plateauTolerance");
  assertInteger(o.maxReferences, "maxReferences", 1);
  if (!(o.resolutionMultiple >= 0)) throw new RangeError(`resolutionMultiple must be ≥ 0, got ${o.resolutionMultiple}`);
  const method = "correlation-dimension";
  const nv = delayVectorCount(x.length, o.maxDim, o.tau);
  const baseParams = { ...o, norm: "euclidean", count: "strict <" };
  if (nv < MIN_VECTORS) {
    return { ...notDefined(method, baseParams, `too few points: ${Math.max(0, nv)} delay vectors at m = ${o.maxDim} (need ${MIN_VECTORS})`), research: true };
  }
  const period = meanPeriod(x);
  if (period === null) return { ...notDefined(method, baseParams, "zero variance: the series is constant"), research: true };
  const theiler = o.theiler ?? Math.ceil(period);
  assertInteger(theiler, "theiler", 0);
  const params = { ...baseParams, theiler };

  // Reference vectors, evenly spaced; each is paired with every vector j > i + W (and, when subsampled, also with
  // every j < i − W, so that each reference sees all its partners once).
  const all = nv <= o.maxReferences;
  const refs: number[] = [];
  const step = all ? 1 : nv / o.maxReferences;
  for (let r = 0; Math.floor(r) < nv; r += step) refs.push(Math.floor(r));

  const binsPerDim = 2048 << MANTISSA_BITS;
  const hist = new Float64Array(o.maxDim * binsPerDim);
  const acc = new Float64Array(nv);
  const bits = new Float64Array(1);
  const hiWord = new Uint32Array(bits.buffer, littleEndian() ? 4 : 0, 1);
  const shift = 20 - MANTISSA_BITS;
  let pairs = 0;
  const tau = o.tau;
  for (const i of refs) {
    // Partner ranges [j0, nv) and, when subsampled, [0, i − W).
    for (let side = 0; side < (all ? 1 : 2); side++) {
      const j0 = side === 0 ? i + theiler + 1 : 0;
      const j1 = side === 0 ? nv : i - theiler;
      if (j1 <= j0) continue;
      pairs += j1 - j0;
      acc.fill(0, j0, j1);
      for (let k = 0; k < o.maxDim; k++) {
        const xi = x[i + k * tau]!;
        const off = k * tau;
        const h = k * binsPerDim;
        for (let j = j0; j < j1; j++) {
          const d = x[j + off]! - xi;
          const s = acc[j]! + d * d;
          acc[j] = s;
          bits[0] = s;
          hist[h + (hiWord[0]! >>> shift)]! += 1;
        }
      }
    }
  }

  const cLow = Math.max(o.cLow, o.minPairs / pairs);
  const lnRMin = Math.log(o.resolutionMultiple * resolution(x));
  const curves: CorrelationCurve[] = [];
  const slopes: (number | null)[] = [];
  for (let k = 0; k < o.maxDim; k++) {
    const lnR: number[] = [];
    const lnC: number[] = [];
    const fitX: number[] = [];
    const fitY: number[] = [];
    let below = 0;
    const h = k * binsPerDim;
    for (let b = 0; b < binsPerDim; b++) {
      // Count of pairs with r² < edge(b) is the sum of the bins before b.
      if (below > 0 && below < pairs) {
        bits[0] = 0;
        hiWord[0] = b << shift;
        const edge2 = bits[0]!;
        const c = below / pairs;
        const lr = 0.5 * Math.log(edge2);
        lnR.push(lr);
        lnC.push(Math.log(c));
        if (c >= cLow && c <= o.cHigh && lr >= lnRMin) {
          fitX.push(lr);
          fitY.push(Math.log(c));
        }
      }
      below += hist[h + b]!;
    }
    const slope = fitX.length >= MIN_FIT_POINTS ? linearFit(fitX, fitY).slope : null;
    slopes.push(slope);
    curves.push({
      m: k + 1,
      lnR,
      lnC,
      slope,
      fitFrom: slope === null ? null : fitX[0]!,
      fitTo: slope === null ? null : fitX[fitX.length - 1]!,
    });
  }

  const bound = 2 * Math.log10(nv);
  let saturationDim: number | null = null;
  let plateau: number | null = null;
  for (let k = 0; k + 2 < slopes.length; k++) {
    const a = slopes[k];
    const b = slopes[k + 1];
    const c = slopes[k + 2];
    if (a == null || b == null || c == null) continue;
    const meanSlope = (a + b + c) / 3;
    if (meanSlope > 0 && Math.max(a, b, c) - Math.min(a, b, c) <= o.plateauTolerance * meanSlope) {
      saturationDim = k + 1;
      plateau = meanSlope;
      break;
    }
  }
  let d2: number | null = null;
  let d2Reason: string | null = null;
  if (plateau === null) {
    d2Reason = `no plateau: the slope does not saturate for m = 1…${o.maxDim} (what stochastic data do)`;
  } else if (plateau > bound) {
    d2Reason = `the plateau ${plateau.toFixed(2)} exceeds the Eckmann–Ruelle bound 2·log10 N = ${bound.toFixed(2)}: too few points`;
  } else {
    d2 = plateau;
  }
  return {
    ...measured(method, params, {
      d2,
      d2Reason,
      verdict: saturationDim === null ? "not saturated" : "saturated",
      saturationDim,
      slopes,
      curves,
      eckmannRuelleBound: bound,
      theiler,
      vectors: nv,
      pairs,
      caveat: CORRELATION_DIMENSION_CAVEAT,
    }),
    research: true,
  };
}

/** Smallest positive gap between distinct values of x. */
function resolution(x: Float64Array): number {
  const s = Float64Array.from(x).sort();
  let gap = Infinity;
  for (let i = 1; i < s.length; i++) {
    const d = s[i]! - s[i - 1]!;
    if (d > 0 && d < gap) gap = d;
  }
  return gap;
}

function littleEndian(): boolean {
  return new Uint8Array(new Uint16Array([1]).buffer)[0] === 1;
}
