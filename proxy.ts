// Next 16's proxy (formerly middleware.ts). Thin on purpose: a request id, the path for returning after
// sign-in, and a signed-out check that redirects pages and answers 401 to API calls. Role and unit decisions
// live in lib/auth/guard.ts, because server actions and route handlers are reachable by direct POST.
import { NextResponse, type NextRequest } from "next/server";
import { getToken } from "next-auth/jwt";

// /api/jobs/ is reached by the scheduler with its own secret and no session: its handler checks the secret or an
// administrator's session itself.
const PUBLIC_PREFIXES = ["/signin", "/api/auth/", "/api/health", "/api/jobs/"];

export async function proxy(req: NextRequest) {
  const requestId = req.headers.get("x-request-id") ?? crypto.randomUUID();
  const { pathname, search } = req.nextUrl;
  const isPublic = PUBLIC_PREFIXES.some((p) => pathname === p || pathname.startsWith(p));

  if (!isPublic) {
    const token = await getToken({ req, secret: process.env.NEXTAUTH_SECRET });
    if (!token) {
      if (pathname.startsWith("/api/")) {
        return NextResponse.json(
          { error: "unauthorized", message: "Sign in first." },
          { status: 401, headers: { "x-request-id": requestId, "Cache-Control": "no-store" } },
        );
      }
      const url = req.nextUrl.clone();
      url.pathname = "/signin";
      url.search = `?callbackUrl=${encodeURIComponent(pathname + search)}`;
      return NextResponse.redirect(url);
    }
  }

  const headers = new Headers(req.headers);
  headers.set("x-request-id", requestId);
  headers.set("x-corvane-path", pathname + search);
  const res = NextResponse.next({ request: { headers } });
  res.headers.set("x-request-id", requestId);
  return res;
}

export const config = {
  matcher: ["/((?!_next/static|_next/image|favicon.ico|icon.svg|fonts/).*)"],
};
