// One stay in one compute run: every window not yet stored for the current engine version, then the stay's
// baseline and review flags, each chunk in its own transaction (windows, baseline and flags commit together, so a
// run that stops half-way leaves nothing half-evaluated).
import { publishLive } from "@/lib/live/events";
import type { Knex } from "knex";
import type { IndexWindowInsert, WindowKind } from "@/lib/db/tables";
import { ALGORITHM_VERSION } from "@/lib/engine/version";
import type { LongWindow, ShortWindow } from "@/lib/engine/windows";
import { evaluateStayFlags, type StayFlagOutcome } from "@/lib/flags/evaluate-stay";
import type { RuleSet } from "@/lib/flags/rule-sets";
import { logger } from "@/lib/log";
import { baselineDelta, baselineMedians, settleBaselines, type BaselineSettings } from "./baseline";
import { lastBeatS, loadBeats, type ActiveStay } from "./beats";
import type { ComputationParams } from "./params";
import { alignUp, LEFT_CONTEXT_S, LONG_S, LONG_STRIDE_S, SHORT_S, SHORT_STRIDE_S, windowsOfChunk } from "./stay-windows";

/** A discharged stay's beats are taken as complete this long after discharge (late beats from a slow link). */
const CLOSED_STAY_SETTLE_MS = 5 * 60_000;
/** A long window needs 70 min of beats with its context: 16,800 beats at the neonatal range gate's 240 bpm. */
const LONG_CHUNK_MIN_BEATS = 20_000;
/** Beats read past a step's last window, s: room for the cleaning's right-hand context (100 beats, 200 s at 30 bpm). */
const STEP_CONTEXT_S = 600;
/** Rows per INSERT (13 columns each, well under PostgreSQL's 65,535 bound parameters). */
const INSERT_BATCH = 400;

interface StayContext {
  db: Knex;
  runId: string;
  now: Date;
  chunkBeats: number;
  baseline: BaselineSettings;
  params: ComputationParams;
  /** The unit's rule set in force; null: no flags for this stay (none seeded, or it no longer validates). */
  ruleSet: RuleSet | null;
  /** Most time of each window kind this run computes for the stay, s: windows starting within this span from the
   *  first one due (Infinity: all that are due). */
  stepS: number;
}

interface StayOutcome extends StayFlagOutcome {
  windows: number;
  baselines: number;
  /** Windows are still due: the stay stopped at the end of ctx.stepS. */
  more?: boolean;
}

const GRID = {
  short: { windowS: SHORT_S, strideS: SHORT_STRIDE_S },
  long: { windowS: LONG_S, strideS: LONG_STRIDE_S },
} as const;

/** node-pg sends a JavaScript array as a PostgreSQL array literal; a jsonb column needs its JSON text instead. */
const jsonArray = (v: (number | null)[] | null) => (v === null ? null : (JSON.stringify(v) as unknown as (number | null)[]));

function rowOf(w: ShortWindow | LongWindow, stay: ActiveStay, ctx: StayContext, medians: ReadonlyMap<string, number>): IndexWindowInsert {
  return {
    stay_id: stay.stayId,
    kind: w.kind,
    window_start: new Date(w.startS * 1000),
    window_end: new Date(w.endS * 1000),
    algorithm_version: ALGORITHM_VERSION,
    params_hash: ctx.params.hash,
    grade: w.quality.grade,
    quality: { ...w.quality },
    values: w.values,
    reasons: w.reasons,
    mse: w.kind === "long" ? jsonArray(w.mse) : null,
    baseline_delta: baselineDelta(w.values, medians),
    compute_run_id: ctx.runId,
  };
}

/** Latest window start per kind, for this engine version and for older ones. */
async function windowMarks(db: Knex, stayId: string) {
  const rows = await db("index_windows")
    .where({ stay_id: stayId })
    .groupBy("kind", "algorithm_version")
    .select<{ kind: WindowKind; algorithm_version: string; latest: Date }[]>("kind", "algorithm_version", db.raw("max(window_start) AS latest"));
  const latest = (kind: WindowKind, current: boolean) =>
    rows
      .filter((r) => r.kind === kind && (r.algorithm_version === ALGORITHM_VERSION) === current)
      .reduce<Date | null>((m, r) => (m === null || r.latest > m ? r.latest : m), null);
  return {
    current: { short: latest("short", true), long: latest("long", true) },
    older: { short: latest("short", false), long: latest("long", false) },
  };
}

export async function computeStay(stay: ActiveStay, ctx: StayContext): Promise<StayOutcome> {
  const { db } = ctx;
  const out: StayOutcome = { windows: 0, baselines: 0, raised: [], reactivated: [], cleared: [], capped: 0 };
  const untilMs = ctx.now.getTime();
  const lastS = await lastBeatS(db, stay, untilMs);
  if (lastS === null) return out;
  const marks = await windowMarks(db, stay.stayId);
  const closed = stay.dischargedAt !== null && stay.dischargedAt.getTime() <= ctx.now.getTime() - CLOSED_STAY_SETTLE_MS;
  const admittedS = stay.admittedAt.getTime() / 1000;

  for (const kind of ["short", "long"] as const) {
    const { windowS, strideS } = GRID[kind];
    const latest = marks.current[kind];
    // A new engine version starts again from the stay's start (old rows stay, keyed by their version).
    let nextS = latest ? latest.getTime() / 1000 + strideS : alignUp(admittedS, strideS);
    let continues = latest !== null;
    const limit = kind === "short" ? ctx.chunkBeats : Math.max(ctx.chunkBeats, LONG_CHUNK_MIN_BEATS);
    // Windows starting before stepEndS are this run's; beats a little past the last one's end are read for the
    // cleaning's right-hand context, so the windows are the same as one pass over the stay would give.
    const stepEndS = nextS + ctx.stepS;
    const stepReadMs = Math.min(untilMs, (stepEndS + windowS + STEP_CONTEXT_S) * 1000);
    while (nextS + windowS <= lastS) {
      if (nextS >= stepEndS) {
        out.more = true;
        break;
      }
      // What the step reads; when that completes no window (a stretch the engine leaves without one), it reads on
      // to now, as a run without steps would.
      let readUntilMs = stepReadMs;
      let beats;
      let full;
      let complete: (ShortWindow | LongWindow)[];
      for (;;) {
        beats = await loadBeats(db, stay, (nextS - LEFT_CONTEXT_S) * 1000, readUntilMs, limit);
        full = beats.count === limit;
        // The last beats of a closed stay make every window up to them complete.
        const final = closed && !full && readUntilMs >= lastS * 1000;
        complete = kind === "short"
          ? windowsOfChunk(beats, stay.population, "short", nextS, final, continues)
          : windowsOfChunk(beats, stay.population, "long", nextS, final, continues);
        if (complete.length || readUntilMs === untilMs) break;
        readUntilMs = untilMs;
      }
      // The first complete window always counts (the engine may start later than nextS), so every step moves on.
      const windows = complete.filter((w, k) => k === 0 || w.startS < stepEndS);
      if (!windows.length) {
        if (full) logger.warn({ stayId: stay.stayId, kind, beats: beats.count }, "a full chunk of beats completed no window; left for a later run");
        break;
      }
      const applied = await storeChunk(stay, ctx, windows, marks.older);
      out.windows += applied.windows;
      out.baselines += applied.baselines;
      out.raised.push(...applied.raised);
      out.reactivated.push(...applied.reactivated);
      out.cleared.push(...applied.cleared);
      out.capped += applied.capped;
      nextS = windows[windows.length - 1]!.startS + strideS;
      continues = true;
      // Every beat up to now was read: nothing more is due until more beats arrive.
      if (!full && readUntilMs === untilMs) break;
    }
  }
  return out;
}

/** Stores one chunk's windows idempotently, then settles baselines and evaluates flags on the windows it added. */
async function storeChunk(
  stay: ActiveStay,
  ctx: StayContext,
  windows: (ShortWindow | LongWindow)[],
  older: Record<WindowKind, Date | null>,
): Promise<StayOutcome> {
  return ctx.db.transaction(async (trx) => {
    const medians = await baselineMedians(trx, stay.stayId, ALGORITHM_VERSION);
    const rows = windows.map((w) => rowOf(w, stay, ctx, medians));
    const inserted: { kind: WindowKind; window_start: Date }[] = [];
    for (let i = 0; i < rows.length; i += INSERT_BATCH) {
      inserted.push(
        ...(await trx("index_windows")
          .insert(rows.slice(i, i + INSERT_BATCH))
          .onConflict(["stay_id", "kind", "window_start", "algorithm_version"])
          .ignore()
          .returning(["kind", "window_start"])),
      );
    }
    const baselines = await settleBaselines(trx, stay.stayId, ALGORITHM_VERSION, ctx.baseline);
    const outcome: StayOutcome = { windows: inserted.length, baselines, raised: [], reactivated: [], cleared: [], capped: 0 };
    if (inserted.length) {
      // Delivered on commit to every server process, and from there to browsers showing this unit.
      const until = new Date(Math.max(...inserted.map((r) => r.window_start.getTime()))).toISOString();
      await publishLive(trx, { type: "windows", unitId: stay.unitId, stayId: stay.stayId, count: inserted.length, until });
    }
    if (!ctx.ruleSet || !inserted.length) return outcome;
    const first = (kind: WindowKind) => {
      const starts = inserted.filter((r) => r.kind === kind).map((r) => r.window_start.getTime());
      return starts.length ? new Date(Math.min(...starts)) : null;
    };
    const flags = await evaluateStayFlags(trx, {
      stayId: stay.stayId,
      unitId: stay.unitId,
      timeZone: stay.timeZone,
      algorithmVersion: ALGORITHM_VERSION,
      ruleSet: ctx.ruleSet,
      newFrom: { short: first("short"), long: first("long") },
      judgedUpTo: older,
    });
    if (flags.raised.length) await publishLive(trx, { type: "flags", unitId: stay.unitId, stayId: stay.stayId, raised: flags.raised.length });
    return { ...outcome, ...flags };
  });
}
