// The part of autocannon 8 (no bundled types) that scripts/bench-ui.ts uses.
declare module "autocannon" {
  interface Options {
    url: string;
    connections?: number;
    duration?: number;
    headers?: Record<string, string>;
    requests?: { method?: string; path?: string; setupRequest?: (req: { path?: string; [k: string]: unknown }) => { path?: string; [k: string]: unknown } }[];
  }
  interface Result {
    requests: { total: number; average: number };
    non2xx: number;
    errors: number;
    latency: { p50: number; p90: number; p99: number; average: number; max: number };
  }
  interface Instance extends PromiseLike<Result> {
    on(event: "response", listener: (client: unknown, statusCode: number, resBytes: number, responseTime: number) => void): this;
  }
  function autocannon(opts: Options): Instance;
  export default autocannon;
}
