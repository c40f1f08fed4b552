// next-auth v4 configuration: e-mail + password (argon2id), JWT sessions carrying user id and unit-scoped roles.
import type { NextAuthOptions } from "next-auth";
import CredentialsProvider from "next-auth/providers/credentials";
import { randomUUID } from "node:crypto";
import { z } from "zod";
import { recordAudit } from "@/lib/audit/record";
import { config } from "@/lib/config";
import { logger } from "@/lib/log";
import { authenticate } from "./sign-in";
import { signInSchema } from "./sign-in.validation";

type HeaderBag = Record<string, string | string[] | undefined> | undefined;
const header = (h: HeaderBag, name: string): string | null => {
  const v = h?.[name];
  return (Array.isArray(v) ? v[0] : v) ?? null;
};

export function authOptions(): NextAuthOptions {
  const idleSeconds = config().CORVANE_IDLE_MINUTES * 60;
  return {
    secret: process.env.NEXTAUTH_SECRET,
    // The session lapses after the idle period unless activity refreshes it (components/IdleLock.tsx).
    session: { strategy: "jwt", maxAge: idleSeconds },
    jwt: { maxAge: idleSeconds },
    pages: { signIn: "/signin", error: "/signin" },
    providers: [
      CredentialsProvider({
        id: "credentials",
        name: "E-mail and password",
        credentials: { email: { type: "email" }, password: { type: "password" } },
        async authorize(credentials, req) {
          const parsed = signInSchema.safeParse(credentials);
          if (!parsed.success) throw new Error("invalid");
          const forwarded = header(req.headers, "x-forwarded-for");
          const result = await authenticate(parsed.data, {
            requestId: header(req.headers, "x-request-id") ?? randomUUID(),
            clientAddress: forwarded ? forwarded.split(",")[0]!.trim() : header(req.headers, "x-real-ip"),
          });
          // The message reaches the sign-in page as its error code.
          if (!result.ok) throw new Error(result.code);
          return result.user;
        },
      }),
    ],
    callbacks: {
      async jwt({ token, user }) {
        if (user) {
          token.userId = user.id;
          token.grants = user.grants;
        }
        return token;
      },
      async session({ session, token }) {
        session.user = { id: token.userId, name: token.name ?? "", email: token.email ?? "", grants: token.grants };
        return session;
      },
    },
    events: {
      async signOut({ token }) {
        const parsed = z.object({ userId: z.string(), email: z.string().nullish() }).safeParse(token);
        await recordAudit({
          actor: { userId: parsed.data?.userId ?? null, email: parsed.data?.email ?? null, role: null },
          action: "auth.sign_out",
          outcome: "success",
          requestId: randomUUID(),
          clientAddress: null,
        });
      },
    },
    logger: {
      error: (code, metadata) => logger.error({ code, metadata: metadata instanceof Error ? metadata.message : undefined }, "next-auth error"),
      warn: (code) => logger.warn({ code }, "next-auth warning"),
      debug: () => undefined,
    },
  };
}
