// Server configuration from the environment, parsed once (every variable is documented in .env.example).
import { z } from "zod";

const schema = z.object({
  CORVANE_IDLE_MINUTES: z.coerce.number().int().min(1).max(720).default(15),
  CORVANE_SIGNIN_MAX_FAILURES_ACCOUNT: z.coerce.number().int().min(1).default(5),
  CORVANE_SIGNIN_MAX_FAILURES_ADDRESS: z.coerce.number().int().min(1).default(20),
  CORVANE_SIGNIN_WINDOW_MINUTES: z.coerce.number().int().min(1).default(15),
  CORVANE_DEMO_MODE: z.enum(["0", "1"]).default("0"),
});

export type Config = z.infer<typeof schema>;

let cached: Config | null = null;
export function config(): Config {
  cached ??= schema.parse(process.env);
  return cached;
}
