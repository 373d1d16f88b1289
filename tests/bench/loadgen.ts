// Load generator for the benchmark, run as its own process so its CPU is measured apart from the
// broker's. Each client is one sensor publishing QoS 1 JSON readings with unique timestamps; either
// closed-loop (a fixed number in flight per client) or paced at a fixed total rate.
import mqtt, { type MqttClient } from "mqtt";

type Config = {
  url: string;
  sensors: { id: number; secret: string }[];
  clients: number;
  inflight: number;
  total: number;
  rate?: number; // readings per second across all clients; closed-loop when absent
  startMs: number; // timestamp of each sensor's first reading
};

const cfg = JSON.parse(process.argv[2]) as Config;

async function connect(sensor: { id: number; secret: string }, i: number): Promise<MqttClient> {
  return new Promise((resolve, reject) => {
    const c = mqtt.connect(cfg.url, {
      username: String(sensor.id),
      password: sensor.secret,
      clientId: `bench-${process.pid}-${i}`,
      protocolVersion: 4,
      reconnectPeriod: 0,
    });
    c.once("connect", () => resolve(c));
    c.once("error", reject);
  });
}

const latencies: number[] = [];
let acked = 0;
let failed = 0;

async function main() {
  const clients = await Promise.all(Array.from({ length: cfg.clients }, (_, i) => connect(cfg.sensors[i % cfg.sensors.length], i)));
  const perClient = Math.ceil(cfg.total / cfg.clients);
  const seq = new Array(cfg.clients).fill(0);
  const cpu0 = process.cpuUsage();
  const t0 = performance.now();

  const publish = (ci: number, done: () => void) => {
    const sensor = cfg.sensors[ci % cfg.sensors.length];
    // Clients sharing a sensor take interleaved timestamps, so every reading is unique.
    const k = seq[ci]++ * Math.ceil(cfg.clients / cfg.sensors.length) + Math.floor(ci / cfg.sensors.length);
    const payload = `{"time":${cfg.startMs + k * 1000},"temperature":${(18 + (k % 70) / 10).toFixed(1)},"humidity":${40 + (k % 40)}}`;
    const sent = performance.now();
    clients[ci].publish(`nichewise/sensors/${sensor.id}/reading`, payload, { qos: 1 }, (err) => {
      if (err) failed++;
      else {
        acked++;
        latencies.push(performance.now() - sent);
      }
      done();
    });
  };

  if (!cfg.rate) {
    await Promise.all(
      clients.map(
        (_c, ci) =>
          new Promise<void>((resolve) => {
            let outstanding = 0;
            let issued = 0;
            let scheduled = false;
            // The acks of one socket read free several places at once; refilling them together
            // sends the new publishes in one socket write (mqtt-packet corks the stream for the
            // rest of the tick), as a busy gateway would, instead of one write per publish.
            const pump = () => {
              scheduled = false;
              while (outstanding < cfg.inflight && issued < perClient) {
                outstanding++;
                issued++;
                publish(ci, () => {
                  outstanding--;
                  if (issued >= perClient && outstanding === 0) resolve();
                  else if (!scheduled) {
                    scheduled = true;
                    setImmediate(pump);
                  }
                });
              }
            };
            pump();
          }),
      ),
    );
  } else {
    await new Promise<void>((resolve) => {
      let issued = 0;
      let settled = 0;
      const start = performance.now();
      const timer = setInterval(() => {
        const due = Math.min(cfg.total, Math.floor(((performance.now() - start) / 1000) * cfg.rate!));
        while (issued < due) {
          publish(issued % cfg.clients, () => {
            settled++;
            if (settled === cfg.total) resolve();
          });
          issued++;
        }
        if (issued >= cfg.total) clearInterval(timer);
      }, 2);
    });
  }
  const ms = performance.now() - t0;
  const cpu = process.cpuUsage(cpu0);
  await Promise.all(clients.map((c) => c.endAsync()));
  latencies.sort((a, b) => a - b);
  const q = (p: number) => latencies[Math.min(latencies.length - 1, Math.floor(p * latencies.length))] ?? null;
  process.stdout.write(
    JSON.stringify({ ms, acked, failed, p50: q(0.5), p99: q(0.99), cpuMs: (cpu.user + cpu.system) / 1000 }) + "\n",
  );
  process.exit(0);
}

main().catch((err) => {
  console.error(err);
  process.exit(1);
});
