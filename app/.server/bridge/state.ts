// A bridge's limits, the state its page shows, and the small pure helpers around a connection.
import type { Values } from "~/domain/payloads/presets";
import type { BridgeConfig } from "./store";

/**
 * Largest packet read from a bridged broker. Over MAX_BRIDGED_PAYLOAD_BYTES a message is still read,
 * acknowledged and recorded with its reason (refusing it would have the broker send it again
 * forever); over this the connection is closed. MQTT 5 tells the broker the smaller
 * MAX_BRIDGE_V5_PACKET_BYTES, and the broker drops what is bigger (MQTT 5 §3.1.2.11.4).
 */
export const MAX_BRIDGE_PACKET_BYTES = 1024 * 1024;
export const MAX_BRIDGE_V5_PACKET_BYTES = 64 * 1024;
/**
 * Per topic: a burst of this many messages, then this many a second. A topic over it is not
 * dropped (a backlog the broker kept for us is real readings) but held back: the bridge waits
 * before reading on, so the broker holds the rest (its queue, its limits).
 */
export const TOPIC_BURST = 100;
export const TOPIC_PER_SECOND = 50;
/** MQTT 5: how long the broker keeps the session (and unacknowledged messages) while we are away. */
export const SESSION_EXPIRY_S = 7 * 24 * 3600;

export type BridgeStatus = "connecting" | "connected" | "offline" | "stopped";
export type BridgeCounts = {
  /** Messages received on attached topics. */
  received: number;
  /** Readings committed (new or already stored). */
  stored: number;
  /** Of those, new readings that fall in no placement of their sensor: no spot shows them until it is placed. */
  outsideSpot: number;
  /** Messages refused with a reason (bad payload, unit mix-up, out of range…). */
  rejected: number;
  /** Messages on topics nothing is attached to (left over from an earlier subscription). */
  unattached: number;
  /** Devices in a shared topic that are not attached (a BLE gateway hears the neighbours' too). */
  otherDevices: number;
  /** Messages held back because their topic sent more than TOPIC_PER_SECOND. */
  heldBack: number;
  /** Retained messages without a time of their own: their value is old, their time unknown. */
  staleRetained: number;
  /** Commits that failed: the message was not acknowledged and comes again. */
  writeFailures: number;
  reconnects: number;
};
export type BridgeState = {
  status: BridgeStatus;
  connectedSince: number | null;
  lastMessageAt: number | null;
  lastError: { at: number; message: string } | null;
  counts: BridgeCounts;
};

export const zeroCounts = (): BridgeCounts => ({
  received: 0,
  stored: 0,
  outsideSpot: 0,
  rejected: 0,
  unattached: 0,
  otherDevices: 0,
  heldBack: 0,
  staleRetained: 0,
  writeFailures: 0,
  reconnects: 0,
});

/** The socket options for a bridge's broker address. */
export function endpoint(config: Pick<BridgeConfig, "url" | "caCert">) {
  const u = new URL(config.url);
  const tls = u.protocol === "mqtts:";
  return {
    tls,
    host: u.hostname.replace(/^\[|\]$/g, ""),
    port: Number(u.port) || (tls ? 8883 : 1883),
    ca: config.caCert ?? undefined,
  };
}

/** A preset's values as the payload the ingest validation reads (°C, time as epoch ms). */
export function toPayload(v: Values) {
  return {
    temperature: v.temperature,
    humidity: v.humidity,
    lux: v.lux,
    battery: v.battery,
    ...(v.at ? { time: v.at.getTime() } : {}),
  };
}
