// The readings' shards on the engine: their queues' and exchange's names, and how they are declared
// and bound (a sensor's JSON readings hashed by sensor, its channel topics all to shard 0). The
// ingest worker (worker.ts) declares them at every connection.
import type { Channel } from "amqplib";
import { CHANNEL_TOPICS } from "~/domain/ingest/payload";
import { MQTT_EXCHANGE } from "~/.server/cluster/auth";

/** Points per shard on the hash ring: with a handful of points the shards' shares of the sensors are very uneven. */
const RING_WEIGHT = "20";

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
