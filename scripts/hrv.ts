// npm run hrv -- FILE [--window SECONDS --stride SECONDS] [--m 2 --r 0.2] [--no-clean] [--population neonatal] [--json]
// Every index Corvane computes, for a beat-interval file: one RR interval (ms) per line, or CSV with an `rr_ms`
// column and an optional `time_s` column. A thin wrapper: reading and parsing the file, then lib/engine.
import { readFileSync } from "node:fs";
import { parseArgs } from "node:util";
import { parseBeatFile } from "@/lib/engine/io/parse-beat-file";
import { summariseRecording, WHOLE_KEYS, type WholeKey, type WholeSummary } from "@/lib/engine/summary";
import { computeWindows, type ShortWindow } from "@/lib/engine/windows";
import { SHORT_TERM_KEYS } from "@/lib/engine/indices";
import { ALGORITHM_VERSION } from "@/lib/engine/version";

const USAGE = `usage: npm run hrv -- FILE [options]

  FILE                 one RR interval in ms per line, or CSV with a header naming "rr_ms" (and optionally "time_s");
                       "#" starts a comment
  --window SECONDS     also compute the short-term indices per window of this length
  --stride SECONDS     step between windows (default: the window length)
  --m N                SampEn/ApEn embedding dimension (default 2)
  --r FRACTION         SampEn/ApEn tolerance as a fraction of the SD (default 0.2)
  --no-clean           compute on the intervals exactly as given (no range gate, no ectopy correction)
  --population NAME    adult (default) or neonatal: the range gate's preset
  --json               print one JSON object { "whole": {…}, "windows": […] }
  --help               this text

Decision support only: these indices do not diagnose anything.`;

class UsageError extends Error {}

function positiveNumber(name: string, raw: string | undefined, integer = false): number | undefined {
  if (raw === undefined) return undefined;
  const v = Number(raw);
  if (!Number.isFinite(v) || v <= 0 || (integer && !Number.isInteger(v))) {
    throw new UsageError(`--${name} needs a positive ${integer ? "whole number" : "number"}, got "${raw}"`);
  }
  return v;
}

function parseCommandLine(argv: string[]) {
  let parsed;
  try {
    parsed = parseArgs({
      args: argv,
      allowPositionals: true,
      strict: true,
      options: {
        window: { type: "string" },
        stride: { type: "string" },
        m: { type: "string" },
        r: { type: "string" },
        "no-clean": { type: "boolean" },
        population: { type: "string" },
        json: { type: "boolean" },
        help: { type: "boolean" },
      },
    });
  } catch (err) {
    throw new UsageError((err as Error).message.replace(/\. To specify a positional.*$/s, ""));
  }
  const { values, positionals } = parsed;
  if (values.help) return null;
  if (positionals.length !== 1) throw new UsageError(positionals.length ? "give exactly one FILE" : "no FILE given");
  const population = values.population ?? "adult";
  if (population !== "adult" && population !== "neonatal") throw new UsageError(`--population must be adult or neonatal, got "${population}"`);
  const window = positiveNumber("window", values.window);
  const stride = positiveNumber("stride", values.stride);
  if (stride !== undefined && window === undefined) throw new UsageError("--stride needs --window");
  const m = positiveNumber("m", values.m, true) ?? 2;
  const r = positiveNumber("r", values.r) ?? 0.2;
  if (m > 10) throw new UsageError("--m above 10 is not meaningful for these series");
  if (r > 5) throw new UsageError("--r is a fraction of the SD (e.g. 0.2), got a value above 5");
  return { file: positionals[0]!, window, stride: stride ?? window, m, r, clean: !values["no-clean"], population, json: Boolean(values.json) } as const;
}

const UNITS: Partial<Record<WholeKey, string>> = {
  mean_nn: "ms", hr: "bpm", sdnn: "ms", rmssd: "ms", sdsd: "ms", pnn50: "%", sd1: "ms", sd2: "ms",
  lf: "ms²", hf: "ms²", vlf: "ms²", lyapunov: "per beat",
};
const LABELS: Record<WholeKey, string> = {
  n_beats: "NN intervals used", mean_nn: "mean NN", hr: "heart rate (60000 / mean NN)", sdnn: "SDNN", rmssd: "RMSSD",
  sdsd: "SDSD", nn50: "NN50", pnn50: "pNN50 (of N−1 differences)", sd1: "Poincaré SD1", sd2: "Poincaré SD2",
  sampen: "SampEn", apen: "ApEn", mse: "MSE τ = 1…20", mse_ci: "MSE complexity index", dfa_alpha1: "DFA α1 (n 4–16)",
  dfa_alpha2: "DFA α2 (n 16–64)", lf: "LF power (Lomb–Scargle)", hf: "HF power (Lomb–Scargle)", lf_hf: "LF/HF",
  vlf: "VLF power (Lomb–Scargle)", beta: "spectral slope β", mfdfa_width: "MF-DFA width Δh",
  d2: "correlation dimension D2 (research)", lyapunov: "largest Lyapunov exponent (research)",
  power_law_alpha: "power-law exponent of run sizes (research)",
};

const fmt = (v: number) => (Number.isInteger(v) ? String(v) : Math.abs(v) >= 100 ? v.toFixed(1) : v.toPrecision(4));
const pct = (v: number | null) => (v === null ? "n/a" : `${(100 * v).toFixed(1)} %`);

function printWhole(file: string, w: WholeSummary, m: number, r: number) {
  const q = w.quality;
  const c = q.cleaning;
  console.log(`Corvane ${ALGORITHM_VERSION} — ${file}`);
  console.log(`Decision support only: these indices do not diagnose anything.\n`);
  if (c) {
    console.log(q.cleaned
      ? `Cleaning: ${c.input} intervals read, ${c.output} NN kept; ${c.edited} edited (${pct(c.shareEdited)}), ` +
        `${Object.entries(c.byLabel).filter(([k, n]) => k !== "normal" && n > 0).map(([k, n]) => `${n} ${k.replace("_", " ")}`).join(", ") || "no abnormal beats"}`
      : `Cleaning: off (--no-clean): ${c.input} intervals used as given`);
  }
  console.log(`Quality: ${q.grade} — coverage ${pct(q.coverage)}, edited ${pct(q.shareEdited)}, ectopic ${pct(q.shareEctopic)}, longest gap ${q.longestGapS.toFixed(1)} s` +
    (q.reasons.length ? ` (${q.reasons.join("; ")})` : ""));
  console.log(`SampEn/ApEn with m = ${m}, r = ${r} × SD (matches at distance ≤ r)\n`);
  const width = Math.max(...WHOLE_KEYS.map((k) => LABELS[k].length));
  for (const key of WHOLE_KEYS) {
    const v = w[key];
    let text: string;
    if (key === "mse") text = v === null ? "—" : (v as (number | null)[]).map((x) => (x === null ? "·" : x.toFixed(2))).join(" ");
    else text = v === null ? "—" : `${fmt(v as number)}${UNITS[key] ? ` ${UNITS[key]}` : ""}`;
    const why = w.reasons[key];
    console.log(`  ${LABELS[key].padEnd(width)}  ${text}${why ? `   (${why})` : ""}`);
  }
}

function windowJson(w: ShortWindow) {
  return {
    start_s: w.startS,
    end_s: w.endS,
    quality: w.quality,
    ...Object.fromEntries(SHORT_TERM_KEYS.map((k) => [k, w.values ? w.values[k] : null])),
    reasons: w.values ? w.reasons : { all: `window unusable: ${w.quality.reasons.join("; ")}` },
  };
}

function printWindows(windows: ShortWindow[]) {
  const cols = ["mean_nn", "sdnn", "rmssd", "pnn50", "sampen", "dfa_alpha1", "lf", "hf"] as const;
  console.log(`\nWindows (${windows.length}):`);
  console.log(`  ${"start s".padStart(9)} ${"end s".padStart(9)}  ${"quality".padEnd(8)} ${cols.map((c) => c.padStart(10)).join(" ")}`);
  for (const w of windows) {
    const cells = cols.map((c) => {
      const v = w.values?.[c];
      return (v === null || v === undefined ? "—" : fmt(v)).padStart(10);
    });
    console.log(`  ${w.startS.toFixed(1).padStart(9)} ${w.endS.toFixed(1).padStart(9)}  ${w.quality.grade.padEnd(8)} ${cells.join(" ")}`);
  }
}

function main(): number {
  let args;
  try {
    args = parseCommandLine(process.argv.slice(2));
  } catch (err) {
    if (err instanceof UsageError) {
      console.error(`hrv: ${err.message}\n\n${USAGE}`);
      return 2;
    }
    throw err;
  }
  if (!args) {
    console.log(USAGE);
    return 0;
  }
  let text: string;
  try {
    text = readFileSync(args.file, "utf8");
  } catch (err) {
    console.error(`hrv: cannot read ${args.file}: ${(err as NodeJS.ErrnoException).code ?? (err as Error).message}`);
    return 1;
  }
  const parsed = parseBeatFile(text);
  if (!parsed.ok) {
    console.error(`hrv: ${args.file}${parsed.line === null ? "" : `:${parsed.line}`}: ${parsed.message}`);
    return 1;
  }
  const series = { rr: parsed.rr, times: parsed.times };
  const { whole } = summariseRecording(series, { m: args.m, r: args.r, clean: args.clean, population: args.population });
  const windows = args.window
    ? computeWindows(series, {
        shortWindowS: args.window,
        shortStrideS: args.stride!,
        clean: args.clean,
        population: args.population,
        includeLong: false,
        entropy: { m: args.m, r: args.r },
      }).short
    : [];
  if (args.json) {
    console.log(JSON.stringify({ whole, windows: windows.map(windowJson) }));
  } else {
    printWhole(args.file, whole, args.m, args.r);
    if (args.window) printWindows(windows);
  }
  return 0;
}

process.exitCode = main();
