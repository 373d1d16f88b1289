// The embedded MQTT broker. Sensors sign in with their id and secret and may publish only under
// their own topic. A reading is written inside `authorizePublish`, before aedes sends the PUBACK,
// so an acknowledged reading is a committed one; if the write fails the callback gets the error,
// aedes closes the connection without acking and the sensor resends after reconnecting.
//
// Before a client has signed in it can cost the server little: packets are refused by their
// announced length before their bodies are buffered, connections are counted, a connection that
// sends no CONNECT in time is closed, and browsers of other sites may not open the WebSocket port.
import { Aedes, type AedesOptions, type Client } from "aedes";
import { createServer, type Server, type Socket } from "node:net";
import http from "node:http";
import { WebSocketServer, createWebSocketStream } from "ws";
import { isSensorId, parseTopic, TOPIC_PREFIX } from "~/domain/ingest/payload";
import { env, publicUrl } from "~/.server/env";
import { kept } from "~/.server/kept";
import { recordRejectionsSoon } from "~/.server/ingest/rejections";
import { ingestMessage } from "~/.server/ingest/message";
import { verifySensorSecret } from "~/.server/ingest/sensor-cache";
import type { ReadingWriter } from "~/.server/ingest/writer";

export { CONNECT_TIMEOUT_MS, MAX_CONNECT_BYTES, MAX_PUBLISH_BYTES } from "~/.server/ingest/packet-limits";
import { CONNECT_TIMEOUT_MS, limitPacketSizes, packetLimit } from "~/.server/ingest/packet-limits";

export type BrokerStats = {
  startedAt: Date;
  accepted: number;
  rejected: number;
  refusedConnections: number;
  writeFailures: number;
};

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
const holder = kept<Holder>("broker", () => ({}));
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
  /** Open MQTT connections (TCP and WebSocket together) at most; more are closed at once. */
  maxConnections?: number;
  connectTimeoutMs?: number;
  /** Browser origins allowed on the WebSocket port; clients sending no Origin (sensors) always are. */
  allowedOrigins?: string[];
}): Promise<RunningBroker> {
  const log = opts.log ?? console.log;
  const maxConnections = opts.maxConnections ?? env().MQTT_MAX_CONNECTIONS;
  const sensorOf = new WeakMap<Client, number>();
  const clientsOf = new Map<number, Set<Client>>();
  const stats: BrokerStats = {
    startedAt: new Date(),
    accepted: 0,
    rejected: 0,
    refusedConnections: 0,
    writeFailures: 0,
  };
  let openConnections = 0;

  const options: AedesOptions = {
    // QoS 1 deliveries in flight across the broker; each waits for a group commit (a few ms).
    concurrency: 1000,
    connectTimeout: opts.connectTimeoutMs ?? CONNECT_TIMEOUT_MS,
    authenticate(client, username, password, done) {
      const id = Number(username);
      if (!username || !isSensorId(id) || !password) {
        stats.refusedConnections++;
        return done(authError("Bad user name or password", 4), false);
      }
      verifySensorSecret(id, password.toString("utf8")).then(
        (info) => {
          if (!info) {
            stats.refusedConnections++;
            return done(authError("Bad user name or password", 4), false);
          }
          // A client id is the sensor's own: the broker files it under the sensor id, so another
          // sensor sending the same client id gets a session of its own instead of taking this
          // one over (MQTT 3.1.1 §3.1.4 closes the older connection of a client id).
          client.id = `${id}/${client.id}`;
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
      if (
        id &&
        (sub.topic === `${TOPIC_PREFIX}/${id}/#` || sub.topic.startsWith(`${TOPIC_PREFIX}/${id}/`)) &&
        !sub.topic.includes("+")
      ) {
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
          recordRejectionsSoon([
            {
              sensorId: id ?? null,
              source: "mqtt",
              topic: packet.topic,
              reason: "topic not allowed for this sensor",
              payload: "",
            },
          ]);
          return done(new Error("topic not allowed"));
        }
        ingestMessage(opts.writer, id, match.channel, packet.payload as Buffer, {
          stored: () => {
            stats.accepted++;
            done(null);
          },
          refused: (reason) => refuse(id, packet, reason, done),
          failed: (err) => failed(err, done),
        });
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
    recordRejectionsSoon([
      {
        sensorId,
        source: "mqtt",
        topic: packet.topic,
        reason,
        payload: (packet.payload as Buffer).subarray(0, 500).toString("utf8"),
      },
    ]);
    done(null);
  }

  function failed(err: Error, done: Done) {
    stats.writeFailures++;
    done(err);
  }

  function tooBig(client: Client, cmd: string, length: number) {
    const sensorId = sensorOf.get(client);
    if (sensorId === undefined) return;
    stats.rejected++;
    recordRejectionsSoon([
      {
        sensorId,
        source: "mqtt",
        reason: `${cmd} packet of ${length} bytes is over ${packetLimit(cmd)} bytes: connection closed`,
        payload: "",
      },
    ]);
  }

  /** Counts a new connection, or refuses it when the broker is full. */
  function admit(): boolean {
    if (openConnections >= maxConnections) {
      stats.refusedConnections++;
      return false;
    }
    openConnections++;
    return true;
  }
  const release = () => void openConnections--;

  const broker = await Aedes.createBroker(options);
  // A sensor's reading has no one to go to: the server takes it in authorizePublish, and a sensor
  // may subscribe only to its own topics. After the PUBACK aedes would still match every reading
  // against offline and live subscriptions (two topic-tree lookups, a promise and a few objects per
  // message); the messages the server publishes itself (no client) are delivered as before.
  const deliver = broker.publish.bind(broker) as unknown as (
    packet: unknown,
    client: Client | null,
    done?: (err?: Error | null) => void,
  ) => void;
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
  const server: Server = createServer({ noDelay: true }, (socket: Socket) => {
    if (!admit()) return void socket.destroy();
    socket.once("close", release);
    limitPacketSizes(broker.handle(socket), tooBig);
  });
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
      res
        .writeHead(426, { "Content-Type": "text/plain" })
        .end("MQTT over WebSocket: connect with a WebSocket MQTT client\n");
    });
    // A page of another site must not open MQTT connections from a visitor's browser (browsers
    // send Origin on every WebSocket handshake, RFC 6455 §4.1); sensors and other non-browser
    // clients send none.
    const allowed = new Set(opts.allowedOrigins ?? [new URL(publicUrl()).origin]);
    wss = new WebSocketServer({
      server: wsServer,
      // One WebSocket message carries one MQTT packet or a few; this keeps ws from collecting 100 MB (its default).
      maxPayload: 64 * 1024,
      verifyClient: ({ origin }, accept) => {
        if (origin && !allowed.has(origin)) return accept(false, 403, "Origin not allowed");
        if (openConnections >= maxConnections) return accept(false, 503, "Too many connections");
        accept(true);
      },
    });
    wss.on("connection", (ws, req) => {
      if (!admit()) return void ws.terminate();
      ws.once("close", release);
      const stream = createWebSocketStream(ws);
      stream.on("error", () => ws.terminate());
      limitPacketSizes(broker.handle(stream as never, req), tooBig);
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
