// tsx scripts/simulator.ts [--port N] [--speed N] [--truth] [--no-backfill]
// tsx scripts/simulator.ts --device SERIAL --token TOKEN [--scenario NAME] [--port N]   (npm run simulator -- …)
// The device simulator: a local stand-in for the bedside devices assigned to beds, serving each one's beat stream
// over Server-Sent Events on 127.0.0.1. A thin wrapper: read the devices from PostgreSQL, then lib/simulator.
// The one-device mode stands in for one newly registered device with the token its page showed, without reading
// the database (the command is shown on the device page: lib/devices/simulator-command.ts).
import { join } from "node:path";
import { parseArgs } from "node:util";
import { db } from "@/lib/db/knex";
import { logger } from "@/lib/log";
import { hashStreamToken } from "@/lib/devices/stream-token";
import { changedStreamTokens, loadSimulatedDevices } from "@/lib/simulator/load-devices";
import { FileSeqLedger } from "@/lib/simulator/seq-ledger";
import { createSimulatorServer } from "@/lib/simulator/server";
import type { SimulatedDeviceConfig } from "@/lib/simulator/device";
import { NEONATAL_SCENARIOS } from "@/lib/simulator/scenarios";
import { DEFAULT_SIMULATOR_PORT, DEMO_TIME_ZONE, simulatorStreamUrl, type DemoScenario } from "@/seeds/demo-data";
import { closeOnSignal, runScript } from "./process";

/** Every scenario a device can stream (a record, so a scenario added to DemoScenario must be listed here). */
const SCENARIO_NAMES: Record<DemoScenario, true> = {
  healthy_sleep: true,
  complexity_loss_rigid: true,
  complexity_loss_decorrelated: true,
  af_episodes: true,
  paced: true,
  ectopy: true,
  artefacts: true,
  dropouts_clock_drift: true,
  nicu: true,
  nicu_presepsis: true,
};
const SCENARIOS = Object.keys(SCENARIO_NAMES) as DemoScenario[];
const DEFAULT_SCENARIO: DemoScenario = "healthy_sleep";
/** How often the demo simulator looks for issued or rotated stream tokens, ms. */
const TOKEN_POLL_MS = 10_000;
/** The registry's serial form (lib/devices/device-fields.validation.ts), also safe as part of a file name. */
const SERIAL = /^[A-Za-z0-9][A-Za-z0-9-]{0,63}$/;

const USAGE = `usage: tsx scripts/simulator.ts [options]                       every assigned device, from the database
       npm run simulator -- --device SERIAL --token TOKEN [options]   one device, no database

  --port N         port on 127.0.0.1 (default: CORVANE_SIM_PORT, else ${DEFAULT_SIMULATOR_PORT})
  --speed N        simulated seconds per second (default 1 = real time; 60 = a minute a second; at most 3600)
  --truth          tests only: serve /devices/:serial/truth and /devices/:serial/inject
  --no-backfill    start at now instead of 19:00 local on the evening of the last review night that has
                   ended (always so with --device)
  --seq-ledger F   keep each device's sequence numbers across restarts in the JSON file F (npm start:
                   .corvane/simulator-seq.json); without it every start numbers from 1
  --device SERIAL  serve only this device, at /devices/SERIAL/stream, starting now; its numbering is kept in
                   .corvane/simulator-seq-SERIAL.json unless --seq-ledger says otherwise, so a restart (say, with
                   a rotated token) continues where the ingest left off
  --token TOKEN    with --device: the stream token the device's page showed when it was issued
  --scenario NAME  with --device: what it streams (default ${DEFAULT_SCENARIO}); one of
                   ${SCENARIOS.join(", ")}
  --help           this text

Without --device: reads every device with an open bed assignment from DATABASE_URL, and every 10 s any token
issued or rotated since; needs NEXTAUTH_SECRET to unseal them. With --device: reads nothing; the device page shows the exact command. Invented demo data only.`;

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
        device: { type: "string" },
        token: { type: "string" },
        scenario: { type: "string" },
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
  const common = { port, speed, truth: values.truth ?? false, seqLedger };
  if (values.device === undefined) {
    if (values.token !== undefined || values.scenario !== undefined) throw new UsageError("--token and --scenario go with --device SERIAL");
    return { ...common, backfill: !values["no-backfill"], one: null };
  }
  const serial = values.device.trim();
  if (!SERIAL.test(serial)) throw new UsageError(`--device needs the device's serial number (letters, digits and dashes, as registered), got "${values.device}"`);
  const token = values.token;
  if (token === undefined || token.trim() === "" || token === "<token>") {
    throw new UsageError("--device needs --token TOKEN: the stream token shown on the device's page when it was issued or rotated");
  }
  if (/\s/.test(token)) throw new UsageError("--token must not contain spaces: copy the token exactly as shown");
  const scenario = values.scenario ?? DEFAULT_SCENARIO;
  if (!SCENARIOS.includes(scenario as DemoScenario)) throw new UsageError(`--scenario must be one of ${SCENARIOS.join(", ")}; got "${scenario}"`);
  // A newly registered device starts streaming now: no night to backfill.
  return { ...common, backfill: false, one: { serial, token, scenario: scenario as DemoScenario } };
}

/** The one-device mode's device: the demo's time zone, and the resolution the demo registers for its kind. */
function oneDevice(one: { serial: string; token: string; scenario: DemoScenario }): SimulatedDeviceConfig {
  const neonatal = NEONATAL_SCENARIOS.includes(one.scenario);
  return { ...one, timeZone: DEMO_TIME_ZONE, resolutionMs: neonatal ? 1 : 1000 / 128 };
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
  if (args.one) {
    await db.destroy(); // imported for the database mode; never connected here
    const ledgerPath = args.seqLedger ?? join(".corvane", `simulator-seq-${args.one.serial}.json`);
    const seqLedger = new FileSeqLedger(ledgerPath);
    const sim = createSimulatorServer({ devices: [oneDevice(args.one)], speed: args.speed, truth: args.truth, backfill: false, seqLedger });
    const { port } = await sim.listen(args.port);
    logger.info({ serial: args.one.serial, scenario: args.one.scenario, stream: simulatorStreamUrl(port, args.one.serial) }, "simulating one device");
    return closeOnSignal("simulator", () => sim.close());
  }
  let devices;
  try {
    devices = await loadSimulatedDevices(db);
  } catch (err) {
    await db.destroy();
    throw err;
  }
  if (devices.length === 0) {
    await db.destroy();
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
  // A token issued or rotated on a device's page reaches its monitor here, as if entered on it: polled, so the
  // simulator needs nothing from the app.
  const known = new Map(devices.map((d) => [d.serial, hashStreamToken(d.token)]));
  let polling = false;
  const poll = setInterval(() => {
    if (polling) return;
    polling = true;
    changedStreamTokens(db, known)
      .then(({ tokens, errors }) => {
        for (const [serial, { token, hash }] of tokens) {
          sim.setToken(serial, token);
          known.set(serial, hash);
          logger.info({ serial }, "the device's stream token changed in the registry: its monitor now takes the new one");
        }
        for (const e of errors) logger.warn({ err: e }, "a changed stream token could not be read; the monitor keeps its token");
      })
      .catch((err: unknown) => logger.warn({ err }, "could not read the devices' stream tokens; trying again"))
      .finally(() => {
        polling = false;
      });
  }, TOKEN_POLL_MS);
  return closeOnSignal("simulator", async () => {
    clearInterval(poll);
    await sim.close();
    await db.destroy();
  });
}

runScript("simulator", main);
