// A stateless ingest worker. The engine shards the sensors' stream by sensor: the JSON reading
// topic goes through a consistent-hash exchange (rabbitmq_consistent_hash_exchange, hashing the
// routing key, which names one sensor) into N quorum queues `<queue>.0` … `<queue>.<N-1>`, each
// with a single active consumer; plain-number channel topics all go to shard 0, so that two channel
// topics of one sensor and instant are never merged by two workers at once. Every worker consumes
// every shard; the engine makes one consumer per shard active, and a worker active on more than its
// share hands shards over (below), so the shards spread over the workers. A shard's readings are
// written only under that shard's PostgreSQL advisory lock, which its previous worker lets go once
// everything it took from the shard has committed: a sensor's readings commit in order even across
// a handover. Each reading goes through the product's one writer and is acknowledged only after its
// commit. A worker that dies leaves its unacknowledged deliveries (and, with its session, its shard
// locks) to the engine and PostgreSQL, and the next consumer in line takes over; a reading stored
// twice that way is one row (the writer deduplicates on sensor and time, as for an MQTT resend).
//
// The checks are the embedded broker's (app/.server/ingest/broker.ts): a bad payload, an unknown
// sensor or a conflicting value is acknowledged and recorded with its reason; a failed write is
// handed back to the queue after a pause, so a PostgreSQL outage delays readings and loses none.
import amqp, { type Channel, type ChannelModel, type ConsumeMessage } from "amqplib";
import pg from "pg";
import { CHANNEL_TOPICS, decodeMessage, parseTopic, validateReading } from "~/domain/ingest/payload";
import { CONFLICT_REASON } from "~/.server/ingest/broker";
import { recordRejectionsSoon } from "~/.server/ingest/rejections";
import {
  cachedSensorInfo,
  lastTemperature,
  noteTemperature,
  sensorInfo,
  type SensorInfo,
} from "~/.server/ingest/sensor-cache";
import type { ReadingWriter } from "~/.server/ingest/writer";
import { MQTT_EXCHANGE } from "~/.server/cluster/auth";
import { routingKeyToTopic } from "~/.server/cluster/config";

export type WorkerStats = {
  accepted: number;
  rejected: number;
  writeFailures: number;
  reconnects: number;
  handovers: number;
};
export type RunningWorker = {
  stats: WorkerStats;
  connectedTo: () => string | null;
  /** The shards this worker is taking deliveries from (it has had one since it last let the shard go). */
  activeShards: () => number[];
  close: () => Promise<void>;
};

/** How long a failed write waits before its delivery goes back to the queue (the database may be restarting). */
const RETRY_MS = 1000;
const RECONNECT_MS = 500;
const LOCK_RETRY_MS = 100;
const REBALANCE_MS = 2000;
/** The shard locks' first key ("NWIS"); the second is the shard's number. */
export const SHARD_LOCK_CLASS = 0x4e574953;
/** Points per shard on the hash ring: with a handful of points the shards' shares of the sensors are very uneven. */
const RING_WEIGHT = "20";
const LOCK_SESSION_NAME = "nichewise-ingest-shards";

/** One query at a time on the lock session (pg queues them, but asks callers not to rely on it). */
const sessionQueues = new WeakMap<pg.Client, Promise<unknown>>();
function ask<T extends pg.QueryResultRow>(session: pg.Client | null, text: string, params: unknown[]): Promise<T[]> {
  if (!session) return Promise.reject(new Error("no lock session"));
  const run = (sessionQueues.get(session) ?? Promise.resolve())
    .catch(() => {})
    .then(() => session.query<T>(text, params));
  sessionQueues.set(session, run);
  return run.then((r) => r.rows);
}

export const shardQueue = (queue: string, k: number) => `${queue}.${k}`;
export const hashExchange = (queue: string) => `${queue}.by-sensor`;

/**
 * Declares the shards (quorum queues: replicated on every node, a majority confirms each message;
 * single active consumer each) and the routes to them. They must exist before sensors publish: the
 * MQTT plugin acknowledges a message that no queue takes.
 *
 * Competing consumers on one queue would commit a sensor's readings out of order (each holds a
 * prefetch of deliveries) and could write two channel topics of one sensor and instant at once,
 * which the writer's merging statement assumes never happens (app/.server/ingest/writer.ts). So a
 * sensor's JSON readings all hash to one shard (the routing key is `nichewise.sensors.<id>.reading`)
 * and its channel topics all go to shard 0.
 */
export async function declareReadingsShards(ch: Channel, queue: string, shards: number) {
  const exchange = hashExchange(queue);
  await ch.assertExchange(exchange, "x-consistent-hash", { durable: true });
  await ch.bindExchange(exchange, MQTT_EXCHANGE, "nichewise.sensors.*.reading");
  for (let k = 0; k < shards; k++) {
    const q = shardQueue(queue, k);
    await ch.assertQueue(q, {
      durable: true,
      arguments: { "x-queue-type": "quorum", "x-single-active-consumer": true },
    });
    await ch.bindQueue(q, exchange, RING_WEIGHT);
  }
  for (const channel of CHANNEL_TOPICS)
    await ch.bindQueue(shardQueue(queue, 0), MQTT_EXCHANGE, `nichewise.sensors.*.${channel}`);
}

type Shard = {
  k: number;
  ch: Channel;
  tag: string | null;
  /** Has had a delivery since it last registered: the engine made this worker the shard's active consumer. */
  active: boolean;
  /** Holds the shard's advisory lock. */
  locked: boolean;
  locking: boolean;
  /** Deliveries waiting for the lock, in order. */
  waiting: ConsumeMessage[];
  /** Deliveries taken and not yet acknowledged or handed back. */
  outstanding: number;
  drained: (() => void)[];
};

export async function startIngestWorker(opts: {
  urls: string[];
  queue: string;
  shards: number;
  prefetch: number;
  writer: ReadingWriter;
  /** PostgreSQL for the shard locks (a session of its own); DATABASE_URL when unset. */
  connectionString?: string;
  rebalanceMs?: number;
  log?: (s: string) => void;
}): Promise<RunningWorker> {
  const log = opts.log ?? console.log;
  const stats: WorkerStats = { accepted: 0, rejected: 0, writeFailures: 0, reconnects: 0, handovers: 0 };
  const perShardPrefetch = Math.max(50, Math.ceil(opts.prefetch / opts.shards));
  let closing = false;
  let conn: ChannelModel | null = null;
  let locks: pg.Client | null = null;
  let shards: Shard[] = [];
  let connectedTo: string | null = null;
  let next = 0;
  let retryTimer: NodeJS.Timeout | null = null;
  let rebalancer: NodeJS.Timeout | null = null;
  let handingOver = false;

  const topicOf = (msg: ConsumeMessage) => routingKeyToTopic(msg.fields.routingKey);
  const activeList = () => shards.filter((s) => s.active).map((s) => s.k);
  const noteActive = () => log(`ingest worker: active on shards [${activeList().join(",")}] of ${opts.shards}`);

  function settled(s: Shard) {
    s.outstanding--;
    if (s.outstanding === 0) for (const f of s.drained.splice(0)) f();
  }

  function reject(s: Shard, msg: ConsumeMessage, sensorId: number | null, reason: string) {
    stats.rejected++;
    recordRejectionsSoon([
      { sensorId, source: "mqtt", topic: topicOf(msg), reason, payload: msg.content.subarray(0, 500).toString("utf8") },
    ]);
    ack(s, msg);
  }

  // A channel closed meanwhile (its node died) has handed the delivery back already.
  const ack = (s: Shard, msg: ConsumeMessage) => {
    try {
      s.ch.ack(msg);
    } catch {
      // closed: the engine has it back
    }
    settled(s);
  };

  function failed(s: Shard, msg: ConsumeMessage) {
    stats.writeFailures++;
    setTimeout(() => {
      try {
        s.ch.nack(msg, false, true);
      } catch {
        // closed: the engine has it back
      }
      settled(s);
    }, RETRY_MS).unref();
  }

  function deliver(s: Shard, msg: ConsumeMessage | null) {
    if (!msg) return; // the queue was deleted; the channel closes and we reconnect
    s.outstanding++;
    if (!s.active) {
      s.active = true;
      log(`ingest worker: taking deliveries from ${shardQueue(opts.queue, s.k)}`);
      noteActive();
    }
    if (s.locked) return handle(s, msg);
    s.waiting.push(msg);
    void lock(s);
  }

  /** Takes the shard's lock (waiting for its previous worker to let it go), then writes what waited. */
  async function lock(s: Shard) {
    if (s.locking || s.locked) return;
    s.locking = true;
    const session = locks;
    try {
      while (!closing && session === locks && session) {
        const got = (
          await ask<{ ok: boolean }>(session, "SELECT pg_try_advisory_lock($1, $2) AS ok", [SHARD_LOCK_CLASS, s.k])
        )[0].ok;
        if (got) {
          s.locked = true;
          for (const msg of s.waiting.splice(0)) handle(s, msg);
          return;
        }
        await new Promise((r) => setTimeout(r, LOCK_RETRY_MS));
      }
    } catch {
      // The lock session failed: the connection is closed below and everything starts again.
      conn?.close().catch(() => {});
    } finally {
      s.locking = false;
    }
  }

  function handle(s: Shard, msg: ConsumeMessage) {
    try {
      const match = parseTopic(topicOf(msg));
      // The engine let only the sensor itself publish here (see auth.ts); anything else is not a reading.
      if (!match) return reject(s, msg, null, "topic not allowed for this sensor");
      const id = match.sensorId;
      const decoded = decodeMessage(match.channel, msg.content);
      if (!decoded.ok) return reject(s, msg, id, decoded.reason);
      const partial = match.channel !== "reading";
      const info = cachedSensorInfo(id);
      if (info !== undefined) return write(s, msg, id, info, decoded.payload, partial);
      sensorInfo(id).then(
        (fetched) => write(s, msg, id, fetched, decoded.payload, partial),
        () => failed(s, msg),
      );
    } catch (err) {
      console.error("[ingest-worker]", err);
      failed(s, msg);
    }
  }

  function write(
    s: Shard,
    msg: ConsumeMessage,
    sensorId: number,
    info: SensorInfo | null,
    payload: unknown,
    partial: boolean,
  ) {
    if (!info) return reject(s, msg, sensorId, "unknown sensor (deleted?)");
    const parsed = validateReading(sensorId, payload as never, {
      now: new Date(),
      kind: info.kind,
      previous: lastTemperature(sensorId),
    });
    if (!parsed.ok) return reject(s, msg, sensorId, parsed.reason);
    const reading = parsed.reading;
    opts.writer.store([partial ? { ...reading, partial } : reading]).then(
      (r) => {
        if (r.conflicts > 0) return reject(s, msg, sensorId, CONFLICT_REASON);
        stats.accepted++;
        if (reading.temperature !== null) noteTemperature(sensorId, reading.measuredAt.getTime(), reading.temperature);
        ack(s, msg); // after COMMIT
      },
      () => failed(s, msg),
    );
  }

  async function consume(s: Shard) {
    s.tag = (await s.ch.consume(shardQueue(opts.queue, s.k), (msg) => deliver(s, msg), { noAck: false })).consumerTag;
  }

  /**
   * Lets a shard go to the next worker in the engine's line: stops taking its deliveries, waits
   * until everything taken from it has committed (or gone back), lets its lock go and registers
   * again, last in line.
   */
  async function handOver(s: Shard) {
    if (!s.tag) return;
    await s.ch.cancel(s.tag);
    s.tag = null;
    s.active = false;
    for (const msg of s.waiting.splice(0)) {
      try {
        s.ch.nack(msg, false, true);
      } catch {
        // closed: the engine has it back
      }
      s.outstanding--;
    }
    if (s.outstanding > 0) await new Promise<void>((r) => s.drained.push(r));
    if (s.locked) {
      s.locked = false;
      await ask(locks, "SELECT pg_advisory_unlock($1, $2)", [SHARD_LOCK_CLASS, s.k]);
    }
    stats.handovers++;
    log(`ingest worker: handed ${shardQueue(opts.queue, s.k)} over`);
    noteActive();
    await consume(s);
  }

  /** Active on more than its share of the shards (the workers are the shards' consumers): hands one over. */
  async function rebalance() {
    if (handingOver || !conn || !locks || shards.length === 0) return;
    handingOver = true;
    try {
      // The queues count only their active consumers, so the workers are counted by their lock sessions.
      const workers = Math.max(
        1,
        (
          await ask<{ n: number }>(
            locks,
            "SELECT count(*)::int AS n FROM pg_stat_activity WHERE application_name = $1 AND datname = current_database()",
            [LOCK_SESSION_NAME],
          )
        )[0].n,
      );
      const active = shards.filter((s) => s.active);
      if (active.length > Math.ceil(opts.shards / workers)) await handOver(active[active.length - 1]);
    } catch {
      // A channel closed meanwhile: the reconnection starts over.
    } finally {
      handingOver = false;
    }
  }

  async function lost(c: ChannelModel, session: pg.Client) {
    if (conn !== c) return;
    conn = null;
    connectedTo = null;
    const had = activeList().length > 0;
    for (const s of shards) for (const f of s.drained.splice(0)) f(); // a handover under way ends here
    shards = [];
    if (had) noteActive();
    // What the writer holds commits first (its acks go nowhere); then the shards' locks go.
    await opts.writer.drain().catch(() => {});
    if (locks === session) locks = null;
    await session.end().catch(() => {});
    if (closing) return;
    stats.reconnects++;
    log("ingest worker: connection to the engine lost; reconnecting");
    retryTimer = setTimeout(() => void connect(), RECONNECT_MS);
  }

  async function connect(): Promise<void> {
    while (!closing) {
      const url = opts.urls[next++ % opts.urls.length];
      const session = new pg.Client({
        connectionString: opts.connectionString ?? process.env.DATABASE_URL,
        keepAlive: true,
        application_name: LOCK_SESSION_NAME,
      });
      try {
        session.on("error", () => {});
        await session.connect();
        // The server drops a silent peer's session (and its shard locks) within about 15 s, as the alert lease's.
        await session.query(
          "SET tcp_keepalives_idle = 5; SET tcp_keepalives_interval = 5; SET tcp_keepalives_count = 2",
        );
        const c = await amqp.connect(url, { timeout: 5000 });
        c.on("error", () => {}); // "close" follows
        const setup = await c.createChannel();
        setup.on("error", () => {});
        await declareReadingsShards(setup, opts.queue, opts.shards);
        await setup.close();
        locks = session;
        conn = c;
        session.once("end", () => void c.close().catch(() => {}));
        c.once("close", () => void lost(c, session));
        const list: Shard[] = [];
        for (let k = 0; k < opts.shards; k++) {
          const ch = await c.createChannel();
          ch.on("error", () => {});
          await ch.prefetch(perShardPrefetch);
          list.push({
            k,
            ch,
            tag: null,
            active: false,
            locked: false,
            locking: false,
            waiting: [],
            outstanding: 0,
            drained: [],
          });
        }
        shards = list;
        for (const s of list) await consume(s);
        connectedTo = url;
        log(`ingest worker: consuming ${opts.shards} shards of ${opts.queue} on ${url.replace(/\/\/[^@]*@/, "//")}`);
        return;
      } catch (err) {
        await session.end().catch(() => {});
        if (closing) return;
        log(
          `ingest worker: ${url.replace(/\/\/[^@]*@/, "//")} refused (${err instanceof Error ? err.message : err}); trying the next node`,
        );
        await new Promise((r) => setTimeout(r, RECONNECT_MS));
      }
    }
  }

  await connect();
  rebalancer = setInterval(() => void rebalance(), opts.rebalanceMs ?? REBALANCE_MS);
  return {
    stats,
    connectedTo: () => connectedTo,
    activeShards: activeList,
    async close() {
      closing = true;
      if (retryTimer) clearTimeout(retryTimer);
      if (rebalancer) clearInterval(rebalancer);
      // Unacknowledged deliveries go back to the queue when the connection closes; what the writer
      // still holds commits, and its acks go nowhere (another worker stores those readings again, once).
      const c = conn;
      await c?.close().catch(() => {});
      await opts.writer.drain();
      await locks?.end().catch(() => {});
    },
  };
}
