// tsx scripts/simulator.ts [--port N] [--speed N] [--truth] [--no-backfill]
// The device simulator: a local stand-in for the bedside devices assigned to beds, serving each one's beat stream
// over Server-Sent Events on 127.0.0.1. A thin wrapper: read the devices from PostgreSQL, then lib/simulator.
import { parseArgs } from "node:util";
import { db } from "@/lib/db/knex";
import { logger } from "@/lib/log";
import { loadSimulatedDevices } from "@/lib/simulator/load-devices";
import { FileSeqLedger } from "@/lib/simulator/seq-ledger";
import { createSimulatorServer } from "@/lib/simulator/server";
import { DEFAULT_SIMULATOR_PORT, simulatorStreamUrl } from "@/seeds/demo-data";
import { closeOnSignal, runScript } from "./process";

const USAGE = `usage: tsx scripts/simulator.ts [options]

  --port N         port on 127.0.0.1 (default: CORVANE_SIM_PORT, else ${DEFAULT_SIMULATOR_PORT})
  --speed N        simulated seconds per second (default 1 = real time; 60 = a minute a second; at most 3600)
  --truth          tests only: serve /devices/:serial/truth and /devices/:serial/inject
  --no-backfill    start at now instead of 19:00 local on the previous evening
  --seq-ledger F   keep each device's sequence numbers across restarts in the JSON file F (npm start:
                   .corvane/simulator-seq.json); without it every start numbers from 1
  --help           this text

Reads every device with an open bed assignment from DATABASE_URL; needs NEXTAUTH_SECRET to unseal their tokens.
Invented demo data only.`;

class UsageError extends Error {}

function number(name: string, raw: string, check: (v: number) => boolean, need: string): number {
  const v = Number(raw);
  if (raw.trim() === "" || !Number.isFinite(v) || !check(v)) throw new UsageError(`${name} needs ${need}, got "${raw}"`);
  return v;
}

function parseCommandLine(argv: string[]) {
  let values;
  try {
    ({ values } = parseArgs({
      args: argv,
      strict: true,
      allowPositionals: false,
      options: {
        port: { type: "string" },
        speed: { type: "string" },
        truth: { type: "boolean" },
        "no-backfill": { type: "boolean" },
        "seq-ledger": { type: "string" },
        help: { type: "boolean" },
      },
    }));
  } catch (err) {
    throw new UsageError((err as Error).message);
  }
  if (values.help) return null;
  const isPort = (v: number) => Number.isInteger(v) && v >= 1 && v <= 65535;
  const port =
    values.port !== undefined
      ? number("--port", values.port, isPort, "a whole number 1–65535")
      : process.env.CORVANE_SIM_PORT
        ? number("CORVANE_SIM_PORT", process.env.CORVANE_SIM_PORT, isPort, "a whole number 1–65535")
        : DEFAULT_SIMULATOR_PORT;
  const speed = values.speed !== undefined ? number("--speed", values.speed, (v) => v > 0 && v <= 3600, "a number above 0 and at most 3600") : 1;
  const seqLedger = values["seq-ledger"];
  if (seqLedger !== undefined && seqLedger.trim() === "") throw new UsageError("--seq-ledger needs a file name");
  return { port, speed, truth: values.truth ?? false, backfill: !values["no-backfill"], seqLedger };
}

async function main(): Promise<number> {
  let args;
  try {
    args = parseCommandLine(process.argv.slice(2));
  } catch (err) {
    if (err instanceof UsageError) {
      console.error(`simulator: ${err.message}\n\n${USAGE}`);
      return 2;
    }
    throw err;
  }
  if (args === null) {
    console.log(USAGE);
    return 0;
  }
  let devices;
  try {
    devices = await loadSimulatedDevices(db);
  } finally {
    await db.destroy();
  }
  if (devices.length === 0) {
    console.error("simulator: no device has an open bed assignment; seed the demo (CORVANE_DEMO_MODE=1 npm start) or assign devices first");
    return 1;
  }
  for (const d of devices) {
    if (d.streamUrl !== simulatorStreamUrl(args.port, d.serial)) {
      logger.warn({ serial: d.serial, registered: d.streamUrl, port: args.port }, "device registered with another stream URL than this simulator serves");
    }
  }
  const seqLedger = args.seqLedger ? new FileSeqLedger(args.seqLedger) : undefined;
  const sim = createSimulatorServer({ devices, speed: args.speed, truth: args.truth, backfill: args.backfill, seqLedger });
  await sim.listen(args.port);
  return closeOnSignal("simulator", () => sim.close());
}

runScript("simulator", main);
