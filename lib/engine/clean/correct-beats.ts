// The correction policy of DOMAIN §2.1 (cp; Peltola, Front Physiol 2012, mem): correct isolated abnormal beats
// only, never bridge runs, and delete rather than interpolate when the series feeds Lomb–Scargle (Moody 1993 [V]).
import { assertInteger } from "../assert";
import type { BeatAction, BeatLabel } from "./labels";

export type CorrectionMode = "interpolate" | "delete";

export interface CorrectionOptions {
  /** "interpolate": correct isolated beats (split missed, merge extra, interpolate the rest), remove runs.
   *  "delete": merge isolated extra pairs (an exact restoration), remove every other abnormal beat. */
  mode: CorrectionMode;
  /** Longest cluster of consecutive abnormal intervals that still counts as isolated. Two covers the short–long
   *  pair of a premature beat and the two halves of a false detection; three or more is a run. */
  maxIsolated: number;
}

export const CORRECTION_DEFAULTS: Readonly<CorrectionOptions> = { mode: "interpolate", maxIsolated: 2 };

export interface EditEntry {
  /** Input index of the first interval of the cluster and the number of input intervals in it. */
  index: number;
  count: number;
  /** Time of the cluster's last input beat, s. */
  timeS: number;
  /** Labels of the cluster's input intervals (after run relabelling). */
  labels: BeatLabel[];
  action: BeatAction | "mixed";
  /** Input values and output values, ms (empty `after` when removed). */
  before: number[];
  after: number[];
}

export interface CorrectedBeats {
  /** Cleaned NN intervals, ms. */
  nn: Float64Array;
  /** Time of the beat ending each NN interval, s. */
  times: Float64Array;
  /** Input index each output interval comes from (for a split, both halves point to the missed interval; for a
   *  merge, to the second half). */
  source: Int32Array;
  /** 1 where the output value is not a measured interval as given (interpolated, split or merged). */
  edited: Uint8Array;
  /** 1 where this interval does not directly follow the previous output interval — something was removed in
   *  between or the input has a time gap — so nn[k] − nn[k−1] is not a successive difference. */
  afterBreak: Uint8Array;
  /** Per input interval: the label after run relabelling, and what was done. */
  labels: BeatLabel[];
  actions: BeatAction[];
  edits: EditEntry[];
}

/**
 * Applies the correction policy to labelled intervals.
 *
 * A cluster is a maximal stretch of consecutive non-normal input intervals with no time gap inside
 * (`gapBefore[k] = 1` marks a gap between beats k − 1 and k). A cluster is *isolated* when it has at most
 * `maxIsolated` intervals, a normal interval directly on each side (no gap between), and no out-of-range or
 * poor-signal interval (those were never measured properly, so there is nothing to correct from).
 * - Isolated, mode "interpolate": `missed` → two halves RR/2; an `extra` pair → one interval RR_j + RR_{j+1};
 *   `ectopic`, `long`, `short`, `percentage` → interpolated on beat index from the normal neighbours: the cubic
 *   through the two normal intervals on each side when all four exist without gaps, else the straight line between
 *   the nearest two.
 * - Isolated, mode "delete": an `extra` pair is merged (exact, no estimate enters); everything else is removed.
 * - Not isolated: removed; in clusters of more than `maxIsolated` intervals the classifier labels (ectopic, long,
 *   short, missed, extra, percentage) become `run`, while `out_of_range` and `poor_signal` stay as they are.
 *
 * Times: kept intervals keep their input times. A corrected cluster's output beats divide the real time span from
 * the beat before the cluster to the cluster's last beat in proportion to their values (a split missed beat lands
 * exactly in the middle; a merged pair ends on the real beat), so times keep increasing; an interpolated value
 * therefore need not equal the time between its beats.
 */
export function correctBeats(
  rr: Float64Array,
  times: Float64Array,
  labelsIn: readonly BeatLabel[],
  gapBefore: Uint8Array,
  options: Partial<CorrectionOptions> = {},
): CorrectedBeats {
  const o: CorrectionOptions = { ...CORRECTION_DEFAULTS, ...options };
  if (o.mode !== "interpolate" && o.mode !== "delete") throw new RangeError(`mode must be "interpolate" or "delete"`);
  assertInteger(o.maxIsolated, "maxIsolated", 0);
  const n = rr.length;
  if (times.length !== n || labelsIn.length !== n || gapBefore.length !== n) throw new RangeError("rr, times, labels and gapBefore must have the same length");

  const labels = labelsIn.slice();
  const actions = new Array<BeatAction>(n).fill("kept");
  const nn: number[] = [];
  const outT: number[] = [];
  const source: number[] = [];
  const edited: number[] = [];
  const afterBreak: number[] = [];
  const edits: EditEntry[] = [];
  let pendingBreak = false;

  const isNormal = (k: number) => k >= 0 && k < n && labels[k] === "normal";
  const push = (v: number, t: number, src: number, ed: boolean, brk: boolean) => {
    nn.push(v);
    outT.push(t);
    source.push(src);
    edited.push(ed ? 1 : 0);
    afterBreak.push(brk ? 1 : 0);
  };
  /** Value at input position k from the normal intervals around the cluster [a, b]. */
  const interpolate = (k: number, a: number, b: number): number => {
    const l1 = a - 1;
    const r1 = b + 1;
    const l2 = a - 2;
    const r2 = b + 2;
    if (isNormal(l2) && !gapBefore[l1] && isNormal(r2) && !gapBefore[r2]) {
      const xs = [l2, l1, r1, r2];
      let v = 0;
      for (let i = 0; i < 4; i++) {
        let w = 1;
        for (let j = 0; j < 4; j++) if (j !== i) w *= (k - xs[j]!) / (xs[i]! - xs[j]!);
        v += w * rr[xs[i]!]!;
      }
      return v;
    }
    return rr[l1]! + ((rr[r1]! - rr[l1]!) * (k - l1)) / (r1 - l1);
  };

  let k = 0;
  while (k < n) {
    if (labels[k] === "normal") {
      push(rr[k]!, times[k]!, k, false, pendingBreak || (k > 0 && gapBefore[k] === 1));
      pendingBreak = false;
      k++;
      continue;
    }
    const a = k;
    k++;
    while (k < n && labels[k] !== "normal" && !gapBefore[k]) k++;
    const b = k - 1;
    const size = b - a + 1;
    const before = Array.from(rr.subarray(a, b + 1));
    const isRun = size > o.maxIsolated;
    // Beats the range gate or the device already disqualified keep that label; classifier labels become "run".
    if (isRun) for (let i = a; i <= b; i++) if (labels[i] !== "out_of_range" && labels[i] !== "poor_signal") labels[i] = "run";
    let isolated = !isRun && isNormal(a - 1) && !gapBefore[a] && isNormal(b + 1) && !gapBefore[b + 1];
    for (let i = a; isolated && i <= b; i++) if (labels[i] === "out_of_range" || labels[i] === "poor_signal") isolated = false;
    // An extra pair must be whole inside the cluster (its two halves adjacent, first half labelled first).
    for (let i = a; isolated && i <= b; i++) {
      if (labels[i] === "extra") {
        if (i + 1 > b || labels[i + 1] !== "extra") isolated = false;
        else i++;
      }
    }
    const extraPairOnly = isolated && size === 2 && labels[a] === "extra";

    if (!isolated || (o.mode === "delete" && !extraPairOnly)) {
      for (let i = a; i <= b; i++) actions[i] = "removed";
      pendingBreak = true;
      edits.push({ index: a, count: size, timeS: times[b]!, labels: labels.slice(a, b + 1), action: "removed", before, after: [] });
      continue;
    }

    // Isolated and correctable: build the replacement values.
    const vals: { v: number; src: number }[] = [];
    for (let i = a; i <= b; i++) {
      const l = labels[i]!;
      if (l === "missed") {
        vals.push({ v: rr[i]! / 2, src: i }, { v: rr[i]! / 2, src: i });
        actions[i] = "split";
      } else if (l === "extra") {
        vals.push({ v: rr[i]! + rr[i + 1]!, src: i + 1 });
        actions[i] = actions[i + 1] = "merged";
        i++;
      } else {
        vals.push({ v: interpolate(i, a, b), src: i });
        actions[i] = "interpolated";
      }
    }
    // New beats share the real span between the beat before the cluster and its last beat in proportion to their
    // values, so times stay increasing and the cluster still ends on a real beat.
    const t0 = times[a - 1]!;
    const span = times[b]! - t0;
    const total = vals.reduce((s, x) => s + x.v, 0);
    let cum = 0;
    const after: number[] = [];
    vals.forEach(({ v, src }, i) => {
      cum += v;
      const t = i === vals.length - 1 ? times[b]! : t0 + (span * cum) / total;
      push(v, t, src, true, i === 0 ? pendingBreak : false);
      after.push(v);
    });
    pendingBreak = false;
    const acts = new Set(actions.slice(a, b + 1));
    edits.push({ index: a, count: size, timeS: times[b]!, labels: labels.slice(a, b + 1), action: acts.size === 1 ? actions[a]! : "mixed", before, after });
  }

  return {
    nn: new Float64Array(nn),
    times: new Float64Array(outT),
    source: new Int32Array(source),
    edited: new Uint8Array(edited),
    afterBreak: new Uint8Array(afterBreak),
    labels,
    actions,
    edits,
  };
}
