// The site home and a spot page as a phone meets them: the built app with the demo's year, Chromium
// at 390 px with its CPU slowed 4× and a slow mobile network (Lighthouse's mobile throttling: 150 ms
// round trip, 1.6 Mbit/s down, 750 kbit/s up). Measured: when the first screen's answer (the spot
// page's verdict summary, the home's "where what grows" matrix) is on screen, first contentful
// paint, and the JavaScript the page loads. Each visit is a fresh browser context (no cache).
import { spawn } from "node:child_process";
import { existsSync, rmSync } from "node:fs";
import { chromium, type Browser } from "playwright-core";

const PORT = 3390;
const BASE = `http://127.0.0.1:${PORT}`;
const DATA = ".data/bench-phone";
const OWNER = { email: "owner@nichewise.test", password: "greenhouse-demo-1" };
const SLOW_4G = {
  offline: false,
  latency: 150,
  downloadThroughput: (1.6 * 1024 * 1024) / 8,
  uploadThroughput: (750 * 1024) / 8,
};

export type PhoneFigure = { page: string; answerMs: number; fcpMs: number; scriptKb: number; scriptKbDecoded: number };

export async function phonePages(opts: {
  chromiumPath: string;
  log: (s: string) => void;
  runs?: number;
}): Promise<PhoneFigure[]> {
  if (!existsSync("build/nichewise-server.mjs"))
    throw new Error("No build found: run `npm run build` before the phone figures");
  rmSync(DATA, { recursive: true, force: true });
  const server = spawn(process.execPath, ["--max-semi-space-size=32", "build/nichewise-server.mjs"], {
    stdio: "ignore",
    // Its own embedded PostgreSQL with the demo, not the bench's database.
    env: {
      ...withoutKey(process.env, "DATABASE_URL"),
      NODE_ENV: "production",
      PORT: String(PORT),
      NW_PG_PORT: "54390",
      NW_PG_DATA: `${DATA}/postgres`,
      MQTT_PORT: "18980",
      MQTT_WS_PORT: "18981",
      NW_SINK_PORT: "25390",
      WEATHER_FAKE_PORT: "18982",
      NW_SIMULATOR: "0",
      NW_DEMO: "1",
      NW_DEMO_CREDENTIALS: `${DATA}/demo-sensors.json`,
    },
  });
  let browser: Browser | undefined;
  try {
    await untilUp(server);
    opts.log("phone: demo app up; timing the site home and a spot page");
    browser = await chromium.launch({
      executablePath: opts.chromiumPath,
      args: ["--no-sandbox", "--disable-gpu", "--no-first-run", "--disable-background-networking"],
    });
    const pages = [
      { page: "Site home", path: "/sites/1", answer: "[data-testid=where-matrix]" },
      { page: "Spot page (kitchen sill)", path: "/sites/1/spots/1", answer: "[data-testid=verdict-summary]" },
    ];
    const out: PhoneFigure[] = [];
    for (const p of pages) {
      const runs: PhoneFigure[] = [];
      for (let i = 0; i < (opts.runs ?? 3); i++) runs.push(await visit(browser, p));
      runs.sort((a, b) => a.answerMs - b.answerMs);
      out.push(runs[Math.floor(runs.length / 2)]);
    }
    return out;
  } finally {
    await browser?.close();
    // A server that already died (its error is what the caller sees) sends no second "exit": waiting
    // for one left nothing on the event loop, and the whole run ended silently with code 0 and no table.
    if (server.exitCode === null && server.signalCode === null) {
      const exited = new Promise((resolve) => server.once("exit", resolve));
      server.kill("SIGTERM");
      await exited;
    }
  }
}

async function visit(browser: Browser, p: { page: string; path: string; answer: string }): Promise<PhoneFigure> {
  const context = await browser.newContext({
    viewport: { width: 390, height: 844 },
    deviceScaleFactor: 3,
    isMobile: true,
    hasTouch: true,
  });
  try {
    const page = await context.newPage();
    // Signing in is not timed: the figure is the page a signed-in grower opens.
    const signIn = await context.request.post(`${BASE}/sign-in`, {
      form: OWNER,
      headers: { Origin: BASE },
      maxRedirects: 0,
    });
    if (signIn.status() !== 302)
      throw new Error(
        `sign-in answered ${signIn.status()}: ${(await signIn.text())
          .replace(/<[^>]*>/g, " ")
          .replace(/\s+/g, " ")
          .slice(0, 300)}`,
      );
    const cdp = await context.newCDPSession(page);
    await cdp.send("Network.enable");
    await cdp.send("Network.emulateNetworkConditions", SLOW_4G);
    await cdp.send("Emulation.setCPUThrottlingRate", { rate: 4 });
    await page.goto(`${BASE}${p.path}`, { waitUntil: "commit" });
    await page.locator(p.answer).first().waitFor({ state: "visible" });
    // performance.now() counts from this navigation's start.
    const answerMs = await page.evaluate(() => performance.now());
    await page.waitForLoadState("load");
    const timing = await page.evaluate(() => {
      const fcp = performance.getEntriesByName("first-contentful-paint")[0]?.startTime ?? NaN;
      const scripts = (performance.getEntriesByType("resource") as PerformanceResourceTiming[]).filter((r) =>
        r.name.endsWith(".js"),
      );
      return {
        fcp,
        encoded: scripts.reduce((n, r) => n + r.encodedBodySize, 0),
        decoded: scripts.reduce((n, r) => n + r.decodedBodySize, 0),
      };
    });
    // Laid out is not yet painted: the answer is on screen at the later of the two.
    return {
      page: p.page,
      answerMs: Math.max(answerMs, timing.fcp),
      fcpMs: timing.fcp,
      scriptKb: timing.encoded / 1024,
      scriptKbDecoded: timing.decoded / 1024,
    };
  } finally {
    await context.close();
  }
}

function withoutKey(env: NodeJS.ProcessEnv, key: string): NodeJS.ProcessEnv {
  const copy = { ...env };
  delete copy[key];
  return copy;
}

async function untilUp(server: ReturnType<typeof spawn>) {
  const deadline = Date.now() + 240_000;
  while (Date.now() < deadline) {
    if (server.exitCode !== null) throw new Error(`the app exited with code ${server.exitCode} before it answered`);
    const ok = await fetch(`${BASE}/sign-in`).then(
      (r) => r.ok,
      () => false,
    );
    if (ok) return;
    await new Promise((resolve) => setTimeout(resolve, 500));
  }
  throw new Error("the app did not answer within 4 minutes");
}
