// What each demo scenario streams over one night block: the DOMAIN §6 recipe, built from the engine's seeded
// generators and modifiers (lib/engine/simulate), in the order the engine asks for (rhythm → ectopy → artefacts →
// dropouts; the device simulator then applies its clock and quantises). Pure: seed and length in, beats out.
import { createRng } from "@/lib/engine/random";
import {
  addArtefacts,
  addDropouts,
  addEctopy,
  concatSeries,
  COMPLEXITY_LOSS_VARIANTS,
  simulateAfLike,
  simulateComplexityLoss,
  simulateHealthySleep,
  simulateNicu,
  simulatePaced,
  type SimulatedBeats,
} from "@/lib/engine/simulate";
import { subSeed } from "@/lib/engine/simulate/types";
import type { DemoScenario } from "@/seeds/demo-data";

export const NEONATAL_SCENARIOS: readonly DemoScenario[] = ["nicu", "nicu_presepsis"];

/** The device's timestamp grid: its resolution, and where the block's start (true time) falls on it — the start
 *  modulo the resolution — ms; the scenario's clock offset moves the beats further along it. */
export interface DeviceGrid {
  resolutionMs: number;
  blockStartPhaseMs: number;
}

export interface NightPlan {
  /** Beats in true time, s from the block start, not yet quantised. */
  series: SimulatedBeats;
  /** The device has a rhythm detector and sends status records with `rhythm` when the rhythm changes. */
  reportsRhythm: boolean;
  /** Device clock: offset from true time, ms, and drift, ppm; a drifting clock is corrected once a night. */
  clockOffsetMs: number;
  clockDriftPpm: number;
  /** Network resends (DOMAIN §6.7): Poisson events per hour, each re-sending the last 2–8 records. */
  resendsPerHour: number;
}

/** DOMAIN §6.7: device clock +0.8 s and +20 ppm, one correction a night. Other devices: |offset| < 50 ms, no drift. */
export const DRIFT_CLOCK = { offsetMs: 800, driftPpm: 20, correctionLocal: "03:00:00" } as const;
const SMALL_OFFSET_MS = 49;
/** Network resends on the transport-fault scenario (our choice, cp): a few an hour keep them in every night. */
const RESENDS_PER_HOUR = 3;
export const RESEND_COUNT = [2, 8] as const;

/** DOMAIN §6.3: AF-like episodes last 20 min to 6 h. */
const AF_EPISODE_S = [20 * 60, 6 * 3600] as const;
/** DOMAIN §6.2: the drift takes 2–6 h; it starts 2–4 h into the evening, so the night holds both ends. */
const DRIFT_START_S = [2 * 3600, 4 * 3600] as const;
const DRIFT_LENGTH_S = [3 * 3600, 5 * 3600] as const;
/** DOMAIN §6.8: the pre-sepsis pattern starts 3–6 h into the evening (our choice, so the night shows both parts). */
const PRESEPSIS_START_S = [3 * 3600, 6 * 3600] as const;
/** DOMAIN §6.4: pacing at 857 ms (70 bpm) ± 1 ms. */
const PACED_INTERVAL_MS = 857;
const PACED_JITTER_MS = 1;

/** Seed streams used here, apart from the ones the engine derives inside each generator. */
const STREAM = { rhythm: 101, episodes: 102, af: 103, ectopy: 104, artefacts: 105, dropouts: 106, clock: 107, plan: 108 } as const;

/**
 * One night block of `scenario`, `durationS` long, on the timestamp grid of the device that sends it.
 * - healthy_sleep: §6.1. - complexity_loss_rigid / _decorrelated: §6.2, a linear ramp of 3–5 h starting 2–4 h in.
 * - af_episodes: §6.3, one or two AF-like episodes of 20 min–6 h with abrupt onset and offset inside healthy sleep;
 *   the device reports the rhythm.
 * - paced: §6.4, a pacemaker's own timer (a constant interval, the device-grid step nearest 857 ms) with ±1 ms
 *   detection jitter on each beat time (addArtefacts' timestamp jitter; RR SD √2·1/√3 ≈ 0.8 ms), the pacing spikes
 *   falling on the device's clock grid. Jitter added to the intervals themselves (simulatePaced's own) would
 *   random-walk the beat times across the 7.8-ms grid of a 1/128-s clock, and the rounding alone would then
 *   lift SDNN above §6.4's 3 ms in some 5-min windows; on that clock the interval here is reported constant.
 * - ectopy: §6.5 PVCs 2 %, PACs 1 %, 10 % of PVC events couplets, bigeminy runs of 1–10 min (0.3 an hour).
 * - artefacts: §6.6 with motion bursts twice an hour. - dropouts_clock_drift: §6.7 gaps (1 an hour), a drifting
 *   clock and network resends. - nicu / nicu_presepsis: §6.8, the pre-sepsis pattern starting 3–6 h in.
 */
export function planNight(scenario: DemoScenario, seed: number, durationS: number, grid: DeviceGrid): NightPlan {
  const resolutionMs = grid.resolutionMs;
  if (!(Number.isInteger(seed) && seed >= 0 && seed <= 0xffffffff)) throw new RangeError(`seed must be a 32-bit unsigned integer, got ${seed}`);
  if (!(durationS > 0 && Number.isFinite(durationS))) throw new RangeError(`durationS must be a positive number, got ${durationS}`);
  if (!(resolutionMs > 0 && resolutionMs <= 100)) throw new RangeError(`resolutionMs must be in (0, 100], got ${resolutionMs}`);
  const rng = createRng(subSeed(seed, STREAM.plan));
  const u = (r: readonly [number, number]) => rng.uniform(r[0], r[1]);
  const clockRng = createRng(subSeed(seed, STREAM.clock));
  const base: Omit<NightPlan, "series"> = {
    reportsRhythm: false,
    clockOffsetMs: clockRng.uniform(-SMALL_OFFSET_MS, SMALL_OFFSET_MS),
    clockDriftPpm: 0,
    resendsPerHour: 0,
  };
  const sleep = () => simulateHealthySleep({ seed: subSeed(seed, STREAM.rhythm), durationS });
  switch (scenario) {
    case "healthy_sleep":
      return { ...base, series: sleep() };
    case "complexity_loss_rigid":
    case "complexity_loss_decorrelated":
      return {
        ...base,
        series: simulateComplexityLoss({
          seed: subSeed(seed, STREAM.rhythm),
          durationS,
          betaEnd: scenario === "complexity_loss_rigid" ? COMPLEXITY_LOSS_VARIANTS.rigid : COMPLEXITY_LOSS_VARIANTS.decorrelated,
          rampStartS: u(DRIFT_START_S),
          rampDurationS: u(DRIFT_LENGTH_S),
          rampShape: "linear",
        }),
      };
    case "af_episodes":
      return { ...base, reportsRhythm: true, series: withAfEpisodes(sleep(), afEpisodes(seed, durationS), seed) };
    case "paced": {
      // Start so that device time = block start phase + start + clock offset + k·interval is on the grid.
      const phase = (((grid.blockStartPhaseMs + base.clockOffsetMs) % resolutionMs) + resolutionMs) % resolutionMs;
      const timer = simulatePaced({
        seed: subSeed(seed, STREAM.rhythm),
        durationS,
        startS: ((resolutionMs - phase) % resolutionMs) / 1000,
        intervalMs: Math.round(PACED_INTERVAL_MS / resolutionMs) * resolutionMs,
        jitterMs: 0,
      });
      const detection = { missedRate: 0, extraRate: 0, spikeRate: 0, motionPerHour: 0, jitterMs: PACED_JITTER_MS };
      return { ...base, reportsRhythm: true, series: addArtefacts(timer, { seed: subSeed(seed, STREAM.artefacts), ...detection }) };
    }
    case "ectopy":
      return {
        ...base,
        series: addEctopy(sleep(), {
          seed: subSeed(seed, STREAM.ectopy),
          pvcRate: 0.02,
          pacRate: 0.01,
          coupletShare: 0.1,
          bigeminyPerHour: 0.3,
          bigeminyDurationS: [60, 600],
        }),
      };
    case "artefacts":
      return { ...base, series: addArtefacts(sleep(), { seed: subSeed(seed, STREAM.artefacts), motionPerHour: 2 }) };
    case "dropouts_clock_drift":
      return {
        ...base,
        series: addDropouts(sleep(), { seed: subSeed(seed, STREAM.dropouts), gapsPerHour: 1 }),
        clockOffsetMs: DRIFT_CLOCK.offsetMs,
        clockDriftPpm: DRIFT_CLOCK.driftPpm,
        resendsPerHour: RESENDS_PER_HOUR,
      };
    case "nicu":
      return { ...base, series: simulateNicu({ seed: subSeed(seed, STREAM.rhythm), durationS }) };
    case "nicu_presepsis": {
      const start = Math.min(u(PRESEPSIS_START_S), durationS / 2);
      return { ...base, series: simulateNicu({ seed: subSeed(seed, STREAM.rhythm), durationS, preSepsisStartS: start }) };
    }
    default: {
      const never: never = scenario;
      throw new RangeError(`unknown scenario "${String(never)}"`);
    }
  }
}

/** One or two AF-like episodes (DOMAIN §6.3): the first 1–4 h into the block, a second after ≥ 1 h of sinus. */
function afEpisodes(seed: number, durationS: number): { startS: number; endS: number }[] {
  const rng = createRng(subSeed(seed, STREAM.episodes));
  // Log-uniform between 20 min and 6 h: short episodes are common, long ones occur.
  const length = () => Math.exp(rng.uniform(Math.log(AF_EPISODE_S[0]), Math.log(AF_EPISODE_S[1])));
  const out: { startS: number; endS: number }[] = [];
  let t = rng.uniform(3600, 4 * 3600);
  for (let i = 0; i < 2; i++) {
    if (i > 0 && rng.next() < 0.5) break;
    const end = Math.min(t + length(), durationS - 600);
    if (end - t < AF_EPISODE_S[0]) break;
    out.push({ startS: t, endS: end });
    t = end + 3600 + rng.uniform(0, 3 * 3600);
  }
  return out;
}

function withAfEpisodes(sinus: SimulatedBeats, episodes: { startS: number; endS: number }[], seed: number): SimulatedBeats {
  const parts: SimulatedBeats[] = [];
  let from = -Infinity;
  episodes.forEach((e, i) => {
    parts.push(sliceSeries(sinus, from, e.startS));
    parts.push(simulateAfLike({ seed: subSeed(seed, STREAM.af + 16 * i), durationS: e.endS - e.startS }));
    from = e.endS;
  });
  parts.push(sliceSeries(sinus, from, Infinity));
  return concatSeries(parts.filter((p) => p.rr.length > 0));
}

/** The beats of `series` whose times lie in (fromS, toS], with their labels; gaps inside the range are kept. */
function sliceSeries(series: SimulatedBeats, fromS: number, toS: number): SimulatedBeats {
  let a = 0;
  while (a < series.times.length && !(series.times[a]! > fromS)) a++;
  let b = a;
  while (b < series.times.length && series.times[b]! <= toS) b++;
  return {
    rr: series.rr.slice(a, b),
    times: series.times.slice(a, b),
    beatType: series.beatType.slice(a, b),
    quality: series.quality.slice(a, b),
    leadOff: series.leadOff.slice(a, b),
    truth: series.truth.slice(a, b),
    rhythm: series.rhythm.slice(a, b),
    gaps: series.gaps.filter((g) => g.startS > fromS && g.endS <= toS).map((g) => ({ ...g })),
    steps: [...series.steps, { generator: "slice", params: { fromS, toS } }],
  };
}
