// Bridge mode: a site's connection, as an MQTT client, to a broker the grower already runs. Its
// messages go through the one ingest path (validateReading, then the writer), and each QoS 1
// message is acknowledged only after its reading is committed: MQTT.js sends the PUBACK when the
// callback of `handleMessage` is called, and handles one incoming packet at a time, so a message
// waiting for its commit holds the rest back in the socket and then in the broker (backpressure, no
// queue of ours). When the commit fails the connection is dropped without acknowledging; the broker
// keeps the session (clean: false, a stable client id; MQTT 5: a session expiry) and sends the
// message again after the reconnect (MQTT 3.1.1 §4.4, MQTT 5 §4.4).
import { MqttClient, type IClientOptions, type IPublishPacket } from "mqtt";
import { connect as netConnect } from "node:net";
import { connect as tlsConnect } from "node:tls";
import { isIP } from "node:net";
import { validateReading, type Reading } from "~/domain/ingest/payload";
import { decodePayload, MAX_BRIDGED_PAYLOAD_BYTES } from "~/domain/payloads/presets";
import { recordRejectionsSoon, type Rejected } from "~/.server/ingest/rejections";
import { lastTemperature, noteTemperature, sensorInfo } from "~/.server/ingest/sensor-cache";
import { CONFLICT_REASON } from "~/.server/ingest/message";
import type { ReadingWriter } from "~/.server/ingest/writer";
import { PacketSizeGuard } from "./packet-guard";
import type { BridgeConfig, BridgeLink } from "./store";
import {
  endpoint,
  MAX_BRIDGE_PACKET_BYTES,
  MAX_BRIDGE_V5_PACKET_BYTES,
  SESSION_EXPIRY_S,
  TOPIC_BURST,
  TOPIC_PER_SECOND,
  toPayload,
  zeroCounts,
  type BridgeState,
} from "./state";
import { RecordGate, RECORD_EVERY_MS, TopicPacer } from "./throttle";

export type Deps = { writer: ReadingWriter; log?: (s: string) => void; reconnectMs?: number; maxReconnectMs?: number };

export class SiteBridge {
  readonly state: BridgeState = {
    status: "stopped",
    connectedSince: null,
    lastMessageAt: null,
    lastError: null,
    counts: zeroCounts(),
  };
  private client: MqttClient | null = null;
  /** Bumped whenever a connection is given up: a commit that finishes after that must not ack on the next one. */
  private generation = 0;
  private byTopic = new Map<string, BridgeLink[]>();
  /** Topics the broker's session for us holds (confirmed by its SUBACK). */
  private subscribed = new Set<string>();
  private pacer = new TopicPacer(TOPIC_BURST, TOPIC_PER_SECOND);
  private recorded = new RecordGate(RECORD_EVERY_MS);
  private reconnectMs: number;

  constructor(
    readonly config: BridgeConfig,
    links: BridgeLink[],
    private readonly deps: Deps,
  ) {
    this.reconnectMs = deps.reconnectMs ?? 2000;
    this.setLinks(links);
  }

  get topics() {
    return [...this.byTopic.keys()];
  }

  /** Replaces the attached topics; the running connection subscribes and unsubscribes the difference. */
  setLinks(links: BridgeLink[]) {
    const before = new Set(this.byTopic.keys());
    this.byTopic = new Map();
    for (const l of links) {
      const list = this.byTopic.get(l.topic) ?? [];
      list.push(l);
      this.byTopic.set(l.topic, list);
    }
    this.pacer.clear();
    const c = this.client;
    if (!c?.connected) return; // the next connect subscribes what is missing
    const removed = [...before].filter((t) => !this.byTopic.has(t));
    if (removed.length) {
      for (const t of removed) this.subscribed.delete(t);
      c.unsubscribe(removed);
    }
    this.subscribeMissing(c);
  }

  /**
   * Subscribes the attached topics the session does not hold yet. Not all of them on every
   * reconnect: subscribing again makes the broker send its retained messages again (MQTT 3.1.1
   * §3.8.4).
   */
  private subscribeMissing(c: MqttClient) {
    const missing = this.topics.filter((t) => !this.subscribed.has(t));
    if (missing.length === 0) return;
    c.subscribe(missing, { qos: 1 }, (err, granted) => {
      if (err) return this.fail(`Could not subscribe: ${err.message}`);
      for (const g of granted ?? []) {
        // 0x80 (3.1.1) or a reason code of 0x80 and over (5): the broker refused this topic to our user.
        if (g.qos >= 0x80)
          this.fail(`The broker refused the subscription to ${g.topic}: check the user's access to it`);
        else this.subscribed.add(g.topic);
      }
    });
  }

  start() {
    if (this.client) return;
    if (this.config.passwordError) {
      // Signing in without the password would only be refused: wait for it to be typed again.
      this.fail(this.config.passwordError);
      return;
    }
    const { tls, host, port, ca } = endpoint(this.config);
    const v5 = this.config.protocolVersion === 5;
    const build = () => {
      const socket = tls
        ? tlsConnect({ host, port, ca, servername: isIP(host) ? undefined : host })
        : netConnect({ host, port });
      socket.setNoDelay(true);
      const guard = new PacketSizeGuard(MAX_BRIDGE_PACKET_BYTES);
      socket.on("data", (chunk: Buffer) => {
        if (guard.feed(chunk)) return;
        this.fail(
          `The broker sent a packet of ${guard.tooBig} bytes, over ` +
            `${MAX_BRIDGE_PACKET_BYTES}: connection closed (set a smaller ` +
            `message size limit on the broker)`,
        );
        socket.destroy();
      });
      return socket;
    };
    const options: IClientOptions = {
      clientId: this.config.clientId,
      username: this.config.username ?? undefined,
      password: this.config.password ?? undefined,
      protocolVersion: this.config.protocolVersion,
      clean: false,
      keepalive: 60,
      connectTimeout: 15_000,
      reconnectPeriod: this.reconnectMs,
      resubscribe: false,
      // MQTT 5: keep the session while we are away, hold at most 20 unacknowledged messages in
      // flight to us, and send nothing bigger than we take.
      ...(v5
        ? {
            properties: {
              sessionExpiryInterval: SESSION_EXPIRY_S,
              receiveMaximum: 20,
              maximumPacketSize: MAX_BRIDGE_V5_PACKET_BYTES,
            },
          }
        : {}),
    };
    const client = new MqttClient(build as never, options);
    this.client = client;
    this.state.status = "connecting";
    client.handleMessage = (packet, done) => this.onMessage(packet as IPublishPacket, done);
    client.on("connect", (connack) => {
      this.state.status = "connected";
      this.state.connectedSince = Date.now();
      this.reconnectMs = this.deps.reconnectMs ?? 2000;
      client.options.reconnectPeriod = this.reconnectMs;
      // A resumed session holds our subscriptions; a new one (first connect, or a broker that lost
      // it) holds none.
      if (!connack.sessionPresent) this.subscribed.clear();
      this.subscribeMissing(client);
      this.deps.log?.(
        `[bridge ${this.config.siteId}] connected to ${this.config.url}${connack.sessionPresent ? " (session resumed)" : ""}`,
      );
    });
    client.on("reconnect", () => {
      this.state.counts.reconnects++;
      this.state.status = "connecting";
    });
    client.on("close", () => {
      if (this.state.status !== "stopped") this.state.status = "offline";
      this.state.connectedSince = null;
    });
    client.on("error", (err) => {
      this.fail(err.message);
      // Refused credentials or a broken certificate will not mend by themselves: try less often.
      this.reconnectMs = Math.min(this.reconnectMs * 2, this.deps.maxReconnectMs ?? 60_000);
      client.options.reconnectPeriod = this.reconnectMs;
    });
  }

  async stop() {
    this.generation++;
    this.state.status = "stopped";
    const c = this.client;
    this.client = null;
    // Forced: anything not yet committed stays unacknowledged with the broker, which sends it again.
    if (c) await c.endAsync(true).catch(() => {});
  }

  private fail(message: string) {
    this.state.lastError = { at: Date.now(), message: message.slice(0, 300) };
  }

  /** Drops the connection without acknowledging what is in hand; MQTT.js reconnects by itself. */
  private dropConnection(reason: string) {
    this.generation++;
    this.fail(reason);
    this.reconnectMs = Math.min(this.reconnectMs * 2, this.deps.maxReconnectMs ?? 30_000);
    if (this.client) {
      this.client.options.reconnectPeriod = this.reconnectMs;
      this.client.stream?.destroy();
    }
  }

  private onMessage(packet: IPublishPacket, done: (err?: Error) => void) {
    const generation = this.generation;
    this.handle(packet).then(
      () => {
        if (generation === this.generation) done();
      },
      (err: Error) => {
        this.state.counts.writeFailures++;
        if (generation === this.generation)
          this.dropConnection(`Could not store a reading (${err.message}); the broker will send it again`);
      },
    );
  }

  /** Reads, validates and stores one message. Resolves when it may be acknowledged; rejects when it must come again. */
  private async handle(packet: IPublishPacket): Promise<void> {
    const now = Date.now();
    const topic = packet.topic;
    const links = this.byTopic.get(topic);
    this.state.lastMessageAt = now;
    if (!links) {
      this.state.counts.unattached++;
      return;
    }
    this.state.counts.received++;
    const payload = typeof packet.payload === "string" ? Buffer.from(packet.payload) : packet.payload;
    const preview = () => payload.subarray(0, 500).toString("utf8");
    const rejections: Rejected[] = [];
    const reject = (sensorId: number | null, reason: string, key = `${topic}|${reason}`) => {
      this.state.counts.rejected++;
      if (this.recorded.due(key, now))
        rejections.push({ sensorId, source: "mqtt", topic, reason: `home broker: ${reason}`, payload: preview() });
    };
    try {
      await this.pacer.pace(topic, () => this.state.counts.heldBack++);
      if (payload.length > MAX_BRIDGED_PAYLOAD_BYTES)
        return reject(links[0].sensorId, `payload over ${MAX_BRIDGED_PAYLOAD_BYTES} bytes`);
      const readings: Reading[] = [];
      let matched = false;
      let read = false;
      let unattached: string | null = null;
      for (const link of links) {
        const info = await sensorInfo(link.sensorId);
        if (!info) {
          reject(link.sensorId, "unknown sensor (deleted?)");
          continue;
        }
        const decoded = decodePayload(payload, link.mapping, { now: new Date(now), timeZone: info.timeZone });
        if (!decoded.ok) {
          reject(link.sensorId, decoded.reason);
          continue;
        }
        read = true;
        for (const item of decoded.items) {
          if (link.device && item.device !== link.device) {
            if (item.device) unattached ??= item.device;
            continue;
          }
          matched = true;
          if (packet.retain && !item.values.at) {
            // Sent again by the broker on subscribing: the value is old and says not when it was measured.
            this.state.counts.staleRetained++;
            continue;
          }
          const r = validateReading(link.sensorId, toPayload(item.values), {
            now: new Date(now),
            kind: info.kind,
            previous: lastTemperature(link.sensorId),
          });
          if (!r.ok) {
            reject(link.sensorId, r.reason, `${topic}|${link.device}|${r.reason}`);
            continue;
          }
          const partial = r.reading.temperature === null || r.reading.humidity === null;
          readings.push(partial ? { ...r.reading, partial } : r.reading);
        }
      }
      if (read && !matched && links.every((l) => l.device)) {
        this.state.counts.otherDevices++;
        // Recorded like an unknown sensor, but once an hour per topic: a gateway hears every
        // neighbour's tags, and a row for each would push the real refusals out of the record.
        if (unattached && this.recorded.due(`${topic}|other`, now, 3_600_000)) {
          rejections.push({
            sensorId: null,
            source: "mqtt",
            topic,
            reason: `home broker: device ${unattached} in this topic is not attached to a sensor (others may be too)`,
            payload: preview(),
          });
        }
        return;
      }
      if (readings.length === 0) return;
      // write(), not store(): the bridge is told how many fell outside any spot, as HTTP ingest is.
      const result = await this.deps.writer.write(readings);
      this.state.counts.stored += readings.length - result.conflicts;
      this.state.counts.outsideSpot += result.outsideSpot;
      if (result.conflicts > 0) {
        this.state.counts.rejected += result.conflicts;
        if (this.recorded.due(`${topic}|conflict`, now))
          rejections.push({
            sensorId: readings[0].sensorId,
            source: "mqtt",
            topic,
            reason: CONFLICT_REASON,
            payload: preview(),
          });
      }
      for (const r of readings)
        if (r.temperature !== null) noteTemperature(r.sensorId, r.measuredAt.getTime(), r.temperature);
    } finally {
      if (rejections.length) recordRejectionsSoon(rejections);
    }
  }
}
