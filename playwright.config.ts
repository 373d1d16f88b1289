import { defineConfig } from "@playwright/test";

// The end-to-end run starts the built app with demo data on ports and a data folder of its own.
// NW_E2E_SLOT (0–9) shifts every port and the data folder, so two runs can share a machine.
const slot = Number(process.env.NW_E2E_SLOT ?? 0);
export const E2E = {
  port: 3100 + slot,
  pgPort: 55433 + slot,
  mqttPort: 18830 + 2 * slot,
  wsPort: 18831 + 2 * slot,
  sinkPort: 25250 + slot,
  dir: `.data/e2e-${slot}`,
};

export default defineConfig({
  testDir: "tests/e2e",
  timeout: 60_000,
  expect: { timeout: 10_000 },
  fullyParallel: false,
  workers: 1,
  reporter: [["list"]],
  outputDir: `.data/test-results-${slot}`,
  use: {
    baseURL: `http://127.0.0.1:${E2E.port}`,
    launchOptions: {
      executablePath: process.env.CHROMIUM_PATH ?? "/usr/bin/chromium",
      args: [
        "--no-sandbox",
        "--disable-gpu",
        "--disable-quic",
        "--no-first-run",
        "--disable-background-networking",
        "--disable-component-update",
        "--disable-sync",
      ],
    },
    trace: "off",
  },
  globalTeardown: "./tests/e2e/teardown.ts",
  webServer: {
    command: `tsx app/.server/postgres.ts stop ${E2E.dir}/postgres; rm -rf ${E2E.dir} && node --max-semi-space-size=32 build/nichewise-server.mjs`,
    gracefulShutdown: { signal: "SIGTERM", timeout: 15_000 },
    url: `http://127.0.0.1:${E2E.port}/sign-in`,
    timeout: 180_000,
    reuseExistingServer: false,
    stdout: "ignore",
    stderr: "pipe",
    env: {
      NODE_ENV: "production",
      PORT: String(E2E.port),
      NW_PG_PORT: String(E2E.pgPort),
      NW_PG_DATA: `${E2E.dir}/postgres`,
      MQTT_PORT: String(E2E.mqttPort),
      MQTT_WS_PORT: String(E2E.wsPort),
      NW_SINK_PORT: String(E2E.sinkPort),
      NW_BACKFILL_DAYS: "120",
      NW_SIMULATOR: "0",
      NW_DEMO_CREDENTIALS: `${E2E.dir}/demo-sensors.json`,
    },
  },
});
