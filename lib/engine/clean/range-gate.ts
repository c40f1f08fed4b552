// Physiological range gate (DOMAIN §2.1).
import { assertSeries } from "../assert";
import { measured, type Measured } from "../result";

/**
 * Plausible RR intervals, ms, bounds inclusive. Adult 300–2000 ms (200–30 bpm), common practice (DOMAIN §2.1).
 * Neonatal 250–1500 ms (240–40 bpm): DOMAIN §2.1 suggests about 250–1000 ms (cp), but a gate must only remove what
 * cannot be a beat, and the bradycardic decelerations that precede late-onset sepsis (DOMAIN §1, §6.8: RR up to
 * +150 % of about 420 ms) reach past 1000 ms; 40 bpm is our bound for the deepest neonatal bradycardia (mem).
 */
export const RANGE_GATE_PRESETS = {
  adult: { minMs: 300, maxMs: 2000 },
  neonatal: { minMs: 250, maxMs: 1500 },
} as const;

export type Population = keyof typeof RANGE_GATE_PRESETS;

export const RANGE_GATE_DEFAULTS = { population: "adult" as Population };

export interface RangeGateOptions {
  population?: Population;
  /** Override the preset's bounds, ms. */
  minMs?: number;
  maxMs?: number;
}

export interface RangeGateResult {
  /** 1 where minMs ≤ RR ≤ maxMs, else 0. */
  inRange: Uint8Array;
  outOfRange: number;
}

/** Marks intervals outside [minMs, maxMs] (inclusive bounds). Always defined; an empty series gives empty marks. */
export function rangeGate(rr: Float64Array, options: RangeGateOptions = {}): Measured<RangeGateResult> {
  assertSeries(rr, "rr");
  const population = options.population ?? RANGE_GATE_DEFAULTS.population;
  const preset = RANGE_GATE_PRESETS[population];
  if (!preset) throw new RangeError(`population must be one of ${Object.keys(RANGE_GATE_PRESETS).join(", ")}`);
  const minMs = options.minMs ?? preset.minMs;
  const maxMs = options.maxMs ?? preset.maxMs;
  if (!(Number.isFinite(minMs) && Number.isFinite(maxMs) && 0 <= minMs && minMs < maxMs)) {
    throw new RangeError(`range gate needs 0 ≤ minMs < maxMs, got ${minMs}, ${maxMs}`);
  }
  const inRange = new Uint8Array(rr.length);
  let out = 0;
  for (let i = 0; i < rr.length; i++) {
    const ok = rr[i]! >= minMs && rr[i]! <= maxMs;
    inRange[i] = ok ? 1 : 0;
    if (!ok) out++;
  }
  return measured("range-gate", { population, minMs, maxMs }, { inRange, outOfRange: out });
}
