// POST /api/jobs/compute: one run of the scheduled computation (windows, baselines, review flags). Allowed for the
// scheduler process, which presents CORVANE_SCHEDULER_SECRET in a header, or for a signed-in administrator.
// Answers the run's summary: counts and ids only, no patient data.
import { randomUUID } from "node:crypto";
import { recordAudit } from "@/lib/audit/record";
import { guardApi } from "@/lib/auth/guard";
import { clientAddressFrom } from "@/lib/auth/request-context";
import { SCHEDULED_STEP_S, schedulerSecretMatches, SCHEDULER_SECRET_HEADER } from "@/lib/compute/config";
import { runCompute, type ComputeRunSummary, type RunComputeOptions } from "@/lib/compute/run";
import { logger } from "@/lib/log";

export const dynamic = "force-dynamic";

const json = (status: number, body: unknown) => Response.json(body, { status, headers: { "Cache-Control": "no-store" } });

async function run(options: RunComputeOptions): Promise<Response> {
  let summary: ComputeRunSummary;
  try {
    summary = await runCompute(options);
  } catch (err) {
    logger.error({ err, requestId: options.requestId }, "compute run could not be recorded");
    return json(500, { error: "server_error", message: "The computation could not run; see the server log." });
  }
  return json(summary.status === "failed" ? 500 : 200, summary);
}

export async function POST(req: Request) {
  const requestId = req.headers.get("x-request-id") ?? randomUUID();
  const clientAddress = clientAddressFrom(req.headers);
  const presented = req.headers.get(SCHEDULER_SECRET_HEADER);
  if (presented !== null) {
    if (!schedulerSecretMatches(presented)) {
      await recordAudit({
        actor: { userId: null, email: null, role: "scheduler" },
        action: "access.denied",
        outcome: "denied",
        detail: { what: "api /api/jobs/compute", reason: "wrong or unset scheduler secret" },
        requestId,
        clientAddress,
      });
      return json(401, { error: "unauthorized", message: "The scheduler secret does not match." });
    }
    // A backlog is worked a step of every stay per run; the scheduler calls again at once while `more` is true.
    return run({ trigger: "scheduler", requestId, clientAddress, stepS: SCHEDULED_STEP_S });
  }
  const guard = await guardApi("jobs.run");
  if (!guard.ok) return guard.response;
  const { actor } = guard;
  return run({ trigger: "admin", actor: { userId: actor.userId, email: actor.email }, requestId: actor.requestId, clientAddress: actor.clientAddress });
}
