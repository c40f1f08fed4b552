// DOMAIN §6.5: premature ventricular and atrial beats, couplets and runs of bigeminy, placed into any rhythm with
// their true labels in the hidden ground-truth channel.
import { assertInteger } from "../assert";
import { createRng } from "../random";
import { assertNonNegative, assertProbability, assertRange, type SimulatedBeats, type TruthLabel, type DeviceBeatType } from "./types";

export interface EctopyOptions {
  seed: number;
  /** Share of all beats that start a PVC event (an isolated PVC, or a couplet, see coupletShare): 0.1–5 %. */
  pvcRate: number;
  /** Share of all beats that are PACs. */
  pacRate: number;
  /** Share of PVC events that are couplets (two PVCs in a row). */
  coupletShare: number;
  /** Bigeminy episodes (every other beat a PVC): Poisson rate per hour and duration range, s (1–10 min). */
  bigeminyPerHour: number;
  bigeminyDurationS: readonly number[];
  /** PVC coupling: RR_i = c·RR_prev, c ~ U(lo, hi). */
  pvcCoupling: readonly number[];
  /** The compensatory pause RR_{i+1} = 2·RR_prev − RR_i is off by U(−jitter, jitter), ms. */
  pauseJitterMs: number;
  /** PAC coupling c ~ U(lo, hi) and non-compensatory reset RR_{i+1} = RR_prev·U(lo, hi). */
  pacCoupling: readonly number[];
  pacReset: readonly number[];
}

export const ECTOPY_DEFAULTS: Readonly<EctopyOptions> = {
  seed: 1,
  pvcRate: 0.02,
  pacRate: 0,
  coupletShare: 0,
  bigeminyPerHour: 0,
  bigeminyDurationS: [60, 600],
  pvcCoupling: [0.55, 0.75],
  pauseJitterMs: 10,
  pacCoupling: [0.7, 0.9],
  pacReset: [1.0, 1.15],
};

/**
 * Adds ectopy to a series, DOMAIN §6.5. Each event replaces intervals in place, so the beat count is unchanged and
 * the sinus timing after a fully compensated PVC is kept to within the pause jitter:
 * - PVC at i: RR_i = c·RR_{i−1}, c ~ U(0.55, 0.75) (type "V", truth "pvc"); RR_{i+1} = 2·RR_{i−1} − RR_i ± 10 ms
 *   (full compensatory pause; type "N", truth "post_ectopic").
 * - Couplet: two PVCs, RR_i = c₁·ref, RR_{i+1} = c₂·ref, then RR_{i+2} = 3·ref − RR_i − RR_{i+1} ± 10 ms.
 * - PAC at i: RR_i = c·RR_{i−1}, c ~ U(0.70, 0.90) (type "S", truth "pac"); RR_{i+1} = RR_{i−1}·U(1.0, 1.15)
 *   (non-compensatory, truth "post_ectopic").
 * - Bigeminy: over an episode every other beat is a PVC, each referred to the underlying interval before it.
 * Events go only where the input beat and its neighbours are "normal", with at least one normal interval between
 * events, so the reference RR_{i−1} of an isolated event is always a normal interval. Times after an event shift
 * by the change in the interval sum. Run modifiers in the order ectopy → artefacts → dropouts → quantiseBeats.
 */
export function addEctopy(series: SimulatedBeats, options: Partial<EctopyOptions> = {}): SimulatedBeats {
  const o: EctopyOptions = { ...ECTOPY_DEFAULTS, ...options };
  assertInteger(o.seed, "seed", 0, 0xffffffff);
  assertProbability("pvcRate", o.pvcRate);
  assertProbability("pacRate", o.pacRate);
  assertProbability("pvcRate + pacRate", o.pvcRate + o.pacRate);
  assertProbability("coupletShare", o.coupletShare);
  assertNonNegative("bigeminyPerHour", o.bigeminyPerHour);
  assertNonNegative("pauseJitterMs", o.pauseJitterMs);
  assertRange("bigeminyDurationS", o.bigeminyDurationS, 0, 86400);
  assertRange("pvcCoupling", o.pvcCoupling, 0.1, 1);
  assertRange("pacCoupling", o.pacCoupling, 0.1, 1);
  assertRange("pacReset", o.pacReset, 0.5, 2);

  const rng = createRng(o.seed);
  const n = series.rr.length;
  const base = series.rr;
  const rr = base.slice();
  const beatType: DeviceBeatType[] = series.beatType.slice();
  const truth: TruthLabel[] = series.truth.slice();
  const used = new Uint8Array(n);
  const free = (k: number) => k >= 0 && k < n && used[k] === 0 && series.truth[k] === "normal";
  const jitter = () => rng.uniform(-o.pauseJitterMs, o.pauseJitterMs);
  const u = (r: readonly number[]) => rng.uniform(r[0]!, r[1]!);

  // Bigeminy episodes first, as a Poisson process over the series' time span.
  if (n > 3 && o.bigeminyPerHour > 0) {
    const rate = o.bigeminyPerHour / 3600;
    let t = series.times[0]!;
    const end = series.times[n - 1]!;
    let k = 0;
    for (;;) {
      t += -Math.log(1 - rng.next()) / rate;
      if (t >= end) break;
      const stop = t + u(o.bigeminyDurationS);
      while (k < n && series.times[k]! < t) k++;
      let i = k;
      // Every other beat: PVC at i, pause at i + 1, then the next PVC at i + 2. The beat before the first PVC must
      // be a free normal beat; later PVCs follow the previous pause.
      while (i + 1 < n && series.times[i + 1]! <= stop && (i > k || free(i - 1)) && free(i) && free(i + 1)) {
        const ref = base[i - 1]!;
        rr[i] = u(o.pvcCoupling) * ref;
        rr[i + 1] = 2 * ref - rr[i]! + jitter();
        beatType[i] = "V";
        truth[i] = "pvc";
        truth[i + 1] = "post_ectopic";
        used[i] = used[i + 1] = 1;
        i += 2;
      }
      if (i > k && i < n) used[i] = 1; // keep one normal beat after the episode
      t = Math.max(t, stop);
    }
  }

  // An event occupies its own beats plus the normal beat required after it, so events can start only on a share of
  // the beats. The draw probability per eligible beat is raised so that pvcRate and pacRate are shares of all beats:
  // with q = pvcRate + pacRate and e beats blocked per event beyond the first (2, or 3 for a couplet),
  // events per beat = p/(1 + e·p) = q  ⇔  p = q/(1 − e·q). Bigeminy episodes are not allowed for.
  const q = o.pvcRate + o.pacRate;
  const blocked = q > 0 ? 2 + (o.pvcRate * o.coupletShare) / q : 2;
  const scale = q > 0 ? 1 / (1 - blocked * q) : 1;
  if (!(scale > 0 && q * scale <= 1)) throw new RangeError("pvcRate + pacRate too high for isolated events (keep it below about 0.3)");
  const pPvc = o.pvcRate * scale;
  const pPac = o.pacRate * scale;
  for (let i = 1; i + 1 < n; i++) {
    if (!free(i - 1) || !free(i) || !free(i + 1)) continue;
    const draw = rng.next();
    if (draw < pPvc) {
      const ref = rr[i - 1]!;
      const couplet = rng.next() < o.coupletShare && free(i + 2);
      rr[i] = u(o.pvcCoupling) * ref;
      beatType[i] = "V";
      truth[i] = "pvc";
      used[i] = 1;
      if (couplet) {
        rr[i + 1] = u(o.pvcCoupling) * ref;
        rr[i + 2] = 3 * ref - rr[i]! - rr[i + 1]! + jitter();
        beatType[i + 1] = "V";
        truth[i + 1] = "pvc";
        truth[i + 2] = "post_ectopic";
        used[i + 1] = used[i + 2] = 1;
        i += 2;
      } else {
        rr[i + 1] = 2 * ref - rr[i]! + jitter();
        truth[i + 1] = "post_ectopic";
        used[i + 1] = 1;
        i += 1;
      }
    } else if (draw < pPvc + pPac) {
      const ref = rr[i - 1]!;
      rr[i] = u(o.pacCoupling) * ref;
      rr[i + 1] = u(o.pacReset) * ref;
      beatType[i] = "S";
      truth[i] = "pac";
      truth[i + 1] = "post_ectopic";
      used[i] = used[i + 1] = 1;
      i += 1;
    }
  }

  const times = new Float64Array(n);
  let shift = 0;
  for (let k = 0; k < n; k++) {
    shift += (rr[k]! - base[k]!) / 1000;
    times[k] = series.times[k]! + shift;
  }
  return {
    ...series,
    rr,
    times,
    beatType,
    truth,
    quality: series.quality.slice(),
    leadOff: series.leadOff.slice(),
    rhythm: series.rhythm.slice(),
    gaps: series.gaps.map((g) => ({ ...g })),
    steps: [...series.steps, { generator: "ectopy", params: { ...o } }],
  };
}
