// A device's sent records, kept compactly so a reader can resume from any Last-Event-ID (DOMAIN §4). A night is
// 40,000–120,000 records a device (adult about 1 beat/s, neonate about 2.4 beats/s), so records live in fixed
// chunks of typed arrays — 12 bytes each, 22 with ground truth — and are formatted only when sent. Whole chunks
// older than the retention are dropped, so a simulator left running does not grow without bound.
import { BEAT_TYPES, formatStreamEvent, type StreamRecord } from "@/lib/streaming/protocol";
import type { TruthLabel } from "@/lib/engine/simulate";

const CHUNK = 16_384;

/** Low three bits of `flags`: 0–4 a beat of type BEAT_TYPES[code], STATUS a status record. */
export const STATUS = 5;
const LEAD_OFF_BIT = 8;
/** Bits 4–6 of `flags`: a status record's rhythm, RHYTHMS[code] (0 = none). */
export const RHYTHMS = [null, "sinus", "af", "paced", "unknown"] as const;

export const TRUTH_LABELS = ["normal", "pvc", "pac", "post_ectopic", "missed", "extra", "motion", "spike"] as const satisfies readonly TruthLabel[];
/** Ground-truth fault bits of a record. */
export const FAULT = { clockStep: 1, afterDropout: 2, afterLeadOff: 4 } as const;
/** `label` of a status record. */
export const NO_LABEL = 255;

export function packFlags(kind: number, leadOff: boolean, rhythm: number): number {
  return kind | (leadOff ? LEAD_OFF_BIT : 0) | (rhythm << 4);
}

export interface RecordTruth {
  seq: number;
  kind: "beat" | "status";
  /** True time of the record, epoch ms (whole ms). */
  tTrue: number;
  tDevice: number;
  /** Device clock minus true time, ms. */
  clockOffsetMs: number;
  /** The generator's label of the interval (lib/engine/simulate TruthLabel); null for a status record. */
  label: TruthLabel | null;
  /** How many times the record has been sent again after its first sending (network resend, DOMAIN §6.7); a
   *  resend goes out just before the device's next record. */
  resent: number;
  /** The first record after a device clock correction step. */
  clockStep: boolean;
  /** The first beat after a gap with no beats, and what kind of gap it was. */
  afterGap: "dropout" | "lead_off" | null;
}

class Chunk {
  readonly tDevice = new Float64Array(CHUNK);
  /** Interval in device ticks (resolution steps); 0 for status records. */
  readonly rrTicks = new Uint16Array(CHUNK);
  /** Device quality × 100, floored. */
  readonly quality = new Uint8Array(CHUNK);
  readonly flags = new Uint8Array(CHUNK);
  readonly tTrue: Float64Array | null;
  readonly label: Uint8Array | null;
  readonly faults: Uint8Array | null;
  /** True time of the newest record in the chunk, epoch ms. */
  lastTrueMs = -Infinity;
  constructor(truth: boolean) {
    this.tTrue = truth ? new Float64Array(CHUNK) : null;
    this.label = truth ? new Uint8Array(CHUNK) : null;
    this.faults = truth ? new Uint8Array(CHUNK) : null;
  }
}

export interface AppendInput {
  tDevice: number;
  rrTicks: number;
  quality: number;
  flags: number;
  tTrue: number;
  /** Index into TRUTH_LABELS, or 255 for a status record. */
  label: number;
  faults: number;
}

export class RecordStore {
  private chunks: Chunk[] = [];
  /** seq of chunks[0]'s first record. */
  private firstSeqHeld = 1;
  private held = 0;
  private nextSeq = 1;
  /** seq of the first record this store numbered (1 unless the device kept counting across a restart). */
  private startSeq = 1;
  /** Before sending seq s, the device re-sends the `count` records before s. Keyed by the next seq, not the last
   *  one sent, so a reader that has already sent the last record still gets the resend in the same place. */
  private readonly resends = new Map<number, number>();

  constructor(
    readonly resolutionMs: number,
    readonly keepTruth: boolean,
  ) {}

  /** Newest seq, 0 before the first record. */
  get lastSeq(): number {
    return this.nextSeq - 1;
  }
  /** Oldest seq still held (lastSeq + 1 when none are). */
  get firstSeq(): number {
    return this.firstSeqHeld;
  }
  get size(): number {
    return this.held;
  }

  /** Numbers the first record `seq` instead of 1: a device that kept counting across a restart. Before any record. */
  startAt(seq: number): void {
    if (this.nextSeq !== this.startSeq || this.held) throw new Error("startAt comes before the first record");
    if (!(Number.isSafeInteger(seq) && seq >= 1)) throw new RangeError(`a seq is a whole number ≥ 1, got ${seq}`);
    this.firstSeqHeld = this.nextSeq = this.startSeq = seq;
  }

  append(r: AppendInput): number {
    const index = this.nextSeq - this.firstSeqHeld;
    const at = index % CHUNK;
    if (at === 0) this.chunks.push(new Chunk(this.keepTruth));
    const c = this.chunks[this.chunks.length - 1]!;
    if (!(r.rrTicks >= 0 && r.rrTicks <= 0xffff && Number.isInteger(r.rrTicks))) throw new RangeError(`interval of ${r.rrTicks} ticks does not fit the store`);
    c.tDevice[at] = r.tDevice;
    c.rrTicks[at] = r.rrTicks;
    c.quality[at] = r.quality;
    c.flags[at] = r.flags;
    c.lastTrueMs = r.tTrue;
    if (c.tTrue) {
      c.tTrue[at] = r.tTrue;
      c.label![at] = r.label;
      c.faults![at] = r.faults;
    }
    this.held++;
    return this.nextSeq++;
  }

  /** The device re-sends its last `count` records (fewer if it has sent fewer), ahead of its next record. */
  resendLast(count: number): void {
    const n = Math.min(count, this.nextSeq - this.startSeq);
    if (n > 0) this.resends.set(this.nextSeq, Math.max(n, this.resends.get(this.nextSeq) ?? 0));
  }

  /** How many records are re-sent just before `seq` (seqs seq − count … seq − 1); 0 when none. */
  resendBefore(seq: number): number {
    return this.resends.get(seq) ?? 0;
  }

  private locate(seq: number): [Chunk, number] {
    if (!(Number.isInteger(seq) && seq >= this.firstSeqHeld && seq <= this.lastSeq)) {
      throw new RangeError(`seq ${seq} is not held (held: ${this.firstSeqHeld}–${this.lastSeq})`);
    }
    const index = seq - this.firstSeqHeld;
    return [this.chunks[Math.floor(index / CHUNK)]!, index % CHUNK];
  }

  /** The record's device time, epoch ms (what `record(seq).tDevice` gives, without building the record). */
  deviceTime(seq: number): number {
    const [c, i] = this.locate(seq);
    return c.tDevice[i]!;
  }

  record(seq: number): StreamRecord {
    const [c, i] = this.locate(seq);
    const flags = c.flags[i]!;
    const kind = flags & 7;
    const leadOff = (flags & LEAD_OFF_BIT) !== 0;
    if (kind === STATUS) {
      const rhythm = RHYTHMS[(flags >> 4) & 7] ?? null;
      return rhythm === null
        ? { kind: "status", seq, tDevice: c.tDevice[i]!, leadOff }
        : { kind: "status", seq, tDevice: c.tDevice[i]!, leadOff, rhythm };
    }
    return {
      kind: "beat",
      seq,
      tDevice: c.tDevice[i]!,
      rr: c.rrTicks[i]! * this.resolutionMs,
      type: BEAT_TYPES[kind]!,
      quality: c.quality[i]! / 100,
      leadOff,
    };
  }

  /** The record as the SSE event a conforming device sends (lib/streaming/protocol.ts). */
  event(seq: number): string {
    return formatStreamEvent(this.record(seq));
  }

  truth(seq: number): RecordTruth {
    const [c, i] = this.locate(seq);
    if (!c.tTrue) throw new Error("this store keeps no ground truth");
    const label = c.label![i]!;
    const faults = c.faults![i]!;
    let resent = 0;
    for (const [before, count] of this.resends) if (seq < before && seq >= before - count && before <= this.lastSeq) resent++;
    return {
      seq,
      kind: (c.flags[i]! & 7) === STATUS ? "status" : "beat",
      tTrue: c.tTrue[i]!,
      tDevice: c.tDevice[i]!,
      clockOffsetMs: c.tDevice[i]! - c.tTrue[i]!,
      label: label === NO_LABEL ? null : TRUTH_LABELS[label]!,
      resent,
      clockStep: (faults & FAULT.clockStep) !== 0,
      afterGap: faults & FAULT.afterDropout ? "dropout" : faults & FAULT.afterLeadOff ? "lead_off" : null,
    };
  }

  /** Drops whole chunks whose newest record is older than `cutoffTrueMs`; never the chunk being filled. */
  trimBefore(cutoffTrueMs: number): void {
    while (this.chunks.length > 1 && this.chunks[0]!.lastTrueMs < cutoffTrueMs) {
      this.chunks.shift();
      this.firstSeqHeld += CHUNK;
      this.held -= CHUNK;
    }
    for (const before of this.resends.keys()) if (before <= this.firstSeqHeld) this.resends.delete(before);
  }

  /** Bytes held in typed arrays. */
  get bytes(): number {
    return this.chunks.length * CHUNK * (this.keepTruth ? 22 : 12);
  }
}
