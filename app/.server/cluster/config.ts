// Cluster mode's settings, read once from the environment and validated like ~/.server/env.
// NW_ROLE unset (or "all") is the embedded single process that `npm start` runs.
import { z } from "zod";

const schema = z.object({
  // web: pages, the HTTP ingest API, the engine's auth endpoint and a bid for the alert lease.
  // ingest: consumes the engine's queue and writes through the writer; no web server, no broker.
  NW_ROLE: z.enum(["all", "web", "ingest"]).default("all"),
  // AMQP URLs of the engine's nodes, comma-separated; a worker tries them in turn.
  NW_AMQP_URLS: z.string().default("amqp://127.0.0.1:5672"),
  // The readings' shards are the quorum queues <NW_AMQP_QUEUE>.0 … .<NW_AMQP_SHARDS - 1>. Fixed for a
  // cluster's life: changing it moves sensors between shards (docs/cluster.md).
  NW_AMQP_QUEUE: z.string().min(1).max(200).default("nichewise.readings"),
  NW_AMQP_SHARDS: z.coerce.number().int().min(1).max(64).default(4),
  // Unacknowledged deliveries a worker holds over all its shards: enough to fill two group commits of the writer.
  NW_AMQP_PREFETCH: z.coerce.number().int().min(1).max(20_000).default(2000),
  // The shared secret in the engine's auth URLs (?key=…); unset: the auth endpoint is off.
  NW_CLUSTER_AUTH_KEY: z.string().min(16).max(200).optional(),
  // Readings further behind the clock than this are history for the alert engine (its maxLagMs).
  NW_ALERT_MAX_LAG_MS: z.coerce.number().int().positive().optional(),
});

export type ClusterEnv = z.infer<typeof schema>;

let cached: ClusterEnv | undefined;
export function clusterEnv(source: NodeJS.ProcessEnv = process.env): ClusterEnv {
  if (source !== process.env) return parse(source);
  cached ??= parse(source);
  return cached;
}

function parse(source: NodeJS.ProcessEnv): ClusterEnv {
  const result = schema.safeParse(source);
  if (!result.success) {
    throw new Error(
      `Invalid environment:\n${result.error.issues.map((i) => `  ${i.path.join(".")}: ${i.message}`).join("\n")}`,
    );
  }
  return result.data;
}

export const clusterRole = () => clusterEnv().NW_ROLE;
export const amqpUrls = () =>
  clusterEnv()
    .NW_AMQP_URLS.split(",")
    .map((u) => u.trim())
    .filter(Boolean);

/** The engine's name for a topic: MQTT's "/" is AMQP's "." and the other way round (RabbitMQ's MQTT plugin). */
export const routingKeyToTopic = (key: string) => key.replace(/[./]/g, (c) => (c === "." ? "/" : "."));
export const topicToRoutingKey = routingKeyToTopic;
