import "server-only";
import { headers } from "next/headers";
import { randomUUID } from "node:crypto";

export interface RequestContext {
  requestId: string;
  clientAddress: string | null;
  /** Path and query of the page being rendered (set by proxy.ts), for returning after sign-in. */
  pathname: string;
}

/** Client address from the first hop of X-Forwarded-For (set by Next's server or a trusted reverse proxy). */
export function clientAddressFrom(h: { get(name: string): string | null }): string | null {
  const forwarded = h.get("x-forwarded-for");
  if (forwarded) return forwarded.split(",")[0]!.trim() || null;
  return h.get("x-real-ip");
}

export async function requestContext(): Promise<RequestContext> {
  const h = await headers();
  return {
    requestId: h.get("x-request-id") ?? randomUUID(),
    clientAddress: clientAddressFrom(h),
    pathname: h.get("x-corvane-path") ?? "/",
  };
}
