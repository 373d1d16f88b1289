// Cluster mode's own parts against the real PostgreSQL: the engine's auth endpoint (RabbitMQ's HTTP
// auth backend asks it about sensors), the alert lease (one holder at a time, taken over when the
// holder's session dies) and the lease holder's engine fed by what other processes' writers
// commit. The whole cluster (three RabbitMQ nodes, workers, web instances, faults) is proved by
// `npm run test:cluster` (tests/cluster/run.ts), which is too slow for this suite.
import express from "express";
import type { AddressInfo } from "node:net";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { announceCommits, startAlertsUnderLease } from "~/.server/cluster/alerts";
import { engineAuthRouter } from "~/.server/cluster/auth";
import { startLease, type Lease } from "~/.server/cluster/lease";
import { onlyInLeaseHolder } from "~/.server/cluster/roles";
import { pool } from "~/.server/db";
import { ReadingWriter } from "~/.server/ingest/writer";
import { configureMailer, startMailSink } from "~/.server/mail";
import { makeSensor, makeSite, makeSpot, makeUser } from "./helpers";

const KEY = "k".repeat(24);
const MIN = 60_000;
const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/** Waits for `cond` (at most `ms`): the outcome is asserted, not how long it took. */
async function eventually(cond: () => boolean | Promise<boolean>, ms = 30_000) {
  const until = Date.now() + ms;
  while (!(await cond())) {
    if (Date.now() > until) return false;
    await sleep(100);
  }
  return true;
}

describe("the engine's auth endpoint (RabbitMQ HTTP auth backend)", () => {
  let base: string;
  let close: () => void;
  beforeAll(async () => {
    const app = express();
    app.use("/cluster/auth", engineAuthRouter(KEY));
    const server = app.listen(0, "127.0.0.1");
    await new Promise((r) => server.once("listening", r));
    base = `http://127.0.0.1:${(server.address() as AddressInfo).port}/cluster/auth`;
    close = () => server.close();
  });
  afterAll(() => close?.());

  // The plugin posts a form and reads "allow" or "deny" (rabbitmq_auth_backend_http's README).
  const ask = async (path: string, form: Record<string, string>, key = KEY) => {
    const res = await fetch(`${base}/${path}?key=${key}`, { method: "POST", body: new URLSearchParams(form) });
    return { status: res.status, body: await res.text() };
  };

  it("lets a sensor in with its secret (stored as a SHA-256 hash) and keeps it to its own topics", async () => {
    const site = await makeSite(await makeUser());
    const a = await makeSensor(site, await makeSpot(site));
    const b = await makeSensor(site, await makeSpot(site));
    expect((await ask("user", { username: String(a.id), password: a.secret })).body).toBe("allow");
    expect((await ask("user", { username: String(a.id), password: b.secret })).body).toBe("deny");
    expect((await ask("user", { username: "nichewise-ingest", password: "x" })).body).toBe("deny");
    expect((await ask("vhost", { username: String(a.id), vhost: "/", ip: "127.0.0.1" })).body).toBe("allow");
    const topic = (username: number, permission: string, routing_key: string) =>
      ask("topic", {
        username: String(username),
        vhost: "/",
        resource: "topic",
        name: "amq.topic",
        permission,
        routing_key,
      });
    expect((await topic(a.id, "write", `nichewise.sensors.${a.id}.reading`)).body).toBe("allow");
    expect((await topic(a.id, "write", `nichewise.sensors.${a.id}.humidity`)).body).toBe("allow");
    expect((await topic(a.id, "write", `nichewise.sensors.${b.id}.reading`)).body).toBe("deny");
    expect((await topic(a.id, "write", `nichewise.sensors.${a.id}.reading.extra`)).body).toBe("deny");
    expect((await topic(a.id, "read", `nichewise.sensors.*.#`)).body).toBe("deny");
    const resource = (resource: string, name: string, permission: string) =>
      ask("resource", { username: String(a.id), vhost: "/", resource, name, permission });
    expect((await resource("exchange", "amq.topic", "write")).body).toBe("allow");
    expect((await resource("queue", "nichewise.readings", "read")).body).toBe("deny");
    expect((await resource("exchange", "amq.direct", "write")).body).toBe("deny");
  });

  it("answers nobody without the engine's key (no oracle for sensor secrets)", async () => {
    const site = await makeSite(await makeUser());
    const s = await makeSensor(site);
    const res = await ask("user", { username: String(s.id), password: s.secret }, "x".repeat(24));
    expect(res.status).toBe(403);
    expect(res.body).toBe("deny");
  });
});

describe("the alert lease (PostgreSQL advisory lock on its own session)", () => {
  const leases: Lease[] = [];
  afterAll(async () => {
    for (const l of leases) await l.stop();
  });

  it("has one holder at a time, and another instance takes over when the holder's session dies", async () => {
    const key = 424_242;
    const running = new Set<string>();
    let starts = 0;
    const lease = (name: string) =>
      startLease({
        connectionString: process.env.DATABASE_URL!,
        key,
        retryMs: 100,
        onAcquire: async () => {
          starts++;
          running.add(name);
          return async () => void running.delete(name);
        },
      });
    const a = lease("a");
    leases.push(a);
    expect(await eventually(() => a.holding())).toBe(true);
    const b = lease("b");
    leases.push(b);
    await sleep(500); // b tries several times meanwhile
    expect(b.holding()).toBe(false);
    expect([...running]).toEqual(["a"]);

    // The holder's process dies: its session ends, and PostgreSQL releases the lock with it.
    await pool().query(
      `SELECT pg_terminate_backend(pid) FROM pg_locks WHERE locktype = 'advisory' AND objid = $1 AND granted`,
      [key],
    );
    expect(await eventually(() => b.holding())).toBe(true);
    expect(await eventually(() => !running.has("a"))).toBe(true);
    expect([...running]).toEqual(["b"]);
    expect(starts).toBe(2);
  });
});

describe("the lease holder's alert engine", () => {
  let sink: { port: number; close: () => Promise<void> };
  let lease: Lease | undefined;
  let stopAnnouncing: (() => void) | undefined;
  beforeAll(async () => {
    sink = await startMailSink({ port: 0 });
    configureMailer(`smtp://127.0.0.1:${sink.port}`);
  });
  afterAll(async () => {
    stopAnnouncing?.();
    await lease?.stop();
    await sink?.close();
  });

  it("opens an event from readings another process's writer committed (announced after the commit)", async () => {
    const site = await makeSite(await makeUser());
    const spot = await makeSpot(site, { indoor: false });
    const sensor = await makeSensor(site, spot);
    const rule = await pool().query<{ id: number }>(
      `INSERT INTO watches (spot_id, kind, threshold, duration_minutes, hysteresis, clear_minutes, early_warning)
       VALUES ($1, 'cold', 10, 10, 1, 30, false) RETURNING id`,
      [spot.id],
    );
    // Other files' watches share this database: paused, so the new holder's catch-up is this spot's alone.
    await pool().query(`UPDATE watches SET paused = true WHERE spot_id <> $1`, [spot.id]);
    // This process's writer commits nothing; the ingest worker's writer (another process in
    // cluster mode) commits the readings and announces them.
    lease = startAlertsUnderLease(new ReadingWriter(), {
      connectionString: process.env.DATABASE_URL!,
      maxLagMs: Number.POSITIVE_INFINITY,
      checkEveryMs: 3_600_000,
      retryMs: 100,
    });
    expect(await eventually(() => lease!.holding())).toBe(true);
    // No wait for the holder's LISTEN: readings committed before it are read by its catch-up.
    const worker = new ReadingWriter();
    stopAnnouncing = announceCommits(worker);
    // An hour at 8 °C in 5-minute steps, under a 10 °C cold rule of 10 minutes.
    const from = Date.now() - 60 * MIN;
    const readings = Array.from({ length: 12 }, (_, i) => ({
      sensorId: sensor.id,
      measuredAt: new Date(from + i * 5 * MIN),
      temperature: 8,
      humidity: 80,
      lux: null,
      battery: 80,
    }));
    for (let i = 0; i < readings.length; i += 3) await worker.write(readings.slice(i, i + 3));
    const opened = await eventually(
      async () =>
        (await pool().query(`SELECT 1 FROM alert_events WHERE rule_id = $1`, [rule.rows[0].id])).rowCount === 1,
    );
    expect(opened).toBe(true);
    const events = await pool().query<{ started_at: Date; ended_at: Date | null }>(
      `SELECT started_at, ended_at FROM alert_events WHERE rule_id = $1`,
      [rule.rows[0].id],
    );
    expect(events.rows).toHaveLength(1);
    expect(events.rows[0].ended_at).toBeNull();
    expect(events.rows[0].started_at.getTime()).toBe(from);
  });
});

describe("the weather job and forecast warnings in cluster mode", () => {
  const leases: Lease[] = [];
  afterAll(async () => {
    for (const l of leases) await l.stop();
  });

  // Issue 19: web instances are several; each site's weather is fetched and its forecast checked by one of them.
  it("run only in the instance holding the lease, and in the next holder once it dies", async () => {
    const key = 434_343;
    const calls = { a: 0, b: 0 };
    const instance = (name: "a" | "b") => {
      const lease = startLease({
        connectionString: process.env.DATABASE_URL!,
        key,
        retryMs: 100,
        onAcquire: async () => async () => {},
      });
      leases.push(lease);
      const weather = { job: { round: async () => ++calls[name] } };
      const warnings = { runner: { run: async () => (calls[name]++, { spots: 1, warned: 0, cleared: 0 }) } };
      onlyInLeaseHolder(weather, warnings, lease);
      return { lease, tick: async () => (await weather.job.round(), await warnings.runner.run()) };
    };
    const a = instance("a");
    expect(await eventually(() => a.lease.holding())).toBe(true);
    const b = instance("b");
    await sleep(300);
    await a.tick();
    await b.tick();
    expect(calls).toEqual({ a: 2, b: 0 });

    await pool().query(
      `SELECT pg_terminate_backend(pid) FROM pg_locks WHERE locktype = 'advisory' AND objid = $1 AND granted`,
      [key],
    );
    expect(await eventually(() => b.lease.holding())).toBe(true);
    await a.tick();
    await b.tick();
    expect(calls).toEqual({ a: 2, b: 2 });
  });
});
