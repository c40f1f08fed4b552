// Beat classification of Lipponen & Tarvainen 2019 (J Med Eng Technol 43:173, DOI 10.1080/03091902.2019.1640306),
// written from the paper's definitions as summarised in DOMAIN §2.1.
import { assertInteger, assertSeries } from "../assert";
import { measured, notDefined, type Measured } from "../result";
import { rollingMedian, rollingQuartileDeviation } from "./rolling";

export type LtLabel = "normal" | "ectopic" | "long" | "short" | "missed" | "extra";

export interface LipponenTarvainenOptions {
  /** Threshold factor: Th = alpha × quartile deviation. */
  alpha: number;
  /** Beats in the centred window of each quartile deviation. */
  thresholdWindow: number;
  /** Beats in the centred window of the local median medRR. */
  medianWindow: number;
  /** Ectopic decision boundary S12 = −c1·S11 ∓ c2. */
  c1: number;
  c2: number;
  /** A beat is long/short when |mRRs| exceeds this. */
  mrrsLimit: number;
  /** Floor for both thresholds, ms (ours; see lipponenTarvainen). */
  minThresholdMs: number;
}

export const LIPPONEN_TARVAINEN_DEFAULTS: Readonly<LipponenTarvainenOptions> = {
  alpha: 5.2,
  thresholdWindow: 91,
  medianWindow: 11,
  c1: 0.13,
  c2: 0.17,
  mrrsLimit: 3,
  minThresholdMs: 10,
};

export interface LtClassification {
  labels: LtLabel[];
  /** dRR_j / Th1_j and mRR_j / Th2_j (dimensionless). */
  dRRs: Float64Array;
  mRRs: Float64Array;
  /** Thresholds Th1 (for dRR) and Th2 (for mRR), ms. */
  th1: Float64Array;
  th2: Float64Array;
  /** Local median medRR, ms. */
  medRR: Float64Array;
  counts: Record<LtLabel, number>;
}

/**
 * Classifies each RR interval as normal, ectopic, long, short, missed or extra (Lipponen & Tarvainen 2019).
 *
 * Series (j = 0 … N−1, all windows centred and clipped at the ends of the series):
 * - dRR_j = RR_j − RR_{j−1}; dRR_0 = 0 by convention (beat 0 has no predecessor, so only the mRR test can flag it).
 * - Th1_j = alpha · QD(|dRR|) over `thresholdWindow` (91) beats; dRRs = dRR/Th1. QD = (Q3 − Q1)/2, quartiles by R's
 *   type 7.
 * - medRR_j = median of RR over `medianWindow` (11) beats; mRR_j = RR_j − medRR_j, doubled where negative;
 *   Th2_j = alpha · QD(|mRR|) over 91 beats; mRRs = mRR/Th2.
 * - Both thresholds are floored at `minThresholdMs` (10 ms, our choice): on a near-constant series (a paced rhythm,
 *   a flat stretch) QD → 0 and one clock tick (7.8 ms at 128 Hz) would otherwise read as abnormal, and QD = 0
 *   would divide by zero.
 *
 * Decision, beat by beat (neighbours beyond the series count as dRRs = 0):
 * 1. Ectopic — subspace S1: S11 = dRRs_j; S12 = max(dRRs_{j−1}, dRRs_{j+1}) if dRRs_j > 0, else the min. Ectopic
 *    if (S11 > 1 and S12 < −c1·S11 − c2) or (S11 < −1 and S12 > −c1·S11 + c2), c1 = 0.13, c2 = 0.17: a large
 *    successive difference flanked on both sides by differences of the opposite sign (the middle, long interval of
 *    a short–long ectopic pair). DOMAIN §2.1's shorthand writes the first boundary with +c2 and "the mirror image";
 *    we use the point-symmetric form with c2 as a margin away from S12 = 0 on both branches, which is how we
 *    remember the paper (mem). The two differ by 2·c2 = 0.34 in S12 only.
 * 2. Long/short — subspace S2: S21 = dRRs_j; S22 = min(dRRs_{j+1}, dRRs_{j+2}) if dRRs_j ≥ 0, else the max.
 *    Long/short if (S21 > 1 and S22 < −1) or (S21 < −1 and S22 > 1) — a large change undone within two beats —
 *    or |mRRs_j| > 3. DOMAIN §2.1 summarises the first part as "|dRRs| > 1"; the paper's S22 condition (mem) is
 *    what keeps the normal interval after a compensatory pause or a missed beat (whose dRR is also large) from
 *    being flagged, so we keep it (a test shows the difference).
 * 3. A long/short beat is `missed` if RR_j > medRR_j and |RR_j/2 − medRR_j| < Th2_j (split it); `extra` if
 *    RR_j < medRR_j and |RR_j + RR_{j+1} − medRR_j| < Th2_j (merge it with the next, which is labelled `extra` too
 *    and not classified on its own); otherwise `long` (RR_j > medRR_j) or `short`.
 *
 * Undefined (null) with fewer than `medianWindow` beats.
 */
export function lipponenTarvainen(rr: Float64Array, options: Partial<LipponenTarvainenOptions> = {}): Measured<LtClassification> {
  assertSeries(rr, "rr");
  const o: LipponenTarvainenOptions = { ...LIPPONEN_TARVAINEN_DEFAULTS, ...options };
  assertInteger(o.thresholdWindow, "thresholdWindow", 3);
  assertInteger(o.medianWindow, "medianWindow", 3);
  if (o.thresholdWindow % 2 === 0 || o.medianWindow % 2 === 0) throw new RangeError("thresholdWindow and medianWindow must be odd");
  for (const [name, v] of [["alpha", o.alpha], ["c1", o.c1], ["c2", o.c2], ["mrrsLimit", o.mrrsLimit], ["minThresholdMs", o.minThresholdMs]] as const) {
    if (!(Number.isFinite(v) && v >= 0)) throw new RangeError(`${name} must be a finite number ≥ 0, got ${v}`);
  }
  if (!(o.alpha > 0 && o.minThresholdMs > 0)) throw new RangeError("alpha and minThresholdMs must be > 0");
  const params = { ...o };
  const n = rr.length;
  if (n < o.medianWindow) {
    return notDefined("lipponen-tarvainen", params, `fewer than ${o.medianWindow} beats: the ${o.medianWindow}-beat local median is not defined`);
  }

  const dRR = new Float64Array(n);
  const absD = new Float64Array(n);
  for (let j = 1; j < n; j++) {
    dRR[j] = rr[j]! - rr[j - 1]!;
    absD[j] = Math.abs(dRR[j]!);
  }
  const th1 = rollingQuartileDeviation(absD, o.thresholdWindow);
  const dRRs = new Float64Array(n);
  for (let j = 0; j < n; j++) {
    th1[j] = Math.max(o.alpha * th1[j]!, o.minThresholdMs);
    dRRs[j] = dRR[j]! / th1[j]!;
  }
  const medRR = rollingMedian(rr, o.medianWindow);
  const mRR = new Float64Array(n);
  const absM = new Float64Array(n);
  for (let j = 0; j < n; j++) {
    const m = rr[j]! - medRR[j]!;
    mRR[j] = m < 0 ? 2 * m : m;
    absM[j] = Math.abs(mRR[j]!);
  }
  const th2 = rollingQuartileDeviation(absM, o.thresholdWindow);
  const mRRs = new Float64Array(n);
  for (let j = 0; j < n; j++) {
    th2[j] = Math.max(o.alpha * th2[j]!, o.minThresholdMs);
    mRRs[j] = mRR[j]! / th2[j]!;
  }

  const d = (j: number) => (j >= 0 && j < n ? dRRs[j]! : 0);
  const labels = new Array<LtLabel>(n).fill("normal");
  for (let j = 0; j < n; j++) {
    if (labels[j] !== "normal") continue; // the second half of an extra pair
    const s11 = dRRs[j]!;
    const s12 = s11 > 0 ? Math.max(d(j - 1), d(j + 1)) : Math.min(d(j - 1), d(j + 1));
    if ((s11 > 1 && s12 < -o.c1 * s11 - o.c2) || (s11 < -1 && s12 > -o.c1 * s11 + o.c2)) {
      labels[j] = "ectopic";
      continue;
    }
    const s22 = s11 >= 0 ? Math.min(d(j + 1), d(j + 2)) : Math.max(d(j + 1), d(j + 2));
    const longShort = (s11 > 1 && s22 < -1) || (s11 < -1 && s22 > 1) || Math.abs(mRRs[j]!) > o.mrrsLimit;
    if (!longShort) continue;
    const v = rr[j]!;
    const med = medRR[j]!;
    if (v > med && Math.abs(v / 2 - med) < th2[j]!) {
      labels[j] = "missed";
    } else if (v < med && j + 1 < n && Math.abs(v + rr[j + 1]! - med) < th2[j]!) {
      labels[j] = "extra";
      labels[j + 1] = "extra";
    } else {
      labels[j] = v > med ? "long" : "short";
    }
  }
  const counts: Record<LtLabel, number> = { normal: 0, ectopic: 0, long: 0, short: 0, missed: 0, extra: 0 };
  for (const l of labels) counts[l]++;
  return measured("lipponen-tarvainen", params, { labels, dRRs, mRRs, th1, th2, medRR, counts });
}
