import "server-only";
// One LISTEN connection per server process, fanned out to every open browser stream of that process.
import { EventEmitter } from "node:events";
import pg from "pg";
import { logger } from "@/lib/log";
import { LIVE_CHANNEL, liveEventSchema, type LiveEvent } from "./events";

type Listener = (event: LiveEvent) => void;

const globalForLive = globalThis as unknown as { corvaneLive?: LiveHub };

class LiveHub {
  private emitter = new EventEmitter();
  private client: pg.Client | null = null;
  private connecting: Promise<void> | null = null;

  constructor() {
    this.emitter.setMaxListeners(0);
  }

  subscribe(fn: Listener): () => void {
    this.emitter.on("event", fn);
    void this.ensureConnected();
    return () => this.emitter.off("event", fn);
  }

  private ensureConnected(): Promise<void> {
    if (this.client) return Promise.resolve();
    this.connecting ??= (async () => {
      const client = new pg.Client({ connectionString: process.env.DATABASE_URL });
      client.on("notification", (msg) => {
        if (msg.channel !== LIVE_CHANNEL || !msg.payload) return;
        const parsed = liveEventSchema.safeParse(JSON.parse(msg.payload));
        if (parsed.success) this.emitter.emit("event", parsed.data);
      });
      client.on("error", (err) => {
        logger.warn({ err: err.message }, "live listener lost its connection; reconnecting");
        this.client = null;
        setTimeout(() => void this.ensureConnected(), 2000);
      });
      try {
        await client.connect();
        await client.query(`LISTEN ${LIVE_CHANNEL}`);
        this.client = client;
      } catch (err) {
        logger.warn({ err: (err as Error).message }, "live listener could not connect; retrying");
        setTimeout(() => void this.ensureConnected(), 2000);
      } finally {
        this.connecting = null;
      }
    })();
    return this.connecting;
  }
}

export function liveHub(): LiveHub {
  globalForLive.corvaneLive ??= new LiveHub();
  return globalForLive.corvaneLive;
}
