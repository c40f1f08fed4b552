// npm run bench:engine — one synthetic 8-h night through every stage of the engine, with wall time and memory per
// stage. Goal: the whole night under 1 s on this 2-core machine (issue 3). The night is invented (DOMAIN §6
// recipe: healthy sleep with 2 % PVCs and the §6.6 artefacts); nothing here is patient data.
import { spectralSlope } from "@/lib/engine/frequency/spectral-slope";
import { researchMeasures } from "@/lib/engine/research/researchMeasures";
import { addArtefacts, addEctopy, simulateHealthySleep } from "@/lib/engine/simulate";
import { ALGORITHM_VERSION } from "@/lib/engine/version";
import { cleanForWindows, windowsFromCleaned } from "@/lib/engine/windows";

const RUNS = Number(process.env.BENCH_RUNS ?? 5);

interface Stage {
  name: string;
  run: () => unknown;
}

function night() {
  // μ0 = 800 ms gives about 34,000 beats in 8 h.
  const base = simulateHealthySleep({ seed: 2026, durationS: 8 * 3600, mu0: 800 });
  return addArtefacts(addEctopy(base, { seed: 2027, pvcRate: 0.02 }), { seed: 2028 });
}

const mib = (bytes: number) => `${(bytes / 2 ** 20).toFixed(0)} MiB`;
const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)]!;

function main() {
  const t0 = performance.now();
  const sim = night();
  const genMs = performance.now() - t0;
  const series = { rr: sim.rr, times: sim.times, quality: sim.quality, leadOff: sim.leadOff };
  const nightS = sim.times[sim.times.length - 1]!;
  let cleaned = cleanForWindows(series, "adult", true);
  const nn = cleaned.interpolated.value!.nn;
  const oneHour = (() => {
    const t = cleaned.interpolated.value!.times;
    let k = 0;
    while (k < t.length && t[k]! - t[0]! < 3600) k++;
    return nn.slice(0, k);
  })();

  const stages: Stage[] = [
    { name: "cleaning (interpolate + delete modes)", run: () => (cleaned = cleanForWindows(series, "adult", true)) },
    { name: "short-term indices, 5-min windows every 1 min", run: () => windowsFromCleaned(series, cleaned, { includeLong: false }) },
    { name: "hourly MSE, DFA α2, MF-DFA, ApEn", run: () => windowsFromCleaned(series, cleaned, { includeShort: false }) },
    { name: "whole-night spectral slope β", run: () => spectralSlope(cleaned.deleted.value!.nn, cleaned.deleted.value!.times) },
    { name: `research measures on one hour (${oneHour.length} beats)`, run: () => researchMeasures(oneHour) },
  ];

  console.log(`Corvane engine ${ALGORITHM_VERSION} benchmark — Node ${process.version}, ${RUNS} runs per stage (first run = cold)`);
  console.log(`Synthetic night: ${sim.rr.length} beats over ${(nightS / 3600).toFixed(2)} h, generated in ${genMs.toFixed(0)} ms\n`);
  const header = `${"stage".padEnd(52)} ${"cold ms".padStart(8)} ${"median ms".padStart(10)} ${"heap after".padStart(11)} ${"peak RSS".padStart(9)}`;
  console.log(header);
  let totalCold = 0;
  let totalMedian = 0;
  for (const stage of stages) {
    const times: number[] = [];
    let result: unknown;
    for (let i = 0; i < RUNS; i++) {
      const a = performance.now();
      result = stage.run();
      times.push(performance.now() - a);
    }
    const detail = result && typeof result === "object" && "short" in result
      ? ` [${(result as unknown as { short: unknown[]; long: unknown[] }).short.length || (result as unknown as { long: unknown[] }).long.length} windows]`
      : "";
    const heap = process.memoryUsage().heapUsed;
    const peak = process.resourceUsage().maxRSS * 1024;
    totalCold += times[0]!;
    totalMedian += median(times.slice(1).length ? times.slice(1) : times);
    console.log(`${(stage.name + detail).padEnd(52)} ${times[0]!.toFixed(0).padStart(8)} ${median(times.slice(1).length ? times.slice(1) : times).toFixed(0).padStart(10)} ${mib(heap).padStart(11)} ${mib(peak).padStart(9)}`);
  }
  console.log(`${"whole night".padEnd(52)} ${totalCold.toFixed(0).padStart(8)} ${totalMedian.toFixed(0).padStart(10)}`);
  console.log(`\nGoal: whole night under 1000 ms — ${totalMedian < 1000 ? "met" : "NOT met"} (median of warm runs).`);
}

main();
