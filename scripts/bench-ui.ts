// npm run bench:ui (through scripts/bench.sh, which starts PostgreSQL, writes the bench data and starts the app):
// p95 latency of the Ward overview and Night review route handlers on loopback under a small concurrent load
// (autocannon), and the time from navigation until every Night review chart is drawn in headless Debian chromium
// (the page's performance mark "corvane:night-charts-drawn"). Goals: p95 < 50 ms; charts < 1 s.
import autocannon from "autocannon";
import { chromium } from "@playwright/test";

const base = process.env.CORVANE_BENCH_URL ?? "http://127.0.0.1:3300";
const data = JSON.parse(process.env.CORVANE_BENCH_DATA ?? "null") as { unitId: string; stayIds: string[]; email: string; password: string } | null;
if (!data) throw new Error("CORVANE_BENCH_DATA (the JSON line of scripts/bench-ui-data.ts) is not set");
const SECONDS = Number(process.env.CORVANE_BENCH_SECONDS ?? 15);
/** Concurrent connections per route (CORVANE_BENCH_CONNECTIONS; 2 = one per core of this machine). */
const CONNECTIONS = Number(process.env.CORVANE_BENCH_CONNECTIONS ?? 2);
const PAGE_LOADS = 7;

/** Signs in through next-auth's credentials endpoint and returns the session cookie header. */
async function signIn(): Promise<string> {
  const jar = new Map<string, string>();
  const keep = (res: Response) => {
    for (const c of res.headers.getSetCookie()) {
      const [pair] = c.split(";");
      const i = pair!.indexOf("=");
      jar.set(pair!.slice(0, i), pair!.slice(i + 1));
    }
  };
  const cookie = () => [...jar].map(([k, v]) => `${k}=${v}`).join("; ");
  const csrfRes = await fetch(`${base}/api/auth/csrf`);
  keep(csrfRes);
  const { csrfToken } = (await csrfRes.json()) as { csrfToken: string };
  const res = await fetch(`${base}/api/auth/callback/credentials`, {
    method: "POST",
    headers: { "content-type": "application/x-www-form-urlencoded", cookie: cookie() },
    body: new URLSearchParams({ csrfToken, email: data!.email, password: data!.password, json: "true" }),
    redirect: "manual",
  });
  keep(res);
  if (![...jar.keys()].some((k) => k.includes("session-token"))) throw new Error(`sign-in failed (${res.status})`);
  return cookie();
}

const percentile = (sorted: number[], p: number) => sorted[Math.min(sorted.length - 1, Math.ceil((p / 100) * sorted.length) - 1)]!;

async function load(name: string, paths: string[], cookie: string) {
  let k = 0;
  const times: number[] = [];
  const statuses = new Map<number, number>();
  const instance = autocannon({
    url: base,
    connections: CONNECTIONS,
    duration: SECONDS,
    headers: { cookie },
    requests: [{ method: "GET", setupRequest: (req) => ({ ...req, path: paths[k++ % paths.length] }) }],
  });
  instance.on("response", (_c, status, _b, ms) => {
    times.push(ms);
    statuses.set(status, (statuses.get(status) ?? 0) + 1);
  });
  const result = await instance;
  times.sort((a, b) => a - b);
  const p95 = percentile(times, 95);
  console.log(
    `${name.padEnd(22)} ${String(times.length).padStart(6)} requests  p50 ${percentile(times, 50).toFixed(1)} ms  p95 ${p95.toFixed(1)} ms  p99 ${percentile(times, 99).toFixed(1)} ms  ` +
      `statuses ${JSON.stringify(Object.fromEntries(statuses))}  errors ${result.errors}  (goal p95 < 50 ms: ${p95 < 50 ? "met" : "NOT met"})`,
  );
}

async function chartsDrawn(cookie: string) {
  const browser = await chromium.launch({ executablePath: process.env.CORVANE_CHROMIUM ?? "/usr/bin/chromium", args: ["--no-sandbox", "--disable-gpu"] });
  try {
    const context = await browser.newContext({ viewport: { width: 1280, height: 800 } });
    await context.addCookies(cookie.split("; ").map((c) => {
      const i = c.indexOf("=");
      return { name: c.slice(0, i), value: c.slice(i + 1), url: base };
    }));
    const page = await context.newPage();
    const times: number[] = [];
    for (let i = 0; i < PAGE_LOADS; i++) {
      await page.goto(`${base}/stays/${data!.stayIds[i % data!.stayIds.length]}/night`);
      const handle = await page.waitForFunction(() => performance.getEntriesByName("corvane:night-charts-drawn")[0]?.startTime ?? null, null, { timeout: 30_000 });
      times.push((await handle.jsonValue()) as number);
    }
    const first = times.shift()!; // the first load also warms the server's compiled routes
    times.sort((a, b) => a - b);
    const median = percentile(times, 50);
    console.log(
      `Night review charts drawn: median ${median.toFixed(0)} ms, worst ${times[times.length - 1]!.toFixed(0)} ms over ${times.length} loads (first, cold: ${first.toFixed(0)} ms) ` +
        `(goal < 1000 ms: ${median < 1000 ? "met" : "NOT met"})`,
    );
  } finally {
    await browser.close();
  }
}

const cookie = await signIn();
console.log(`bench:ui — ${data.stayIds.length} beds × 7 days of windows; ${CONNECTIONS} connections, ${SECONDS} s per route, loopback`);
await load("Ward overview route", [`/api/units/${data.unitId}/overview`], cookie);
await load("Night review route", data.stayIds.map((s) => `/api/stays/${s}/night`), cookie);
await chartsDrawn(cookie);
