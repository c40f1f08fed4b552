// JSON logs through pino. Never log patient data: log ids, actions and outcomes only.
import pino from "pino";

export const logger = pino({
  level: process.env.LOG_LEVEL ?? "info",
  base: { service: "corvane" },
  timestamp: pino.stdTimeFunctions.isoTime,
  // Defence in depth: names a caller might pass by mistake are removed before a line is written.
  redact: {
    paths: ["password", "*.password", "password_hash", "*.password_hash", "display_name", "*.display_name",
      "record_number", "*.record_number", "headers.cookie", "*.headers.cookie"],
    remove: true,
  },
});
