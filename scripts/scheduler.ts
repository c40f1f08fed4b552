// The scheduler process, started by npm start beside the app: every minute (a pg-boss 10 cron schedule in
// PostgreSQL, so ticks survive restarts and several schedulers never double up), and once at start-up, it POSTs to
// the app's compute route on loopback with the scheduler secret. The computation itself runs in the app
// (lib/compute/run.ts); this process only keeps time. A scheduled run computes at most two hours of windows per
// stay (SCHEDULED_STEP_S); a run that leaves windows due (after a first start, a restart or an outage) asks for
// the next run at once instead of at the next whole minute, so catching up goes run after run, every bed in step.
// A second every-minute tick works the mail directly against the database (no app route): the reminder job
// (lib/mail/reminders.ts) enqueues what is due, then the mail worker (lib/mail/deliver.ts) sends the outbox.
// Every 10 minutes, and once at start-up, it signs a checkpoint of the audit trail's newest entry
// (lib/audit/checkpoints.ts), so a later chain check also finds newest entries that were removed.
import type { Transporter } from "nodemailer";
import PgBoss from "pg-boss";
import config from "@/knexfile";
import { createCheckpoint } from "@/lib/audit/checkpoints";
import { SCHEDULER_SECRET_HEADER } from "@/lib/compute/config";
import { db } from "@/lib/db/knex";
import { logger } from "@/lib/log";
import { createTransport } from "@/lib/mail/config";
import { deliverDue } from "@/lib/mail/deliver";
import { runReminders } from "@/lib/mail/reminders";

const QUEUE = "corvane-compute-tick";
const MAIL_QUEUE = "corvane-mail-tick";
const CHECKPOINT_QUEUE = "corvane-audit-checkpoint";
/** A checkpoint is one short transaction; a minute is generous even behind a busy writer's lock. */
const CHECKPOINT_TIMEOUT_S = 60;
/** A mail tick sends at most 50 messages, each bounded by the transport's timeouts (lib/mail/config.ts). */
const MAIL_TIMEOUT_S = 30 * 60;
/** Longest a run may take before the tick gives up waiting (a first catch-up over several nights is the long case). */
const RUN_TIMEOUT_MS = 15 * 60_000;
/** The start-up run waits this long at most for the app to answer (npm start starts the app first). */
const STARTUP_WAIT_MS = 120_000;

const port = Number(process.env.PORT ?? 3000);
if (!Number.isInteger(port) || port < 1 || port > 65_535) throw new Error(`PORT must be a port number, got "${process.env.PORT}"`);
const secret = process.env.CORVANE_SCHEDULER_SECRET;
if (!secret || secret.length < 32) {
  logger.fatal("CORVANE_SCHEDULER_SECRET is not set or shorter than 32 characters: the scheduler cannot call the compute route");
  process.exit(1);
}
const computeUrl = `http://127.0.0.1:${port}/api/jobs/compute`;
const connectionString = typeof config.connection === "string" ? config.connection : undefined;
if (!connectionString) throw new Error("knexfile.ts must give DATABASE_URL as a connection string");

let inFlight: AbortController | null = null;
let stopping = false;

/** One call of the compute route; throws on anything but a finished run (done or skipped). True when the run left
 *  windows due for the next run (`more`). */
async function tick(reason: "schedule" | "start-up" | "catch-up"): Promise<boolean> {
  const started = Date.now();
  inFlight = new AbortController();
  const timeout = setTimeout(() => inFlight?.abort(new Error(`no answer within ${RUN_TIMEOUT_MS / 1000} s`)), RUN_TIMEOUT_MS);
  try {
    const res = await fetch(computeUrl, { method: "POST", headers: { [SCHEDULER_SECRET_HEADER]: secret! }, signal: inFlight.signal });
    const body = (await res.json().catch(() => null)) as { runId?: string; status?: string; windows?: number; flagsRaised?: number; more?: boolean; error?: string } | null;
    if (!res.ok) throw new Error(`compute route answered ${res.status}${body?.error ? `: ${body.error}` : ""}`);
    logger.info({ reason, runId: body?.runId, status: body?.status, windows: body?.windows, flagsRaised: body?.flagsRaised, more: body?.more, ms: Date.now() - started }, "compute tick");
    return body?.status === "done" && body.more === true;
  } finally {
    clearTimeout(timeout);
    inFlight = null;
  }
}

let transport: Transporter | null = null;

/** One mail tick: reminders, then delivery. Each step's failure is logged and never stops the scheduler. */
async function mailTick(): Promise<void> {
  const now = new Date();
  try {
    const r = await runReminders(db, now);
    if (r.reminders + r.escalations > 0) logger.info({ ...r }, "mail tick: reminders enqueued");
  } catch (err) {
    logger.error({ err }, "mail tick: reminder job failed; delivery goes on");
  }
  try {
    transport ??= createTransport();
    const d = await deliverDue(db, transport, now);
    if (d.claimed > 0) logger.info({ ...d }, "mail tick: outbox worked");
  } catch (err) {
    logger.error({ err }, "mail tick: delivery failed; the next tick retries");
  }
}

/** Signs the audit trail's newest entry; a failure is logged and the next tick tries again. */
async function checkpointTick(reason: "schedule" | "start-up"): Promise<void> {
  try {
    const r = await createCheckpoint(db, new Date());
    if (r.created) logger.info({ reason, checkpointId: r.id, auditSeq: r.seq }, "audit checkpoint signed");
  } catch (err) {
    logger.error({ err, reason }, "audit checkpoint failed; the next tick retries");
  }
}

async function appAnswers(): Promise<boolean> {
  try {
    return (await fetch(`http://127.0.0.1:${port}/api/health`, { signal: AbortSignal.timeout(5_000) })).status < 500;
  } catch {
    return false;
  }
}

const boss = new PgBoss({ connectionString, schema: "pgboss", application_name: "corvane-scheduler", max: 3 });
boss.on("error", (err) => logger.error({ err }, "pg-boss error"));
await boss.start();
// A "stately" queue holds at most one waiting and one running tick: a slow run never builds a backlog.
await boss.createQueue(QUEUE, { name: QUEUE, policy: "stately", retryLimit: 0, expireInSeconds: RUN_TIMEOUT_MS / 1000 + 60 });
await boss.schedule(QUEUE, "* * * * *", {}, { tz: "UTC" });
/** After a run that left windows due, one more run right away (the stately queue keeps at most one waiting). */
const catchUp = async (catching: boolean) => {
  if (catching && !stopping) await boss.send(QUEUE, { catchUp: true });
};
await boss.work<{ catchUp?: boolean }>(QUEUE, { pollingIntervalSeconds: 2, batchSize: 1 }, async ([job]) =>
  catchUp(await tick(job?.data?.catchUp ? "catch-up" : "schedule")),
);
await boss.createQueue(MAIL_QUEUE, { name: MAIL_QUEUE, policy: "stately", retryLimit: 0, expireInSeconds: MAIL_TIMEOUT_S });
await boss.schedule(MAIL_QUEUE, "* * * * *", {}, { tz: "UTC" });
await boss.work(MAIL_QUEUE, { pollingIntervalSeconds: 2, batchSize: 1 }, async () => mailTick());
await boss.createQueue(CHECKPOINT_QUEUE, { name: CHECKPOINT_QUEUE, policy: "stately", retryLimit: 0, expireInSeconds: CHECKPOINT_TIMEOUT_S });
await boss.schedule(CHECKPOINT_QUEUE, "*/10 * * * *", {}, { tz: "UTC" });
await boss.work(CHECKPOINT_QUEUE, { pollingIntervalSeconds: 2, batchSize: 1 }, async () => checkpointTick("schedule"));
logger.info({ queue: QUEUE, mailQueue: MAIL_QUEUE, checkpointQueue: CHECKPOINT_QUEUE, computeUrl }, "scheduler running: compute and mail every minute, audit checkpoint every 10 minutes");
// The start-up checkpoint needs only the database, so it does not wait for the app.
await checkpointTick("start-up");

const stop = async (signal: string) => {
  if (stopping) return;
  stopping = true;
  logger.info({ signal }, "scheduler stopping");
  inFlight?.abort(new Error("scheduler stopping"));
  await boss.stop({ graceful: true, wait: true, timeout: 10_000 }).catch((err) => logger.error({ err }, "pg-boss did not stop cleanly"));
  transport?.close();
  await db.destroy().catch((err) => logger.error({ err }, "database pool did not close cleanly"));
  process.exit(0);
};
process.on("SIGINT", () => void stop("SIGINT"));
process.on("SIGTERM", () => void stop("SIGTERM"));

// The start-up run, so a restarted app catches up at once rather than at the next whole minute.
const deadline = Date.now() + STARTUP_WAIT_MS;
while (!stopping && !(await appAnswers())) {
  if (Date.now() > deadline) break;
  await new Promise((r) => setTimeout(r, 2_000));
}
if (!stopping) {
  await tick("start-up")
    .then(catchUp)
    .catch((err) => logger.error({ err }, "start-up compute run failed; the schedule goes on"));
}
