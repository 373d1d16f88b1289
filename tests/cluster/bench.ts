// The benchmark's cluster section (tests/bench/run.ts): the same closed-loop MQTT load (QoS 1, 20
// clients × 50 in flight) first through the embedded broker (ack after commit), then through a
// three-node RabbitMQ cluster (tests/cluster/engine.ts) to one ingest worker, then to two sharing its
// four shards (app/.server/cluster/worker.ts). The
// cluster's figure is the rate readings were *stored* at (the engine acks once its quorum queue
// holds a reading; the workers commit after), beside the rate the engine acked at; CPU seconds per
// part say where the time goes.
import { spawn, type ChildProcess } from "node:child_process";
import { randomBytes } from "node:crypto";
import { readFileSync } from "node:fs";
import type { AddressInfo } from "node:net";
import path from "node:path";
import { build as esbuild } from "esbuild";
import express from "express";
import { engineAuthRouter } from "../../app/.server/cluster/auth";
import { startEngineCluster } from "./engine";

type Row = { figure: string; ours: string; baseline: string; ratio: string; target: string; note?: string };
type Run = { ms: number; acked: number; failed: number; p50: number; p99: number; cpuMs: number };
const fmt = (n: number, d = 0) => n.toLocaleString("en", { maximumFractionDigits: d, minimumFractionDigits: d });
const DAY = 86_400_000;

/** CPU milliseconds a process has used (/proc, clock ticks of 10 ms), or 0 when it is gone. */
function cpuMsOf(pid: number | undefined): number {
  if (!pid) return 0;
  try {
    const f = readFileSync(`/proc/${pid}/stat`, "utf8").split(") ")[1].split(" ");
    return (Number(f[11]) + Number(f[12])) * 10;
  } catch {
    return 0;
  }
}

async function bundleFile(file: string, dir: string): Promise<string> {
  const outfile = path.resolve(dir, `${path.basename(file, ".ts")}.mjs`);
  await esbuild({
    entryPoints: [file],
    bundle: true,
    platform: "node",
    format: "esm",
    packages: "external",
    outfile,
    logLevel: "warning",
  });
  return outfile;
}

function loadgen(loadgenJs: string, cfg: object): Promise<Run> {
  return new Promise((resolve, reject) => {
    const child = spawn(process.execPath, [loadgenJs, JSON.stringify(cfg)], { stdio: ["ignore", "pipe", "inherit"] });
    let s = "";
    child.stdout.on("data", (d) => (s += d));
    child.on("exit", (code) =>
      code === 0
        ? resolve(JSON.parse(s.trim().split("\n").pop()!) as Run)
        : reject(new Error(`loadgen exited ${code}`)),
    );
  });
}

function ipc<T>(child: ChildProcess, cmd: string): Promise<T> {
  return new Promise((resolve) => {
    child.once("message", (m) => resolve(m as T));
    child.send({ cmd });
  });
}

export async function clusterBench(o: {
  dir: string;
  basePort: number;
  creds: { id: number; secret: string }[];
  total: number;
  nodeFlags: string[];
  postgresTicks: () => Promise<Map<string, number>>;
  postgresCpuMsSince: (before: Map<string, number>) => Promise<number>;
  log: (s: string) => void;
}): Promise<Row[]> {
  const [loadgenJs, brokerJs, workerJs] = await Promise.all(
    ["tests/bench/loadgen.ts", "tests/bench/broker-proc.ts", "tests/cluster/worker-proc.ts"].map((f) =>
      bundleFile(f, o.dir),
    ),
  );
  const load = { sensors: o.creds.slice(0, 20), clients: 20, inflight: 50, total: o.total };
  // Each run its own stretch of time, so every reading is new (no batch goes down the duplicate path).
  const startOf = (k: number) => Date.now() - (380 - 10 * k) * DAY;

  // The embedded broker, as the rest of the benchmark measures it, on this section's load.
  const embedded = spawn(process.execPath, [...o.nodeFlags, brokerJs], {
    stdio: ["ignore", "inherit", "inherit", "ipc"],
    env: { ...process.env, NODE_ENV: "production" },
  });
  const { port } = await new Promise<{ port: number }>((resolve) =>
    embedded.once("message", (m) => resolve(m as { port: number })),
  );
  const base = await loadgen(loadgenJs, { url: `mqtt://127.0.0.1:${port}`, ...load, startMs: startOf(0) });
  embedded.send({ cmd: "stop" });
  await new Promise((r) => embedded.once("exit", r));
  const embeddedRate = base.acked / (base.ms / 1000);
  o.log(`cluster section: embedded broker ${fmt(embeddedRate)}/s`);

  // The engine asks this process about sensors (the web instances' endpoint in production).
  const key = randomBytes(18).toString("hex");
  const app = express();
  app.use("/cluster/auth", engineAuthRouter(key));
  const server = app.listen(0, "127.0.0.1");
  await new Promise((r) => server.once("listening", r));
  const authUrl = `http://127.0.0.1:${(server.address() as AddressInfo).port}/cluster/auth`;
  const engine = await startEngineCluster({
    dir: path.join(o.dir, "engine"),
    basePort: o.basePort,
    authUrls: [authUrl],
    authKey: key,
    tag: "nwbench",
    log: o.log,
  });
  const workers: ChildProcess[] = [];
  const rows: Row[] = [];
  try {
    const startWorker = async (first: number) => {
      const child = spawn(process.execPath, [...o.nodeFlags, workerJs, JSON.stringify(engine.amqpUrls(first))], {
        stdio: ["ignore", "inherit", "inherit", "ipc"],
        env: { ...process.env, NODE_ENV: "production" },
      });
      await new Promise((r) => child.once("message", r));
      workers.push(child);
    };
    const stored = async () => {
      let n = 0;
      for (const w of workers) n += (await ipc<{ accepted: number }>(w, "stats")).accepted;
      return n;
    };
    const cpu = async () => {
      let w = 0;
      for (const c of workers) w += (await ipc<{ cpuMs: number }>(c, "stats")).cpuMs;
      return { workers: w, engine: engine.nodes.reduce((s, n) => s + cpuMsOf(engine.pid(n.index)), 0) };
    };
    const measure = async (label: string, k: number) => {
      const before = await stored();
      const cpu0 = await cpu();
      const pg0 = await o.postgresTicks();
      const t = performance.now();
      const r = await loadgen(loadgenJs, {
        url: `mqtt://127.0.0.1:${engine.nodes[0].mqttPort}`,
        ...load,
        startMs: startOf(k),
      });
      const ackedAt = performance.now();
      while ((await stored()) - before < r.acked) {
        if (performance.now() - ackedAt > 300_000)
          throw new Error(`${label}: readings acked by the engine were not all stored in 5 minutes`);
        await new Promise((res) => setTimeout(res, 50));
      }
      const storedMs = r.ms + (performance.now() - ackedAt);
      const cpu1 = await cpu();
      const pgMs = await o.postgresCpuMsSince(pg0);
      const rate = r.acked / (storedMs / 1000);
      const wall = (performance.now() - t) / 1000;
      const note =
        `engine acked ${fmt(r.acked / (r.ms / 1000))}/s (ack p50 / p99 ` +
        `${r.p50.toFixed(1)} / ${r.p99.toFixed(1)} ms); CPU s — load ` +
        `generator ${fmt(r.cpuMs / 1000, 1)}, RabbitMQ (3 nodes) ` +
        `${fmt((cpu1.engine - cpu0.engine) / 1000, 1)}, worker` +
        `${workers.length > 1 ? "s" : ""} ` +
        `${fmt((cpu1.workers - cpu0.workers) / 1000, 1)}, PostgreSQL ` +
        `${fmt(pgMs / 1000, 1)} (wall ${fmt(wall, 1)} s)`;
      o.log(`cluster section: ${label} ${fmt(rate)}/s stored; ${note}`);
      rows.push({
        figure: `Cluster mode, 3 RabbitMQ nodes → ${label}: readings stored/s, 20 clients × 50 in flight`,
        ours: fmt(rate),
        baseline: `${fmt(embeddedRate)} (embedded broker)`,
        ratio: `${fmt((rate / embeddedRate) * 100)} %`,
        target: "—",
        note,
      });
    };
    await startWorker(0);
    await measure("1 ingest worker", 1);
    const spread = async () => {
      const lists: string[] = [];
      for (const w of workers) lists.push(`[${(await ipc<{ active: number[] }>(w, "stats")).active.join(",")}]`);
      return lists.join(" / ");
    };
    o.log(`cluster section: 1 worker active on shards ${await spread()}`);
    await startWorker(1);
    await measure("2 ingest workers (4 shards spread over both)", 2);
    o.log(
      `cluster section: 2 workers active on shards ${await spread()} (each hands shards on while it is active on more than half)`,
    );
    rows[rows.length - 1].note += `; active shards at the end ${await spread()}`;
    rows.push({
      figure: "Cluster mode: RabbitMQ start, three nodes to one cluster (s)",
      ours: fmt(engine.startSeconds, 1),
      baseline: "—",
      ratio: "—",
      target: "—",
      note:
        `resident memory after the runs: ` +
        `${engine.nodes.map((n) => `${fmt(Number(/VmRSS:\s+(\d+)/.exec(safeRead(`/proc/${engine.pid(n.index)}/status`))?.[1] ?? 0) / 1024)} MB`).join(", ")}`,
    });
  } finally {
    for (const w of workers) {
      w.send({ cmd: "stop" });
      await new Promise((r) => w.once("exit", r));
    }
    await engine.stop();
    server.close();
  }
  return rows;
}

function safeRead(file: string) {
  try {
    return readFileSync(file, "utf8");
  } catch {
    return "";
  }
}
