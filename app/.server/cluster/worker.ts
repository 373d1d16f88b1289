// A stateless ingest worker: consumes the engine's replicated queue (a RabbitMQ quorum queue fed by
// its MQTT plugin; one worker active at a time, the others standing by) and writes each reading through the product's one writer, acknowledging a
// delivery only after its reading is committed. A worker that dies leaves its unacknowledged
// deliveries to the engine, which hands them to another worker; a reading stored twice that way is
// one row (the writer deduplicates on sensor and time, as for an MQTT resend).
//
// The checks are the embedded broker's (app/.server/ingest/broker.ts): a bad payload, an unknown
// sensor or a conflicting value is acknowledged and recorded with its reason; a failed write is
// handed back to the queue after a pause, so a PostgreSQL outage delays readings and loses none.
import amqp, { type Channel, type ChannelModel, type ConsumeMessage } from "amqplib";
import { decodeMessage, parseTopic, validateReading } from "~/domain/ingest/payload";
import { CONFLICT_REASON } from "~/.server/ingest/broker";
import { recordRejectionsSoon } from "~/.server/ingest/rejections";
import { cachedSensorInfo, lastTemperature, noteTemperature, sensorInfo, type SensorInfo } from "~/.server/ingest/sensor-cache";
import type { ReadingWriter } from "~/.server/ingest/writer";
import { MQTT_EXCHANGE } from "~/.server/cluster/auth";
import { routingKeyToTopic } from "~/.server/cluster/config";

export type WorkerStats = { accepted: number; rejected: number; writeFailures: number; reconnects: number };
export type RunningWorker = { stats: WorkerStats; connectedTo: () => string | null; close: () => Promise<void> };

/** How long a failed write waits before its delivery goes back to the queue (the database may be restarting). */
const RETRY_MS = 1000;
const RECONNECT_MS = 500;

/**
 * Declares the queue (quorum: replicated on every node, a majority confirms each message) and binds
 * it to the sensors' topics. It must exist before sensors publish: the MQTT plugin acknowledges a
 * message that no queue takes.
 *
 * Single active consumer: one worker at a time takes deliveries and the others wait, taking over
 * when it goes. Competing consumers would commit a sensor's readings out of order (each holds a
 * prefetch of deliveries) and could write two channel topics of one sensor and instant at once,
 * which the writer's merging statement assumes never happens (app/.server/ingest/writer.ts); see
 * docs/scaling.md for partitioning by sensor.
 */
export async function declareReadingsQueue(ch: Channel, queue: string) {
  await ch.assertQueue(queue, { durable: true, arguments: { "x-queue-type": "quorum", "x-single-active-consumer": true } });
  await ch.bindQueue(queue, MQTT_EXCHANGE, "nichewise.sensors.#");
}

export async function startIngestWorker(opts: {
  urls: string[];
  queue: string;
  prefetch: number;
  writer: ReadingWriter;
  log?: (s: string) => void;
}): Promise<RunningWorker> {
  const log = opts.log ?? console.log;
  const stats: WorkerStats = { accepted: 0, rejected: 0, writeFailures: 0, reconnects: 0 };
  let closing = false;
  let conn: ChannelModel | null = null;
  let connectedTo: string | null = null;
  let next = 0;
  let retryTimer: NodeJS.Timeout | null = null;

  const topicOf = (msg: ConsumeMessage) => routingKeyToTopic(msg.fields.routingKey);

  function reject(ch: Channel, msg: ConsumeMessage, sensorId: number | null, reason: string) {
    stats.rejected++;
    recordRejectionsSoon([{ sensorId, source: "mqtt", topic: topicOf(msg), reason, payload: msg.content.subarray(0, 500).toString("utf8") }]);
    ack(ch, msg);
  }

  // A channel closed meanwhile (its node died) has handed the delivery back already.
  const ack = (ch: Channel, msg: ConsumeMessage) => {
    try {
      ch.ack(msg);
    } catch {}
  };

  function failed(ch: Channel, msg: ConsumeMessage) {
    stats.writeFailures++;
    setTimeout(() => {
      try {
        ch.nack(msg, false, true);
      } catch {}
    }, RETRY_MS).unref();
  }

  let active = false;
  function handle(ch: Channel, msg: ConsumeMessage | null) {
    if (!msg) return; // the queue was deleted; the channel closes and we reconnect
    if (!active) {
      active = true; // the engine made this worker the queue's active consumer
      log("ingest worker: taking deliveries");
    }
    try {
      const match = parseTopic(topicOf(msg));
      // The engine let only the sensor itself publish here (see auth.ts); anything else is not a reading.
      if (!match) return reject(ch, msg, null, "topic not allowed for this sensor");
      const id = match.sensorId;
      const decoded = decodeMessage(match.channel, msg.content);
      if (!decoded.ok) return reject(ch, msg, id, decoded.reason);
      const partial = match.channel !== "reading";
      const info = cachedSensorInfo(id);
      if (info !== undefined) return write(ch, msg, id, info, decoded.payload, partial);
      sensorInfo(id).then(
        (fetched) => write(ch, msg, id, fetched, decoded.payload, partial),
        () => failed(ch, msg),
      );
    } catch (err) {
      console.error("[ingest-worker]", err);
      failed(ch, msg);
    }
  }

  function write(ch: Channel, msg: ConsumeMessage, sensorId: number, info: SensorInfo | null, payload: unknown, partial: boolean) {
    if (!info) return reject(ch, msg, sensorId, "unknown sensor (deleted?)");
    const parsed = validateReading(sensorId, payload as never, { now: new Date(), kind: info.kind, previous: lastTemperature(sensorId) });
    if (!parsed.ok) return reject(ch, msg, sensorId, parsed.reason);
    const reading = parsed.reading;
    opts.writer.store([partial ? { ...reading, partial } : reading]).then(
      (r) => {
        if (r.conflicts > 0) return reject(ch, msg, sensorId, CONFLICT_REASON);
        stats.accepted++;
        if (reading.temperature !== null) noteTemperature(sensorId, reading.measuredAt.getTime(), reading.temperature);
        ack(ch, msg); // after COMMIT
      },
      () => failed(ch, msg),
    );
  }

  async function connect(): Promise<void> {
    while (!closing) {
      const url = opts.urls[next++ % opts.urls.length];
      try {
        const c = await amqp.connect(url, { timeout: 5000 });
        c.on("error", () => {}); // "close" follows
        const ch = await c.createChannel();
        ch.on("error", () => {});
        await declareReadingsQueue(ch, opts.queue);
        await ch.prefetch(opts.prefetch);
        await ch.consume(opts.queue, (msg) => handle(ch, msg), { noAck: false });
        conn = c;
        connectedTo = url;
        log(`ingest worker: consuming ${opts.queue} on ${url.replace(/\/\/[^@]*@/, "//")}`);
        c.once("close", () => {
          conn = null;
          active = false;
          connectedTo = null;
          if (closing) return;
          stats.reconnects++;
          log("ingest worker: connection to the engine lost; reconnecting");
          retryTimer = setTimeout(() => void connect(), RECONNECT_MS);
        });
        return;
      } catch (err) {
        if (closing) return;
        log(`ingest worker: ${url.replace(/\/\/[^@]*@/, "//")} refused (${err instanceof Error ? err.message : err}); trying the next node`);
        await new Promise((r) => setTimeout(r, RECONNECT_MS));
      }
    }
  }

  await connect();
  return {
    stats,
    connectedTo: () => connectedTo,
    async close() {
      closing = true;
      if (retryTimer) clearTimeout(retryTimer);
      // Unacknowledged deliveries go back to the queue when the connection closes; what the writer
      // still holds commits, and its acks go nowhere (another worker stores those readings again, once).
      await conn?.close().catch(() => {});
      await opts.writer.drain();
    },
  };
}
