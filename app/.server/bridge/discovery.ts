// Listening: what a grower's broker publishes under a prefix, for up to a minute, with what each
// topic's last message would store. A separate connection with a clean session and a client id of
// its own, at QoS 0, so it leaves nothing behind on the broker and takes nothing from the bridge.
// Bounded: topics, bytes per message, bytes in all, and time.
import { MqttClient, type IClientOptions } from "mqtt";
import { connect as netConnect, isIP } from "node:net";
import { connect as tlsConnect } from "node:tls";
import { randomBytes } from "node:crypto";
import {
  isDiscoveryConfigTopic,
  MAX_BRIDGED_PAYLOAD_BYTES,
  parseDiscoveryConfig,
  recognise,
  type DiscoveryHint,
  type Mapping,
  type Values,
} from "~/domain/payloads/presets";
import { PacketSizeGuard } from "./packet-guard";
import { endpoint, MAX_BRIDGE_PACKET_BYTES } from "./state";
import type { BridgeConfig } from "./store";
import { kept } from "~/.server/kept";

export const LISTEN_MS = 60_000;
export const MAX_TOPICS = 300;
export const MAX_TOTAL_BYTES = 2 * 1024 * 1024;
/** Home Assistant discovery configs say what a state topic measures and in which unit. */
export const HA_DISCOVERY_PREFIX = "homeassistant";

type Heard = { count: number; lastAt: number; payload: Buffer | null; tooBig: number; retained: boolean };
export type Listening = {
  prefix: string;
  startedAt: number;
  endsAt: number;
  status: "listening" | "done" | "failed";
  /** Why it stopped early, when it did. */
  note: string | null;
  topics: Map<string, Heard>;
  hints: Map<string, DiscoveryHint>;
  bytes: number;
  stop: () => void;
};
export type Found = {
  topic: string;
  count: number;
  lastAt: number;
  device: string | null;
  mapping: Mapping | null;
  preview: Values[];
  /** Why nothing is suggested (too big, not a known shape). */
  note: string | null;
};

type Holder = { listening: Map<number, Listening> };
const holder = kept<Holder>("bridge-listening", () => ({ listening: new Map() }));

/** Sites listening at once in this server, and how long what was heard is kept after. */
export const MAX_LISTENING = 5;
export const KEEP_HEARD_MS = 15 * 60_000;

export class ListenRefused extends Error {}

export function listeningFor(siteId: number): Listening | null {
  const l = holder.listening.get(siteId);
  if (l && l.status !== "listening" && Date.now() - l.endsAt > KEEP_HEARD_MS) {
    holder.listening.delete(siteId);
    return null;
  }
  return l ?? null;
}

export function startListening(config: BridgeConfig, prefix: string, opts: { durationMs?: number } = {}): Listening {
  holder.listening.get(config.siteId)?.stop();
  for (const [siteId, other] of holder.listening)
    if (other.status !== "listening" && Date.now() - other.endsAt > KEEP_HEARD_MS) holder.listening.delete(siteId);
  const busy = [...holder.listening.values()].filter((o) => o.status === "listening").length;
  if (busy >= MAX_LISTENING)
    throw new ListenRefused(`${MAX_LISTENING} sites are listening right now: try again in a minute.`);
  const { tls, host, port, ca } = endpoint(config);
  const now = Date.now();
  const l: Listening = {
    prefix,
    startedAt: now,
    endsAt: now + Math.min(opts.durationMs ?? LISTEN_MS, LISTEN_MS),
    status: "listening",
    note: null,
    topics: new Map(),
    hints: new Map(),
    bytes: 0,
    stop: () => {},
  };
  holder.listening.set(config.siteId, l);
  const build = () => {
    const socket = tls
      ? tlsConnect({ host, port, ca, servername: isIP(host) ? undefined : host })
      : netConnect({ host, port });
    const guard = new PacketSizeGuard(MAX_BRIDGE_PACKET_BYTES);
    socket.on("data", (chunk: Buffer) => {
      if (guard.feed(chunk)) return;
      finish("done", `stopped: the broker sent a message of ${guard.tooBig} bytes`);
      socket.destroy();
    });
    return socket;
  };
  const options: IClientOptions = {
    clientId: `${config.clientId}-listen-${randomBytes(3).toString("hex")}`,
    username: config.username ?? undefined,
    password: config.password ?? undefined,
    protocolVersion: config.protocolVersion,
    clean: true,
    reconnectPeriod: 0,
    connectTimeout: 10_000,
  };
  const client = new MqttClient(build as never, options);
  const timer = setTimeout(() => finish("done", null), l.endsAt - now);
  function finish(status: "done" | "failed", note: string | null) {
    if (l.status !== "listening") return;
    clearTimeout(timer);
    l.status = status;
    l.note = note;
    l.endsAt = Math.min(l.endsAt, Date.now());
    client.end(true);
  }
  l.stop = () => finish("done", "stopped");
  client.on("connect", () => {
    const filters = [prefix ? `${prefix}/#` : "#"];
    if (prefix !== HA_DISCOVERY_PREFIX && !prefix.startsWith(`${HA_DISCOVERY_PREFIX}/`))
      filters.push(`${HA_DISCOVERY_PREFIX}/#`);
    client.subscribe(
      filters,
      { qos: 0 },
      (err) => err && finish("failed", `The broker refused the subscription: ${err.message}`),
    );
  });
  client.on("error", (err) => finish("failed", err.message));
  client.on("close", () =>
    finish(l.topics.size ? "done" : "failed", l.topics.size ? null : "The connection closed before anything was heard"),
  );
  client.on("message", (topic, payload, packet) => {
    if (l.status !== "listening") return;
    if (isDiscoveryConfigTopic(topic) && topic.startsWith(`${HA_DISCOVERY_PREFIX}/`)) {
      const hint = payload.length <= MAX_BRIDGED_PAYLOAD_BYTES ? parseDiscoveryConfig(payload) : null;
      if (hint && l.hints.size < MAX_TOPICS) l.hints.set(hint.stateTopic, hint);
      return;
    }
    let heard = l.topics.get(topic);
    if (!heard) {
      if (l.topics.size >= MAX_TOPICS)
        return finish("done", `stopped at ${MAX_TOPICS} topics: listen under a narrower prefix`);
      l.topics.set(topic, (heard = { count: 0, lastAt: 0, payload: null, tooBig: 0, retained: false }));
    }
    heard.count++;
    heard.lastAt = Date.now();
    heard.retained = packet.retain;
    if (payload.length > MAX_BRIDGED_PAYLOAD_BYTES) {
      heard.tooBig++;
      return;
    }
    l.bytes += payload.length - (heard.payload?.length ?? 0);
    heard.payload = Buffer.from(payload);
    if (l.bytes > MAX_TOTAL_BYTES) finish("done", "stopped: heard more than 2 MB; listen under a narrower prefix");
  });
  return l;
}

/** What was heard, with a suggested mapping and the readings it would store, per topic and device. */
export function foundTopics(l: Listening, timeZone: string): Found[] {
  const out: Found[] = [];
  const ctx = { now: new Date(), timeZone };
  for (const [topic, h] of [...l.topics].sort(([a], [b]) => a.localeCompare(b))) {
    const base = { topic, count: h.count, lastAt: h.lastAt };
    if (!h.payload) {
      out.push({
        ...base,
        device: null,
        mapping: null,
        preview: [],
        note: h.tooBig ? `messages over ${MAX_BRIDGED_PAYLOAD_BYTES} bytes` : "no message yet",
      });
      continue;
    }
    const found = recognise(topic, h.payload, ctx, l.hints.get(topic));
    if (found.length === 0) {
      out.push({
        ...base,
        device: null,
        mapping: null,
        preview: [],
        note: "not a shape Nichewise knows: attach it with your own mapping below",
      });
      continue;
    }
    for (const f of found)
      out.push({
        ...base,
        device: f.mapping.device ?? null,
        mapping: f.mapping,
        preview: f.items.map((i) => i.values),
        note: null,
      });
  }
  return out;
}
