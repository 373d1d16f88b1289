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
// Here: the connection to the engine, the shards' consumers, their locks and handovers. How the
// shards are declared: shards.ts; the lock session: shard-locks.ts; what becomes of one delivery
// (the broker's checks, the write, the ack after its commit): deliveries.ts.
import amqp, { type ChannelModel, type ConsumeMessage } from "amqplib";
import type pg from "pg";
import type { ReadingWriter } from "~/.server/ingest/writer";
import { deliveryHandler, handBack, type DeliveryStats, type TakenFrom } from "~/.server/cluster/deliveries";
import {
  connectLockSession,
  countWorkers,
  lockSession,
  tryShardLock,
  unlockShard,
} from "~/.server/cluster/shard-locks";
import { declareReadingsShards, shardQueue } from "~/.server/cluster/shards";

export type WorkerStats = DeliveryStats & { reconnects: number; handovers: number };
export type RunningWorker = {
  stats: WorkerStats;
  connectedTo: () => string | null;
  /** The shards this worker is taking deliveries from (it has had one since it last let the shard go). */
  activeShards: () => number[];
  close: () => Promise<void>;
};

const RECONNECT_MS = 500;
const LOCK_RETRY_MS = 100;
const REBALANCE_MS = 2000;

/** A shard's consumer on this worker's connection. */
type Shard = TakenFrom & {
  k: number;
  tag: string | null;
  /** Has had a delivery since it last registered: the engine made this worker the shard's active consumer. */
  active: boolean;
  /** Holds the shard's advisory lock. */
  locked: boolean;
  locking: boolean;
  /** Deliveries waiting for the lock, in order. */
  waiting: ConsumeMessage[];
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

  const activeList = () => shards.filter((s) => s.active).map((s) => s.k);
  const noteActive = () => log(`ingest worker: active on shards [${activeList().join(",")}] of ${opts.shards}`);

  const handle = deliveryHandler(opts.writer, stats);

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
        if (await tryShardLock(session, s.k)) {
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
      handBack(s.ch, msg);
      s.outstanding--;
    }
    if (s.outstanding > 0) await new Promise<void>((r) => s.drained.push(r));
    if (s.locked) {
      s.locked = false;
      await unlockShard(locks, s.k);
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
      const workers = Math.max(1, await countWorkers(locks));
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
      const session = lockSession(opts.connectionString);
      try {
        await connectLockSession(session);
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
