// The server: PostgreSQL (embedded unless DATABASE_URL is given), migrations, demo data, the mail
// sink, the MQTT broker and writer, the web server and the simulator, with one shutdown path. It is
// part of the routes' module graph: in production app/.server/server.ts (this plus the routes) is
// the SSR build's entry, and in development Vite loads it (app/.server/serve.ts, the process entry).
// The services it starts reach loaders and actions through the load context (http-adapter.ts).
import compression from "compression";
import express from "express";
import http from "node:http";
import path from "node:path";
import type { ServerBuild } from "react-router";
import type { ViteDevServer } from "vite";
import { demoPolicy, env, publicUrl } from "~/.server/env";
import { startBroker } from "~/.server/ingest/broker";
import { startBridges } from "~/.server/bridge/registry";
import { startEmbeddedPostgres, type EmbeddedPostgres } from "~/.server/postgres";

const log = (s: string) => console.log(`[nichewise] ${s}`);

export type Running = { stop: () => Promise<void>; url: string; mqttPort: number; port: number };

export type MainOptions = {
  /** Development: Vite's dev server (its middleware, and each request's current build) and the HTTP server its HMR socket shares. */
  dev?: { vite: ViteDevServer; server: http.Server };
  /** Production: the routes, built into the same bundle as this module. */
  build?: ServerBuild;
};

export async function main(opts: MainOptions = {}): Promise<Running> {
  const stops: (() => Promise<void>)[] = [];
  const stopAll = async () => {
    for (const s of stops.reverse()) await s().catch((err) => console.error(err));
  };
  try {
    return await startAll(opts, stops, stopAll);
  } catch (err) {
    // Leave nothing running (PostgreSQL above all) when start-up fails half-way.
    await stopAll();
    throw err;
  }
}

async function startAll(
  opts: MainOptions,
  stops: (() => Promise<void>)[],
  stopAll: () => Promise<void>,
): Promise<Running> {
  const e = env();
  // Cluster mode (app/.server/cluster; docs/decisions/0004-cluster-engine.md): NW_ROLE=web or ingest.
  const { clusterRole } = await import("~/.server/cluster/config");
  const role = clusterRole();
  const cluster = role === "all" ? null : await import("~/.server/cluster/roles");
  if (role === "ingest") return cluster!.startIngestRole(stops, stopAll, log);

  let pg: EmbeddedPostgres | undefined;
  if (!process.env.DATABASE_URL) {
    pg = await startEmbeddedPostgres({ dataDir: e.NW_PG_DATA, port: e.NW_PG_PORT, database: "nichewise", log });
    process.env.DATABASE_URL = pg.url;
    stops.push(pg.stop);
    log(`PostgreSQL on 127.0.0.1:${e.NW_PG_PORT} (data in ${e.NW_PG_DATA})`);
  }
  const { closeDb, runMigrations, pool } = await import("~/.server/db");
  stops.push(closeDb);
  await runMigrations(path.resolve("drizzle"));
  await pool().query("SELECT ensure_reading_partitions(date_trunc('month', now()) - interval '1 month', 4)");

  const { startMailSink, configureMailer } = await import("~/.server/mail");
  if (!e.SMTP_URL) {
    const sink = await startMailSink({ port: e.NW_SINK_PORT, log });
    stops.push(sink.close);
    configureMailer(`smtp://127.0.0.1:${sink.port}`);
  } else {
    configureMailer(e.SMTP_URL);
  }

  const { writer } = await import("~/.server/ingest/writer");
  const { startAlerts } = await import("~/.server/alerts/engine");
  // With the compressed demo front a rule minute lasts a second, matching the simulator's 60×.
  const alertOptions = { minuteMs: e.NW_COLD_FRONT ? 1000 : 60_000, log };
  stops.push(cluster ? cluster.startWebAlerts(writer(), alertOptions) : await startAlerts(writer(), alertOptions));

  // A web instance of cluster mode takes no MQTT: sensors talk to the engine.
  const broker = cluster
    ? null
    : await startBroker({ host: e.MQTT_HOST, port: e.MQTT_PORT, wsPort: e.MQTT_WS_PORT, writer: writer(), log });
  stops.push(async () => {
    await broker?.close();
    await writer().drain();
  });
  // Bridges to the growers' own brokers (stopped before the writer drains: unacknowledged messages come again).
  stops.push(await startBridges({ writer: writer(), log }));

  // Outdoor weather: the hosted service when configured, else the local fake (the simulator's
  // climate, with the demo's forecast front under NW_COLD_FRONT). The job never blocks start-up.
  let archiveUrl = e.WEATHER_ARCHIVE_URL;
  let forecastUrl = e.WEATHER_FORECAST_URL;
  const { forecastColdFront } = await import("../../simulator/model");
  const forecastFront = e.NW_COLD_FRONT ? forecastColdFront(Date.now()) : undefined;
  if (!archiveUrl || !forecastUrl) {
    const { startWeatherFake } = await import("../../simulator/weather-fake");
    const fake = await startWeatherFake({ port: e.WEATHER_FAKE_PORT, coldFront: forecastFront, log });
    stops.push(fake.close);
    archiveUrl ??= `${fake.url}/v1/archive`;
    forecastUrl ??= `${fake.url}/v1/forecast`;
  }
  // Forecast warnings run after each forecast (or archive chunk) the job stores, and every half hour.
  const { startForecastWarnings } = await import("~/.server/alerts/forecast");
  const forecastWarnings = startForecastWarnings({ log });
  const { startWeatherJob } = await import("~/.server/weather/job");
  const weatherJob = startWeatherJob({
    endpoints: { archiveUrl, forecastUrl, apiKey: e.WEATHER_API_KEY },
    years: e.WEATHER_YEARS,
    log,
    onStored: (siteId) => void forecastWarnings.runner.run(siteId).catch((err) => console.error("[forecast]", err)),
  });
  if (cluster) cluster.onlyInLeaseHolder(weatherJob, forecastWarnings); // NW_ROLE=web: the lease holder alone
  stops.push(forecastWarnings.stop);
  stops.push(weatherJob.stop);

  const { pruneRejections } = await import("~/.server/ingest/rejections");
  const { pruneRollupChanges } = await import("~/.server/rollups/read");
  const housekeeping = setInterval(() => {
    pruneRejections().catch(() => {});
    pool()
      .query("SELECT ensure_reading_partitions(date_trunc('month', now()), 3)")
      .catch(() => {});
  }, 60_000);
  stops.push(async () => clearInterval(housekeeping));
  // Daily, not with the rest: each prune reads the whole change log, and a spot whose old entries
  // go makes the rollup cache read it again.
  const daily = setInterval(() => pruneRollupChanges().catch(() => {}), 86_400_000);
  stops.push(async () => clearInterval(daily));

  const demo = demoPolicy(e);
  log(demo.why);
  if (demo.seed) {
    const { seedDemo } = await import("~/.server/seed");
    await seedDemo({ log, backfillDays: e.NW_BACKFILL_DAYS });
    // The demo's plants and readings are in: look at the forecast now rather than in half an hour.
    void forecastWarnings.runner.run().catch((err) => console.error("[forecast]", err));
  }

  const { reactRouterAdapter, securityHeaders } = await import("~/.server/http-adapter");
  const services = { writer: writer(), broker };
  const app = express();
  const server = opts.dev?.server ?? http.createServer();
  server.on("request", app);
  app.disable("x-powered-by");
  // The client's address for the sign-in rate limit: the socket's, or what trusted proxies forwarded.
  app.set("trust proxy", e.TRUST_PROXY);
  app.use(securityHeaders({ dev: !!opts.dev, https: publicUrl().startsWith("https:") }));
  app.use(compression());
  app.use(refuseCrossOrigin);
  cluster?.mountEngineAuth(app);

  if (opts.dev) {
    const { vite } = opts.dev;
    app.use(vite.middlewares);
    app.all(
      "*",
      reactRouterAdapter(
        () => vite.ssrLoadModule("virtual:react-router/server-build") as Promise<ServerBuild>,
        "development",
        services,
      ),
    );
  } else {
    const { build } = opts;
    if (!build)
      throw new Error("No build given: start the server with `node build/nichewise-server.mjs` after `npm run build`");
    const buildDir = path.resolve("build");
    app.use("/assets", express.static(path.join(buildDir, "client/assets"), { immutable: true, maxAge: "1y" }));
    app.use(express.static(path.join(buildDir, "client"), { maxAge: "1h" }));
    app.all(
      "*",
      reactRouterAdapter(() => build, "production", services),
    );
  }

  await new Promise<void>((resolve, reject) => {
    server.once("error", reject);
    server.listen(e.PORT, e.HOST, () => resolve());
  });
  stops.push(
    () =>
      new Promise<void>((resolve) => {
        server.close(() => resolve());
        server.closeAllConnections();
      }),
  );
  const port = (server.address() as { port: number }).port;
  // PORT=0 (tests) lets the system choose; the log and the answer name the port it chose.
  const url = e.PORT === 0 && !e.PUBLIC_URL ? publicUrl().replace(/:0$/, `:${port}`) : publicUrl();
  log(`Web app on ${url}`);

  if (demo.seed && e.NW_SIMULATOR && broker) {
    const { startLiveSimulator } = await import("../../simulator/live");
    const coldFrontAt = e.NW_COLD_FRONT ? new Date(Date.now() + 30_000) : null;
    const { DEMO_HOUSEHOLD } = await import("../../simulator/demo");
    const scenario = { ...DEMO_HOUSEHOLD.scenario, coldFront: forecastFront };
    const sim = await startLiveSimulator({
      mqttUrl: `mqtt://127.0.0.1:${broker.port}`,
      speed: e.NW_SIM_SPEED,
      intervalS: e.NW_SIM_INTERVAL_S,
      coldFrontAt,
      scenario,
      log,
    });
    if (coldFrontAt)
      log(
        "Cold front: the outdoor bench starts falling in about a minute; watch the site page and the admin page's mail",
      );
    stops.splice(stops.length, 0, sim.stop);
  }

  return { stop: stopAll, url, mqttPort: broker?.port ?? 0, port };
}

// Actions refuse posts from other origins (CSRF). Sensors posting to the ingest API carry a bearer
// token and no cookie, so they are not subject to this check.
function refuseCrossOrigin(req: express.Request, res: express.Response, next: express.NextFunction) {
  if (req.method === "GET" || req.method === "HEAD" || req.method === "OPTIONS") return next();
  if (req.path === "/api/ingest") return next();
  const origin = req.headers.origin;
  const site = req.headers["sec-fetch-site"];
  if (site === "cross-site" || (origin && origin !== "null" && originHost(origin) !== req.headers.host)) {
    res.status(403).type("text/plain").send("Cross-origin form posts are refused.");
    return;
  }
  if (origin === "null") {
    res.status(403).type("text/plain").send("Cross-origin form posts are refused.");
    return;
  }
  next();
}

// A malformed Origin is refused like a foreign one, rather than thrown on.
function originHost(origin: string) {
  try {
    return new URL(origin).host;
  } catch {
    return null;
  }
}
