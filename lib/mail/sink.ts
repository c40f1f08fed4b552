// The local SMTP sink: a demo-mode stand-in for a mail service. It accepts any message on loopback, parses it with
// mailparser and stores it in mail_received, where the demo Mailbox page shows it. Nothing leaves the machine.
// Loopback only: it refuses any other address, has no authentication and no TLS, and must never face a network.
import { isIP } from "node:net";
import type { AddressInfo } from "node:net";
import type { Knex } from "knex";
import { simpleParser } from "mailparser";
import { SMTPServer, type SMTPServerDataStream, type SMTPServerSession } from "smtp-server";
import { logger } from "@/lib/log";

/** Largest message accepted; Corvane's messages are a few kilobytes. */
export const SINK_MAX_BYTES = 1024 * 1024;

export interface MailSinkOptions {
  db: Knex;
  /** 0 = any free port (tests). */
  port: number;
  host?: string;
}

export interface MailSink {
  /** The port actually listened on. */
  port: number;
  close(): Promise<void>;
}

function isLoopback(host: string): boolean {
  if (host === "::1") return true;
  return isIP(host) === 4 && host.startsWith("127.");
}

async function readAll(stream: SMTPServerDataStream): Promise<Buffer> {
  const chunks: Buffer[] = [];
  for await (const chunk of stream) chunks.push(chunk as Buffer);
  return Buffer.concat(chunks);
}

async function store(db: Knex, raw: Buffer, session: SMTPServerSession): Promise<string> {
  const parsed = await simpleParser(raw);
  const [row] = await db("mail_received")
    .insert({
      envelope_from: session.envelope.mailFrom ? session.envelope.mailFrom.address : null,
      envelope_to: session.envelope.rcptTo.map((r) => r.address),
      subject: parsed.subject ?? null,
      body_text: parsed.text ?? null,
      message_id: parsed.messageId ?? null,
      raw: raw.toString("utf8"),
    })
    .returning("id");
  return String(row!.id);
}

/** Starts the sink; resolves once it listens. */
export async function createMailSink({ db, port, host = "127.0.0.1" }: MailSinkOptions): Promise<MailSink> {
  if (!isLoopback(host)) throw new RangeError(`the mail sink listens on loopback only (127.0.0.1 or ::1), not "${host}"`);
  if (!Number.isInteger(port) || port < 0 || port > 65_535) throw new RangeError(`port must be a whole number 0–65535, got ${port}`);
  const server = new SMTPServer({
    name: "corvane-mail-sink.localhost",
    banner: "Corvane local demo mail sink — stores messages for the demo Mailbox; delivers nothing",
    authOptional: true,
    disabledCommands: ["STARTTLS"],
    size: SINK_MAX_BYTES,
    logger: false,
    onData(stream, session, callback) {
      readAll(stream)
        .then(async (raw) => {
          if (stream.sizeExceeded) {
            const err = Object.assign(new Error(`message larger than ${SINK_MAX_BYTES} bytes`), { responseCode: 552 });
            return callback(err);
          }
          const id = await store(db, raw, session);
          logger.info({ mailReceivedId: id }, "mail sink stored a message");
          callback();
        })
        .catch((err: unknown) => {
          logger.error({ err: err instanceof Error ? { message: err.message } : String(err) }, "mail sink could not store a message");
          callback(Object.assign(new Error("could not store the message; try again later"), { responseCode: 451 }));
        });
    },
  });
  server.on("error", (err) => logger.error({ err: { message: err.message } }, "mail sink error"));
  await new Promise<void>((resolve, reject) => {
    const onError = (err: Error) => reject(err);
    server.server.once("error", onError);
    server.listen(port, host, () => {
      server.server.off("error", onError);
      resolve();
    });
  });
  const actual = (server.server.address() as AddressInfo).port;
  logger.info({ host, port: actual }, "mail sink listening");
  return {
    port: actual,
    close: () => new Promise<void>((resolve) => server.close(() => resolve())),
  };
}
