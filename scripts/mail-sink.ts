// tsx scripts/mail-sink.ts [--port N]
// The local SMTP sink as a process (npm start runs it in demo mode): stores every message it receives in PostgreSQL
// for the demo Mailbox. A thin wrapper over lib/mail/sink.
import { parseArgs } from "node:util";
import { db } from "@/lib/db/knex";
import { mailConfig } from "@/lib/mail/config";
import { createMailSink } from "@/lib/mail/sink";
import { closeOnSignal, runScript } from "./process";

const USAGE = `usage: tsx scripts/mail-sink.ts [options]

  --port N   port on 127.0.0.1 (default: CORVANE_SMTP_SINK_PORT, else 2525)
  --help     this text

Stores received messages in DATABASE_URL's mail_received table (demo Mailbox). Loopback only; delivers nothing.`;

class UsageError extends Error {}

function parseCommandLine(argv: string[]): { port: number } | null {
  let values;
  try {
    ({ values } = parseArgs({ args: argv, strict: true, allowPositionals: false, options: { port: { type: "string" }, help: { type: "boolean" } } }));
  } catch (err) {
    throw new UsageError((err as Error).message);
  }
  if (values.help) return null;
  if (values.port === undefined) return { port: mailConfig().CORVANE_SMTP_SINK_PORT };
  const port = Number(values.port);
  if (values.port.trim() === "" || !Number.isInteger(port) || port < 1 || port > 65_535) throw new UsageError(`--port needs a whole number 1–65535, got "${values.port}"`);
  return { port };
}

async function main(): Promise<number> {
  let args;
  try {
    args = parseCommandLine(process.argv.slice(2));
  } catch (err) {
    if (err instanceof UsageError) {
      console.error(`mail-sink: ${err.message}\n\n${USAGE}`);
      return 2;
    }
    throw err;
  }
  if (args === null) {
    console.log(USAGE);
    return 0;
  }
  const sink = await createMailSink({ db, port: args.port, host: "127.0.0.1" });
  return closeOnSignal("mail sink", () => sink.close().then(() => db.destroy()));
}

runScript("mail-sink", main);
