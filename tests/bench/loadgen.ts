// Load generator for the benchmark, run as its own process so its CPU is measured apart from the
// broker's. Each client is one sensor publishing QoS 1 JSON readings with unique timestamps; either
// closed-loop (a fixed number in flight per client) or paced at a fixed total rate.
//
// The clients speak MQTT 3.1.1 on plain TCP sockets through mqtt-packet, the packet codec MQTT.js
// is built on, and keep nothing but a callback per packet id in flight. MQTT.js's own bookkeeping
// per publish (option merging, a cloned packet in its outgoing store, logging) cost this shared
// 2-core machine about 20 µs a reading, time the broker under test then did not get. The
// integration tests drive the broker with MQTT.js and mosquitto_pub.
import { connect as tcpConnect, type Socket } from "node:net";
import mqttPacket from "mqtt-packet";

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

type Client = {
  publish: (topic: string, payload: string, cb: (err?: Error) => void) => void;
  end: () => Promise<void>;
};

function connect(sensor: { id: number; secret: string }, i: number): Promise<Client> {
  const { hostname, port } = new URL(cfg.url);
  return new Promise((resolve, reject) => {
    const socket: Socket = tcpConnect(Number(port), hostname);
    socket.setNoDelay(true);
    const parser = mqttPacket.parser({ protocolVersion: 4 });
    const waiting = new Map<number, (err?: Error) => void>();
    let nextId = 1;
    // Packets written in one tick leave in one socket write.
    let out: Buffer[] = [];
    const flush = () => {
      socket.write(out.length === 1 ? out[0] : Buffer.concat(out));
      out = [];
    };
    const send = (b: Buffer) => {
      if (out.push(b) === 1) process.nextTick(flush);
    };
    const client: Client = {
      publish(topic, payload, cb) {
        while (waiting.has(nextId)) nextId = (nextId % 65535) + 1;
        const messageId = nextId;
        nextId = (nextId % 65535) + 1;
        waiting.set(messageId, cb);
        send(mqttPacket.generate({ cmd: "publish", topic, payload, qos: 1, messageId, retain: false, dup: false }));
      },
      end: () =>
        new Promise((done) => {
          socket.end(mqttPacket.generate({ cmd: "disconnect" }), () => done());
        }),
    };
    parser.on("packet", (packet) => {
      if (packet.cmd === "puback") {
        const cb = waiting.get(packet.messageId!);
        waiting.delete(packet.messageId!);
        cb?.();
      } else if (packet.cmd === "connack") {
        if (packet.returnCode === 0) resolve(client);
        else reject(new Error(`CONNACK ${packet.returnCode}`));
      }
    });
    socket.on("data", (chunk) => parser.parse(chunk));
    socket.on("error", reject);
    socket.on("close", () => {
      for (const cb of waiting.values()) cb(new Error("connection closed"));
      waiting.clear();
    });
    send(
      mqttPacket.generate({
        cmd: "connect",
        protocolId: "MQTT",
        protocolVersion: 4,
        clean: true,
        keepalive: 60,
        clientId: `bench-${process.pid}-${i}`,
        username: String(sensor.id),
        password: Buffer.from(sensor.secret),
      }),
    );
  });
}

const latencies: number[] = [];
let acked = 0;
let failed = 0;

async function main() {
  const clients = await Promise.all(
    Array.from({ length: cfg.clients }, (_, i) => connect(cfg.sensors[i % cfg.sensors.length], i)),
  );
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
    clients[ci].publish(`nichewise/sensors/${sensor.id}/reading`, payload, (err) => {
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
            // sends the new publishes in one socket write, as a busy gateway would, instead of
            // one write per publish.
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
  await Promise.all(clients.map((c) => c.end()));
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
