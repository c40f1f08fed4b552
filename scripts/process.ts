// The two ends every long-running script shares: wait for SIGINT or SIGTERM and close what it serves (exit code 0,
// or 1 when closing fails), and run `main` to an exit code, printing an error in one line under the script's name.
import { logger } from "@/lib/log";

/** Resolves with 0 after `close` succeeds on the first SIGINT or SIGTERM, or 1 when it fails. */
export function closeOnSignal(name: string, close: () => Promise<unknown>): Promise<number> {
  return new Promise<number>((resolve) => {
    const stop = (signal: NodeJS.Signals) => {
      logger.info({ signal }, `${name} stopping`);
      close().then(
        () => resolve(0),
        (err: unknown) => {
          logger.error({ err }, `${name} did not close cleanly`);
          resolve(1);
        },
      );
    };
    process.once("SIGINT", stop);
    process.once("SIGTERM", stop);
  });
}

/** Runs the script's main and exits with its code; an error ends it with status 1 and one line on stderr. */
export function runScript(name: string, main: () => Promise<number>): void {
  main().then(
    (code) => process.exit(code),
    (err: unknown) => {
      console.error(`${name}: ${err instanceof Error ? err.message : String(err)}`);
      process.exit(1);
    },
  );
}
