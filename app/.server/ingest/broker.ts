// The embedded MQTT broker. Sensors sign in with their id and secret and may publish only under
// their own topic. A reading is written inside `authorizePublish`, before aedes sends the PUBACK,
// so an acknowledged reading is a committed one; if the write fails the callback gets the error,
// aedes closes the connection without acking and the sensor resends after reconnecting.
import { Aedes, type AedesOptions, type Client } from "aedes";
import { createServer, type Server } from "node:net";
import http from "node:http";
import { WebSocketServer, createWebSocketStream } from "ws";
import { decodeMessage, parseTopic, TOPIC_PREFIX, validateReading } from "~/domain/ingest/payload";
import { recordRejectionsSoon } from "~/.server/ingest/rejections";
import { cachedSensorInfo, sensorInfo, verifySensorSecret, type SensorInfo } from "~/.server/ingest/sensors";
import type { ReadingWriter } from "~/.server/ingest/writer";

export type BrokerStats = { startedAt: Date; accepted: number; rejected: number; refusedConnections: number; writeFailures: number };

export type RunningBroker = {
  broker: Aedes;
  stats: BrokerStats;
  connectedSensors: () => number;
  disconnectSensor: (sensorId: number) => void;
  close: () => Promise<void>;
  port: number;
  wsPort: number | null;
};

type Holder = { running?: RunningBroker };
const holder = ((globalThis as Record<string, unknown>).__nichewiseBroker ??= {}) as Holder;
export const runningBroker = () => holder.running;

function authError(message: string, code: 3 | 4 | 5) {
  return Object.assign(new Error(message), { returnCode: code });
}

export async function startBroker(opts: {
  host: string;
  port: number;
  wsPort?: number | null;
  writer: ReadingWriter;
  log?: (s: string) => void;
}): Promise<RunningBroker> {
  const log = opts.log ?? console.log;
  const sensorOf = new WeakMap<Client, number>();
  const clientsOf = new Map<number, Set<Client>>();
  const stats: BrokerStats = { startedAt: new Date(), accepted: 0, rejected: 0, refusedConnections: 0, writeFailures: 0 };

  const options: AedesOptions = {
    // QoS 1 deliveries in flight across the broker; each waits for a group commit (a few ms).
    concurrency: 1000,
    authenticate(client, username, password, done) {
      const id = Number(username);
      if (!username || !Number.isInteger(id) || id <= 0 || !password) {
        stats.refusedConnections++;
        return done(authError("Bad user name or password", 4), false);
      }
      verifySensorSecret(id, password.toString("utf8")).then(
        (info) => {
          if (!info) {
            stats.refusedConnections++;
            return done(authError("Bad user name or password", 4), false);
          }
          sensorOf.set(client, id);
          let set = clientsOf.get(id);
          if (!set) clientsOf.set(id, (set = new Set()));
          set.add(client);
          done(null, true);
        },
        // MQTT 3.1.1 §3.2.2.3: 3 is "Server unavailable"; 5 ("not authorized") would read as a bad secret.
        () => done(authError("Server unavailable", 3), false),
      );
    },
    authorizeSubscribe(client, sub, done) {
      const id = sensorOf.get(client);
      if (id && (sub.topic === `${TOPIC_PREFIX}/${id}/#` || sub.topic.startsWith(`${TOPIC_PREFIX}/${id}/`)) && !sub.topic.includes("+")) {
        return done(null, sub);
      }
      done(new Error("A sensor may subscribe only to its own topics"));
    },
    authorizePublish(client, packet, done) {
      try {
        const id = client ? sensorOf.get(client) : undefined;
        const match = parseTopic(packet.topic);
        if (!client) return done(null); // the broker's own messages
        if (!id || !match || match.sensorId !== id) {
          // Refusing closes the connection; publishing outside its topic is not a payload mistake.
          stats.rejected++;
          recordRejectionsSoon([{ sensorId: id ?? null, source: "mqtt", topic: packet.topic, reason: "topic not allowed for this sensor", payload: "" }]);
          return done(new Error("topic not allowed"));
        }
        const decoded = decodeMessage(match.channel, packet.payload as Buffer);
        if (!decoded.ok) return refuse(id, packet, decoded.reason, done);
        const partial = match.channel !== "reading";
        const info = cachedSensorInfo(id);
        if (info !== undefined) return writeOrRefuse(id, info, packet, decoded.payload, partial, done);
        sensorInfo(id)
          .then((fetched) => writeOrRefuse(id, fetched, packet, decoded.payload, partial, done))
          .catch((err: Error) => failed(err, done));
      } catch (err) {
        // Nothing here should throw; if it does, refuse rather than crash the broker.
        done(err instanceof Error ? err : new Error(String(err)));
      }
    },
  };

  type Done = (err?: Error | null) => void;
  type Publish = { topic: string; payload: Buffer | string };

  /** Acks a message that can't be stored (a refused QoS 1 publish would be resent forever) and records why. */
  function refuse(sensorId: number, packet: Publish, reason: string, done: Done) {
    stats.rejected++;
    recordRejectionsSoon([{ sensorId, source: "mqtt", topic: packet.topic, reason, payload: (packet.payload as Buffer).subarray(0, 500).toString("utf8") }]);
    done(null);
  }

  function failed(err: Error, done: Done) {
    stats.writeFailures++;
    done(err);
  }

  /** Validates and stores one message; `done` (the PUBACK) comes after the commit. */
  function writeOrRefuse(sensorId: number, info: SensorInfo | null, packet: Publish, payload: unknown, partial: boolean, done: Done) {
    if (!info) return refuse(sensorId, packet, "unknown sensor (deleted?)", done);
    const parsed = validateReading(sensorId, payload as never, { now: new Date(), kind: info.kind });
    if (!parsed.ok) return refuse(sensorId, packet, parsed.reason, done);
    opts.writer.store([partial ? { ...parsed.reading, partial } : parsed.reading]).then(
      () => {
        stats.accepted++;
        done(null);
      },
      (err: Error) => failed(err, done),
    );
  }

  const broker = await Aedes.createBroker(options);
  // A sensor's reading has no one to go to: the server takes it in authorizePublish, and a sensor
  // may subscribe only to its own topics. After the PUBACK aedes would still match every reading
  // against offline and live subscriptions (two topic-tree lookups, a promise and a few objects per
  // message); the messages the server publishes itself (no client) are delivered as before.
  const deliver = broker.publish.bind(broker) as unknown as (packet: unknown, client: Client | null, done?: (err?: Error | null) => void) => void;
  (broker as unknown as { publish: typeof deliver }).publish = (packet, client, done) => {
    if (client && typeof client === "object") return done?.(null);
    deliver(packet, client, done);
  };
  broker.on("clientDisconnect", (client) => {
    const id = sensorOf.get(client);
    if (id) clientsOf.get(id)?.delete(client);
  });
  broker.on("clientError", () => {});
  broker.on("connectionError", () => {});

  // No Nagle delay on PUBACKs: a sensor publishing every few ms would otherwise wait for the TCP
  // ack of the previous PUBACK (up to a delayed-ack timeout) before hearing about the next one.
  const server: Server = createServer({ noDelay: true }, broker.handle);
  await new Promise<void>((resolve, reject) => {
    server.once("error", reject);
    server.listen(opts.port, opts.host, () => resolve());
  });
  const port = (server.address() as { port: number }).port;
  log(`MQTT broker on mqtt://${opts.host}:${port}`);

  let wsServer: http.Server | null = null;
  let wss: WebSocketServer | null = null;
  let wsPort: number | null = null;
  if (opts.wsPort !== null && opts.wsPort !== undefined) {
    wsServer = http.createServer((_req, res) => {
      res.writeHead(426, { "Content-Type": "text/plain" }).end("MQTT over WebSocket: connect with a WebSocket MQTT client\n");
    });
    wss = new WebSocketServer({ server: wsServer });
    wss.on("connection", (ws, req) => {
      const stream = createWebSocketStream(ws);
      stream.on("error", () => ws.terminate());
      broker.handle(stream as never, req);
    });
    await new Promise<void>((resolve, reject) => {
      wsServer!.once("error", reject);
      wsServer!.listen(opts.wsPort!, opts.host, () => resolve());
    });
    wsPort = (wsServer.address() as { port: number }).port;
    log(`MQTT over WebSocket on ws://${opts.host}:${wsPort}`);
  }

  const running: RunningBroker = {
    broker,
    stats,
    port,
    wsPort,
    connectedSensors: () => [...clientsOf.values()].reduce((n, s) => n + s.size, 0),
    disconnectSensor(sensorId) {
      for (const c of clientsOf.get(sensorId) ?? []) c.close();
      clientsOf.delete(sensorId);
    },
    close: () =>
      new Promise<void>((resolve) => {
        wss?.clients.forEach((c) => c.terminate());
        wss?.close();
        wsServer?.close();
        server.close();
        broker.close(() => resolve());
      }),
  };
  holder.running = running;
  return running;
}
