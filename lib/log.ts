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

export const logger = createLogger();
