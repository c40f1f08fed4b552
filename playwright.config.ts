import { defineConfig } from "@playwright/test";

const PORT = Number(process.env.CORVANE_TEST_APP_PORT ?? 3100);
export const BASE_URL = `http://127.0.0.1:${PORT}`;

export default defineConfig({
  testDir: "tests/e2e",
  outputDir: ".corvane/test-results",
  fullyParallel: false,
  workers: 1, // two cores: the app server needs the other one
  retries: 0,
  timeout: 60_000,
  expect: { timeout: 10_000 },
  use: {
    baseURL: BASE_URL,
    viewport: { width: 1280, height: 800 },
    trace: "retain-on-failure",
    screenshot: "only-on-failure",
    launchOptions: {
      // Debian's chromium; Playwright's own browser download cannot work on this network.
      executablePath: "/usr/bin/chromium",
      args: ["--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run",
        "--disable-background-networking", "--disable-component-update", "--disable-sync"],
    },
  },
  webServer: {
    // Built by scripts/test.sh before Playwright runs; DATABASE_URL etc. come from the environment it sets.
    command: `node_modules/.bin/next start -H 127.0.0.1 -p ${PORT}`,
    url: `${BASE_URL}/api/health`,
    reuseExistingServer: false,
    timeout: 120_000,
    stdout: "ignore",
    stderr: "pipe",
  },
});
