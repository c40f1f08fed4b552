// Liveness for operators and the start script: database ping and migration status. No patient data.
import { db } from "@/lib/db";
import knexConfig from "@/knexfile";
import { logger } from "@/lib/log";

export const dynamic = "force-dynamic";

export async function GET() {
  const started = Date.now();
  try {
    await db.raw("SELECT 1");
    const [completed, pending] = (await db.migrate.list(knexConfig.migrations)) as [{ name: string }[], { file: string }[]];
    const body = {
      status: pending.length ? "degraded" : "ok",
      database: { reachable: true, latencyMs: Date.now() - started },
      migrations: {
        applied: completed.length,
        pending: pending.map((p) => p.file),
        latest: completed.at(-1)?.name ?? null,
      },
      time: new Date().toISOString(),
    };
    return Response.json(body, { status: pending.length ? 503 : 200, headers: { "Cache-Control": "no-store" } });
  } catch (err) {
    logger.error({ err }, "health check failed");
    return Response.json(
      { status: "down", database: { reachable: false }, time: new Date().toISOString() },
      { status: 503, headers: { "Cache-Control": "no-store" } },
    );
  }
}
