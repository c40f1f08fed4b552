// The shell command a biomedical engineer runs from the project folder to have the local simulator stand in for a newly
// registered device (scripts/simulator.ts one-device mode). Only for stream addresses the simulator can serve: plain
// http on this machine, path /devices/<serial>/stream; anything else is a real device and gets no command. Devices on
// the port of the demo simulator that `npm start` runs are served by it already (it reads their current tokens when
// it starts), so they get no command either: a second simulator could not listen on that port.
import { DEFAULT_SIMULATOR_PORT } from "@/seeds/demo-data";

const LOCAL_HOSTS = new Set(["127.0.0.1", "localhost"]);

/** POSIX single quotes: nothing inside is special except ' itself, written as '\''. */
function singleQuote(value: string): string {
  return `'${value.replace(/'/g, `'\\''`)}'`;
}

/** Bare when only characters no POSIX shell treats specially (and not option-like), else single-quoted. */
function shellQuote(value: string): string {
  return /^[A-Za-z0-9._\/:@%+][A-Za-z0-9._\/:=@%+-]*$/.test(value) ? value : singleQuote(value);
}

/** The port the simulator must listen on to serve this device's stream URL, or null if it cannot. */
function simulatorPort(serial: string, streamUrl: string): number | null {
  let url: URL;
  try {
    url = new URL(streamUrl);
  } catch {
    return null;
  }
  if (url.protocol !== "http:" || !LOCAL_HOSTS.has(url.hostname)) return null;
  if (url.username || url.password || url.search || url.hash) return null;
  if (url.pathname !== `/devices/${encodeURIComponent(serial)}/stream`) return null;
  // URL drops the scheme's default port (":80") to "".
  const port = url.port === "" ? 80 : Number(url.port);
  return Number.isInteger(port) && port >= 1 && port <= 65535 ? port : null;
}

/** The port of the demo simulator `npm start` runs (CORVANE_SIM_PORT, as scripts/start.sh passes it). */
export function demoSimulatorPort(): number {
  return Number(process.env.CORVANE_SIM_PORT) || DEFAULT_SIMULATOR_PORT;
}

/** True when the stream address is one the demo simulator of `npm start` serves. */
export function servedByDemoSimulator({ serial, streamUrl }: { serial: string; streamUrl: string }): boolean {
  return simulatorPort(serial, streamUrl) === demoSimulatorPort();
}

export function simulatorCommand({ serial, streamUrl }: { serial: string; streamUrl: string }, token: string | null): string | null {
  const port = simulatorPort(serial, streamUrl);
  if (port === null || port === demoSimulatorPort()) return null;
  if (token === null) return `npm run simulator -- --device ${shellQuote(serial)} --token '<token>' --port ${port}`;
  // A base64url token may start with "-"; node:util parseArgs only accepts such a value attached with "=".
  const tokenArg = token.startsWith("-") ? `--token=${singleQuote(token)}` : `--token ${singleQuote(token)}`;
  return `npm run simulator -- --device ${shellQuote(serial)} ${tokenArg} --port ${port}`;
}
