// JSON logs through pino. Never log patient data: log ids, actions and outcomes only.
import pino, { type DestinationStream } from "pino";

// Defence in depth: names a caller might pass by mistake are removed before a line is written.
export const REDACTED_PATHS = [
  "password", "*.password", "password_hash", "*.password_hash", "passwordHash", "*.passwordHash",
  "display_name", "*.display_name", "displayName", "*.displayName",
  "record_number", "*.record_number", "recordNumber", "*.recordNumber",
  "birth_date", "*.birth_date", "headers.cookie", "*.headers.cookie", "headers.authorization", "*.headers.authorization",
];

export function createLogger(destination?: DestinationStream, level = process.env.LOG_LEVEL ?? "info") {
  return pino(
    {
      level,
      base: { service: "corvane" },
      timestamp: pino.stdTimeFunctions.isoTime,
      redact: { paths: REDACTED_PATHS, remove: true },
    },
    destination,
  );
}

/**
 * Standard output, written synchronously. When whoever reads it goes away (`npm start | tee log` stopped with Ctrl-C,
 * a closed terminal), later lines are dropped instead of being retried: otherwise the exit-time flush of pino's default
 * destination can wait on the broken pipe forever and keep a worker from stopping.
 */
function stdoutDestination(): DestinationStream {
  const dest = pino.destination({ dest: 1, sync: true });
  dest.on("error", (err: NodeJS.ErrnoException) => {
    if (err.code !== "EPIPE") throw err;
    dest.write = () => true;
    dest.flushSync = () => undefined;
  });
  return dest;
}

export const logger = createLogger(stdoutDestination());
