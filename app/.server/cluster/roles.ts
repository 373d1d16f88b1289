// The process modes of cluster mode, chosen by NW_ROLE in app/.server/main.ts. Both are stateless:
// readings, sessions and alert state live in PostgreSQL (DATABASE_URL, required), sensors talk to
// the engine's nodes, and any instance can die and be started again, or be one of several.
import type { Express } from "express";
import type { AlertEngineOptions } from "~/.server/alerts/engine";
import { announceCommits, startAlertsUnderLease } from "~/.server/cluster/alerts";
import { engineAuthRouter } from "~/.server/cluster/auth";
import { amqpUrls, clusterEnv } from "~/.server/cluster/config";
import type { Lease } from "~/.server/cluster/lease";
import { startIngestWorker } from "~/.server/cluster/worker";
import type { ReadingWriter } from "~/.server/ingest/writer";

function databaseUrl() {
  const url = process.env.DATABASE_URL;
  if (!url) throw new Error("NW_ROLE=web and NW_ROLE=ingest share one PostgreSQL: set DATABASE_URL");
  return url;
}

/** NW_ROLE=ingest: a queue consumer and the writer, nothing else. */
export async function startIngestRole(
  stops: (() => Promise<void>)[],
  stopAll: () => Promise<void>,
  log: (s: string) => void,
) {
  const url = databaseUrl();
  const c = clusterEnv();
  const { closeDb } = await import("~/.server/db");
  stops.push(closeDb);
  const { writer } = await import("~/.server/ingest/writer");
  const stopAnnouncing = announceCommits(writer());
  stops.push(async () => stopAnnouncing());
  const worker = await startIngestWorker({
    urls: amqpUrls(),
    queue: c.NW_AMQP_QUEUE,
    shards: c.NW_AMQP_SHARDS,
    connectionString: url,
    prefetch: c.NW_AMQP_PREFETCH,
    writer: writer(),
    log,
  });
  stops.push(worker.close);
  log(`ingest role: writing to ${url.replace(/\/\/[^@]*@/, "//")}`);
  return { stop: stopAll, url: "", mqttPort: 0, port: 0 };
}

/** This web instance's alert lease (NW_ROLE=web), for the work only its holder does. */
let alertLease: Lease | null = null;

/** NW_ROLE=web: the alert engine only while this instance holds the alert lease. */
export function startWebAlerts(w: ReadingWriter, opts: AlertEngineOptions): () => Promise<void> {
  const lag = clusterEnv().NW_ALERT_MAX_LAG_MS;
  const stopAnnouncing = announceCommits(w);
  const lease = startAlertsUnderLease(w, {
    ...opts,
    ...(lag ? { maxLagMs: lag } : {}),
    connectionString: databaseUrl(),
  });
  alertLease = lease;
  return async () => {
    stopAnnouncing();
    await lease.stop();
  };
}

/** NW_ROLE=web with NW_CLUSTER_AUTH_KEY: the engine's auth endpoint at /cluster/auth. */
export function mountEngineAuth(app: Express) {
  const key = clusterEnv().NW_CLUSTER_AUTH_KEY;
  if (key) app.use("/cluster/auth", engineAuthRouter(key));
}

type Rounds = { job: { round: () => Promise<number> } };
type Passes = { runner: { run: (siteId?: number) => Promise<{ spots: number; warned: number; cleared: number }> } };

/**
 * NW_ROLE=web: the weather job's rounds and the forecast warnings' passes run only in the instance
 * holding `lease` (by default this instance's alert lease); the others skip them, and a new holder
 * picks them up at its next round. Without it every web instance fetched every site's weather and
 * checked every forecast. Call right after starting both (before their first tick).
 */
export function onlyInLeaseHolder(
  weather: Rounds,
  warnings: Passes,
  lease: Pick<Lease, "holding"> | null = alertLease,
) {
  const holding = () => lease?.holding() ?? false;
  const round = weather.job.round.bind(weather.job);
  const run = warnings.runner.run.bind(warnings.runner);
  weather.job.round = () => (holding() ? round() : Promise.resolve(0));
  warnings.runner.run = (siteId?: number) =>
    holding() ? run(siteId) : Promise.resolve({ spots: 0, warned: 0, cleared: 0 });
}
