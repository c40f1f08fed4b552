// A biomedical engineer brings a new device on line (issue 7 item 8): frees a bed, registers the device, issues its
// stream token, assigns it to the bed, runs the simulator command the page shows, and sees the stream go Live; then
// rotates the token with an hour's grace while the device (the simulator) keeps the old one, and the beats keep
// coming. A clinician is refused on the registry pages. Every registry screen visited passes axe.
//
// The e2e app runs without the ingest, so this spec starts `tsx scripts/ingest.ts` on the e2e database itself
// (DATABASE_URL and NEXTAUTH_SECRET of the Playwright run, as scripts/test.sh sets them) and stops it afterwards,
// with the simulator, by process group. The simulator listens on a free port, named in the device's stream address.
import { spawn, type ChildProcess } from "node:child_process";
import { rmSync } from "node:fs";
import { createServer } from "node:net";
import { fileURLToPath } from "node:url";
import type { Page } from "@playwright/test";
import { simulatorCommand } from "@/lib/devices/simulator-command";
import { demoDeviceSerial } from "@/seeds/demo-data";
import { connect } from "@/tests/support/db";
import { expect, expectAccessible, signIn, test } from "./fixtures";

const ROOT = fileURLToPath(new URL("../..", import.meta.url));
/** Demo bed 4W-11 holds no stay (seeds/demo-data.ts DEMO_STAYS): its demo device can come off for the new one. */
const FREE_BED = "4W-11";
/** Starting tsx, the first connection and the ingest's reconnect delay (eventsource retries every few s) fit in this. */
const LIVE_WITHIN_MS = 60_000;
/** A new serial per run, so the spec also runs against a database it ran against before. */
const SERIAL = `LVG-E2E-${Date.now().toString(36).toUpperCase()}`;

let unitId: string;
let demoDeviceId: string;
let simPort: number;
const children: { name: string; proc: ChildProcess; output: string[] }[] = [];

async function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const server = createServer();
    server.once("error", reject);
    server.listen(0, "127.0.0.1", () => {
      const { port } = server.address() as { port: number };
      server.close(() => resolve(port));
    });
  });
}

/** Starts a child in its own process group (npm → sh → tsx → node: one signal to the group stops them all). */
function start(name: string, command: string, args: string[], env: NodeJS.ProcessEnv = process.env) {
  const proc = spawn(command, args, { cwd: ROOT, env, detached: true, stdio: ["ignore", "pipe", "pipe"] });
  const child = { name, proc, output: [] as string[] };
  const keep = (chunk: Buffer) => {
    child.output.push(chunk.toString());
    if (child.output.length > 400) child.output.splice(0, 100);
  };
  proc.stdout!.on("data", keep);
  proc.stderr!.on("data", keep);
  children.push(child);
  return child;
}

async function stopChild(c: (typeof children)[number]): Promise<void> {
  if (c.proc.exitCode !== null || c.proc.signalCode !== null) return;
  const exited = new Promise<void>((resolve) => c.proc.once("exit", () => resolve()));
  try {
    process.kill(-c.proc.pid!, "SIGTERM");
  } catch {
    return; // already gone
  }
  const timeout = new Promise<"timeout">((resolve) => setTimeout(() => resolve("timeout"), 10_000));
  if ((await Promise.race([exited, timeout])) === "timeout") {
    try {
      process.kill(-c.proc.pid!, "SIGKILL");
    } catch {
      // gone meanwhile
    }
  }
}

function outputOf(name: string): string {
  return children.find((c) => c.name === name)?.output.join("") ?? "";
}

test.beforeAll(async () => {
  const db = connect(process.env.DATABASE_URL!);
  try {
    unitId = (await db("units").where({ code: "4W" }).first("id"))!.id;
    demoDeviceId = (await db("devices").where({ serial: demoDeviceSerial(FREE_BED) }).first("id"))!.id;
  } finally {
    await db.destroy();
  }
  simPort = await freePort();
  // LOG_LEVEL info: its start line is how we know it listens for registry changes and reads devices.
  const ingest = start("ingest", "node_modules/.bin/tsx", ["scripts/ingest.ts"], { ...process.env, LOG_LEVEL: "info" });
  await expect.poll(() => outputOf("ingest"), { timeout: 30_000, message: "the ingest to start" }).toContain('"msg":"ingest running"');
  expect(ingest.proc.exitCode).toBeNull();
});

test.afterAll(async () => {
  for (const c of children.reverse()) await stopChild(c);
  // The simulator's one-device sequence ledger (scripts/simulator.ts), named after the device.
  rmSync(`${ROOT}/.corvane/simulator-seq-${SERIAL}.json`, { force: true });
});

test.afterEach(async ({}, testInfo) => {
  if (testInfo.status !== testInfo.expectedStatus) {
    for (const c of children) await testInfo.attach(`${c.name} output`, { body: c.output.join("").slice(-20_000), contentType: "text/plain" });
  }
});

/** The last-beat time the device page shows (its machine-readable instant), epoch ms; null without one. */
async function lastBeatAt(page: Page): Promise<number | null> {
  const time = page.getByRole("region", { name: "Record", exact: true }).locator("span", { hasText: /^last beat/ }).locator("time");
  if ((await time.count()) === 0) return null;
  return Date.parse((await time.getAttribute("datetime"))!);
}

test.describe("device registry", () => {
  test("a biomedical engineer registers a device, issues a token, assigns it, runs the simulator, sees it live and rotates the token", async ({ page }) => {
    test.setTimeout(240_000);
    await page.goto("/signin");
    await signIn(page, "biomed");
    await page.waitForURL((url) => !url.pathname.startsWith("/signin"));

    // The demo has a device on every bed: take the one off the empty bed first.
    await page.goto(`/units/${unitId}/devices/${demoDeviceId}`);
    await expect(page.getByRole("heading", { level: 1, name: demoDeviceSerial(FREE_BED) })).toBeVisible();
    await page.getByRole("button", { name: "Unassign…" }).click();
    await page.getByRole("button", { name: "Unassign now" }).click();
    await expect(page.getByRole("region", { name: "Bed", exact: true })).toContainText("Not on a bed");

    // Register.
    await page.goto(`/units/${unitId}/devices/new`);
    await expect(page.getByRole("heading", { level: 1, name: "Register a device" })).toBeVisible();
    await expectAccessible(page);
    const streamUrl = `http://127.0.0.1:${simPort}/devices/${SERIAL}/stream`;
    await page.getByLabel("Serial number").fill(SERIAL);
    await page.getByLabel("Manufacturer").fill("Larkspur Vitals Group (fictional)");
    await page.getByLabel("Model").fill("Larkspur demo monitor LM-2 (fictional)");
    await page.getByLabel("Firmware version").fill("2.4.1");
    await page.getByLabel("RR resolution (ms)").fill("7.8125");
    await page.getByLabel("Stream address").fill(streamUrl);
    await page.getByLabel("Notes").fill("Brought on line by the e2e test.");
    await page.getByRole("button", { name: "Register device" }).click();
    await page.waitForURL(new RegExp(`/units/${unitId}/devices/[0-9a-f-]{36}$`));
    await expect(page.getByRole("heading", { level: 1, name: SERIAL })).toBeVisible();
    await expectAccessible(page);

    // Issue the token: shown once, with the command that runs the simulator for this device with it.
    await page.getByRole("button", { name: "Issue token" }).click();
    const tokenField = page.getByRole("textbox", { name: "Stream token", exact: true });
    await expect(tokenField).toHaveValue(/^[A-Za-z0-9_-]{43}$/); // 32 random bytes, base64url (lib/devices/stream-token.ts)
    const token = await tokenField.inputValue();
    const commandField = page.getByRole("textbox", { name: "Simulator command, with this token" });
    const command = await commandField.inputValue();
    expect(command).toBe(simulatorCommand({ serial: SERIAL, streamUrl }, token));
    await expectAccessible(page);

    // Assign to the free bed.
    await page.getByRole("combobox", { name: "Bed" }).selectOption({ label: FREE_BED });
    await page.getByRole("button", { name: "Assign to bed" }).click();
    await expect(page.getByRole("region", { name: "Bed", exact: true })).toContainText(`On bed ${FREE_BED}`);
    // The token is still on screen after the refresh that showed the assignment.
    await expect(tokenField).toHaveValue(token);

    // Run the command as copied, from the project folder, as a person pasting it into a shell would.
    start("simulator", "sh", ["-c", command]);
    const deviceUrl = page.url();
    await expect(async () => {
      await page.goto(deviceUrl);
      await expect(page.getByRole("region", { name: "Record", exact: true }).getByText("Live", { exact: true })).toBeVisible({ timeout: 1_000 });
    }).toPass({ timeout: LIVE_WITHIN_MS, intervals: [1_000, 2_000] });
    const firstBeat = await lastBeatAt(page);
    expect(firstBeat).not.toBeNull();
    await expectAccessible(page);

    // Rotate with an hour's grace; the simulator keeps the old token and is not restarted.
    await page.getByLabel("Old token keeps working for").selectOption({ label: "1 hour" });
    await page.getByRole("button", { name: "Rotate token…" }).click();
    await page.getByRole("button", { name: "Rotate now" }).click();
    await expect(tokenField).not.toHaveValue(token);
    await expect(tokenField).toHaveValue(/^[A-Za-z0-9_-]{43}$/);
    const rotatedAt = Date.now();
    await expect(page.getByRole("region", { name: "Stream token", exact: true })).toContainText("Old token works until");
    await expectAccessible(page);

    // Beats keep arriving after the rotation: the last-beat time moves past it and the stream stays Live.
    await expect(async () => {
      await page.goto(deviceUrl);
      await expect(page.getByRole("region", { name: "Record", exact: true }).getByText("Live", { exact: true })).toBeVisible({ timeout: 1_000 });
      expect(await lastBeatAt(page)).toBeGreaterThan(rotatedAt);
    }).toPass({ timeout: LIVE_WITHIN_MS, intervals: [2_000] });
    expect(await lastBeatAt(page)).toBeGreaterThan(firstBeat!);
    expect(children.find((c) => c.name === "simulator")!.proc.exitCode).toBeNull();

    // The unit's Stream health table lists the device as Live too.
    await page.goto(`/units/${unitId}/stream-health`);
    const row = page.getByRole("row", { name: new RegExp(SERIAL) });
    await expect(row).toContainText("Live");
    await expectAccessible(page);
  });

  test("a clinician is refused on the registry pages", async ({ page }) => {
    await page.goto("/signin");
    await signIn(page, "clinician");
    await page.waitForURL((url) => !url.pathname.startsWith("/signin"));
    for (const path of [
      `/units/${unitId}/devices`,
      `/units/${unitId}/devices/new`,
      `/units/${unitId}/devices/import`,
      `/units/${unitId}/devices/${demoDeviceId}`,
      `/units/${unitId}/stream-health`,
      `/units/${unitId}/maintenance`,
    ]) {
      await page.goto(path);
      await expect(page, path).toHaveURL(/\/forbidden$/);
    }
  });
});
