// `npm run test:cluster`: cluster mode proved on this machine. A three-node RabbitMQ cluster on
// loopback (tests/cluster/engine.ts), two ingest workers and two web instances of the built server
// (NW_ROLE=ingest / web) and one PostgreSQL. Checks that a session made on one web instance is
// served by the other, then drives 100,000 readings from simulated MQTT sensors (the fault soak of
// `npm run test:faults`, tests/faults/soak-core.ts, with its checks) while one engine node, one
// ingest worker and the alert engine's holder are killed with SIGKILL. Exits non-zero on any reading
// lost or counted twice, on alert events wrong (the soak's checks), or on a failed takeover.
// Not part of `npm test`: it takes several minutes (starting RabbitMQ alone takes most of one).
//
// NW_CLUSTER_READINGS, NW_CLUSTER_CLIENTS, NW_CLUSTER_RATE (publishes/s), NW_CLUSTER_PG_PORT and
// NW_CLUSTER_BASE_PORT (20 ports from it for the engine, 3 more for the web instances and the mail sink)
// change size, pace and ports. Logs of every process are kept in .data/cluster/logs on failure.
import { randomBytes } from "node:crypto";
import { existsSync, rmSync } from "node:fs";
import path from "node:path";
import { startEmbeddedPostgres, stopEmbeddedPostgres } from "~/.server/postgres";
import { formatReport, runSoak, soakFailed, type ClusterFault } from "../faults/soak-core";
import { startEngineCluster, type EngineCluster } from "./engine";
import { rssMb, SERVER, startServerProc, type Proc } from "./procs";

const dir = path.resolve(".data/cluster");
const logDir = path.join(dir, "logs");
const pgDir = path.join(dir, "pg");
const pgPort = Number(process.env.NW_CLUSTER_PG_PORT ?? 55482);
const base = Number(process.env.NW_CLUSTER_BASE_PORT ?? 26300);
const readings = Number(process.env.NW_CLUSTER_READINGS ?? 100_000);
const clients = Number(process.env.NW_CLUSTER_CLIENTS ?? 20);
const rate = Number(process.env.NW_CLUSTER_RATE ?? 2500);
const database = "nichewise_cluster";
const log = (s: string) => console.log(`[cluster] ${s}`);
const YEARS_MS = 3 * 365 * 86_400_000;

async function main() {
  if (!existsSync(SERVER)) throw new Error("No build found: run `npm run build` first (npm run test:cluster does)");
  stopEmbeddedPostgres(pgDir);
  rmSync(dir, { recursive: true, force: true });
  const stops: (() => Promise<unknown>)[] = [];
  const stopAll = async () => {
    for (const s of stops.reverse()) await s().catch((err) => console.error(err));
  };
  let failed = true;
  try {
    const pg = await startEmbeddedPostgres({ dataDir: pgDir, port: pgPort, database, log: () => {} });
    stops.push(pg.stop);
    process.env.DATABASE_URL = pg.url;
    const { runMigrations, closeDb } = await import("~/.server/db");
    stops.push(closeDb);
    await runMigrations(path.resolve("drizzle"));
    log(`PostgreSQL on 127.0.0.1:${pgPort}`);

    const mail = await import("~/.server/mail");
    const sink = await mail.startMailSink({ port: base + 22, log: () => {} });
    stops.push(sink.close);

    // Two web instances: A first, so that it holds the alert lease; the engine asks B (never killed)
    // about sensors, as it would ask the web instances' proxy in production.
    const authKey = randomBytes(18).toString("hex");
    const webEnv = (port: number) => ({
      NW_ROLE: "web",
      DATABASE_URL: pg.url,
      HOST: "127.0.0.1",
      PORT: String(port),
      SMTP_URL: `smtp://127.0.0.1:${sink.port}`,
      NW_CLUSTER_AUTH_KEY: authKey,
      // The soak's readings are ~200 days old (so the run is fast): the engine treats them as live.
      NW_ALERT_MAX_LAG_MS: String(YEARS_MS),
      WEATHER_YEARS: "1",
    });
    const web: Proc[] = [];
    for (const [i, name] of ["web-a", "web-b"].entries()) {
      const p = startServerProc(name, logDir, webEnv(base + 20 + i));
      stops.push(() => p.kill("SIGKILL"));
      web.push(p);
      // The lease may be taken before the web server listens: both waits start now.
      const leased = i === 0 ? p.waitFor(/holds the alert lease/, 60_000) : null;
      leased?.catch(() => {}); // awaited below
      await p.waitFor(/Web app on/);
      await leased;
    }
    log(`web instances on :${base + 20} (alert lease holder) and :${base + 21}`);
    await checkStatelessWeb(base + 20, base + 21);

    const engine: EngineCluster = await startEngineCluster({
      dir: path.join(dir, "engine"),
      basePort: base,
      authUrls: [`http://127.0.0.1:${base + 21}/cluster/auth`],
      authKey,
      log,
    });
    stops.push(engine.stop);

    const workers: Proc[] = [];
    for (let i = 0; i < 2; i++) {
      const p = startServerProc(`ingest-${i + 1}`, logDir, {
        NW_ROLE: "ingest",
        DATABASE_URL: pg.url,
        NW_AMQP_URLS: engine.amqpUrls(i).join(","),
      });
      stops.push(() => p.kill("SIGKILL"));
      await p.waitFor(/ingest worker: consuming/);
      workers.push(p);
    }
    // Each worker logs the shards it takes deliveries from ("active on shards [0,2] of 4").
    const shardsOf = (p: Proc) => /active on shards \[([\d,]*)\]/.exec(p.lastLine(/active on shards/) ?? "")?.[1] ?? "";
    const shardReport = () =>
      workers.map((p) => `${p.name} [${shardsOf(p)}]${p.alive() ? "" : " (killed)"}`).join(", ");
    log("two ingest workers consuming every shard of the readings");
    await checkOversize(engine);

    let takeoverMs: number | null = null;
    let workerTakeoverMs: number | null = null;
    let engineMs: number | null = null;
    const memory: string[] = [];
    const fault = async (kind: ClusterFault) => {
      if (memory.length === 0) {
        memory.push(...engine.nodes.map((n) => `${n.name} ${rssMb(engine.pid(n.index)) ?? "?"} MB`));
        memory.push(...[...web, ...workers].map((p) => `${p.name} ${p.rssMb() ?? "?"} MB`));
      }
      if (kind === "kill-engine-node") {
        spreadAtStart.text = shardReport();
        await engine.kill(2);
        log("killed engine node 3 (SIGKILL)");
      } else if (kind === "kill-ingest-worker") {
        // The one active on more shards; the other takes its shards over.
        const before = shardReport();
        const victim = [...workers].sort((x, y) => shardsOf(y).length - shardsOf(x).length)[0];
        const other = workers.find((w) => w !== victim)!;
        const taken = other.waitFor(/taking deliveries from/, 60_000);
        const killedAt = Date.now();
        await victim.kill("SIGKILL");
        workerTakeoverMs = (await taken) - killedAt;
        log(
          `active shards before: ${before}; killed ${victim.name} (SIGKILL); ${other.name} took deliveries from one of its shards ${workerTakeoverMs} ms later`,
        );
      } else {
        // The lock is taken first; the engine then catches up from each rule's cursor before it runs.
        const taken = web[1].waitFor(/lease \d+: held/, 60_000);
        const running = web[1].waitFor(/holds the alert lease/, 60_000);
        const killedAt = Date.now();
        await web[0].kill("SIGKILL");
        takeoverMs = (await taken) - killedAt;
        engineMs = (await running) - killedAt;
        log(
          `killed the alert lease holder (web A, SIGKILL); web B took the lease ${takeoverMs} ms later, its engine ran ${engineMs} ms after the kill`,
        );
      }
    };
    const spreadAtStart = { text: "" };
    const report = await runSoak({
      databaseUrl: pg.url,
      pgDataDir: pgDir,
      pgPort,
      pgDatabase: database,
      readings,
      clients,
      ratePerSecond: rate,
      faults: [
        { at: 0.25, kind: "kill-engine-node" },
        { at: 0.5, kind: "kill-ingest-worker" },
        { at: 0.75, kind: "kill-alert-holder" },
      ],
      cluster: { servers: engine.mqttServers(), fault },
      log,
    });
    console.log(`\ncluster mode: 3 RabbitMQ nodes, 2 ingest workers, 2 web instances\n${formatReport(report)}`);
    console.log(`active shards (of 4) at the first fault: ${spreadAtStart.text}; at the end: ${shardReport()}`);
    console.log(
      `engine start ${engine.startSeconds.toFixed(1)} s; ingest ` +
        `takeover ${workerTakeoverMs ?? "-"} ms; alert lease takeover ` +
        `${takeoverMs ?? "-"} ms (engine running after ${engineMs ?? "-"}` +
        ` ms); resident memory before the faults: ${memory.join(", ")}`,
    );
    failed = soakFailed(report) || takeoverMs === null || workerTakeoverMs === null;
    console.log(
      failed
        ? "FAILED: readings lost, counted twice, alert events wrong or no takeover"
        : "OK: 0 lost, 0 double-counted, alert events consistent, alert lease taken over",
    );
  } finally {
    await stopAll();
    stopEmbeddedPostgres(pgDir);
    if (!failed && !process.env.NW_CLUSTER_KEEP) rmSync(dir, { recursive: true, force: true });
    else console.log(`logs kept in ${path.relative(process.cwd(), logDir)}`);
  }
  process.exitCode = failed ? 1 : 0;
}

/**
 * A sensor sending a 1 MB message (a reading is at most 4 KB): the engine must not queue it, and
 * the node must stay up. Nothing is stored for it; the sensor's connection may be closed.
 */
async function checkOversize(engine: EngineCluster) {
  const { makeSensor, makeSite, makeSpot, makeUser } = await import("../integration/helpers");
  const { pool } = await import("~/.server/db");
  const mqtt = (await import("mqtt")).default;
  const site = await makeSite(await makeUser());
  const sensor = await makeSensor(site, await makeSpot(site));
  const node = engine.nodes[0];
  const client = await mqtt.connectAsync(`mqtt://127.0.0.1:${node.mqttPort}`, {
    protocolVersion: 4,
    username: String(sensor.id),
    password: sensor.secret,
    reconnectPeriod: 0,
  });
  client.on("error", () => {});
  const big = JSON.stringify({
    time: new Date().toISOString(),
    temperature: 20,
    humidity: 50,
    pad: "x".repeat(1024 * 1024),
  });
  const outcome = await Promise.race([
    client.publishAsync(`nichewise/sensors/${sensor.id}/reading`, big, { qos: 1 }).then(
      () => "acknowledged",
      (err: Error) => `refused (${err.message})`,
    ),
    new Promise<string>((r) => client.once("close", () => r("connection closed by the engine"))),
    new Promise<string>((r) => setTimeout(() => r("no answer in 10 s"), 10_000)),
  ]);
  await client.endAsync(true).catch(() => {});
  await new Promise((r) => setTimeout(r, 2000)); // a worker would have taken it by now
  const stored = (await pool().query("SELECT count(*)::int AS n FROM readings WHERE sensor_id = $1", [sensor.id]))
    .rows[0].n;
  const rejected = (
    await pool().query("SELECT count(*)::int AS n FROM rejected_messages WHERE sensor_id = $1", [sensor.id])
  ).rows[0].n;
  const alive = engine.pid(0) !== undefined && rssMb(engine.pid(0)) !== null;
  log(
    `a 1 MB message: ${outcome}; stored ${stored}, recorded as rejected ${rejected}; node 1 ${alive ? "up" : "DOWN"} (${rssMb(engine.pid(0)) ?? "?"} MB)`,
  );
  if (stored !== 0 || !alive) throw new Error("an oversized message was stored or took the engine node down");
}

/** Web instances share nothing but PostgreSQL: a session made on one is served by the other, and ended on one it is gone on both. */
async function checkStatelessWeb(portA: number, portB: number) {
  const { createSession, generateSessionToken, invalidateSession, sessionIdFromToken, SESSION_COOKIE } =
    await import("~/.server/auth");
  const { makeSite, makeUser } = await import("../integration/helpers");
  const user = await makeUser();
  const site = await makeSite(user);
  const token = generateSessionToken();
  await createSession(token, user.id);
  const get = (port: number) =>
    fetch(`http://127.0.0.1:${port}/sites/${site.id}`, {
      headers: { cookie: `${SESSION_COOKIE}=${token}` },
      redirect: "manual",
    });
  const [a, b] = await Promise.all([get(portA), get(portB)]);
  const pageB = await b.text();
  if (a.status !== 200 || b.status !== 200 || !pageB.includes(site.name))
    throw new Error(`a session made once was not served by both web instances (${a.status}, ${b.status})`);
  await invalidateSession(sessionIdFromToken(token));
  const after = await get(portA);
  if (after.status === 200) throw new Error("a session ended in the database was still served");
  log(`stateless web: one session served by both instances (200, 200), refused by both once ended (${after.status})`);
}

main().catch((err) => {
  console.error(err);
  stopEmbeddedPostgres(pgDir);
  process.exit(1);
});
