// The ingest process, started (and stopped) by npm start beside the app: reads every active device's stream and
// stores its beats. A sibling process rather than part of the Next server, so a flood of device events never
// competes with page rendering, and each can be restarted alone.
import { db } from "@/lib/db/knex";
import { IngestService } from "@/lib/ingest/ingest-service";
import { logger } from "@/lib/log";

const service = new IngestService(db);
await service.start();
logger.info({ devices: service.readers.size }, "ingest running");

let stopping = false;
const stop = async (signal: string) => {
  if (stopping) return;
  stopping = true;
  logger.info({ signal }, "ingest stopping");
  await service.stop();
  await db.destroy();
  process.exit(0);
};
process.on("SIGINT", () => void stop("SIGINT"));
process.on("SIGTERM", () => void stop("SIGTERM"));
