// The scheduled computation: one run computes every window not yet stored for the active stays, their personal
// baselines and review flags, and drops expired beats. A PostgreSQL advisory lock lets one run work at a time; a run
// that finds it taken records itself as skipped. Every run is recorded in compute_runs and in the audit trail.
import { randomUUID } from "node:crypto";
import type { Knex } from "knex";
import { recordAudit, type AuditEntry } from "@/lib/audit/record";
import { db as defaultDb } from "@/lib/db/knex";
import type { ComputeRunRow } from "@/lib/db/tables";
import { ALGORITHM_VERSION } from "@/lib/engine/version";
import { rulesInForce } from "@/lib/flags/rule-sets";
import { logger } from "@/lib/log";
import type { BaselineSettings } from "./baseline";
import { activeStays } from "./beats";
import { computeConfig } from "./config";
import { computationParams, storeComputationParams, type ComputationParams } from "./params";
import { deleteExpiredHealthMinutes, dropExpiredBeatPartitions } from "./retention";
import { computeStay } from "./stay";

/** Advisory-lock key of the compute job ("comp"); the audit writer uses another key. */
export const COMPUTE_LOCK_KEY = 0x636f6d70;
/** Stays discharged within this long before the run still get their last windows and flags. */
const RECENT_DISCHARGE_MS = 24 * 3_600_000;
/**
 * Default beats read per step: about 3 h at 65 bpm, 80 min at 150 bpm. The run works inside the app's server
 * process, and each step's engine work is one synchronous stretch (about 0.3 s at this size on one core), so steps are
 * kept small enough that pages stay responsive during a long catch-up.
 */
const DEFAULT_CHUNK_BEATS = 12_000;
/** Fewest beats per step: 10 min of context, a 5-min window and the right context at 240 bpm fit in 5,000. */
const MIN_CHUNK_BEATS = 5_000;
/** Flag ids listed in a run's audit entry (the count is always complete). */
const MAX_AUDITED_FLAG_IDS = 100;

export type ComputeTrigger = ComputeRunRow["trigger"];

export interface RunComputeOptions {
  trigger: ComputeTrigger;
  /** The instant the run works as of (beats after it are not read); default: now. */
  now?: Date;
  /** Database; default: the process's one Knex instance. */
  db?: Knex;
  /** The signed-in administrator who started an `admin` run. */
  actor?: { userId: string; email: string };
  requestId?: string;
  clientAddress?: string | null;
  /** Beats read per step, which bounds memory on a long catch-up; default DEFAULT_CHUNK_BEATS. */
  chunkBeats?: number;
  /** Baseline period and minimum; default CORVANE_BASELINE_HOURS and CORVANE_BASELINE_MIN_WINDOWS. */
  baseline?: Partial<BaselineSettings>;
  /**
   * Most time of windows computed per stay and kind in this run, s (windows starting within this span from the
   * first one due); default: every window due. The scheduler sets a step so that a backlog (a first start, an
   * outage) is worked the same stretch of every stay at a time, run after run: every bed has its first windows
   * within seconds, and all reach the end of the previous night together, instead of waiting for the stays before.
   */
  stepS?: number;
}

export interface ComputeRunSummary {
  runId: string;
  status: "done" | "failed" | "skipped";
  algorithmVersion: string;
  trigger: ComputeTrigger;
  /** Stays looked at (in progress, or discharged within the last day). */
  stays: number;
  windows: number;
  baselines: number;
  flagsRaised: number;
  flagsReactivated: number;
  flagsCleared: number;
  /** Conditions that raised no flag because the patient's night had reached the rule set's cap. */
  flagsCapped: number;
  /** Windows were left for the next run (some stay stopped at the end of its step): the scheduler runs again at once. */
  more: boolean;
  failedStays: number;
  partitionsDropped: string[];
  durationMs: number;
  /** What went wrong, in ids and plain words (no patient data); null when nothing did. */
  error: string | null;
}

function auditActor(o: RunComputeOptions): AuditEntry["actor"] {
  if (o.trigger === "admin") return { userId: o.actor!.userId, email: o.actor!.email, role: "admin" };
  return { userId: null, email: null, role: o.trigger === "scheduler" ? "scheduler" : "system" };
}

/** Writes the run's final row and its `compute.run` audit entry together. */
async function finishRun(db: Knex, o: RunComputeOptions, s: ComputeRunSummary, raisedIds: string[]): Promise<void> {
  await db.transaction(async (trx) => {
    await trx("compute_runs").where({ id: s.runId }).update({
      finished_at: new Date(),
      status: s.status,
      stays: s.stays,
      windows: s.windows,
      flags_raised: s.flagsRaised,
      duration_ms: s.durationMs,
      error: s.error,
    });
    await recordAudit(
      {
        actor: auditActor(o),
        action: "compute.run",
        target: { type: "compute_run", id: s.runId },
        outcome: s.status === "failed" ? "failure" : "success",
        detail: {
          status: s.status,
          algorithm_version: s.algorithmVersion,
          trigger: s.trigger,
          stays: s.stays,
          windows: s.windows,
          baselines: s.baselines,
          flags_raised: s.flagsRaised,
          flags_reactivated: s.flagsReactivated,
          flags_cleared: s.flagsCleared,
          flags_capped: s.flagsCapped,
          failed_stays: s.failedStays,
          more_due: s.more,
          partitions_dropped: s.partitionsDropped,
          duration_ms: s.durationMs,
          raised_flag_ids: raisedIds.slice(0, MAX_AUDITED_FLAG_IDS),
          ...(s.error && { error: s.error }),
        },
        requestId: o.requestId ?? null,
        clientAddress: o.clientAddress ?? null,
      },
      trx,
    );
  });
}

async function runLocked(db: Knex, o: RunComputeOptions, summary: ComputeRunSummary, started: number): Promise<ComputeRunSummary> {
  const cfg = computeConfig();
  const now = o.now ?? new Date();
  const baseline: BaselineSettings = {
    hours: o.baseline?.hours ?? cfg.CORVANE_BASELINE_HOURS,
    minWindows: o.baseline?.minWindows ?? cfg.CORVANE_BASELINE_MIN_WINDOWS,
  };
  const chunkBeats = o.chunkBeats ?? DEFAULT_CHUNK_BEATS;
  const stepS = o.stepS ?? Infinity;
  const raisedIds: string[] = [];
  const errors: string[] = [];
  try {
    summary.partitionsDropped = await dropExpiredBeatPartitions(db, cfg.CORVANE_BEAT_RETENTION_DAYS, now);
    const healthMinutes = await deleteExpiredHealthMinutes(db, cfg.CORVANE_BEAT_RETENTION_DAYS, now);
    if (healthMinutes) logger.info({ runId: summary.runId, rows: healthMinutes }, "expired stream-health minutes deleted");
    const stays = await activeStays(db, now, RECENT_DISCHARGE_MS);
    summary.stays = stays.length;
    const { ruleSets, invalid } = await rulesInForce(db, [...new Set(stays.map((s) => s.unitId))]);
    for (const err of invalid.values()) {
      logger.error({ err, runId: summary.runId }, "rule set in force does not validate: no flags for its unit");
      errors.push(err.message);
    }
    const params = new Map<string, ComputationParams>();
    for (const stay of stays) {
      let p = params.get(stay.population);
      if (!p) {
        p = computationParams(stay.population);
        await storeComputationParams(db, p);
        params.set(stay.population, p);
      }
      try {
        const r = await computeStay(stay, { db, runId: summary.runId, now, chunkBeats, baseline, params: p, ruleSet: ruleSets.get(stay.unitId) ?? null, stepS });
        if (r.more) summary.more = true;
        summary.windows += r.windows;
        summary.baselines += r.baselines;
        summary.flagsRaised += r.raised.length;
        summary.flagsReactivated += r.reactivated.length;
        summary.flagsCleared += r.cleared.length;
        summary.flagsCapped += r.capped;
        raisedIds.push(...r.raised);
      } catch (err) {
        // One stay's failure (a broken series, a lost connection) must not stop the others; the next run retries it.
        summary.failedStays += 1;
        logger.error({ err, runId: summary.runId, stayId: stay.stayId }, "compute failed for a stay");
        if (summary.failedStays === 1) errors.push(`stay ${stay.stayId}: ${err instanceof Error ? err.message : String(err)}`);
      }
    }
    if (summary.failedStays > 1) errors.push(`${summary.failedStays} stays failed in all`);
  } catch (err) {
    logger.error({ err, runId: summary.runId }, "compute run failed");
    errors.push(err instanceof Error ? err.message : String(err));
  }
  summary.status = errors.length ? "failed" : "done";
  summary.error = errors.length ? errors.join("; ").slice(0, 2000) : null;
  summary.durationMs = Math.round(performance.now() - started);
  await finishRun(db, o, summary, raisedIds);
  logger.info(
    { runId: summary.runId, status: summary.status, trigger: summary.trigger, stays: summary.stays, windows: summary.windows, flagsRaised: summary.flagsRaised, durationMs: summary.durationMs },
    "compute run finished",
  );
  return summary;
}

/**
 * Runs the computation once. Never runs twice at the same time: the run holds a session-level advisory lock on a
 * connection of its own for its whole length (released on return, or by PostgreSQL if the process dies).
 */
export async function runCompute(o: RunComputeOptions): Promise<ComputeRunSummary> {
  if (o.trigger === "admin" && !o.actor) throw new TypeError("an admin run needs the administrator as actor");
  if (o.chunkBeats !== undefined && !(Number.isInteger(o.chunkBeats) && o.chunkBeats >= MIN_CHUNK_BEATS)) {
    throw new RangeError(`chunkBeats must be a whole number ≥ ${MIN_CHUNK_BEATS}, got ${o.chunkBeats}`);
  }
  if (o.stepS !== undefined && !(Number.isInteger(o.stepS) && o.stepS >= 3600)) {
    throw new RangeError(`stepS must be a whole number of seconds ≥ 3600 (one hourly window), got ${o.stepS}`);
  }
  if (o.now && Number.isNaN(o.now.getTime())) throw new RangeError("now is not a valid date");
  const db = o.db ?? defaultDb;
  const opts: RunComputeOptions = { ...o, requestId: o.requestId ?? randomUUID() };
  computeConfig(); // invalid settings fail here, before anything is recorded
  const started = performance.now();
  const summary: ComputeRunSummary = {
    runId: "",
    status: "skipped",
    algorithmVersion: ALGORITHM_VERSION,
    trigger: o.trigger,
    stays: 0,
    windows: 0,
    baselines: 0,
    flagsRaised: 0,
    flagsReactivated: 0,
    flagsCleared: 0,
    flagsCapped: 0,
    more: false,
    failedStays: 0,
    partitionsDropped: [],
    durationMs: 0,
    error: null,
  };
  // A pg client straight from Knex's pool: the lock belongs to this connection, whatever the pool does meanwhile.
  const conn = (await db.client.acquireConnection()) as { query(text: string, values?: unknown[]): Promise<{ rows: { ok: boolean }[] }> };
  let locked = false;
  try {
    locked = (await conn.query("SELECT pg_try_advisory_lock($1) AS ok", [COMPUTE_LOCK_KEY])).rows[0]!.ok;
    const [run] = await db("compute_runs")
      .insert({ algorithm_version: ALGORITHM_VERSION, trigger: o.trigger, status: locked ? "running" : "skipped" })
      .returning("id");
    summary.runId = String(run!.id);
    if (!locked) {
      summary.durationMs = Math.round(performance.now() - started);
      await finishRun(db, opts, summary, []);
      logger.info({ runId: summary.runId, trigger: o.trigger }, "compute run skipped: another run holds the lock");
      return summary;
    }
    return await runLocked(db, opts, summary, started);
  } finally {
    try {
      if (locked) await conn.query("SELECT pg_advisory_unlock($1) AS ok", [COMPUTE_LOCK_KEY]);
    } finally {
      await db.client.releaseConnection(conn);
    }
  }
}
