// Server start-up hooks. Unhandled request errors are logged as JSON with the request id (set by proxy.ts) and the
// route pattern, never the query string or body, so no patient data reach the log.
import type { Instrumentation } from "next";

export function register() {}

export const onRequestError: Instrumentation.onRequestError = async (err, request, context) => {
  if (process.env.NEXT_RUNTIME !== "nodejs") return;
  const { logger } = await import("@/lib/log");
  const header = request.headers["x-request-id"];
  logger.error(
    {
      requestId: Array.isArray(header) ? header[0] : header,
      method: request.method,
      route: context.routePath,
      routeType: context.routeType,
      err: { message: err instanceof Error ? err.message : String(err), digest: (err as { digest?: string }).digest },
    },
    "request failed",
  );
};
