// One holder at a time across instances: a PostgreSQL session-level advisory lock held on a
// connection of its own. PostgreSQL releases it when that session ends, so a holder that dies (or
// whose connection dies) loses it at once, and a waiting instance takes it on its next try, a
// second later. A holder that loses its connection stops its work before trying again.
//
// Two holders can overlap for a moment (the old one still finishing while the new one starts):
// what the lease guards (the alert engine) changes its state only under row locks, so the overlap
// repeats no event; the lease is for not doing the work twice, not for correctness.
import pg from "pg";

export type Lease = { holding: () => boolean; stop: () => Promise<void> };

export type LeaseOptions = {
  connectionString: string;
  /** The advisory lock's key (one per kind of work). */
  key: number;
  /** Starts the work once the lock is held; returns what stops it. Gets the lock's own session. */
  onAcquire: (session: pg.Client) => Promise<() => Promise<void>>;
  retryMs?: number;
  /** A query on the session this often, so a dead connection is noticed while nothing else happens. */
  pingMs?: number;
  log?: (s: string) => void;
};

export function startLease(o: LeaseOptions): Lease {
  const retryMs = o.retryMs ?? 1000;
  const pingMs = o.pingMs ?? 2000;
  const log = o.log ?? (() => {});
  let stopped = false;
  let holding = false;
  let timer: NodeJS.Timeout | null = null;
  let session: pg.Client | null = null;
  let stopWork: (() => Promise<void>) | null = null;
  let ping: NodeJS.Timeout | null = null;
  let losing: Promise<void> | null = null;

  const schedule = () => {
    if (!stopped) timer = setTimeout(() => void attempt(), retryMs);
  };

  async function attempt() {
    timer = null;
    const c = new pg.Client({
      connectionString: o.connectionString,
      keepAlive: true,
      application_name: "nichewise-lease",
    });
    c.on("error", () => void lose(c, "connection error"));
    try {
      await c.connect();
      // The server drops a silent peer's session (and its lock) within about 15 s.
      await c.query("SET tcp_keepalives_idle = 5; SET tcp_keepalives_interval = 5; SET tcp_keepalives_count = 2");
      const got = (await c.query<{ ok: boolean }>("SELECT pg_try_advisory_lock($1) AS ok", [o.key])).rows[0].ok;
      if (!got || stopped) {
        await c.end().catch(() => {});
        return schedule();
      }
    } catch {
      await c.end().catch(() => {});
      return schedule();
    }
    session = c;
    holding = true;
    c.once("end", () => void lose(c, "connection ended"));
    log(`lease ${o.key}: held`);
    try {
      stopWork = await o.onAcquire(c);
    } catch (err) {
      log(`lease ${o.key}: work failed to start (${err instanceof Error ? err.message : err}); letting go`);
      await lose(c, "start failed");
      return;
    }
    if (stopped || session !== c) {
      await stopWork().catch(() => {});
      stopWork = null;
      return;
    }
    ping = setInterval(() => c.query("SELECT 1").catch(() => void lose(c, "ping failed")), pingMs);
  }

  function lose(c: pg.Client, why: string): Promise<void> {
    if (session !== c) return losing ?? Promise.resolve();
    session = null;
    holding = false;
    if (ping) clearInterval(ping);
    ping = null;
    const work = stopWork;
    stopWork = null;
    if (!stopped) log(`lease ${o.key}: lost (${why}); stopping the work`);
    losing = (async () => {
      await work?.().catch((err) => console.error("[lease]", err));
      await c.end().catch(() => {});
      losing = null;
      schedule();
    })();
    return losing;
  }

  void attempt();
  return {
    holding: () => holding,
    async stop() {
      stopped = true;
      if (timer) clearTimeout(timer);
      if (session) await lose(session, "stopping");
      else await losing;
    },
  };
}
