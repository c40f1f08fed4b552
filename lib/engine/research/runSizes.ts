import { assertSeries } from "../assert";

export interface Runs {
  /** Number of successive differences in each run (k ≥ 1). */
  lengths: Float64Array;
  /** Cumulative |ΔRR| of each run (ms for an RR series): the "size" of the run. */
  sizes: Float64Array;
}

export interface RunSizes {
  /** Runs of consecutive RR increases (decelerations). */
  increases: Runs;
  /** Runs of consecutive RR decreases (accelerations). */
  decreases: Runs;
  /** Successive differences equal to zero: each ends any run and starts none. */
  ties: number;
  /** Runs dropped because the start or the end of the series cut them (their true length is unknown). */
  censored: number;
}

/**
 * Maximal runs of consecutive increases and of consecutive decreases of a series (DOMAIN §2.8; run statistics of
 * heart rate: Guzik et al. 2012), with their lengths and their cumulative absolute change.
 *
 * With Δ_i = x_{i+1} − x_i, an increase run is a maximal block of consecutive Δ > 0, of length k = the number of
 * differences in it and size Σ|Δ| over it (equal to x_end − x_start); decreases likewise with Δ < 0. A zero
 * difference ends the current run. The first and last runs are dropped, since the ends of the series may have cut
 * them. Under independent, identically distributed continuous values the increase-run lengths follow
 * P(k) = 3·[1/(k+1)! − 2/(k+2)! + 1/(k+3)!] with 1/3 increase run per value (DOMAIN §3.1 A11) — factorial, not
 * power-law, decay.
 */
export function runSizes(x: Float64Array): RunSizes {
  assertSeries(x, "x");
  const incL: number[] = [];
  const incS: number[] = [];
  const decL: number[] = [];
  const decS: number[] = [];
  let ties = 0;
  let censored = 0;
  let sign = 0; // direction of the open run: 1 up, −1 down, 0 none
  let len = 0;
  let size = 0;
  let touchesStart = true;
  const close = () => {
    if (sign === 0) return;
    if (touchesStart) censored++;
    else if (sign > 0) {
      incL.push(len);
      incS.push(size);
    } else {
      decL.push(len);
      decS.push(size);
    }
    sign = 0;
    len = 0;
    size = 0;
  };
  for (let i = 0; i + 1 < x.length; i++) {
    const d = x[i + 1]! - x[i]!;
    const s = d > 0 ? 1 : d < 0 ? -1 : 0;
    if (s !== sign) {
      // A run that ended here was preceded by its own start within the series unless it began at index 0.
      close();
      if (i > 0) touchesStart = false;
    }
    if (s === 0) {
      ties++;
      touchesStart = false;
      continue;
    }
    sign = s;
    len++;
    size += Math.abs(d);
  }
  if (sign !== 0) censored++; // the last run may continue past the end
  return {
    increases: { lengths: Float64Array.from(incL), sizes: Float64Array.from(incS) },
    decreases: { lengths: Float64Array.from(decL), sizes: Float64Array.from(decS) },
    ties,
    censored,
  };
}
