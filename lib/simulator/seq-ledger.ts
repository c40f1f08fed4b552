// Where each simulated device's sequence numbers stand, kept across simulator restarts. A bedside device keeps
// counting when it is switched off and on again; the simulator, which rebuilds its records from the previous
// evening on every start, needs to know which seq the first record of each night block had the last time, so a
// restart on a later day continues the numbering the ingest already holds instead of starting again at 1.
import { mkdirSync, readFileSync, renameSync, writeFileSync } from "node:fs";
import { dirname } from "node:path";
import { z } from "zod";

/** What the simulator asks of a ledger; a device without one numbers its records from 1 (tests, --no-backfill). */
export interface SeqLedger {
  /** The seq the first record of the block starting on `evening` had, if this device has sent that block before. */
  firstSeqOf(serial: string, evening: string): number | null;
  /** The seq to give the first record of a block this device has not sent before. */
  nextFree(serial: string): number;
  /** The block starting on `evening` begins at `firstSeq`. */
  noteBlock(serial: string, evening: string, firstSeq: number): void;
  /** The device has sent records up to `lastSeq`. */
  noteSent(serial: string, lastSeq: number): void;
  /**
   * The device's numbering comes from an older simulator whose night blocks held other records (before empty beds
   * stopped sending beats): its blocks cannot be rebuilt with the same seqs, so it starts now, numbering on from
   * where it stopped, rather than backfill records the ingest may already hold under other seqs.
   */
  sentUnderOlderRecipe?(serial: string): boolean;
}

/** Blocks remembered per device: a week of evenings (restarts reach back at most to the previous evening). */
const KEEP_BLOCKS = 8;

/** Version 2: night blocks leave out beats while no patient is on the bed. A version-1 file keeps its last seqs
 *  (numbering goes on) but not its blocks. */
const LEDGER_VERSION = 2;

const fileSchema = z.object({
  version: z.union([z.literal(1), z.literal(LEDGER_VERSION)]),
  devices: z.record(
    z.string(),
    z.object({
      blocks: z.record(z.string().regex(/^\d{4}-\d{2}-\d{2}$/), z.number().int().positive()),
      lastSeq: z.number().int().nonnegative(),
    }),
  ),
});
type LedgerFile = z.infer<typeof fileSchema>;

/** In memory, for tests and for a file-backed ledger's state. */
export class MemorySeqLedger implements SeqLedger {
  /** Devices whose numbering came from a version-1 ledger. */
  private readonly olderRecipe = new Set<string>();

  constructor(protected state: LedgerFile = { version: LEDGER_VERSION, devices: {} }) {
    if (state.version !== LEDGER_VERSION) {
      for (const [serial, d] of Object.entries(state.devices)) {
        this.olderRecipe.add(serial);
        d.lastSeq = Math.max(d.lastSeq, ...Object.values(d.blocks).map((first) => first - 1));
        d.blocks = {};
      }
      state.version = LEDGER_VERSION;
    }
  }
  sentUnderOlderRecipe(serial: string): boolean {
    return this.olderRecipe.has(serial);
  }

  private device(serial: string) {
    return (this.state.devices[serial] ??= { blocks: {}, lastSeq: 0 });
  }
  firstSeqOf(serial: string, evening: string): number | null {
    return this.state.devices[serial]?.blocks[evening] ?? null;
  }
  nextFree(serial: string): number {
    const d = this.state.devices[serial];
    if (!d) return 1;
    return Math.max(d.lastSeq, ...Object.values(d.blocks)) + 1;
  }
  noteBlock(serial: string, evening: string, firstSeq: number): void {
    const d = this.device(serial);
    d.blocks[evening] = firstSeq;
    const evenings = Object.keys(d.blocks).sort();
    for (const old of evenings.slice(0, Math.max(0, evenings.length - KEEP_BLOCKS))) delete d.blocks[old];
    d.lastSeq = Math.max(d.lastSeq, firstSeq - 1);
  }
  noteSent(serial: string, lastSeq: number): void {
    const d = this.device(serial);
    d.lastSeq = Math.max(d.lastSeq, lastSeq);
  }
  snapshot(): LedgerFile {
    return structuredClone(this.state);
  }
}

/**
 * A ledger kept in a JSON file (npm start: .corvane/simulator-seq.json). Read once at start; written by `save()`,
 * which the simulator calls every minute and on close, through a temporary file and a rename so a crash mid-write
 * leaves the previous version. A file that does not parse is an error, not a silent restart at seq 1.
 */
export class FileSeqLedger extends MemorySeqLedger {
  constructor(readonly path: string) {
    let state: LedgerFile = { version: LEDGER_VERSION, devices: {} };
    let text: string | null = null;
    try {
      text = readFileSync(path, "utf8");
    } catch (err) {
      if ((err as NodeJS.ErrnoException).code !== "ENOENT") throw err;
    }
    if (text !== null) {
      const parsed = fileSchema.safeParse(JSON.parse(text));
      if (!parsed.success) throw new Error(`${path} is not a simulator sequence ledger: ${parsed.error.issues[0]?.message ?? "invalid"}`);
      state = parsed.data;
    }
    super(state);
  }

  save(): void {
    mkdirSync(dirname(this.path), { recursive: true });
    const tmp = `${this.path}.tmp`;
    writeFileSync(tmp, JSON.stringify(this.state, null, 1) + "\n");
    renameSync(tmp, this.path);
  }
}
