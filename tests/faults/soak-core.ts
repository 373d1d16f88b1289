// The fault soak: live MQTT.js sensors (QoS 1, MQTT 3.1.1) publish simulated readings through the
// real broker and writer while PostgreSQL is killed, the broker is restarted, connections are cut
// and the database is slowed by a held lock. After each fault and at the end, the database is
// checked in one snapshot: every acknowledged reading is stored exactly once, nothing unsent is
// stored, and the hourly rollups equal a fresh aggregation of the raw readings. With
// `serverProcess` the broker and writer run in a child process (tests/faults/server-proc.ts), so
// that the server can be killed with SIGKILL mid-stream and started again on the same port.
//
// MQTT 3.1.1 §4.3.2 (QoS 1, at least once): a PUBACK hands the message over; until then the sender
// keeps it and resends. So "lost" is an acknowledged reading missing from the database, and
// "double-counted" is a reading counted more than once (a duplicate row, or a rollup counting more
// readings than the raw table holds).
import { spawn, type ChildProcess } from "node:child_process";
import type { Socket } from "node:net";
import { fileURLToPath } from "node:url";
import mqtt, { type MqttClient } from "mqtt";
import pg from "pg";
import { startBroker, type RunningBroker } from "~/.server/ingest/broker";
import { ReadingWriter } from "~/.server/ingest/writer";
import { LOCAL_HOUR_START } from "~/.server/rollups/sql";
import { embeddedPid, startEmbeddedPostgres } from "~/.server/postgres";
import { DEMO_SCENARIO, DEMO_SITE, DEMO_SPOTS, generate } from "../../simulator/model";
import { makeSensor, makeSite, makeSpot, makeUser } from "../integration/helpers";

export type FaultKind =
  | "kill-postgres"
  | "restart-broker"
  | "cut-connections"
  | "lock-rollups"
  | "lock-readings"
  | "kill-server"
  | ClusterFault;
/** Faults of cluster mode (tests/cluster/run.ts), run by the caller's `cluster.fault`. */
export type ClusterFault = "kill-engine-node" | "kill-ingest-worker" | "kill-alert-holder";

export type SoakOptions = {
  databaseUrl: string;
  pgDataDir: string;
  pgPort: number;
  pgDatabase: string;
  readings: number; // distinct readings in all, across clients
  clients: number;
  /** Faults in order; each starts when this share of the messages has been acknowledged. */
  faults: { at: number; kind: FaultKind }[];
  window?: number; // un-acked publishes each client keeps in flight
  /** Publishes per second across all clients, so the faults land while readings are flowing. */
  ratePerSecond?: number;
  /** Run the broker and writer in a child process (needed by "kill-server"; no alert engine then). */
  serverProcess?: boolean;
  /**
   * Cluster mode (tests/cluster/run.ts): the sensors connect to any of these MQTT servers (the
   * engine's nodes), the ingest workers and the alert engine run in other processes, and the
   * caller runs the cluster's faults.
   */
  cluster?: { servers: { host: string; port: number }[]; fault: (kind: ClusterFault) => Promise<void> };
  log?: (s: string) => void;
};

export type Check = {
  after: string;
  acked: number;
  stored: number;
  lost: number;
  unexpected: number;
  doubleCounted: number;
  rollupHoursDiffering: number;
  alerts?: AlertCheck;
  keys?: Set<string>;
};
/** `inFlight`: readings published and not yet acknowledged when the fault struck. */
export type FaultFigure = {
  kind: FaultKind;
  at: number;
  inFlight: number;
  outageMs: number;
  firstAckMs: number | null;
  recoveredMs: number;
  check: Check;
};

export type SoakReport = {
  clients: number;
  messages: number; // publishes planned, including the simulator's duplicates
  distinct: number;
  sent: number; // publishes made, including resends the sensor code made after an error
  acked: number; // distinct readings acknowledged
  stored: number;
  lost: number;
  doubleCounted: number;
  unexpected: number;
  valueMismatches: number;
  rollupHoursDiffering: number;
  rejectedByBroker: number;
  writeFailures: number;
  reconnects: number;
  alerts: AlertCheck | null;
  faults: FaultFigure[];
  seconds: number;
  readingsPerSecond: number;
};

export type AlertCheck = {
  rules: number;
  events: number;
  open: number;
  /** Open events of one rule beyond the first: the same condition alerted twice. */
  repeated: number;
  /** Pairs of one rule's events overlapping in time (readings arriving out of order can cause them). */
  overlapping: number;
  /** Events open before a fault that were gone after it. */
  lostOpen: number;
  /** The same rules evaluated afresh over the stored readings in time order (arrival order differs). */
  reference?: { events: number; withoutEngineEvent: number; engineWithoutReference: number };
};

/**
 * How far the engine may differ from a fresh evaluation of the stored readings in time order.
 * They are not the same input: the engine evaluates readings as they arrive and, by design, lets a
 * reading older than one already evaluated (another sensor of the spot, a resend, a swapped send)
 * lower an open event's peak but not move the state. So near the threshold an event can start or
 * end a few readings apart, or split or merge. Allowed: a tenth of the reference events (at least
 * one) unmatched on either side, and the counts a tenth apart (at least one).
 */
export const ALERT_TOLERANCE = 0.1;

/** Why the alert figures fail the run, or an empty list. */
export function alertProblems(a: AlertCheck): string[] {
  const problems: string[] = [];
  if (a.repeated > 0) problems.push(`${a.repeated} events open twice for one rule`);
  if (a.lostOpen > 0) problems.push(`${a.lostOpen} open events gone after a fault`);
  if (a.overlapping > 0) problems.push(`${a.overlapping} pairs of one rule's events overlapping in time`);
  if (a.reference) {
    const allowed = Math.max(1, Math.floor(ALERT_TOLERANCE * a.reference.events));
    if (Math.abs(a.events - a.reference.events) > allowed)
      problems.push(`${a.events} events against ${a.reference.events} on re-evaluation (±${allowed} allowed)`);
    if (a.reference.withoutEngineEvent > allowed)
      problems.push(
        `${a.reference.withoutEngineEvent} re-evaluated events the engine never raised (${allowed} allowed)`,
      );
    if (a.reference.engineWithoutReference > allowed)
      problems.push(
        `${a.reference.engineWithoutReference} engine events not found on re-evaluation (${allowed} allowed)`,
      );
  }
  return problems;
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));
const MINUTE = 60_000;

const SERVER_PROC = fileURLToPath(new URL("./server-proc.ts", import.meta.url));

/** Starts tests/faults/server-proc.ts on `port` (0: any) and resolves once it listens. */
function startServerProcess(o: SoakOptions, port: number): Promise<{ child: ChildProcess; port: number }> {
  return new Promise((resolve, reject) => {
    const child = spawn(process.execPath, ["--import", "tsx", SERVER_PROC, String(port)], {
      stdio: ["ignore", "inherit", "inherit", "ipc"],
      env: { ...process.env, DATABASE_URL: o.databaseUrl, NODE_ENV: "test" },
    });
    child.once("error", reject);
    child.once("exit", (code, signal) =>
      reject(new Error(`server process exited (${code ?? signal}) before listening`)),
    );
    child.once("message", (m: { port: number }) => resolve({ child, port: m.port }));
  });
}

function killed(child: ChildProcess, signal: NodeJS.Signals) {
  return new Promise<void>((resolve) => {
    if (child.exitCode !== null || child.signalCode !== null) return resolve();
    child.once("exit", () => resolve());
    child.kill(signal);
  });
}

type Message = { key: string; payload: string };
type Expected = { t: number; h: number; lux: number | null };

type Sim = {
  sensorId: number;
  secret: string;
  topic: string;
  messages: Message[];
  next: number;
  inflight: number;
  client?: MqttClient;
};

function isAlive(pid: number) {
  try {
    process.kill(pid, 0);
    return true;
  } catch {
    return false;
  }
}

/** Starts the cluster again; retries while the killed server's backends still hold shared memory. */
async function restartPostgres(o: SoakOptions) {
  const until = Date.now() + 60_000;
  for (;;) {
    try {
      await startEmbeddedPostgres({ dataDir: o.pgDataDir, port: o.pgPort, database: o.pgDatabase, log: () => {} });
      return;
    } catch (err) {
      if (Date.now() > until) throw err;
      await sleep(300);
    }
  }
}

// Hours as the writer files them (the same LOCAL_HOUR_START), aggregated from raw readings, against
// the stored rollups. Sums are double precision added in a different order, hence the tolerance.
const ROLLUP_DIFF_SQL = `
WITH fresh AS (
  SELECT p.spot_id, ${LOCAL_HOUR_START("r.measured_at", "si.time_zone")} AS hour,
    count(r.temperature)::int AS t_n, min(r.temperature) AS t_min, max(r.temperature) AS t_max, sum(r.temperature) AS t_sum,
    count(r.humidity)::int AS h_n, min(r.humidity) AS h_min, max(r.humidity) AS h_max, sum(r.humidity) AS h_sum,
    count(r.lux)::int AS lux_n, sum(r.lux) AS lux_sum, max(r.lux) AS lux_max
  FROM placements p
  JOIN readings r ON r.sensor_id = p.sensor_id AND r.measured_at >= p.from_at AND (p.to_at IS NULL OR r.measured_at < p.to_at)
  JOIN spots sp ON sp.id = p.spot_id JOIN sites si ON si.id = sp.site_id
  WHERE p.spot_id = ANY($1::int[])
  GROUP BY 1, 2
), stored AS (
  SELECT * FROM hourly_rollups WHERE spot_id = ANY($1::int[]) AND (t_n > 0 OR h_n > 0 OR lux_n > 0)
)
SELECT
  count(*) FILTER (WHERE f.spot_id IS NULL OR s.spot_id IS NULL
    OR f.t_n <> s.t_n OR f.h_n <> s.h_n OR f.lux_n <> s.lux_n
    OR f.t_min IS DISTINCT FROM s.t_min OR f.t_max IS DISTINCT FROM s.t_max
    OR f.h_min IS DISTINCT FROM s.h_min OR f.h_max IS DISTINCT FROM s.h_max OR f.lux_max IS DISTINCT FROM s.lux_max
    OR abs(coalesce(f.t_sum, 0) - coalesce(s.t_sum, 0)) > 1e-6 * greatest(1, abs(coalesce(f.t_sum, 0))) + 0.01
    OR abs(coalesce(f.h_sum, 0) - coalesce(s.h_sum, 0)) > 1e-6 * greatest(1, abs(coalesce(f.h_sum, 0))) + 0.01
    OR abs(coalesce(f.lux_sum, 0) - coalesce(s.lux_sum, 0)) > 1e-6 * greatest(1, abs(coalesce(f.lux_sum, 0))) + 0.5)::int AS differing,
  coalesce(sum(s.t_n), 0)::bigint AS rollup_n, coalesce(sum(f.t_n), 0)::bigint AS raw_n
FROM fresh f FULL JOIN stored s ON s.spot_id = f.spot_id AND s.hour = f.hour`;

export async function runSoak(o: SoakOptions): Promise<SoakReport> {
  const log = o.log ?? (() => {});
  const window = o.window ?? 64;
  const startedAt = Date.now();

  // Sensors spread over the five demo spots, several sensors to a spot so that concurrent batches
  // upsert the same rollup hours.
  const user = await makeUser();
  const site = await makeSite(user, { timeZone: DEMO_SITE.timeZone, latitude: DEMO_SITE.latitude });
  const spots = [];
  for (const s of DEMO_SPOTS) spots.push(await makeSpot(site, { indoor: s.kind !== "outdoor", name: s.name }));
  const perClient = Math.ceil(o.readings / o.clients);
  // Historic timestamps (about 200 days back, one a minute) so the run goes as fast as the path allows.
  const t0 = Math.floor((Date.now() - 200 * 86_400_000) / MINUTE) * MINUTE;
  const expected = new Map<string, Expected>();
  const sims: Sim[] = [];
  for (let c = 0; c < o.clients; c++) {
    const spotIndex = c % spots.length;
    const sensor = await makeSensor(site, spots[spotIndex]);
    const messages: Message[] = [];
    const seen = new Set<string>();
    const gen = generate(DEMO_SITE, DEMO_SPOTS[spotIndex], DEMO_SCENARIO, {
      from: new Date(t0),
      to: new Date(t0 + perClient * 2 * MINUTE),
      intervalMs: MINUTE,
      sensorSeed: 1000 + c,
      artifacts: true, // the radio link's duplicates and out-of-order sends
      installedAt: new Date(t0 - 30 * 86_400_000),
    });
    for (const r of gen) {
      const key = `${sensor.id}:${r.measuredAt.getTime()}`;
      if (!seen.has(key) && seen.size >= perClient) break;
      seen.add(key);
      expected.set(key, { t: r.temperature, h: r.humidity, lux: r.lux ?? null });
      messages.push({
        key,
        payload: JSON.stringify({
          time: r.measuredAt.toISOString(),
          temperature: r.temperature,
          humidity: r.humidity,
          ...(r.lux !== undefined ? { lux: r.lux } : {}),
          battery: Math.round(r.battery),
        }),
      });
    }
    sims.push({
      sensorId: sensor.id,
      secret: sensor.secret,
      topic: `nichewise/sensors/${sensor.id}/reading`,
      messages,
      next: 0,
      inflight: 0,
    });
  }
  const sensorIds = sims.map((s) => s.sensorId);
  const spotIds = spots.map((s) => s.id);
  const totalMessages = sims.reduce((n, s) => n + s.messages.length, 0);
  log(`${o.clients} clients, ${expected.size} distinct readings in ${totalMessages} messages`);

  // In-process: a writer and broker here. Server process: a child holds them (`server`).
  let writer: ReadingWriter | null = null;
  let broker: RunningBroker | null = null;
  let server: ChildProcess | null = null;
  let port: number;
  if (o.serverProcess) {
    ({ child: server, port } = await startServerProcess(o, 0));
  } else if (o.cluster) {
    port = o.cluster.servers[0].port;
  } else {
    writer = new ReadingWriter();
    broker = await startBroker({ host: "127.0.0.1", port: 0, wsPort: null, writer, log: () => {} });
    port = broker.port;
  }
  let writeFailures = 0;
  let rejectedByBroker = 0;
  const alerts = writer || o.cluster ? await startAlertsIfPresent(writer, spots, expected, sims) : null;

  const acked = new Set<string>();
  let ackedMessages = 0;
  let sent = 0;
  let reconnects = 0;
  const ackTimes: number[] = []; // when each acknowledgement came, in order
  const sentAt = new Map<string, number>(); // first publish time of each message key still outstanding

  const publish = (sim: Sim, m: Message) => {
    sent++;
    if (!sentAt.has(m.key)) sentAt.set(m.key, Date.now());
    sim.client!.publish(sim.topic, m.payload, { qos: 1 }, (err) => {
      // MQTT.js resends its own un-acked messages after reconnecting, but one queued while the
      // link drops again fails with "Connection closed"; a sensor must then send it again.
      if (err) return void setTimeout(() => publish(sim, m), 100);
      acked.add(m.key);
      sentAt.delete(m.key);
      ackedMessages++;
      ackTimes.push(Date.now());
      sim.inflight--;
      pump(sim);
    });
  };
  let budgetFrom = 0;
  const budget = () =>
    o.ratePerSecond && budgetFrom ? ((Date.now() - budgetFrom) * o.ratePerSecond) / 1000 / sims.length : Infinity;
  const pump = (sim: Sim) => {
    while (sim.inflight < window && sim.next < sim.messages.length && sim.next < budget()) {
      sim.inflight++;
      publish(sim, sim.messages[sim.next++]);
    }
  };

  await Promise.all(
    sims.map(
      (sim) =>
        new Promise<void>((resolve) => {
          sim.client = mqtt.connect(`mqtt://127.0.0.1:${port}`, {
            protocolVersion: 4,
            username: String(sim.sensorId),
            password: sim.secret,
            clientId: `soak-${sim.sensorId}`,
            reconnectPeriod: 100,
            connectTimeout: 5000,
            // Spread over the engine's nodes: each client starts at its own and moves on when it dies.
            ...(o.cluster
              ? { servers: o.cluster.servers.map((_s, j, all) => all[(j + sims.indexOf(sim)) % all.length]) }
              : {}),
          });
          sim.client.on("error", () => {});
          sim.client.on("reconnect", () => reconnects++);
          sim.client.once("connect", () => resolve());
        }),
    ),
  );
  budgetFrom = Date.now();
  const pacer = setInterval(() => sims.forEach(pump), 20);
  for (const sim of sims) pump(sim);

  const check = async (after: string, keys: Set<string>): Promise<Check> => {
    const c = new pg.Client({ connectionString: o.databaseUrl });
    await c.connect();
    try {
      // One snapshot for rows and rollups: each write is one statement, so a snapshot sees all of
      // a batch or none of it.
      await c.query("BEGIN ISOLATION LEVEL REPEATABLE READ");
      const rows = await c.query<{ sensor_id: number; ms: string; n: number }>(
        `SELECT sensor_id, (extract(epoch FROM measured_at) * 1000)::bigint AS ms, count(*)::int AS n
         FROM readings WHERE sensor_id = ANY($1::int[]) GROUP BY 1, 2`,
        [sensorIds],
      );
      const diff = await c.query<{ differing: number; rollup_n: string; raw_n: string }>(ROLLUP_DIFF_SQL, [spotIds]);
      await c.query("COMMIT");
      const stored = new Set<string>();
      let duplicates = 0;
      let unexpected = 0;
      for (const r of rows.rows) {
        const key = `${r.sensor_id}:${r.ms}`;
        stored.add(key);
        duplicates += r.n - 1;
        if (!expected.has(key)) unexpected++;
      }
      let lost = 0;
      for (const k of keys) if (!stored.has(k)) lost++;
      const d = diff.rows[0];
      const overcount = Math.max(0, Number(d.rollup_n) - Number(d.raw_n));
      return {
        after,
        acked: keys.size,
        stored: stored.size,
        lost,
        unexpected,
        doubleCounted: duplicates + overcount,
        rollupHoursDiffering: d.differing,
        keys,
      };
    } finally {
      await c.end().catch(() => {});
    }
  };

  /** Waits until every message published before `since` has been acknowledged. */
  const waitOutstandingBefore = async (since: number) => {
    const until = Date.now() + 120_000;
    for (;;) {
      let pending = false;
      for (const at of sentAt.values())
        if (at < since) {
          pending = true;
          break;
        }
      if (!pending) return;
      if (Date.now() > until) throw new Error("readings sent before the fault were still unacknowledged after 120 s");
      await sleep(20);
    }
  };

  const runFault = async (kind: FaultKind): Promise<{ outageMs: number; restoredAt: number }> => {
    const started = Date.now();
    if (kind === "kill-engine-node" || kind === "kill-ingest-worker" || kind === "kill-alert-holder") {
      await o.cluster!.fault(kind);
    } else if (kind === "kill-postgres") {
      const pid = embeddedPid(o.pgDataDir);
      if (!pid) throw new Error("no postmaster.pid for the soak's PostgreSQL");
      process.kill(pid, "SIGKILL");
      while (isAlive(pid)) await sleep(10);
      await sleep(1000); // stay down long enough for writes to fail and clients to be dropped
      await restartPostgres(o);
    } else if (kind === "kill-server" || (kind === "restart-broker" && server)) {
      // The server process killed mid-stream (SIGKILL: no shutdown path runs; statements in flight
      // are rolled back or committed by PostgreSQL, PUBACKs are never sent) and started again on
      // the same port; the sensors reconnect and resend what was not acknowledged.
      if (!server) throw new Error("kill-server needs serverProcess");
      await killed(server, kind === "kill-server" ? "SIGKILL" : "SIGTERM");
      await sleep(300);
      ({ child: server } = await startServerProcess(o, port));
    } else if (kind === "restart-broker" && broker && writer) {
      // The app process going away: the broker and its connections close, the writer finishes
      // what it holds (acks for it go nowhere), and a new broker and writer take the same port.
      writeFailures += broker.stats.writeFailures;
      rejectedByBroker += broker.stats.rejected;
      await broker.close();
      await writer.drain();
      await sleep(300);
      writer = new ReadingWriter();
      broker = await startBroker({ host: "127.0.0.1", port, wsPort: null, writer, log: () => {} });
      await alerts?.restart(writer);
    } else if (kind === "cut-connections") {
      // Half from the broker's side (as when a sensor is revoked), half as a dropped link.
      sims.forEach((sim, i) => {
        if (i % 2 === 0 && broker) broker.disconnectSensor(sim.sensorId);
        else (sim.client?.stream as Socket | undefined)?.destroy();
      });
    } else {
      const table = kind === "lock-rollups" ? "hourly_rollups" : "readings";
      const c = new pg.Client({ connectionString: o.databaseUrl });
      await c.connect();
      await c.query("BEGIN");
      // EXCLUSIVE blocks the writer's INSERT (ROW EXCLUSIVE) but not plain reads.
      await c.query(`LOCK TABLE ${table} IN EXCLUSIVE MODE`);
      await sleep(3000);
      await c.query("COMMIT");
      const restoredAt = Date.now();
      await c.end();
      return { outageMs: restoredAt - started, restoredAt };
    }
    return { outageMs: Date.now() - started, restoredAt: Date.now() };
  };

  const figures: FaultFigure[] = [];
  const faults = [...o.faults].sort((a, b) => a.at - b.at);
  for (const f of faults) {
    while (ackedMessages < f.at * totalMessages) await sleep(20);
    const faultStart = Date.now();
    // No waiting for the engine to catch up: its invariants must hold at any instant.
    const openBefore = alerts ? await alerts.openIds() : [];
    const inFlight = sentAt.size;
    const { outageMs, restoredAt } = await runFault(f.kind);
    await waitOutstandingBefore(faultStart);
    const recoveredMs = Date.now() - restoredAt;
    const firstAck = ackTimes.find((t) => t >= restoredAt); // acks are in time order; few faults, so a scan is fine
    const firstAckMs = firstAck === undefined ? null : firstAck - restoredAt;
    let c = await check(`${f.kind} at ${Math.round(f.at * 100)} %`, new Set(acked));
    // In cluster mode the engine acknowledges once its replicated queue holds a reading; the
    // workers store it after that. Acknowledged readings must all be stored within a minute.
    for (const until = Date.now() + 60_000; o.cluster && c.lost > 0 && Date.now() < until;) {
      await sleep(500);
      c = await check(c.after, new Set(c.keys));
    }
    if (alerts) c.alerts = await alerts.check(openBefore);
    figures.push({ kind: f.kind, at: f.at, inFlight, outageMs, firstAckMs, recoveredMs, check: c });
    log(
      `${c.after}: down ${outageMs} ms, recovered ${recoveredMs} ms ` +
        `after; acked ${c.acked}, stored ${c.stored}, lost ${c.lost}, ` +
        `double-counted ${c.doubleCounted}, rollup hours differing ` +
        `${c.rollupHoursDiffering}` +
        (c.alerts
          ? `; alert events ${c.alerts.events} (${c.alerts.open} open), ` +
            `open twice ${c.alerts.repeated}, overlapping ` +
            `${c.alerts.overlapping}, open ones lost ${c.alerts.lostOpen}`
          : ""),
    );
  }

  // Everything sent must end up acknowledged once the clients have resent what they must.
  const until = Date.now() + 180_000;
  while (acked.size < expected.size && Date.now() < until) await sleep(50);
  clearInterval(pacer);
  if (writer && broker) {
    await writer.drain();
    writeFailures += broker.stats.writeFailures;
    rejectedByBroker += broker.stats.rejected;
  } else {
    // The killed processes' counters died with them; what they refused is in the table.
    const c = new pg.Client({ connectionString: o.databaseUrl });
    await c.connect();
    const res = await c.query<{ n: number }>(
      "SELECT count(*)::int AS n FROM rejected_messages WHERE sensor_id = ANY($1::int[])",
      [sensorIds],
    );
    await c.end();
    rejectedByBroker = res.rows[0].n;
  }
  const seconds = (Date.now() - startedAt) / 1000;
  let final = await check("end", new Set(expected.keys()));
  for (const until = Date.now() + 60_000; o.cluster && final.lost > 0 && Date.now() < until;) {
    await sleep(500);
    final = await check("end", new Set(expected.keys()));
  }

  // Values as sent (stored as real, so compared to float precision).
  let valueMismatches = 0;
  {
    const c = new pg.Client({ connectionString: o.databaseUrl });
    await c.connect();
    const res = await c.query<{
      sensor_id: number;
      ms: string;
      temperature: number;
      humidity: number;
      lux: number | null;
    }>(
      `SELECT sensor_id, (extract(epoch FROM measured_at) * 1000)::bigint AS ms, temperature, humidity, lux
       FROM readings WHERE sensor_id = ANY($1::int[])`,
      [sensorIds],
    );
    await c.end();
    for (const r of res.rows) {
      const e = expected.get(`${r.sensor_id}:${r.ms}`);
      if (
        !e ||
        Math.abs(e.t - r.temperature) > 1e-4 ||
        Math.abs(e.h - r.humidity) > 1e-4 ||
        (e.lux === null) !== (r.lux === null)
      )
        valueMismatches++;
    }
  }

  let alertCheck: AlertCheck | null = null;
  if (alerts) {
    await alerts.idle();
    alertCheck = await alerts.check([], true);
    for (const f of figures) {
      if (!f.check.alerts) continue;
      alertCheck.repeated = Math.max(alertCheck.repeated, f.check.alerts.repeated);
      alertCheck.lostOpen = Math.max(alertCheck.lostOpen, f.check.alerts.lostOpen);
      alertCheck.overlapping = Math.max(alertCheck.overlapping, f.check.alerts.overlapping);
    }
    await alerts.stop();
  }

  await Promise.all(sims.map((s) => s.client?.endAsync(true).catch(() => {})));
  await broker?.close();
  if (server) await killed(server, "SIGTERM");

  const worst = figures.map((f) => f.check).concat(final);
  return {
    clients: o.clients,
    messages: totalMessages,
    distinct: expected.size,
    sent,
    acked: acked.size,
    stored: final.stored,
    lost: Math.max(...worst.map((c) => c.lost)),
    doubleCounted: Math.max(...worst.map((c) => c.doubleCounted)),
    unexpected: Math.max(...worst.map((c) => c.unexpected)),
    valueMismatches,
    rollupHoursDiffering: Math.max(...worst.map((c) => c.rollupHoursDiffering)),
    rejectedByBroker,
    writeFailures,
    reconnects,
    alerts: alertCheck,
    faults: figures,
    seconds,
    readingsPerSecond: Math.round(expected.size / seconds),
  };
}

export function soakFailed(r: SoakReport) {
  return (
    r.lost > 0 ||
    r.doubleCounted > 0 ||
    r.unexpected > 0 ||
    r.valueMismatches > 0 ||
    r.rollupHoursDiffering > 0 ||
    r.acked < r.distinct ||
    r.stored !== r.distinct ||
    r.rejectedByBroker > 0 ||
    (r.alerts !== null && alertProblems(r.alerts).length > 0)
  );
}

export function formatReport(r: SoakReport): string {
  const lines = [
    `clients ${r.clients}; readings ${r.distinct} distinct in ${r.messages} messages (simulator duplicates included)`,
    `sent ${r.sent} publish calls (MQTT.js's own resends not counted), acked ${r.acked}, stored ${r.stored}`,
    `lost ${r.lost}, double-counted ${r.doubleCounted}, stored but ` +
      `never sent ${r.unexpected}, values differing ` +
      `${r.valueMismatches}, rollup hours differing from raw ` +
      `${r.rollupHoursDiffering}`,
    `refused by the broker ${r.rejectedByBroker}, failed writes ${r.writeFailures}, client reconnects ${r.reconnects}`,
    `${r.seconds.toFixed(1)} s in all, ${r.readingsPerSecond} readings/s including faults`,
    "fault                 at  in flight  down ms  first ack ms  recovered ms  acked   lost  double",
    ...r.faults.map(
      (f) =>
        `${f.kind.padEnd(20)} ` +
        `${String(Math.round(f.at * 100)).padStart(3)} % ` +
        `${String(f.inFlight).padStart(9)} ` +
        `${String(f.outageMs).padStart(8)} ` +
        `${String(f.firstAckMs ?? "-").padStart(13)} ` +
        `${String(f.recoveredMs).padStart(13)} ` +
        `${String(f.check.acked).padStart(6)} ` +
        `${String(f.check.lost).padStart(6)} ` +
        `${String(f.check.doubleCounted).padStart(7)}`,
    ),
  ];
  if (r.alerts) {
    const a = r.alerts;
    lines.push(
      `alerts: ${a.rules} rules, ${a.events} events (${a.open} open ` +
        `at the end); open twice ${a.repeated}, open events lost in a ` +
        `fault ${a.lostOpen}, events of one rule overlapping in time ` +
        `${a.overlapping}`,
    );
    if (a.reference)
      lines.push(
        `alerts re-evaluated over the stored readings in time order: ` +
          `${a.reference.events} events, ${a.reference.withoutEngineEvent} ` +
          `with no overlapping engine event; engine events with no ` +
          `re-evaluated one ${a.reference.engineWithoutReference}`,
      );
    const problems = alertProblems(a);
    lines.push(
      problems.length > 0
        ? `ALERTS FAILED: ${problems.join("; ")}`
        : `alerts OK: no overlaps, within ${ALERT_TOLERANCE * 100} % of the re-evaluation`,
    );
  } else
    lines.push("alert events not checked (no alert engine in this run: absent, or the server runs in its own process)");
  return lines.join("\n");
}

// The alert engine (app/.server/alerts/engine.ts), when present: cold and dry-air rules on every
// spot with thresholds at the spot's median, so events open and clear many times during the run.
type AlertsHarness = {
  idle: () => Promise<void>;
  restart: (w: ReadingWriter) => Promise<void>;
  stop: () => Promise<void>;
  openIds: () => Promise<number[]>;
  check: (openBefore: number[], withReference?: boolean) => Promise<AlertCheck>;
};

async function startAlertsIfPresent(
  w: ReadingWriter | null, // null: the engine runs in other processes (cluster mode)
  spots: { id: number }[],
  expected: Map<string, Expected>,
  sims: Sim[],
): Promise<AlertsHarness | null> {
  const enginePath = "~/.server/alerts/engine";
  type Engine = { idle: () => Promise<void> };
  type Mod = {
    startAlerts: (
      w: ReadingWriter,
      o?: { maxLagMs?: number; checkEveryMs?: number },
    ) => Promise<(() => Promise<void>) & { engine: Engine }>;
  };
  let mod: Mod;
  let rules: {
    evaluate: typeof import("~/domain/alerts/rules").evaluate;
    valueFor: typeof import("~/domain/alerts/rules").valueFor;
  };
  let store: { spotPoints: typeof import("~/.server/alerts/store").spotPoints };
  try {
    mod = (await import(/* @vite-ignore */ enginePath)) as Mod;
    rules = await import(/* @vite-ignore */ "~/domain/alerts/rules");
    store = await import(/* @vite-ignore */ "~/.server/alerts/store");
  } catch {
    return null;
  }
  if (typeof mod.startAlerts !== "function") return null;
  const { pool } = await import("~/.server/db");
  const median = (xs: number[]) => xs.sort((a, b) => a - b)[Math.floor(xs.length / 2)];
  const ruleIds: number[] = [];
  for (let i = 0; i < spots.length; i++) {
    const mine = new Set(sims.filter((_s, c) => c % spots.length === i).map((s) => s.sensorId));
    const t: number[] = [];
    const h: number[] = [];
    for (const [key, e] of expected) {
      if (!mine.has(Number(key.split(":")[0]))) continue;
      t.push(e.t);
      h.push(e.h);
    }
    for (const [kind, threshold] of [
      ["cold", median(t)],
      ["dry", median(h)],
    ] as const) {
      const res = await pool().query<{ id: number }>(
        `INSERT INTO watches (spot_id, kind, threshold, duration_minutes, hysteresis, clear_minutes) VALUES ($1, $2, $3, 20, 0.5, 20) RETURNING id`,
        [spots[i].id, kind, threshold],
      );
      ruleIds.push(res.rows[0].id);
    }
  }
  // Alert e-mails go to the local SMTP sink, as in development.
  const mail = await import("~/.server/mail");
  const sink = await mail.startMailSink({ port: 0, log: () => {} });
  mail.configureMailer(`smtp://127.0.0.1:${sink.port}`);
  // The readings are historic (so the run is fast): let the engine treat them as live.
  const opts = { maxLagMs: 3 * 365 * 86_400_000, checkEveryMs: 3_600_000 };
  let handle = w ? await mod.startAlerts(w, opts) : null;
  const stopping: Promise<void>[] = [];
  const q = async <T extends pg.QueryResultRow>(text: string, values: unknown[]) => {
    for (let attempt = 0; ; attempt++) {
      try {
        return (await pool().query<T>(text, values)).rows;
      } catch (err) {
        if (attempt > 50) throw err;
        await sleep(200); // PostgreSQL may still be coming back
      }
    }
  };
  // An engine elsewhere is idle once every rule has evaluated its spot's latest reading (two minutes at most).
  const evaluatedElsewhere = async () => {
    const until = Date.now() + 120_000;
    while (Date.now() < until) {
      const [behind] = await q<{ n: number }>(
        `SELECT count(*)::int AS n FROM watches r WHERE r.id = ANY($1::int[]) AND r.evaluated_to IS DISTINCT FROM (
           SELECT max(rd.measured_at) FROM placements p JOIN readings rd ON rd.sensor_id = p.sensor_id AND rd.measured_at >= p.from_at
           WHERE p.spot_id = r.spot_id)`,
        [ruleIds],
      );
      if (behind.n === 0) return;
      await sleep(500);
    }
  };
  return {
    idle: () => (handle ? handle.engine.idle() : evaluatedElsewhere()),
    restart: async (next) => {
      // The new engine starts at once; the old one finishes its queue meanwhile (both lock rule rows).
      const old = handle;
      handle = await mod.startAlerts(next, opts);
      if (old) stopping.push(old());
    },
    stop: async () => {
      await Promise.all(stopping);
      await handle?.();
      await sink.close();
    },
    openIds: async () =>
      (
        await q<{ id: number }>(`SELECT id FROM alert_events WHERE rule_id = ANY($1::int[]) AND ended_at IS NULL`, [
          ruleIds,
        ])
      ).map((r) => r.id),
    check: async (openBefore, withReference = false) => {
      const [counts] = await q<{ events: number; open: number; extra_open: number }>(
        `SELECT count(*)::int AS events, count(*) FILTER (WHERE ended_at IS NULL)::int AS open,
           (count(*) FILTER (WHERE ended_at IS NULL) - count(DISTINCT rule_id) FILTER (WHERE ended_at IS NULL))::int AS extra_open
         FROM alert_events WHERE rule_id = ANY($1::int[])`,
        [ruleIds],
      );
      const [overlap] = await q<{ n: number }>(
        `SELECT count(*)::int AS n FROM alert_events a JOIN alert_events b ON a.rule_id = b.rule_id AND a.id < b.id
         WHERE a.rule_id = ANY($1::int[]) AND a.started_at < coalesce(b.ended_at, 'infinity') AND b.started_at < coalesce(a.ended_at, 'infinity')`,
        [ruleIds],
      );
      const [gone] = await q<{ n: number }>(
        `SELECT ($2::int - count(*))::int AS n FROM alert_events WHERE id = ANY($1::int[])`,
        [openBefore, openBefore.length],
      );
      const result: AlertCheck = {
        rules: ruleIds.length,
        events: counts.events,
        open: counts.open,
        repeated: counts.extra_open,
        overlapping: overlap.n,
        lostOpen: gone.n,
      };
      if (withReference) {
        let events = 0;
        let without = 0;
        let extra = 0;
        const defs = await q<{
          id: number;
          spot_id: number;
          kind: "cold" | "dry";
          threshold: number;
          duration_minutes: number;
          hysteresis: number;
          clear_minutes: number;
        }>(
          `SELECT id, spot_id, kind, threshold, duration_minutes, hysteresis, clear_minutes FROM watches WHERE id = ANY($1::int[])`,
          [ruleIds],
        );
        for (const d of defs) {
          const pts = (await store.spotPoints(d.spot_id, new Date(0), new Date(Date.now() + 86_400_000)))
            .map((p) => ({ at: p.at, value: rules.valueFor(d.kind, p) }))
            .filter((p): p is { at: Date; value: number } => p.value != null);
          const settings = {
            kind: d.kind,
            threshold: d.threshold,
            durationMinutes: d.duration_minutes,
            hysteresis: d.hysteresis,
            clearMinutes: d.clear_minutes,
          };
          const { transitions } = rules.evaluate(
            settings,
            { pendingSince: null, clearingSince: null, open: null },
            pts,
          );
          const engine = await q<{ started_at: Date; ended_at: Date | null }>(
            `SELECT started_at, ended_at FROM alert_events WHERE rule_id = $1`,
            [d.id],
          );
          let start: Date | null = null;
          const spans: [number, number][] = [];
          for (const t of transitions) {
            if (t.type === "open") start = t.startedAt;
            else if (start) {
              spans.push([start.getTime(), t.at.getTime()]);
              start = null;
            }
          }
          if (start) spans.push([start.getTime(), Infinity]);
          events += spans.length;
          for (const [a, b] of spans) {
            if (!engine.some((e) => e.started_at.getTime() < b && a < (e.ended_at?.getTime() ?? Infinity))) without++;
          }
          for (const e of engine) {
            const a = e.started_at.getTime();
            const b = e.ended_at?.getTime() ?? Infinity;
            if (!spans.some(([x, y]) => x < b && a < y)) extra++;
          }
        }
        result.reference = { events, withoutEngineEvent: without, engineWithoutReference: extra };
      }
      return result;
    },
  };
}
