// One simulated bedside device: its seed, its clock, and the records it sends (lib/streaming/protocol.ts).
// prepareNight is pure — (device, night block) in, the block's records in sending order out — so a device restarted
// on the same day sends the same records with the same seqs. SimulatedDevice walks through the prepared records as
// simulated time passes and keeps what it sent in a RecordStore for readers that resume.
import { createHash } from "node:crypto";
import { createRng } from "@/lib/engine/random";
import { quantiseBeats, type RhythmLabel } from "@/lib/engine/simulate";
import { subSeed } from "@/lib/engine/simulate/types";
import { BEAT_TYPES } from "@/lib/streaming/protocol";
import type { DemoScenario } from "@/seeds/demo-data";
import { deviceClock } from "./clock";
import { nextNightBlock, nightBlockAt, type NightBlock, type NightTimes } from "./night";
import type { SeqLedger } from "./seq-ledger";
import { FAULT, NO_LABEL, packFlags, RecordStore, RHYTHMS, STATUS, TRUTH_LABELS } from "./records";
import { DRIFT_CLOCK, planNight, RESEND_COUNT } from "./scenarios";

export interface SimulatedDeviceConfig {
  serial: string;
  /** The bearer token a reader must present. */
  token: string;
  scenario: DemoScenario;
  /** The unit's IANA zone: nights run from 19:00 to 19:00 local. */
  timeZone: string;
  /** Resolution of the device's timestamps, ms (1, 1000/128, 1000/1024, …). */
  resolutionMs: number;
  /**
   * When a patient is on the device's bed (true time, epoch ms; `toMs` null while the stay is open). Outside these
   * spans the device has no one connected: it sends no beats, only a lead-off status every 30 s, as a monitor with
   * no leads attached does, and a lead-on status when a patient is connected. Omitted: a patient all the time (the
   * one-device mode and the tests).
   */
  occupied?: readonly Occupancy[];
  /** The unit's review night: a backfill then starts on the evening of the last night that has ended (night.ts). */
  night?: NightTimes;
}

/** A span during which a patient is on the device's bed: [fromMs, toMs), epoch ms, toMs null = still there. */
export interface Occupancy {
  fromMs: number;
  toMs: number | null;
}

/** A device's seed: the first 32 bits of SHA-256 of its serial. */
function deviceSeed(serial: string): number {
  return createHash("sha256").update(serial, "utf8").digest().readUInt32BE(0);
}

const OP_BEAT = 0;
const OP_STATUS = 1;
const OP_RESEND = 2;
/** While the leads are off the device repeats its lead-off status this often (our choice, cp). */
const LEAD_OFF_REPEAT_MS = 30_000;
/** Smallest and largest timestamp resolution accepted, ms: beat intervals are kept as 16-bit tick counts. */
const RESOLUTION_RANGE_MS = [0.2, 100] as const;
const MAX_RR_MS = 10_000;
const RESEND_STREAM = 201;
/** Fewest sent records worth copying the rest of a night to free them. */
const COMPACT_MIN = 16_384;

/** The records of one night block, in the order the device sends them. */
export interface PreparedNight {
  block: NightBlock;
  length: number;
  /** OP_BEAT, OP_STATUS or OP_RESEND (re-send the last `quality` records). */
  op: Uint8Array;
  /** True time, whole ms since block.startMs: when the record is sent. */
  tRelMs: Uint32Array;
  /** Device time = deviceOrigin + tDeviceTicks × resolution (device clock, on its grid). */
  deviceOrigin: number;
  tDeviceTicks: Int32Array;
  rrTicks: Uint16Array;
  quality: Uint8Array;
  flags: Uint8Array;
  label: Uint8Array;
  faults: Uint8Array;
}

const RHYTHM_CODE: Record<RhythmLabel, number> = {
  sinus: RHYTHMS.indexOf("sinus"),
  af: RHYTHMS.indexOf("af"),
  paced: RHYTHMS.indexOf("paced"),
  // The protocol has no flutter label; the scenarios here do not make flutter.
  flutter: RHYTHMS.indexOf("unknown"),
};

function assertDeviceConfig(c: SimulatedDeviceConfig): void {
  if (!c.serial) throw new RangeError("a device needs a serial");
  if (!c.token) throw new RangeError(`device ${c.serial}: empty stream token`);
  if (!(c.resolutionMs >= RESOLUTION_RANGE_MS[0] && c.resolutionMs <= RESOLUTION_RANGE_MS[1])) {
    throw new RangeError(`device ${c.serial}: timestamp resolution must be ${RESOLUTION_RANGE_MS[0]}–${RESOLUTION_RANGE_MS[1]} ms, got ${c.resolutionMs}`);
  }
}

/** Where a block has no patient on the bed, as [from, to) ms since the block's start, ascending; [] when a patient
 *  is there throughout (and always without an occupancy list). */
export function emptySpans(occupied: readonly Occupancy[] | undefined, block: NightBlock): [number, number][] {
  if (!occupied) return [];
  const length = block.endMs - block.startMs;
  const spans = occupied
    .map((o): [number, number] => [Math.max(0, o.fromMs - block.startMs), Math.min(length, (o.toMs ?? Infinity) - block.startMs)])
    .filter(([a, b]) => b > a)
    .sort((x, y) => x[0] - y[0]);
  const out: [number, number][] = [];
  let t = 0;
  for (const [a, b] of spans) {
    if (a > t) out.push([t, a]);
    t = Math.max(t, b);
  }
  if (t < length) out.push([t, length]);
  return out;
}

/**
 * The records device `config` sends over `block`: the scenario's beats (lib/simulator/scenarios.ts), moved onto the
 * device clock (offset, drift and the nightly correction step) and quantised to its resolution with the engine's
 * quantiseBeats; status records for lead-off (at its start, every 30 s while it lasts, and when it ends) and, on
 * devices with a rhythm detector, at each rhythm change; network resends. A beat whose quantised interval is 0 (two
 * detections inside one clock tick, possible only at the end of a motion burst) is not sent: the next interval
 * already spans it. While no patient is on the bed (`config.occupied`) nothing of that is sent: a lead-off status
 * every 30 s instead, and a lead-on status when a patient is connected.
 */
export function prepareNight(config: SimulatedDeviceConfig, block: NightBlock): PreparedNight {
  assertDeviceConfig(config);
  const res = config.resolutionMs;
  const durationS = (block.endMs - block.startMs) / 1000;
  const seed = subSeed(deviceSeed(config.serial), block.dayNumber);
  const origin = Math.floor(block.startMs / res) * res;
  const lead = block.startMs - origin;
  const empty = emptySpans(config.occupied, block);
  const noPatient = empty.length === 1 && empty[0]![0] === 0 && empty[0]![1] === durationS * 1000;
  // A block with no patient at all needs only the device's clock, which does not depend on the length planned, so
  // a minute is planned instead of a whole night of beats that would not be sent.
  const plan = planNight(config.scenario, seed, noPatient ? Math.min(60, durationS) : durationS, { resolutionMs: res, blockStartPhaseMs: lead });
  const clock = deviceClock(
    {
      offsetMs: plan.clockOffsetMs,
      driftPpm: plan.clockDriftPpm,
      correctionLocal: plan.clockDriftPpm !== 0 ? DRIFT_CLOCK.correctionLocal : null,
      timeZone: config.timeZone,
    },
    block.startMs,
    block.endMs,
  );
  const s = plan.series;
  const n = s.rr.length;

  // Device clock seconds since `origin`: the beat's true time plus the clock's offset at that moment. The device
  // times its intervals on its own clock, so they stretch with the drift; a correction step breaks contiguity and
  // quantiseBeats then rounds that one interval on its own, as a device does (its intervals ignore clock steps).
  const rate = 1 + plan.clockDriftPpm * 1e-6;
  const devTimes = new Float64Array(n);
  const devRr = new Float64Array(n);
  for (let k = 0; k < n; k++) {
    const rel = s.times[k]! * 1000;
    devTimes[k] = (lead + rel + clock.offsetAt(block.startMs + rel)) / 1000;
    devRr[k] = s.rr[k]! * rate;
  }
  const q = quantiseBeats({ ...s, times: devTimes, rr: devRr }, res);

  // Everything other than beats, in true time (ms since block start); sorted and merged below.
  const extras: { t: number; op: number; leadOff: boolean; rhythm: number; count: number }[] = [];
  for (const g of s.gaps) {
    if (g.kind !== "lead_off") continue;
    for (let t = g.startS * 1000; t < g.endS * 1000; t += LEAD_OFF_REPEAT_MS) extras.push({ t, op: OP_STATUS, leadOff: true, rhythm: 0, count: 0 });
    extras.push({ t: g.endS * 1000, op: OP_STATUS, leadOff: false, rhythm: 0, count: 0 });
  }
  if (plan.reportsRhythm && n > 0) {
    extras.push({ t: s.times[0]! * 1000 - s.rr[0]!, op: OP_STATUS, leadOff: false, rhythm: RHYTHM_CODE[s.rhythm[0]!], count: 0 });
    for (let k = 1; k < n; k++) {
      if (s.rhythm[k] !== s.rhythm[k - 1]) {
        // The new rhythm's first interval starts at the previous beat: say so just after it.
        extras.push({ t: s.times[k - 1]! * 1000 + 1, op: OP_STATUS, leadOff: false, rhythm: RHYTHM_CODE[s.rhythm[k]!], count: 0 });
      }
    }
  }
  if (plan.resendsPerHour > 0) {
    const rng = createRng(subSeed(seed, RESEND_STREAM));
    const rate = plan.resendsPerHour / 3_600_000;
    for (let t = -Math.log(1 - rng.next()) / rate; t < durationS * 1000; t += -Math.log(1 - rng.next()) / rate) {
      extras.push({ t, op: OP_RESEND, leadOff: false, rhythm: 0, count: RESEND_COUNT[0] + rng.int(RESEND_COUNT[1] - RESEND_COUNT[0] + 1) });
    }
  }
  // No patient on the bed: none of the above, a lead-off status every 30 s instead, and a lead-on status (with the
  // rhythm, on a device that reports it) when a patient is connected.
  const isEmptyAt = (t: number) => empty.some(([a, b]) => t >= a && t < b);
  if (empty.length) {
    const kept = extras.filter((x) => !isEmptyAt(x.t));
    extras.length = 0;
    extras.push(...kept);
    let k = 0;
    for (const [a, b] of empty) {
      for (let t = a; t < b; t += LEAD_OFF_REPEAT_MS) extras.push({ t, op: OP_STATUS, leadOff: true, rhythm: 0, count: 0 });
      if (b >= durationS * 1000) continue;
      while (k < n && s.times[k]! * 1000 < b) k++;
      const rhythm = plan.reportsRhythm && k < n ? RHYTHM_CODE[s.rhythm[k]!] : 0;
      extras.push({ t: b, op: OP_STATUS, leadOff: false, rhythm, count: 0 });
    }
  }
  extras.sort((a, b) => a.t - b.t);

  // First beat after each gap.
  const afterGap = new Map<number, number>();
  {
    let k = 0;
    for (const g of [...s.gaps].sort((a, b) => a.startS - b.startS)) {
      while (k < n && s.times[k]! <= g.endS) k++;
      if (k < n) afterGap.set(k, g.kind === "dropout" ? FAULT.afterDropout : FAULT.afterLeadOff);
    }
  }

  const cap = n + extras.length;
  const out: PreparedNight = {
    block,
    length: 0,
    op: new Uint8Array(cap),
    tRelMs: new Uint32Array(cap),
    deviceOrigin: origin,
    tDeviceTicks: new Int32Array(cap),
    rrTicks: new Uint16Array(cap),
    quality: new Uint8Array(cap),
    flags: new Uint8Array(cap),
    label: new Uint8Array(cap),
    faults: new Uint8Array(cap),
  };
  const corrections = clock.corrections.map((c) => c - block.startMs);
  let nextCorrection = 0;
  const put = (t: number, op: number, ticks: number, rrTicks: number, quality: number, flags: number, label: number, faults: number) => {
    const i = out.length++;
    let f = faults;
    if (op !== OP_RESEND && nextCorrection < corrections.length && t >= corrections[nextCorrection]!) {
      f |= FAULT.clockStep;
      while (nextCorrection < corrections.length && t >= corrections[nextCorrection]!) nextCorrection++;
    }
    out.op[i] = op;
    out.tRelMs[i] = Math.max(0, Math.floor(t));
    out.tDeviceTicks[i] = ticks;
    out.rrTicks[i] = rrTicks;
    out.quality[i] = quality;
    out.flags[i] = flags;
    out.label[i] = label;
    out.faults[i] = f;
  };
  const deviceTicks = (t: number) => Math.round((lead + t + clock.offsetAt(block.startMs + t)) / res);
  let e = 0;
  /** The empty span at or after the current beat, and whether the beat follows one. */
  let span = 0;
  let afterEmpty = false;
  for (let k = 0; k < n; k++) {
    const t = s.times[k]! * 1000;
    while (e < extras.length && extras[e]!.t <= t) {
      const x = extras[e++]!;
      if (x.op === OP_RESEND) put(x.t, OP_RESEND, 0, 0, x.count, 0, NO_LABEL, 0);
      else put(x.t, OP_STATUS, deviceTicks(x.t), 0, 0, packFlags(STATUS, x.leadOff, x.rhythm), NO_LABEL, 0);
    }
    if (empty.length) {
      while (span < empty.length && empty[span]![1] <= t) span++;
      if (span < empty.length && t >= empty[span]![0]) {
        afterEmpty = true;
        continue;
      }
    }
    const rrTicks = Math.round(q.rr[k]! / res);
    if (rrTicks <= 0) continue;
    if (rrTicks * res > MAX_RR_MS) throw new RangeError(`device ${config.serial}: generated interval ${rrTicks * res} ms exceeds ${MAX_RR_MS} ms`);
    const type = BEAT_TYPES.indexOf(q.beatType[k]!);
    put(
      t,
      OP_BEAT,
      Math.round((q.times[k]! * 1000) / res),
      rrTicks,
      Math.floor(q.quality[k]! * 100),
      packFlags(type, q.leadOff[k] === 1, 0),
      TRUTH_LABELS.indexOf(q.truth[k]!),
      afterGap.get(k) ?? (afterEmpty ? FAULT.afterLeadOff : 0),
    );
    afterEmpty = false;
  }
  for (; e < extras.length; e++) {
    const x = extras[e]!;
    if (x.t > durationS * 1000) break;
    if (x.op === OP_RESEND) put(x.t, OP_RESEND, 0, 0, x.count, 0, NO_LABEL, 0);
    else put(x.t, OP_STATUS, deviceTicks(x.t), 0, 0, packFlags(STATUS, x.leadOff, x.rhythm), NO_LABEL, 0);
  }
  return out;
}

/**
 * A device sending its records as simulated time passes. `begin(fromMs)` places it at true time fromMs (the start
 * of a backfill, or now); `advanceTo(t)` sends every record up to t, preparing the next night when the current one
 * ends; `prepareAhead` lets a caller prepare the next night early, at a moment of its choosing.
 */
export class SimulatedDevice {
  readonly store: RecordStore;
  private current: PreparedNight | null = null;
  private upcoming: PreparedNight | null = null;
  private cursor = 0;

  constructor(
    readonly config: SimulatedDeviceConfig,
    keepTruth: boolean,
    /** Where this device's numbering stands across restarts; without one it counts from 1. */
    private readonly ledger: SeqLedger | null = null,
  ) {
    assertDeviceConfig(config);
    this.store = new RecordStore(config.resolutionMs, keepTruth);
  }

  /** Starts at true time `fromMs`: the first record sent is the first one at or after it. */
  begin(fromMs: number): void {
    if (this.current) throw new Error(`device ${this.config.serial} has already begun`);
    this.current = prepareNight(this.config, nightBlockAt(fromMs, this.config.timeZone));
    const rel = fromMs - this.current.block.startMs;
    let skipped = 0;
    while (this.cursor < this.current.length && this.current.tRelMs[this.cursor]! < rel) {
      if (this.current.op[this.cursor] !== OP_RESEND) skipped++;
      this.cursor++;
    }
    if (this.ledger) {
      // The block's records carry the seqs they had when this device last sent them, and a new block follows on.
      const { serial } = this.config;
      const evening = this.current.block.evening;
      const known = this.ledger.firstSeqOf(serial, evening);
      // Numbered by an older simulator: the record at fromMs takes the next free seq, so the numbering goes on
      // without a hole (the block's earlier records are never sent with the seqs this implies).
      const first = known ?? (this.ledger.sentUnderOlderRecipe?.(serial) ? Math.max(1, this.ledger.nextFree(serial) - skipped) : this.ledger.nextFree(serial));
      this.ledger.noteBlock(serial, evening, first);
      this.store.startAt(first + skipped);
    }
  }

  /** Sends every record with true time ≤ t; returns how many were sent. */
  advanceTo(t: number): number {
    let c = this.current;
    if (!c) throw new Error(`device ${this.config.serial} has not begun`);
    const before = this.store.lastSeq;
    for (;;) {
      const rel = t - c.block.startMs;
      while (this.cursor < c.length && c.tRelMs[this.cursor]! <= rel) this.send(c, this.cursor++);
      if (this.cursor < c.length || t < c.block.endMs) break;
      c = this.current = this.upcoming ?? prepareNight(this.config, nextNightBlock(c.block, this.config.timeZone));
      this.upcoming = null;
      this.cursor = 0;
      this.ledger?.noteBlock(this.config.serial, c.block.evening, this.store.lastSeq + 1);
    }
    this.dropSent();
    return this.store.lastSeq - before;
  }

  /** Frees the records of the current night already sent (the store has them), once they are a quarter of it:
   *  a backfill sends most of a night at once, and live sending walks through the rest over a day. */
  private dropSent(): void {
    const c = this.current!;
    if (this.cursor < COMPACT_MIN || this.cursor < c.length / 4) return;
    const from = this.cursor;
    this.current = {
      block: c.block,
      length: c.length - from,
      op: c.op.slice(from),
      tRelMs: c.tRelMs.slice(from),
      deviceOrigin: c.deviceOrigin,
      tDeviceTicks: c.tDeviceTicks.slice(from),
      rrTicks: c.rrTicks.slice(from),
      quality: c.quality.slice(from),
      flags: c.flags.slice(from),
      label: c.label.slice(from),
      faults: c.faults.slice(from),
    };
    this.cursor = 0;
  }

  /** True time at which the current night ends, epoch ms. */
  get nightEndsAt(): number {
    if (!this.current) throw new Error(`device ${this.config.serial} has not begun`);
    return this.current.block.endMs;
  }

  get hasUpcoming(): boolean {
    return this.upcoming !== null;
  }

  /** Prepares the next night now, so that crossing into it later costs nothing. */
  prepareAhead(): void {
    if (!this.current) throw new Error(`device ${this.config.serial} has not begun`);
    if (!this.upcoming) this.upcoming = prepareNight(this.config, nextNightBlock(this.current.block, this.config.timeZone));
  }

  private send(c: PreparedNight, i: number): void {
    if (c.op[i] === OP_RESEND) {
      this.store.resendLast(c.quality[i]!);
      return;
    }
    this.store.append({
      tDevice: c.deviceOrigin + c.tDeviceTicks[i]! * this.config.resolutionMs,
      rrTicks: c.rrTicks[i]!,
      quality: c.quality[i]!,
      flags: c.flags[i]!,
      tTrue: c.block.startMs + c.tRelMs[i]!,
      label: c.label[i]!,
      faults: c.faults[i]!,
    });
  }
}
