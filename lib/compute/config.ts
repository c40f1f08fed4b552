// Settings of the scheduled computation, from the environment (documented in .env.example), parsed once with zod:
// an invalid value is an error, never silently replaced by the default.
import { createHash, timingSafeEqual } from "node:crypto";
import { z } from "zod";

const schema = z.object({
  /** Beats partitions (one per UTC day) wholly older than this many days are dropped; windows stay. */
  CORVANE_BEAT_RETENTION_DAYS: z.coerce.number().int().min(1).max(3650).default(30),
  /** Personal baseline: the first valid hours of a stay, and the fewest 5-min windows it needs. */
  CORVANE_BASELINE_HOURS: z.coerce.number().min(0.5).max(72).default(6),
  CORVANE_BASELINE_MIN_WINDOWS: z.coerce.number().int().min(5).max(10_000).default(30),
  /** Shared by the scheduler process and the compute route; unset = only a signed-in administrator can run it. */
  CORVANE_SCHEDULER_SECRET: z.string().min(32, "CORVANE_SCHEDULER_SECRET must be at least 32 characters").optional(),
});

type ComputeConfig = z.infer<typeof schema>;

let cached: ComputeConfig | null = null;
export function computeConfig(): ComputeConfig {
  if (cached) return cached;
  const parsed = schema.safeParse(process.env);
  if (!parsed.success) throw new Error(`invalid compute settings: ${parsed.error.issues.map((i) => `${i.path.join(".")}: ${i.message}`).join("; ")}`);
  cached = parsed.data;
  return cached;
}

/**
 * Time of windows a scheduled run computes per stay and kind, s. Two hours keep a catch-up run to a few seconds for
 * a whole ward and move every bed forward in step; the scheduler starts the next run at once while windows are
 * still due. In steady state a run has about a minute of windows to compute.
 */
export const SCHEDULED_STEP_S = 2 * 3600;

/** Header the scheduler sends its secret in. */
export const SCHEDULER_SECRET_HEADER = "x-corvane-scheduler-secret";

/** Compares a presented secret with CORVANE_SCHEDULER_SECRET in constant time (both hashed first, so lengths match). */
export function schedulerSecretMatches(presented: string): boolean {
  const expected = computeConfig().CORVANE_SCHEDULER_SECRET;
  if (!expected) return false;
  const a = createHash("sha256").update(presented).digest();
  const b = createHash("sha256").update(expected).digest();
  return timingSafeEqual(a, b);
}
