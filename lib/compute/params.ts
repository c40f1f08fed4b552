// The parameters behind every stored window, as one canonical document per population and engine version. The
// per-window values the engine reports beside its parameters (SampEn's r in ms, the beat count, the MF-DFA scales
// that follow from it) depend on the data, so they are left out: with the engine version, this document and the
// beats, any stored value can be recomputed. Its SHA-256 is `params_hash` in index_windows.
import { createHash } from "node:crypto";
import canonicalize from "canonicalize";
import type { Knex } from "knex";
import { CLEAN_DEFAULTS } from "@/lib/engine/clean/clean-beats";
import { DEVICE_QUALITY_POOR_BELOW } from "@/lib/engine/clean/labels";
import { RANGE_GATE_PRESETS, type Population } from "@/lib/engine/clean/range-gate";
import { QUALITY_THRESHOLDS } from "@/lib/engine/clean/window-quality";
import { APEN_DEFAULTS } from "@/lib/engine/entropy/apen";
import { MSE_DEFAULTS } from "@/lib/engine/entropy/mse";
import { SAMPEN_DEFAULTS } from "@/lib/engine/entropy/sampen";
import { DFA_DEFAULTS } from "@/lib/engine/fractal/dfa";
import { MFDFA_DEFAULTS } from "@/lib/engine/fractal/mfdfa";
import { LOMB_SCARGLE_DEFAULTS } from "@/lib/engine/frequency/lomb-scargle";
import { LONG_WINDOW_CI_SCALES, SHORT_WINDOW_LOMB_SCARGLE } from "@/lib/engine/indices";
import { POINCARE_DEFAULTS } from "@/lib/engine/poincare/poincare";
import { NN50_DEFAULTS } from "@/lib/engine/time-domain/nn50";
import { PNN50_DEFAULTS } from "@/lib/engine/time-domain/pnn50";
import { SDNN_DEFAULTS } from "@/lib/engine/time-domain/sdnn";
import { SDSD_DEFAULTS } from "@/lib/engine/time-domain/sdsd";
import { ALGORITHM_VERSION } from "@/lib/engine/version";
import { WINDOW_DEFAULTS } from "@/lib/engine/windows";

export interface ComputationParams {
  params: Record<string, unknown>;
  hash: string;
}

/** The document and its hash for one population (the neonatal range gate differs). */
export function computationParams(population: Population): ComputationParams {
  const params = {
    algorithmVersion: ALGORITHM_VERSION,
    population,
    grid: {
      short: { windowS: WINDOW_DEFAULTS.shortWindowS, strideS: WINDOW_DEFAULTS.shortStrideS, alignedTo: "whole UTC minutes" },
      long: { windowS: WINDOW_DEFAULTS.longWindowS, strideS: WINDOW_DEFAULTS.longStrideS, alignedTo: "whole UTC hours" },
      beatTime: "beat_at (device time corrected to the server clock)",
    },
    cleaning: {
      ...CLEAN_DEFAULTS,
      population,
      rangeGate: RANGE_GATE_PRESETS[population],
      deviceQualityPoorBelow: DEVICE_QUALITY_POOR_BELOW,
      spectralInput: "abnormal beats deleted (Lomb–Scargle); interpolated for every other index",
    },
    quality: QUALITY_THRESHOLDS,
    methods: {
      sdnn: SDNN_DEFAULTS,
      sdsd: SDSD_DEFAULTS,
      nn50: NN50_DEFAULTS,
      pnn50: PNN50_DEFAULTS,
      poincare: POINCARE_DEFAULTS,
      sampen: SAMPEN_DEFAULTS,
      dfa: DFA_DEFAULTS,
      lombScargle: { ...LOMB_SCARGLE_DEFAULTS, ...SHORT_WINDOW_LOMB_SCARGLE },
      mse: { ...MSE_DEFAULTS, complexityIndexScales: LONG_WINDOW_CI_SCALES },
      mfdfa: MFDFA_DEFAULTS,
      apen: APEN_DEFAULTS,
    },
  };
  const text = canonicalize(params);
  if (text === undefined) throw new TypeError("computation parameters cannot be canonicalised");
  return { params: JSON.parse(text) as Record<string, unknown>, hash: createHash("sha256").update(text).digest("hex") };
}

/** Records the document under its hash (once; later runs find it there). */
export async function storeComputationParams(db: Knex | Knex.Transaction, p: ComputationParams): Promise<void> {
  await db("computation_params")
    .insert({ params_hash: p.hash, algorithm_version: ALGORITHM_VERSION, params: JSON.stringify(p.params) })
    .onConflict("params_hash")
    .ignore();
}
