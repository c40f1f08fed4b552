// Percentage rules for abnormal intervals (DOMAIN §2.1).
import { assertInteger, assertSeries } from "../assert";
import { measured, type Measured } from "../result";
import { median } from "../stats";

export type PercentageVariant = "previous" | "xu-schuckers";

export interface PercentageRuleOptions {
  /** "previous": compare with the last accepted interval (Malik et al., mem). "xu-schuckers": compare with the
   *  median of the surrounding intervals AND the last accepted one [V Xu & Schuckers, J Electrocardiol 2001]. */
  variant: PercentageVariant;
  /** Largest accepted relative difference (0.2 = ±20 %). */
  tolerance: number;
  /** Xu & Schuckers: number of surrounding intervals for the median (half before, half after the beat). */
  surrounding: number;
  /** Safeguard (ours): after this many rejections in a row the reference restarts from the local median. */
  resetAfter: number;
  /** Window, beats, of the local median used to start and restart the reference. */
  referenceWindow: number;
}

export const PERCENTAGE_RULE_DEFAULTS: Readonly<PercentageRuleOptions> = {
  variant: "previous",
  tolerance: 0.2,
  surrounding: 24,
  resetAfter: 5,
  referenceWindow: 11,
};

export interface PercentageRuleResult {
  /** 1 where the interval was rejected. */
  rejected: Uint8Array;
  count: number;
}

/**
 * Percentage rule: interval j is rejected when |RR_j − ref| > tolerance·ref.
 * - "previous": ref = the last accepted interval (Malik et al., mem).
 * - "xu-schuckers": rejected when it differs by more than the tolerance from the median of the `surrounding`
 *   intervals (12 before and 12 after, the beat itself excluded, clipped at the ends) OR from the last accepted
 *   interval [V Xu & Schuckers 2001].
 * The rule needs a first reference and can lock onto a stale one after an abrupt change of rate, rejecting the rest
 * of the night. Two safeguards (our choice, stated here): the first reference is the median of the first
 * `referenceWindow` intervals, and after `resetAfter` consecutive rejections the reference restarts from the median
 * of the `referenceWindow` intervals centred on the current one (which itself stays rejected). Always defined.
 */
export function percentageRule(rr: Float64Array, options: Partial<PercentageRuleOptions> = {}): Measured<PercentageRuleResult> {
  assertSeries(rr, "rr");
  const o: PercentageRuleOptions = { ...PERCENTAGE_RULE_DEFAULTS, ...options };
  if (o.variant !== "previous" && o.variant !== "xu-schuckers") throw new RangeError(`unknown percentage-rule variant "${o.variant}"`);
  if (!(o.tolerance > 0 && o.tolerance < 1)) throw new RangeError(`tolerance must be in (0, 1), got ${o.tolerance}`);
  assertInteger(o.surrounding, "surrounding", 2);
  assertInteger(o.resetAfter, "resetAfter", 1);
  assertInteger(o.referenceWindow, "referenceWindow", 1);
  const n = rr.length;
  const rejected = new Uint8Array(n);
  const params = { ...o };
  if (n === 0) return measured("percentage-rule", params, { rejected, count: 0 });

  const halfRef = o.referenceWindow >> 1;
  const localMedian = (j: number) => median(rr, Math.max(0, j - halfRef), Math.min(n, j + halfRef + 1));
  const halfSur = o.surrounding >> 1;
  const buf = new Float64Array(o.surrounding);
  const surroundingMedian = (j: number) => {
    let m = 0;
    for (let i = Math.max(0, j - halfSur); i < Math.min(n, j + halfSur + 1); i++) if (i !== j) buf[m++] = rr[i]!;
    if (m === 0) return rr[j]!;
    const s = buf.subarray(0, m).sort();
    return m % 2 === 1 ? s[(m - 1) / 2]! : (s[m / 2 - 1]! + s[m / 2]!) / 2;
  };

  let ref = median(rr, 0, Math.min(n, o.referenceWindow));
  let streak = 0;
  let count = 0;
  for (let j = 0; j < n; j++) {
    const v = rr[j]!;
    let ok = Math.abs(v - ref) <= o.tolerance * ref;
    if (ok && o.variant === "xu-schuckers") {
      const med = surroundingMedian(j);
      ok = Math.abs(v - med) <= o.tolerance * med;
    }
    if (ok) {
      ref = v;
      streak = 0;
    } else {
      rejected[j] = 1;
      count++;
      if (++streak >= o.resetAfter) {
        ref = localMedian(j);
        streak = 0;
      }
    }
  }
  return measured("percentage-rule", params, { rejected, count });
}
