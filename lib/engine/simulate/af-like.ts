// DOMAIN §6.3: AF-like irregular rhythm (iid intervals), and an optional atrial-flutter variant with 2:1 / variable
// block.
import { assertInteger } from "../assert";
import { createRng } from "../random";
import { assertNonNegative, cleanQuality, seriesFromIntervals, subSeed, type SimulatedBeats } from "./types";

export interface AfLikeOptions {
  seed: number;
  durationS: number;
  /** Exact beat count instead of a duration. */
  beats: number | null;
  startS: number;
  /** RR = offsetMs + Gamma(shape, scale) ms, iid. */
  offsetMs: number;
  gammaShape: number;
  gammaScale: number;
  /** Flutter instead of AF: RR = block × flutterCycleMs ± flutterJitterMs (uniform), block drawn from flutterBlocks. */
  flutter: boolean;
  flutterCycleMs: number;
  flutterBlocks: readonly number[];
  flutterJitterMs: number;
}

export const AF_LIKE_DEFAULTS: Readonly<AfLikeOptions> = {
  seed: 1,
  durationS: 3600,
  beats: null,
  startS: 0,
  offsetMs: 350,
  gammaShape: 3,
  gammaScale: 100,
  flutter: false,
  flutterCycleMs: 200,
  flutterBlocks: [2, 3, 4],
  flutterJitterMs: 5,
};

/**
 * AF-like rhythm, DOMAIN §6.3: RR_k = 350 + Gamma(shape 3, scale 100) ms, independent from beat to beat (mean
 * 650 ms ≈ 92 bpm). Analytic: SD = √3·100 = 173.2 ms and, for iid intervals, RMSSD = √2·SD = 244.9 ms; DOMAIN §6.3
 * [C] gives SDNN 171 ± 8, RMSSD 242 ± 11 ms, pNN50 82 %. Beats are typed "N" (a device without a rhythm detector)
 * and carry rhythm "af" in the optional rhythm channel. With `flutter`, RR = b·200 ± 5 ms with b drawn uniformly
 * from {2, 3, 4} (rhythm "flutter"). Episodes of 20 min to 6 h are made by concatenating series (concatSeries).
 */
export function simulateAfLike(options: Partial<AfLikeOptions> = {}): SimulatedBeats {
  const o: AfLikeOptions = { ...AF_LIKE_DEFAULTS, ...options };
  assertInteger(o.seed, "seed", 0, 0xffffffff);
  if (o.beats !== null) assertInteger(o.beats, "beats", 1);
  else assertNonNegative("durationS", o.durationS);
  assertNonNegative("offsetMs", o.offsetMs);
  if (!(o.gammaShape >= 1 && o.gammaScale > 0)) throw new RangeError("gammaShape must be ≥ 1 and gammaScale > 0");
  if (o.flutter && (o.flutterBlocks.length === 0 || o.flutterBlocks.some((b) => !Number.isInteger(b) || b < 1))) {
    throw new RangeError("flutterBlocks must be a non-empty list of integers ≥ 1");
  }
  const rng = createRng(o.seed);
  const draw = o.flutter
    ? () => o.flutterBlocks[rng.int(o.flutterBlocks.length)]! * o.flutterCycleMs + rng.uniform(-o.flutterJitterMs, o.flutterJitterMs)
    : () => o.offsetMs + rng.gamma(o.gammaShape, o.gammaScale);
  const out: number[] = [];
  if (o.beats !== null) {
    for (let k = 0; k < o.beats; k++) out.push(draw());
  } else {
    let t = 0;
    const end = o.durationS * 1000;
    for (;;) {
      const v = draw();
      if (t + v > end) break;
      t += v;
      out.push(v);
    }
  }
  const rr = new Float64Array(out);
  const quality = cleanQuality(rr.length, createRng(subSeed(o.seed, 1)));
  return seriesFromIntervals(rr, o.startS, o.flutter ? "flutter" : "af", "N", quality, { generator: "af-like", params: { ...o } });
}
