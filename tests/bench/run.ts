// `npm run bench`: speed figures as ratios against baselines measured in the same run, on this
// machine, with its own PostgreSQL and broker. Prints a table and writes .bench/latest.{json,md}.
// This file runs bundled with esbuild and with the server's Node flags, as `npm start` runs the
// product: the bulk paths, profiles and fit table are timed in this process, and under tsx (its
// helper that names every closure) converting the CSV import's rows took 2.7 times as long.
// No figure here is asserted anywhere: the targets are printed beside the numbers.
import { execFile, spawn } from "node:child_process";
import { existsSync, mkdirSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { promisify } from "node:util";
import { build as esbuild } from "esbuild";
import { from as copyFrom } from "pg-copy-streams";
import { chromium } from "playwright-core";
import { phonePages } from "./phone";
import { closeDb, pool, runMigrations } from "../../app/.server/db";
import { aptInstall, isRoot } from "../../app/.server/debian";
import { hashSensorSecret } from "../../app/.server/secrets";
import { importCsv } from "../../app/.server/ingest/csv-import";
import { parseCsv } from "../../app/.server/ingest/csv-file";
import { handleHttpIngest } from "../../app/.server/ingest/http";
import { REBUILD_SQL } from "../../app/.server/rollups/rebuild";
import { ReadingWriter, writer as sharedWriter } from "../../app/.server/ingest/writer";
import { fetchRollups, loadRollups } from "../../app/.server/rollups/read";
import { spotSeries } from "../../app/.server/series";
import { startEmbeddedPostgres } from "../../app/.server/postgres";
import { rankPlantsForSpot } from "../../app/domain/fit/verdict";
import type { Reading } from "../../app/domain/ingest/payload";
import { PLANT_LIBRARY, type PlantProfile } from "../../app/domain/plants/library";
import { seasonProfile } from "../../app/domain/season/profile";
import type { HourlyRollup } from "../../app/domain/season/types";
import { backfill } from "../../simulator/backfill";
import { DEMO_SCENARIO, DEMO_SITE } from "../../simulator/model";
import { zoneClock } from "../../app/domain/season/local-time";
import { combineMonths } from "../../app/domain/projection/combine";
import { projectYear } from "../../app/domain/projection/project";
import { drivers } from "../../app/domain/projection/drivers";
import { fitResponse } from "../../app/domain/projection/response";
import { WeatherJob } from "../../app/.server/weather/job";
import { loadHours } from "../../app/.server/weather/store";
import { DEMO_HOUSEHOLD } from "../../simulator/demo";
import { generate } from "../../simulator/model";
import { startWeatherFake } from "../../simulator/weather-fake";

const run = promisify(execFile);
const DIR = ".data/bench";
const PG_PORT = Number(process.env.NW_BENCH_PG_PORT ?? 55460);
const MINUTE = 60_000;
const DAY = 86_400_000;
const QUICK = process.argv.includes("--quick");
// `npm run bench -- --only=csv-load`: the setup and that one section.
const ONLY = process.argv.find((a) => a.startsWith("--only="))?.slice("--only=".length) ?? null;
const N = (full: number, quick: number) => (QUICK ? quick : full);

type Row = { figure: string; ours: string; baseline: string; ratio: string; target: string; note?: string };
const rows: Row[] = [];
const fmt = (n: number, d = 0) => n.toLocaleString("en", { maximumFractionDigits: d, minimumFractionDigits: d });
const log = (s: string) => console.log(`[bench] ${s}`);
const CHROMIUM = process.env.CHROMIUM_PATH ?? "/usr/bin/chromium";
const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)];

/** A full collection before a measured section (npm run bench runs Node with --expose-gc), so garbage left by the setup is not paid for inside a timing. */
function settle() {
  (globalThis as { gc?: () => void }).gc?.();
}

/**
 * Waits (at most two minutes) until no autovacuum worker runs, before a timed section: the rows
 * the previous section wrote set autovacuum off, and its work would land in the next section's
 * figures. Returns the seconds waited, which the log shows.
 */
async function quietDb(): Promise<number> {
  const t0 = performance.now();
  let quiet = 0;
  while (quiet < 2 && performance.now() - t0 < 120_000) {
    const { rows } = await pool().query<{ n: number }>(
      "SELECT count(*)::int AS n FROM pg_stat_activity WHERE backend_type = 'autovacuum worker'",
    );
    quiet = rows[0].n === 0 ? quiet + 1 : 0;
    if (quiet < 2) await new Promise((r) => setTimeout(r, 500));
  }
  return (performance.now() - t0) / 1000;
}

async function timed<T>(fn: () => Promise<T>): Promise<[T, number]> {
  const t0 = performance.now();
  const v = await fn();
  return [v, performance.now() - t0];
}

// CPU time of each PostgreSQL process of the bench cluster (/proc, clock ticks), by pid.
async function postgresTicks(): Promise<Map<string, number>> {
  const { stdout } = await run("ps", ["-eo", "pid=,args="]);
  const ticks = new Map<string, number>();
  for (const line of stdout.split("\n")) {
    if (!line.includes("postgres") || (!line.includes(DIR) && !line.includes("postgres:"))) continue;
    const pid = line.trim().split(/\s+/)[0];
    try {
      const f = readFileSync(`/proc/${pid}/stat`, "utf8").split(") ")[1].split(" ");
      ticks.set(pid, Number(f[11]) + Number(f[12]));
    } catch {
      // the process ended between ps and the read
    }
  }
  return ticks;
}

/**
 * PostgreSQL CPU milliseconds since `before`, process by process: a backend that exits in between
 * (an idle pool connection closing) takes its whole count with it, and a difference of sums would
 * subtract it from the others.
 */
async function postgresCpuMsSince(before: Map<string, number>): Promise<number> {
  let ticks = 0;
  for (const [pid, now] of await postgresTicks()) ticks += now - (before.get(pid) ?? 0);
  return ticks * 10;
}

function synthetic(sensorIds: number[], perSensor: number, startMs: number, stepMs: number): Reading[] {
  const out: Reading[] = [];
  for (const sensorId of sensorIds) {
    for (let k = 0; k < perSensor; k++) {
      out.push({
        sensorId,
        measuredAt: new Date(startMs + k * stepMs),
        temperature: 18 + 6 * Math.sin(k / 200) + (k % 7) / 10,
        humidity: 55 + 20 * Math.cos(k / 300),
        lux: null,
        battery: null,
      });
    }
  }
  return out;
}

async function copyRows(table: string, readings: Reading[]) {
  const client = await pool().connect();
  try {
    const stream = client.query(
      copyFrom(`COPY ${table} (sensor_id, measured_at, temperature, humidity, lux, battery) FROM STDIN`),
    );
    const done = new Promise<void>((resolve, reject) => {
      stream.on("finish", () => resolve());
      stream.on("error", reject);
    });
    let buf = "";
    for (const r of readings) {
      buf += `${r.sensorId}\t${r.measuredAt.toISOString()}\t${r.temperature ?? "\\N"}\t${r.humidity ?? "\\N"}\t${r.lux ?? "\\N"}\t${r.battery ?? "\\N"}\n`;
      if (buf.length > 1 << 20) {
        if (!stream.write(buf)) await new Promise((r) => stream.once("drain", r));
        buf = "";
      }
    }
    stream.end(buf);
    await done;
  } finally {
    client.release();
  }
}

/** The Node flags `npm start` runs the server with (package.json), for the ingest process. */
function serverNodeFlags(): string[] {
  const start = (JSON.parse(readFileSync("package.json", "utf8")) as { scripts: { start: string } }).scripts.start;
  const m = /\bnode ((?:--\S+ )*)build\/nichewise-server\.mjs/.exec(start);
  if (!m) throw new Error(`package.json's start script does not run build/nichewise-server.mjs: ${start}`);
  return m[1].split(" ").filter(Boolean);
}

/** tests/bench/<name>.ts bundled the way `npm run build:server` bundles the product's entry. */
async function bundle(name: string): Promise<string> {
  const outfile = path.resolve(`${DIR}/${name}.mjs`);
  await esbuild({
    entryPoints: [`tests/bench/${name}.ts`],
    bundle: true,
    platform: "node",
    format: "esm",
    packages: "external",
    outfile,
    logLevel: "warning",
  });
  return outfile;
}

async function directWrite(w: ReadingWriter, readings: Reading[], batch = 1000) {
  for (let i = 0; i < readings.length; i += batch) await w.write(readings.slice(i, i + batch));
}

/**
 * The uPlot figure draws in Debian's Chromium: installed here when missing and running as root (as
 * `npm test` does), otherwise a clear message before any of the run's minutes are spent.
 */
function ensureChromium() {
  if (existsSync(CHROMIUM)) return;
  if (!isRoot() || process.env.CHROMIUM_PATH) {
    throw new Error(
      `Chromium not found at ${CHROMIUM}. Install Debian's package (sudo apt-get install -y chromium) or set CHROMIUM_PATH.`,
    );
  }
  aptInstall("chromium", log);
}

async function main() {
  if (!ONLY) ensureChromium();
  rmSync(DIR, { recursive: true, force: true });
  const pg = await startEmbeddedPostgres({
    dataDir: `${DIR}/postgres`,
    port: PG_PORT,
    database: "bench",
    log: () => {},
  });
  process.env.DATABASE_URL = pg.url;
  try {
    await runMigrations(path.resolve("drizzle"));
    await bench();
  } finally {
    await closeDb();
    await pg.stop();
  }
}

/**
 * Outdoor weather and projections: ten years of a site's weather fetched from the local fake and
 * stored (and its size per site-year), then the response model fitted on 14 days of a simulated
 * windowsill and played through those ten years.
 */
async function projectionBench(siteId: number) {
  const fake = await startWeatherFake({});
  try {
    const job = new WeatherJob({
      endpoints: { archiveUrl: `${fake.url}/v1/archive`, forecastUrl: `${fake.url}/v1/forecast` },
      years: 10,
      perRound: 50,
    });
    const [, fetchMs] = await timed(() => job.untilIdle());
    const size = await pool().query<{ days: number; bytes: string }>(
      `SELECT (SELECT count(*)::int FROM weather_days WHERE site_id = $1) AS days, pg_total_relation_size('weather_days') AS bytes`,
      [siteId],
    );
    const perYear = (Number(size.rows[0].bytes) / size.rows[0].days) * 365.25;
    rows.push({
      figure: "Outdoor weather: 10 years + forecast fetched from the local fake and stored (s)",
      ours: fmt(fetchMs / 1000, 1),
      baseline: "—",
      ratio: "—",
      target: "—",
      note: `${fmt(size.rows[0].days)} days; ${fmt(perYear / 1024, 0)} KiB per site-year with its index`,
    });

    const now = Date.now();
    const thisYear = new Date(now).getUTCFullYear();
    const [weather, loadMs] = await timed(() =>
      loadHours(siteId, new Date(Date.UTC(thisYear - 10, 0, 1) - 14 * DAY), new Date(now + 16 * DAY)),
    );
    const site = { latitude: DEMO_SITE.latitude, longitude: DEMO_SITE.longitude, timeZone: DEMO_SITE.timeZone };
    const spot = DEMO_HOUSEHOLD.spots[0];
    const from = now - 14 * DAY;
    const byHour = new Map<number, HourlyRollup>();
    for (const r of generate(site, spot.sim, DEMO_SCENARIO, {
      from: new Date(from),
      to: new Date(now),
      intervalMs: 600_000,
      sensorSeed: 1,
    })) {
      const h = Math.floor(r.measuredAt.getTime() / 3_600_000) * 3_600_000;
      const x = byHour.get(h) ?? {
        hour: new Date(h),
        tN: 0,
        tMin: 99,
        tMax: -99,
        tSum: 0,
        hN: 0,
        hMin: 100,
        hMax: 0,
        hSum: 0,
        dpMarginMin: null,
        luxN: 0,
        luxSum: null,
      };
      x.tN++;
      x.tSum! += r.temperature;
      x.tMin = Math.min(x.tMin!, r.temperature);
      x.tMax = Math.max(x.tMax!, r.temperature);
      x.hN++;
      x.hSum! += r.humidity;
      byHour.set(h, x);
    }
    const rollups = [...byHour.values()];
    const years = Array.from({ length: 10 }, (_, i) => thisYear - 10 + i);
    const once = () => {
      const d = drivers(weather, site.timeZone, { ...site, facing: spot.facing });
      const model = fitResponse(rollups, d, { indoor: true, timeZone: site.timeZone })!;
      return projectYear(model, d, site, { years });
    };
    for (let i = 0; i < 3; i++) once();
    const times: number[] = [];
    for (let i = 0; i < 7; i++) times.push((await timed(async () => once()))[1]);
    rows.push({
      figure: "Fit one spot's response model on 14 days and project 12 months from 10 years of hourly weather (ms)",
      ours: fmt(median(times), 1),
      baseline: `${fmt(loadMs, 1)} (reading the 10 years of weather)`,
      ratio: "—",
      target: "≤ 50 ms",
      note: "median of 7 after 3 to warm up; in process, no database",
    });

    // The fit table on measured + projected months: 50 spots of 14 days each (their own season
    // objects, so no rule result is shared between spots) × 40 plant profiles, each spot's
    // unmeasured months filled from its projection (cached per spot in the product, so built once here).
    const projectedMonths = once();
    const fitProfiles: PlantProfile[] = [
      ...PLANT_LIBRARY,
      ...PLANT_LIBRARY.slice(0, 15).map((pp) => ({ ...pp, key: `${pp.key}-copy`, minNightC: pp.minNightC + 1 })),
    ];
    const fitWindow = { latitude: site.latitude, facing: spot.facing, indoor: true };
    const table = () =>
      Array.from({ length: 50 }, () => {
        const season = seasonProfile(rollups, site, { from: new Date(now - 365 * DAY), to: new Date(now) });
        const months = combineMonths(projectedMonths, season.year).filter((m) => m.source !== "measured");
        return rankPlantsForSpot(fitProfiles, season, undefined, {
          window: fitWindow,
          projection: { months, years: years.length, firmBy: null },
        });
      });
    for (let i = 0; i < 2; i++) table();
    const tableTimes: number[] = [];
    for (let i = 0; i < 5; i++) tableTimes.push((await timed(async () => table()))[1]);
    const plainTimes: number[] = [];
    const plain = () =>
      Array.from({ length: 50 }, () =>
        rankPlantsForSpot(
          fitProfiles,
          seasonProfile(rollups, site, { from: new Date(now - 365 * DAY), to: new Date(now) }),
          undefined,
          { window: fitWindow },
        ),
      );
    for (let i = 0; i < 5; i++) plainTimes.push((await timed(async () => plain()))[1]);
    rows.push({
      figure: `Fit table with projected months, 50 spots × ${fitProfiles.length} plant profiles, 14 days measured each (ms)`,
      ours: fmt(median(tableTimes), 1),
      baseline: `${fmt(median(plainTimes), 1)} (the same table on the measured days alone)`,
      ratio: "—",
      target: "≤ 200 ms",
      note: "median of 5 after 2 to warm up; each spot's season profile built in the timing; projections cached per spot (built once); in process, no database",
    });
  } finally {
    await fake.close();
  }
}

/** Cluster mode's ingest rate with one and two workers beside the embedded broker's (tests/cluster/bench.ts). */
async function clusterRows(creds: { id: number; secret: string }[]) {
  const { clusterBench } = await import("../cluster/bench");
  const basePort = Number(process.env.NW_BENCH_CLUSTER_BASE_PORT ?? 26400);
  return clusterBench({
    dir: path.resolve(DIR),
    basePort,
    creds,
    total: N(100_000, 30_000),
    nodeFlags: serverNodeFlags(),
    postgresTicks,
    postgresCpuMsSince,
    log,
  });
}

async function bench() {
  const p = pool();
  const started = new Date();
  log(`ingest process flags: ${serverNodeFlags().join(" ") || "none"}`);
  log(
    `machine: ${os.cpus().length} × ${os.cpus()[0]?.model ?? "cpu"}, ${Math.round(os.totalmem() / 2 ** 30)} GiB, node ${process.version}`,
  );

  // One site, 50 spots, 200 sensors (four per spot: 200 MQTT clients each sign in as their own sensor).
  const u = await p.query(
    "INSERT INTO users (email, name, password_hash) VALUES ('bench@example.test', 'Bench', 'x') RETURNING id",
  );
  const site = (
    await p.query("INSERT INTO sites (name, latitude, longitude, time_zone) VALUES ('Bench', $1, $2, $3) RETURNING *", [
      DEMO_SITE.latitude,
      DEMO_SITE.longitude,
      DEMO_SITE.timeZone,
    ])
  ).rows[0];
  await p.query("INSERT INTO memberships (user_id, site_id, role) VALUES ($1, $2, 'owner')", [u.rows[0].id, site.id]);
  const spotIds = (
    await p.query(
      "INSERT INTO spots (site_id, name, indoor) SELECT $1, 'Spot ' || g, true FROM generate_series(1, 50) g RETURNING id",
      [site.id],
    )
  ).rows.map((r) => r.id as number);
  const secret = "benchsecretbenchsecretbenchsecret";
  const hash = hashSensorSecret(secret);
  const sensorIds = (
    await p.query(
      "INSERT INTO sensors (site_id, name, secret_hash) SELECT $1, 'Sensor ' || g, $2 FROM generate_series(1, 200) g RETURNING id",
      [site.id, hash],
    )
  ).rows.map((r) => r.id as number);
  await p.query(
    "INSERT INTO placements (sensor_id, spot_id, from_at) SELECT unnest($1::int[]), unnest($2::int[]), now() - interval '5 years'",
    [sensorIds, sensorIds.map((_id, i) => spotIds[i % 50])],
  );
  // Eight more for the bulk paths (the eighth for the CSV under MQTT load), which no MQTT client signs in as: their figures then measure
  // bulk writing, not batches that happen to overlap what the MQTT runs wrote (a batch with a
  // duplicate is written a second time with ON CONFLICT). Duplicates get a figure of their own.
  const bulkIds = (
    await p.query(
      "INSERT INTO sensors (site_id, name, secret_hash) SELECT $1, 'Bulk ' || g, $2 FROM generate_series(1, 8) g RETURNING id",
      [site.id, hash],
    )
  ).rows.map((r) => r.id as number);
  await p.query(
    "INSERT INTO placements (sensor_id, spot_id, from_at) SELECT unnest($1::int[]), unnest($2::int[]), now() - interval '5 years'",
    [bulkIds, bulkIds.map((_id, i) => spotIds[i])],
  );
  await p.query("SELECT ensure_reading_partitions(now() - interval '30 months', 32)");
  await p.query("CREATE TABLE bench_copy (LIKE readings INCLUDING DEFAULTS INCLUDING CONSTRAINTS)");
  await p.query("ALTER TABLE bench_copy ADD PRIMARY KEY (sensor_id, measured_at)");

  const creds = sensorIds.map((id) => ({ id, secret }));
  if (ONLY === "csv-load") {
    await csvUnderLoad({ sensorId: bulkIds[7], creds, timeZone: site.time_zone });
    return output(started);
  }
  if (ONLY === "projection") {
    await projectionBench(site.id);
    return output(started);
  }
  if (ONLY === "phone") {
    await phoneBench();
    return output(started);
  }
  if (ONLY === "cluster") {
    rows.push(...(await clusterRows(creds)));
    return output(started);
  }

  // ---------- Ingest: bare COPY and the direct writer on the same rows, then MQTT ----------
  const total = N(300_000, 60_000);
  const t0 = Date.now() - 200 * DAY;
  // Each phase's test data lives in a function of its own, so it is garbage once the phase is done
  // (millions of objects kept in this process would put collector pauses into later timings).
  const { copyRate, directRate } = await (async () => {
    const sample = synthetic(sensorIds.slice(0, 50), total / 50, t0, MINUTE);
    const [, copyMs] = await timed(() => copyRows("bench_copy", sample));
    const direct = new ReadingWriter(pool, 5, 2000);
    const [, directMs] = await timed(() => directWrite(direct, sample));
    return { copyRate: total / (copyMs / 1000), directRate: total / (directMs / 1000) };
  })();
  log(`COPY ${fmt(copyRate)}/s, direct writer ${fmt(directRate)}/s`);
  rows.push({
    figure: "Direct writer, 1,000-row batches, one connection (readings/s)",
    ours: fmt(directRate),
    baseline: `${fmt(copyRate)} (bare COPY)`,
    ratio: `${fmt((directRate / copyRate) * 100)} %`,
    target: "—",
  });

  // The broker and writer run in their own process, the load generator in another.
  // Both processes run bundled, as `npm start` runs the product (build/nichewise-server.mjs): tsx's
  // loader and transpile cache alone add about 60 MB to a process.
  const [brokerJs, loadgenJs] = await Promise.all(["broker-proc", "loadgen"].map(bundle));
  const ingest = spawn(process.execPath, [...serverNodeFlags(), brokerJs], {
    stdio: ["ignore", "inherit", "inherit", "ipc"],
    env: { ...process.env, NODE_ENV: "production" },
  });
  const ask = <T>(cmd: string) =>
    new Promise<T>((resolve) => {
      ingest.once("message", (m) => resolve(m as T));
      ingest.send({ cmd });
    });
  const { port } = await new Promise<{ port: number }>((resolve) =>
    ingest.once("message", (m) => resolve(m as { port: number })),
  );
  const url = `mqtt://127.0.0.1:${port}`;

  async function mqttRun(
    label: string,
    opts: { clients: number; inflight: number; total: number; rate?: number; startMs: number },
  ) {
    const pg0 = await postgresTicks();
    const before = await ask<{ cpuMs: number; inserted: number }>("stats");
    const cpu0 = before.cpuMs;
    const t = performance.now();
    const out = await new Promise<string>((resolve, reject) => {
      const child = spawn(process.execPath, [loadgenJs, JSON.stringify({ url, sensors: creds, ...opts })], {
        stdio: ["ignore", "pipe", "inherit"],
      });
      let s = "";
      child.stdout.on("data", (d) => (s += d));
      child.on("exit", (code) => (code === 0 ? resolve(s) : reject(new Error(`loadgen exited ${code}`))));
    });
    const after = await ask<{ cpuMs: number; inserted: number }>("stats");
    const wall = performance.now() - t;
    const r = JSON.parse(out.trim().split("\n").pop()!) as {
      ms: number;
      acked: number;
      failed: number;
      p50: number;
      p99: number;
      cpuMs: number;
    };
    // Each run's readings are new (its own stretch of time): a duplicate would send its whole
    // group commit down the ON CONFLICT path a second time and measure that instead.
    if (after.inserted - before.inserted !== r.acked)
      throw new Error(`${label}: ${r.acked} acked but ${after.inserted - before.inserted} new rows stored`);
    const brokerCpu = after.cpuMs - cpu0;
    const pgCpu = await postgresCpuMsSince(pg0);
    const rate = r.acked / (r.ms / 1000);
    log(
      `${label}: ${fmt(rate)}/s acked ${r.acked} failed ${r.failed} ` +
        `p50 ${r.p50?.toFixed(1)} ms p99 ${r.p99?.toFixed(1)} ms; CPU s: ` +
        `loadgen ${fmt(r.cpuMs / 1000, 1)}, broker+writer ` +
        `${fmt(brokerCpu / 1000, 1)}, PostgreSQL ${fmt(pgCpu / 1000, 1)} ` +
        `over ${fmt(wall / 1000, 1)} s`,
    );
    return {
      ...r,
      rate,
      cpu:
        `CPU s — load generator ${fmt(r.cpuMs / 1000, 1)}, broker + ` +
        `writer ${fmt(brokerCpu / 1000, 1)}, PostgreSQL ` +
        `${fmt(pgCpu / 1000, 1)} (wall ${fmt(wall / 1000, 1)} s)`,
    };
  }

  log(`autovacuum settled after ${fmt(await quietDb(), 1)} s`);
  const m20 = await mqttRun("20 clients × 50 in flight", { clients: 20, inflight: 50, total, startMs: t0 + 100 * DAY });
  rows.push({
    figure: "MQTT QoS 1, ack after commit, 20 clients × 50 in flight (readings/s)",
    ours: fmt(m20.rate),
    baseline: `${fmt(directRate)} (direct writer)`,
    ratio: `${fmt((m20.rate / directRate) * 100)} %`,
    target: "≥ 30,000/s and ≥ 30 %",
    note: m20.cpu,
  });
  const m200 = await mqttRun("200 clients × 10 in flight", {
    clients: 200,
    inflight: 10,
    total,
    startMs: t0 + 20 * DAY,
  });
  rows.push({
    figure: "MQTT QoS 1, 200 clients × 10 in flight (readings/s)",
    ours: fmt(m200.rate),
    baseline: `${fmt(directRate)} (direct writer)`,
    ratio: `${fmt((m200.rate / directRate) * 100)} %`,
    target: "≥ 30,000/s and ≥ 30 %",
    note: m200.cpu,
  });
  const slow = await mqttRun("paced 1,000/s", {
    clients: 20,
    inflight: 1,
    total: N(15_000, 5_000),
    rate: 1000,
    startMs: t0 + 60 * DAY,
  });
  rows.push({
    figure: "Ack latency at 1,000 readings/s, p50 / p99 (ms)",
    ours: `${slow.p50.toFixed(1)} / ${slow.p99.toFixed(1)}`,
    baseline: "—",
    ratio: "—",
    target: "p99 ≤ 25 ms",
  });
  const fast = await mqttRun("paced 25,000/s", {
    clients: 200,
    inflight: 1,
    total: N(250_000, 50_000),
    rate: 25_000,
    startMs: t0 + 140 * DAY,
  });
  rows.push({
    figure: "Ack latency at 25,000 readings/s, p50 / p99 (ms)",
    ours: `${fast.p50.toFixed(1)} / ${fast.p99.toFixed(1)}`,
    baseline: "—",
    ratio: "—",
    target: "p99 ≤ 100 ms",
    note: `${fmt(fast.rate)}/s achieved`,
  });
  const { peakRss } = await ask<{ peakRss: number }>("stats");
  rows.push({
    figure: "Ingest process peak memory (RSS, MB)",
    ours: fmt(peakRss / 2 ** 20),
    baseline: "—",
    ratio: "—",
    target: "≤ 200 MB",
    note: "the broker + writer process, over all MQTT runs",
  });
  ingest.send({ cmd: "stop" });
  await new Promise((r) => ingest.once("exit", r));

  // ---------- Bulk paths: backfill (simulator), CSV import, HTTP batches ----------
  log(`autovacuum settled after ${fmt(await quietDb(), 1)} s`);
  const bulkSensors = bulkIds.slice(0, 5);
  const [bf, bfMs] = await timed(() =>
    backfill({
      site: DEMO_SITE,
      scenario: DEMO_SCENARIO,
      targets: bulkSensors.map((id, i) => ({
        sensorId: id,
        spot: { kind: "room" as const, facing: "none" as const, hasLight: false },
        seed: i + 1,
      })),
      from: new Date(Date.now() - 120 * DAY),
      to: new Date(Date.now() - 1 * DAY),
      intervalMs: 5 * MINUTE,
      write: (r) => sharedWriter().write(r),
    }),
  );
  const bfRate = bf.written / (bfMs / 1000);
  const { csvRate, repeatRate } = await (async () => {
    const csvRows = N(100_000, 20_000);
    const csvText =
      "time,temperature,humidity\n" +
      Array.from(
        { length: csvRows },
        (_, k) => `${new Date(t0 + k * MINUTE).toISOString()},${(19 + (k % 50) / 10).toFixed(1)},${45 + (k % 30)}`,
      ).join("\n");
    const parsed = parseCsv(new TextEncoder().encode(csvText));
    const mapping = {
      timestamp: 0,
      temperature: 1,
      humidity: 2,
      lux: null,
      unit: "C",
      dateFormat: "iso",
      timeZone: "UTC",
    } as const;
    const [csv, csvMs] = await timed(() => importCsv(parsed.rows, mapping, bulkIds[5]));
    // The same file again: every row a duplicate, nothing stored, each batch written twice.
    const [again, againMs] = await timed(() => importCsv(parsed.rows, mapping, bulkIds[5]));
    if (again.stored !== 0) throw new Error(`a repeated CSV import stored ${again.stored} readings`);
    return { csvRate: csv.stored / (csvMs / 1000), repeatRate: csvRows / (againMs / 1000) };
  })();
  const httpRate = await (async () => {
    const httpSensor = bulkIds[6];
    const httpBatches = N(20, 5);
    // The request bodies are the client's work: made before the clock starts.
    const bodies = Array.from({ length: httpBatches }, (_, b) =>
      JSON.stringify({
        readings: Array.from({ length: 10_000 }, (_, k) => ({
          time: t0 + (b * 10_000 + k) * MINUTE,
          temperature: 20 + (k % 9) / 10,
          humidity: 50,
        })),
      }),
    );
    const [httpStored, httpMs] = await timed(async () => {
      let stored = 0;
      for (const body of bodies) {
        const res = await handleHttpIngest(
          new Request("http://bench/api/ingest", {
            method: "POST",
            headers: { Authorization: `Bearer ${httpSensor}.${secret}`, "Content-Type": "application/json" },
            body,
          }),
        );
        stored += ((await res.json()) as { stored: number }).stored;
      }
      return stored;
    });
    return httpStored / (httpMs / 1000);
  })();
  for (const [name, rate] of [
    ["Backfill (simulator → writer, 10,000-row batches)", bfRate],
    ["CSV import (parse + validate + write)", csvRate],
    ["HTTP batches of 10,000 (handler in process)", httpRate],
  ] as const) {
    rows.push({
      figure: `${name} (readings/s, deduplicated with rollups)`,
      ours: fmt(rate),
      baseline: `${fmt(copyRate)} (bare COPY)`,
      ratio: `${fmt((rate / copyRate) * 100)} %`,
      target: "≥ 100,000/s",
    });
  }
  rows.push({
    figure: "The same CSV imported again, every row a duplicate (rows/s, nothing stored)",
    ours: fmt(repeatRate),
    baseline: `${fmt(csvRate)} (first import)`,
    ratio: `${fmt((repeatRate / csvRate) * 100)} %`,
    target: "—",
  });
  log(
    `bulk: backfill ${fmt(bfRate)}/s, CSV ${fmt(csvRate)}/s (again, all duplicates: ${fmt(repeatRate)}/s), HTTP ${fmt(httpRate)}/s`,
  );

  // ---------- Season profile: a year of one-minute readings among 50 sensors ----------
  // The target spot gets its own sensor at one-minute intervals for 16 months (for the growth rows);
  // the other 49 spots get a sensor each at ten minutes for a year. Loaded by COPY, rolled up once.
  const target = (
    await p.query("INSERT INTO spots (site_id, name, indoor) VALUES ($1, 'Profiled spot', true) RETURNING id", [
      site.id,
    ])
  ).rows[0].id as number;
  const targetSensor = (
    await p.query("INSERT INTO sensors (site_id, name, secret_hash) VALUES ($1, 'Profiled sensor', 'x') RETURNING id", [
      site.id,
    ])
  ).rows[0].id as number;
  await p.query("INSERT INTO placements (sensor_id, spot_id, from_at) VALUES ($1, $2, now() - interval '3 years')", [
    targetSensor,
    target,
  ]);
  const now = Date.now();
  const months16 = N(16 * 30, 4 * 30) * DAY;
  // Generated, copied and let go: millions of objects left in this process's heap would put the
  // garbage collector's pauses into the page-load timings below.
  await copyRows("readings", synthetic([targetSensor], Math.floor(months16 / MINUTE), now - months16, MINUTE));
  await copyRows(
    "readings",
    synthetic(
      sensorIds.slice(100, 149),
      Math.floor((N(365, 60) * DAY) / (10 * MINUTE)),
      now - N(365, 60) * DAY,
      10 * MINUTE,
    ),
  );
  await p.query("DELETE FROM hourly_rollups");
  await p.query(REBUILD_SQL, [[target, ...spotIds]]);
  await p.query("ANALYZE");
  const rawCount = Number((await p.query("SELECT count(*) FROM readings")).rows[0].count);
  log(`profile data: ${fmt(rawCount)} raw readings`);
  log(`autovacuum settled after ${fmt(await quietDb(), 1)} s`);

  const siteInfo = { latitude: site.latitude, longitude: site.longitude, timeZone: site.time_zone };
  const RAW_HOURLY = REBUILD_SQL.replace(/^\s*INSERT INTO hourly_rollups \([^)]*\)\s*/m, "").replace(
    "WHERE p.spot_id = ANY($1::int[])",
    "WHERE p.spot_id = ANY($1::int[]) AND r.measured_at >= $2 AND r.measured_at < $3",
  );
  async function fromRollups(from: Date, to: Date) {
    const r = await loadRollups([target], from, to);
    return seasonProfile(r.get(target)!, siteInfo, { from, to });
  }
  async function fromRollupsUncached(from: Date, to: Date) {
    const r = await fetchRollups([target], from, to);
    return seasonProfile(r.get(target)!, siteInfo, { from, to });
  }
  // Columns of the rebuild SELECT are unnamed aggregates; name them so both paths read the same.
  const named = RAW_HOURLY.replace(
    /SELECT spot_id, hour, count\(t\)::int, min\(t\), max\(t\), sum\(t\), count\(h\)::int, min\(h\), max\(h\), sum\(h\),\s*min\(dew_point_margin\(t, h\)\), count\(l\)::int, sum\(l\), max\(l\)/,
    "SELECT spot_id, hour, count(t)::int AS t_n, min(t) AS t_min, " +
      "max(t) AS t_max, sum(t) AS t_sum, count(h)::int AS h_n, min(h) " +
      "AS h_min, max(h) AS h_max, sum(h) AS h_sum, " +
      "min(dew_point_margin(t, h)) AS dp, count(l)::int AS lux_n, " +
      "sum(l) AS lux_sum, max(l) AS lux_max",
  );
  async function fromRawNamed(from: Date, to: Date) {
    const res = await p.query(named + " ORDER BY hour", [[target], from, to]);
    const rollups: HourlyRollup[] = res.rows.map((x) => ({
      hour: x.hour,
      tN: x.t_n,
      tMin: x.t_min,
      tMax: x.t_max,
      tSum: x.t_sum,
      hN: x.h_n,
      hMin: x.h_min,
      hMax: x.h_max,
      hSum: x.h_sum,
      dpMarginMin: x.dp,
      luxN: x.lux_n,
      luxSum: x.lux_sum,
      luxMax: x.lux_max,
      dpN: x.dp_n,
      dpUnderN: x.dp_under_n,
    }));
    return seasonProfile(rollups, siteInfo, { from, to });
  }
  const year = { from: new Date(now - 365 * DAY), to: new Date(now) };
  const profileTimes: number[] = [];
  // Warmed up as on a running server, where the page has been loaded before. Timed straight after
  // one call, seasonProfile itself took 12–26 ms of a load while V8 had yet to optimise it, and
  // 3 ms once it had; the forced collection comes first because it also shrinks the young
  // generation, and the loads straight after it paid for that with extra scavenges (6–13 ms).
  settle();
  const [, firstMs] = await timed(() => fromRollups(year.from, year.to));
  for (let i = 0; i < 20; i++) await fromRollups(year.from, year.to);
  for (let i = 0; i < 9; i++) profileTimes.push((await timed(() => fromRollups(year.from, year.to)))[1]);
  const rawTimes: number[] = [];
  let viaRaw = await fromRawNamed(year.from, year.to);
  for (let i = 0; i < 3; i++) {
    const [v, ms] = await timed(() => fromRawNamed(year.from, year.to));
    viaRaw = v;
    rawTimes.push(ms);
  }
  const viaRollups = await fromRollups(year.from, year.to);
  let maxDiff = 0;
  viaRollups.months.forEach((m, i) => {
    const o = viaRaw.months[i];
    for (const k of ["lowest", "highest", "p05", "p95", "meanDailyLow", "meanDailyHigh"] as const) {
      const a = m.temperature[k];
      const b = o?.temperature[k];
      if (a != null && b != null) maxDiff = Math.max(maxDiff, Math.abs(a - b));
    }
  });
  const pr = median(profileTimes);
  const rw = median(rawTimes);
  const coldTimes: number[] = [];
  for (let i = 0; i < 5; i++) coldTimes.push((await timed(() => fromRollupsUncached(year.from, year.to)))[1]);
  const cold = median(coldTimes);
  rows.push({
    figure: "Season profile of one spot, a year of one-minute readings, page load with the rollup cache checked (ms)",
    ours: fmt(pr, 1),
    baseline: `${fmt(rw, 1)} (same figures from raw readings)`,
    ratio: `${fmt(rw / pr)}× faster`,
    target: "≥ 100× and ≤ 20 ms",
    note:
      `${fmt(rawCount)} raw readings in the table; largest difference ` +
      `between the two ${maxDiff.toFixed(4)} °C (tolerance 0.01 °C); ` +
      `median of 9 after 20 loads to warm up (the first load after ` +
      `start, reading the rollups, took ${fmt(firstMs)} ms)`,
  });
  rows.push({
    figure: "Season profile as above, rollups read without the cache (first load) (ms)",
    ours: fmt(cold, 1),
    baseline: `${fmt(rw, 1)} (from raw readings)`,
    ratio: `${fmt(rw / cold)}× faster`,
    target: "—",
  });

  // ---------- Fit table: 50 spots × 40 profiles ----------
  settle();
  const seasons = await (async () => {
    const r = await loadRollups(spotIds, year.from, year.to);
    return spotIds.map((id) => seasonProfile(r.get(id)!, siteInfo, year));
  })();
  const profiles: PlantProfile[] = [
    ...PLANT_LIBRARY,
    ...PLANT_LIBRARY.slice(0, 15).map((pp) => ({ ...pp, key: `${pp.key}-copy`, minNightC: pp.minNightC + 1 })),
  ];
  const fitTimes: number[] = [];
  for (let i = 0; i < 5; i++)
    fitTimes.push((await timed(async () => seasons.map((s) => rankPlantsForSpot(profiles, s))))[1]);
  const [, seasonsMs] = await timed(async () => {
    const r = await loadRollups(spotIds, year.from, year.to);
    return spotIds.map((id) => seasonProfile(r.get(id)!, siteInfo, year));
  });
  rows.push({
    figure: `Fit table, 50 spots × ${profiles.length} plant profiles (ms)`,
    ours: fmt(median(fitTimes), 1),
    baseline: `${fmt(seasonsMs, 0)} (loading the 50 season profiles it needs)`,
    ratio: "—",
    target: "≤ 100 ms",
  });

  // ---------- Chart data: a year of daily data for one spot, and uPlot's draw in Chromium ----------
  settle();
  const seriesTimes: number[] = [];
  let payload = "";
  for (let i = 0; i < 7; i++) {
    const [s, ms] = await timed(() => spotSeries(target, site.time_zone, "year"));
    payload = JSON.stringify(s);
    seriesTimes.push(ms);
  }
  const hourly = await p.query(
    "SELECT extract(epoch FROM hour)::bigint AS t, t_sum / " +
      "nullif(t_n, 0) AS temp FROM hourly_rollups WHERE spot_id = $1 " +
      "AND hour > now() - interval '1 year' ORDER BY hour",
    [target],
  );
  const hourlyPayload = JSON.stringify({
    t: hourly.rows.map((r) => Number(r.t)),
    temp: hourly.rows.map((r) => r.temp),
  });
  const drawMs = await uplotDraw(hourlyPayload);
  rows.push({
    figure: "Chart data: a year for one spot through the series route (ms, KB)",
    ours: `${fmt(median(seriesTimes), 1)} ms, ${fmt(payload.length / 1024)} KB`,
    baseline: "—",
    ratio: "—",
    target: "≤ 30 ms server",
  });
  rows.push({
    figure: `uPlot draw of a year of hourly data (${fmt(hourly.rowCount ?? 0)} points) in Chromium (ms)`,
    ours: fmt(drawMs, 1),
    baseline: "—",
    ratio: "—",
    target: "≤ 50 ms draw",
  });

  // ---------- Growth: profile time at 1×, 4×, 16× the period; writer rate as the table grows ----------
  settle();
  for (const months of QUICK ? [1, 4] : [1, 4, 16]) {
    const from = new Date(now - months * 30 * DAY);
    // One after another, after a few to warm up (run at once, each timing held the others').
    for (let i = 0; i < 5; i++) await fromRollups(from, year.to);
    const times: number[] = [];
    for (let i = 0; i < 5; i++) times.push((await timed(() => fromRollups(from, year.to)))[1]);
    const a = median(times);
    const [, b] = await timed(() => fromRawNamed(from, year.to));
    rows.push({
      figure: `Growth: profile over ${months} month${months > 1 ? "s" : ""} (${months}× data) (ms)`,
      ours: fmt(a, 1),
      baseline: `${fmt(b, 1)} (from raw)`,
      ratio: `${fmt(b / a)}×`,
      target: "—",
    });
  }
  const growthBatch = synthetic(sensorIds.slice(150, 160), 5000, now - 2 * DAY * 30, 30_000);
  const [, gMs] = await timed(() => directWrite(new ReadingWriter(pool, 5, 2000), growthBatch));
  rows.push({
    figure: `Growth: direct writer with ${fmt(rawCount)} readings already stored (readings/s)`,
    ours: fmt(growthBatch.length / (gMs / 1000)),
    baseline: `${fmt(directRate)} (with ${fmt(total)} stored)`,
    ratio: `${fmt((growthBatch.length / (gMs / 1000) / directRate) * 100)} %`,
    target: "—",
  });

  settle();
  await projectionBench(site.id);

  log(`autovacuum settled after ${fmt(await quietDb(), 1)} s`);
  await csvUnderLoad({ sensorId: bulkIds[7], creds, timeZone: site.time_zone });
  await phoneBench();
  // Last: its 100,000 readings and three RabbitMQ nodes would otherwise weigh on the figures after it
  // (with it before them, the uncached profile and the chart data measured 50–60 % slower).
  rows.push(...(await clusterRows(creds)));
  output(started);
}

/** The phone figures (tests/bench/phone.ts): the built app's first screens with a 4× slower CPU on a slow network. */
async function phoneBench() {
  ensureChromium();
  for (const f of await phonePages({ chromiumPath: CHROMIUM, log })) {
    rows.push({
      figure: `Phone, 390 px, CPU 4× slower, slow 4G: ${f.page}, its answer on screen (ms)`,
      ours: fmt(f.answerMs, 0),
      baseline: `${fmt(f.fcpMs, 0)} (first contentful paint)`,
      ratio: "—",
      target: "≤ 2,500 ms",
      note: `JavaScript ${fmt(f.scriptKb, 0)} KB sent, ${fmt(f.scriptKbDecoded, 0)} KB unpacked; median of 3 fresh visits`,
    });
  }
}

function output(started: Date) {
  const header =
    `Nichewise benchmark — ` +
    `${started.toISOString().slice(0, 16).replace("T", " ")} UTC — ` +
    `${os.cpus().length} cores (${os.cpus()[0]?.model ?? ""}), ` +
    `${Math.round(os.totalmem() / 2 ** 30)} GiB, Node ` +
    `${process.version}, PostgreSQL 15 on loopback` +
    `${QUICK ? " — QUICK (smaller data)" : ""}`;
  const md = [
    `**${header}**`,
    "",
    "| figure | ours | baseline (same run) | ratio | target |",
    "|---|---|---|---|---|",
    ...rows.map(
      (r) => `| ${r.figure}${r.note ? ` — ${r.note}` : ""} | ${r.ours} | ${r.baseline} | ${r.ratio} | ${r.target} |`,
    ),
  ].join("\n");
  mkdirSync(".bench", { recursive: true });
  // A run of one part does not overwrite the whole run's figures.
  const name = ONLY ? `latest-${ONLY}` : "latest";
  writeFileSync(`.bench/${name}.json`, JSON.stringify({ header, rows }, null, 2));
  writeFileSync(`.bench/${name}.md`, md + "\n");
  console.log("\n" + md + "\n");
}

/**
 * A 1,000,000-row CSV (naive local times of a logger, one a minute, across the site's clock
 * changes; about 20 MB) previewed and then imported in the ingest process while 20 MQTT sensors
 * publish 1,000 readings/s to it: the event loop's delay there (what PUBACKs and pages wait on)
 * and how much its RSS grows.
 */
async function csvUnderLoad(opts: { sensorId: number; creds: { id: number; secret: string }[]; timeZone: string }) {
  const csvRows = N(1_000_000, 200_000);
  const file = path.resolve(`${DIR}/million.csv`);
  const clock = zoneClock(opts.timeZone);
  const first = Date.now() - 2 * 365 * DAY;
  const parts: string[] = ["time,temperature"];
  for (let k = 0; k < csvRows; k++) {
    const ms = first + k * MINUTE;
    parts.push(`${new Date(ms + clock.offsetAt(ms)).toISOString().slice(0, 16).replace("T", " ")},${18 + (k % 7)}`);
  }
  writeFileSync(file, parts.join("\n") + "\n");
  parts.length = 0;
  const [brokerJs, loadgenJs] = await Promise.all(["broker-proc", "loadgen"].map(bundle));
  const ingest = spawn(process.execPath, ["--expose-gc", ...serverNodeFlags(), brokerJs], {
    stdio: ["ignore", "inherit", "inherit", "ipc"],
    env: process.env,
  });
  const { port } = await new Promise<{ port: number }>((resolve) =>
    ingest.once("message", (m) => resolve(m as { port: number })),
  );
  const rate = 1000;
  const load = new Promise<string>((resolve, reject) => {
    const child = spawn(
      process.execPath,
      [
        loadgenJs,
        JSON.stringify({
          url: `mqtt://127.0.0.1:${port}`,
          sensors: opts.creds.slice(0, 20),
          clients: 20,
          inflight: 1,
          total: N(60_000, 20_000),
          rate,
          startMs: Date.now() - 400 * DAY,
        }),
      ],
      { stdio: ["ignore", "pipe", "inherit"] },
    );
    let s = "";
    child.stdout.on("data", (d) => (s += d));
    child.on("exit", (code) => (code === 0 ? resolve(s) : reject(new Error(`loadgen exited ${code}`))));
  });
  await new Promise((r) => setTimeout(r, 2000)); // the clients connected and publishing
  const csv = await new Promise<{
    p50Ms: number;
    p99Ms: number;
    maxMs: number;
    growthMb: number;
    afterGcMb: number;
    heapUsedMb: number;
    heapTotalMb: number;
    previewMs: number;
    importMs: number;
    rows: number;
    stored: number;
    dst: number;
  }>((resolve) => {
    ingest.once("message", (m) => resolve(m as never));
    ingest.send({
      cmd: "csv",
      file,
      sensorId: opts.sensorId,
      mapping: {
        timestamp: 0,
        temperature: 1,
        humidity: null,
        lux: null,
        unit: "C",
        dateFormat: "iso",
        timeZone: opts.timeZone,
      },
    });
  });
  const mqtt = JSON.parse((await load).trim().split("\n").pop()!) as {
    acked: number;
    failed: number;
    p50: number;
    p99: number;
  };
  ingest.send({ cmd: "stop" });
  await new Promise((r) => ingest.once("exit", r));
  rmSync(file, { force: true });
  log(
    `CSV under MQTT load: ${fmt(csv.rows)} rows, preview ` +
      `${fmt(csv.previewMs)} ms, import ${fmt(csv.importMs)} ms (` +
      `${fmt(csv.stored)} stored, ${csv.dst} clock changes); event ` +
      `loop p50 ${csv.p50Ms.toFixed(1)} / p99 ${csv.p99Ms.toFixed(1)} ` +
      `/ max ${csv.maxMs.toFixed(1)} ms; RSS +${fmt(csv.growthMb)} MB ` +
      `at peak (heap ${fmt(csv.heapUsedMb)} of ${fmt(csv.heapTotalMb)} ` +
      `MB at the end, +${fmt(csv.afterGcMb)} MB after a collection); ` +
      `MQTT acked ${mqtt.acked} failed ${mqtt.failed} p99 ` +
      `${mqtt.p99.toFixed(1)} ms`,
  );
  const note =
    `${fmt(csv.rows)}-row CSV (${opts.timeZone} local times) ` +
    `previewed in ${fmt(csv.previewMs / 1000, 1)} s and imported in ` +
    `${fmt(csv.importMs / 1000, 1)} s (` +
    `${fmt(csv.rows / (csv.importMs / 1000))} rows/s) in the ingest ` +
    `process, beside 20 MQTT sensors at ${fmt(rate)} readings/s`;
  rows.push({
    figure: "Event-loop delay while a CSV is previewed and imported beside MQTT load, p50 / p99 / max (ms)",
    ours: `${csv.p50Ms.toFixed(1)} / ${csv.p99Ms.toFixed(1)} / ${csv.maxMs.toFixed(1)}`,
    baseline: "—",
    ratio: "—",
    target: "p99 ≤ 50 ms",
    note,
  });
  rows.push({
    figure: "RSS growth of the ingest process over that preview and import (MB)",
    ours: fmt(csv.growthMb),
    baseline: "—",
    ratio: "—",
    target: "≤ 150 MB",
    note: "peak sampled every 20 ms, from a collected heap; includes the file's bytes as an upload holds them",
  });
  rows.push({
    figure: "MQTT ack latency during that CSV preview and import, p50 / p99 (ms)",
    ours: `${mqtt.p50.toFixed(1)} / ${mqtt.p99.toFixed(1)}`,
    baseline: "—",
    ratio: "—",
    target: "—",
    note: `${fmt(mqtt.acked)} acked, ${mqtt.failed} failed`,
  });
}

async function uplotDraw(payload: string): Promise<number> {
  const browser = await chromium.launch({
    executablePath: CHROMIUM,
    args: [
      "--no-sandbox",
      "--disable-gpu",
      "--disable-quic",
      "--no-first-run",
      "--disable-background-networking",
      "--disable-component-update",
      "--disable-sync",
    ],
  });
  try {
    const page = await browser.newPage({ viewport: { width: 1000, height: 600 } });
    const lib = readFileSync("node_modules/uplot/dist/uPlot.iife.min.js", "utf8");
    const css = readFileSync("node_modules/uplot/dist/uPlot.min.css", "utf8");
    await page.setContent(
      `<html><head><style>${css}</style></head><body><div id="c"></div><script>${lib}</script></body></html>`,
    );
    const times: number[] = await page.evaluate((json) => {
      const d = JSON.parse(json);
      const out: number[] = [];
      for (let i = 0; i < 5; i++) {
        const el = document.getElementById("c")!;
        el.innerHTML = "";
        const t = performance.now();
        // @ts-expect-error uPlot is the global from the IIFE build
        const u = new uPlot({ width: 900, height: 300, series: [{}, { stroke: "#c4472f" }] }, [d.t, d.temp], el);
        out.push(performance.now() - t);
        u.destroy();
      }
      return out;
    }, payload);
    return median(times);
  } finally {
    await browser.close();
  }
}

main().catch((err) => {
  console.error(err);
  process.exit(1);
});
