// The ingest worker's PostgreSQL session for the shard locks: a shard's readings are written only
// under its advisory lock (worker.ts), which PostgreSQL lets go when the session ends, so a worker
// that dies loses its shards' locks with it. The sessions are named, so that they also count the
// workers.
import pg from "pg";

/** The shard locks' first key ("NWIS"); the second is the shard's number. */
export const SHARD_LOCK_CLASS = 0x4e574953;
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

/** A new lock session, not yet connected; DATABASE_URL when no connection string is given. */
export function lockSession(connectionString: string | undefined): pg.Client {
  return new pg.Client({
    connectionString: connectionString ?? process.env.DATABASE_URL,
    keepAlive: true,
    application_name: LOCK_SESSION_NAME,
  });
}

export async function connectLockSession(session: pg.Client) {
  session.on("error", () => {});
  await session.connect();
  // The server drops a silent peer's session (and its shard locks) within about 15 s, as the alert lease's.
  await session.query("SET tcp_keepalives_idle = 5; SET tcp_keepalives_interval = 5; SET tcp_keepalives_count = 2");
}

/** Takes the shard's lock if no other session holds it. */
export async function tryShardLock(session: pg.Client | null, k: number): Promise<boolean> {
  return (await ask<{ ok: boolean }>(session, "SELECT pg_try_advisory_lock($1, $2) AS ok", [SHARD_LOCK_CLASS, k]))[0]
    .ok;
}

export async function unlockShard(session: pg.Client | null, k: number) {
  await ask(session, "SELECT pg_advisory_unlock($1, $2)", [SHARD_LOCK_CLASS, k]);
}

/** The workers connected now, counted by their lock sessions (the queues count only their active consumers). */
export async function countWorkers(session: pg.Client | null): Promise<number> {
  return (
    await ask<{ n: number }>(
      session,
      "SELECT count(*)::int AS n FROM pg_stat_activity WHERE application_name = $1 AND datname = current_database()",
      [LOCK_SESSION_NAME],
    )
  )[0].n;
}
