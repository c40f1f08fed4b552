// Joins rhythm episodes into one recording (e.g. sinus → AF-like 20 min … 6 h → sinus, DOMAIN §6.3).
import type { SimulatedBeats } from "./types";

/**
 * Concatenates series in time: each part is moved so that its first interval starts where the previous part's last
 * beat is (a part's own start is times[0] − rr[0]/1000). Intervals, labels and quality are kept; gaps move with
 * their part. The steps of all parts are kept in order, each part's followed by a "concat" marker.
 */
export function concatSeries(parts: readonly SimulatedBeats[]): SimulatedBeats {
  if (parts.length === 0) throw new RangeError("concatSeries needs at least one part");
  const n = parts.reduce((s, p) => s + p.rr.length, 0);
  const rr = new Float64Array(n);
  const times = new Float64Array(n);
  const quality = new Float64Array(n);
  const leadOff = new Uint8Array(n);
  const out: SimulatedBeats = { rr, times, quality, leadOff, beatType: [], truth: [], rhythm: [], gaps: [], steps: [] };
  let k = 0;
  let end: number | null = null;
  parts.forEach((p, i) => {
    const m = p.rr.length;
    const start = m > 0 ? p.times[0]! - p.rr[0]! / 1000 : 0;
    const offset = end === null ? 0 : end - start;
    rr.set(p.rr, k);
    quality.set(p.quality, k);
    leadOff.set(p.leadOff, k);
    for (let j = 0; j < m; j++) times[k + j] = p.times[j]! + offset;
    // Element by element: spreading a night's worth of beats into push() would overflow the argument limit.
    for (let j = 0; j < m; j++) {
      out.beatType.push(p.beatType[j]!);
      out.truth.push(p.truth[j]!);
      out.rhythm.push(p.rhythm[j]!);
    }
    out.gaps.push(...p.gaps.map((g) => ({ ...g, startS: g.startS + offset, endS: g.endS + offset })));
    out.steps.push(...p.steps, { generator: "concat", params: { part: i, offsetS: offset } });
    k += m;
    if (m > 0) end = times[k - 1]!;
  });
  return out;
}
