// Mail settings from the environment (documented in .env.example), parsed once with zod: an invalid value is an error,
// never silently replaced by the default. The defaults point at the local SMTP sink (lib/mail/sink.ts) on loopback,
// so the demo sends nothing off the machine; a real relay is a configuration change (host, port, TLS, credentials).
import nodemailer, { type Transporter } from "nodemailer";
import { z } from "zod";

const port = z.coerce.number().int().min(1).max(65_535);
const flag = z
  .enum(["true", "false", "1", "0"], { error: "must be true, false, 1 or 0" })
  .default("false")
  .transform((v) => v === "true" || v === "1");

const schema = z
  .object({
    SMTP_HOST: z.string().trim().min(1).default("127.0.0.1"),
    /** 2525 = the local sink (CORVANE_SMTP_SINK_PORT's default). */
    SMTP_PORT: port.default(2525),
    /** true = TLS from the first byte (port 465 style); false = plain, upgraded by STARTTLS when the relay offers it. */
    SMTP_SECURE: flag,
    SMTP_USER: z.string().min(1).optional(),
    SMTP_PASS: z.string().min(1).optional(),
    MAIL_FROM: z.string().trim().min(3).default("Corvane review flags (demo) <corvane-noreply@larkspur.example>"),
    /** Port the local sink listens on (npm start, demo mode only). */
    CORVANE_SMTP_SINK_PORT: port.default(2525),
    /** Base of the links in messages; default http://127.0.0.1:${PORT}, as npm start sets it. */
    NEXTAUTH_URL: z.url().optional(),
    PORT: port.default(3000),
  })
  .refine((c) => (c.SMTP_USER === undefined) === (c.SMTP_PASS === undefined), {
    message: "set both SMTP_USER and SMTP_PASS, or neither",
    path: ["SMTP_USER"],
  });

export type MailConfig = z.infer<typeof schema>;

/** Parses mail settings from `env`; throws with every problem named. */
export function parseMailConfig(env: Record<string, string | undefined>): MailConfig {
  // An empty value in .env ("SMTP_USER=") means unset, as for the other settings.
  const cleaned = Object.fromEntries(Object.entries(env).filter(([, v]) => v !== undefined && v !== ""));
  const parsed = schema.safeParse(cleaned);
  if (!parsed.success) throw new Error(`invalid mail settings: ${parsed.error.issues.map((i) => `${i.path.join(".")}: ${i.message}`).join("; ")}`);
  return parsed.data;
}

let cached: MailConfig | null = null;
/** The process's mail settings (read once). */
export function mailConfig(): MailConfig {
  cached ??= parseMailConfig(process.env);
  return cached;
}

/** Where links in messages point, without a trailing slash. */
export function appBaseUrl(c: MailConfig = mailConfig()): string {
  return (c.NEXTAUTH_URL ?? `http://127.0.0.1:${c.PORT}`).replace(/\/+$/, "");
}

/** Short timeouts: an unreachable relay fails the attempt quickly, and the outbox retries with backoff. */
const CONNECTION_TIMEOUT_MS = 10_000;
const SOCKET_TIMEOUT_MS = 30_000;

/** A nodemailer SMTP transport for the configured relay (one connection per message; no pool to go stale). */
export function createTransport(c: MailConfig = mailConfig()): Transporter {
  return nodemailer.createTransport({
    host: c.SMTP_HOST,
    port: c.SMTP_PORT,
    secure: c.SMTP_SECURE,
    auth: c.SMTP_USER && c.SMTP_PASS ? { user: c.SMTP_USER, pass: c.SMTP_PASS } : undefined,
    connectionTimeout: CONNECTION_TIMEOUT_MS,
    greetingTimeout: CONNECTION_TIMEOUT_MS,
    socketTimeout: SOCKET_TIMEOUT_MS,
  });
}
