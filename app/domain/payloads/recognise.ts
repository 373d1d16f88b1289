import { decodePayload } from "./decode";
import { normaliseMac } from "./ble-gateway";
import type { DiscoveryHint } from "./home-assistant";
import { isObject, json } from "./read";
import type { BridgeChannel, DecodeContext, Item, Mapping } from "./types";

// Recognising a payload during discovery: which preset reads it, and the mapping to suggest.

export type Recognised = { mapping: Mapping; items: Item[] };

/** What a topic's last message looks like, with a mapping that reads it; null when nothing does. */
export function recognise(
  topic: string,
  bytes: Uint8Array,
  ctx: DecodeContext,
  hint?: DiscoveryHint | null,
): Recognised[] {
  const try_ = (mapping: Mapping): Recognised[] | null => {
    const r = decodePayload(bytes, mapping, ctx);
    if (!r.ok || r.items.length === 0) return null;
    // A shared topic: one suggestion per device in it.
    if (r.items.some((i) => i.device !== null) && mapping.preset !== "zigbee2mqtt")
      return r.items.map((i) => ({ mapping: { ...mapping, device: i.device }, items: [i] }));
    return [{ mapping, items: r.items }];
  };
  const j = json(bytes);
  const o = j.ok && isObject(j.value) ? j.value : null;
  if (hint) {
    if (!o && hint.channel) {
      const r = try_({ preset: "esphome", channel: hint.channel, unit: hint.unit ?? undefined });
      if (r) return r;
    }
    if (o && hint.channel && hint.path) {
      const r = try_({ preset: "custom", paths: { [hint.channel]: hint.path }, unit: hint.unit ?? undefined });
      if (r) return r;
    }
  }
  if (o) {
    if (o.method === "NotifyStatus" || o.method === "NotifyFullStatus") return try_({ preset: "shelly" }) ?? [];
    if (normaliseMac(o.id) && ["tempc", "tempf", "hum"].some((k) => k in o))
      return try_({ preset: "ble-gateway" }) ?? [];
    if (/(^|\/)SENSOR$/.test(topic) || "TempUnit" in o) {
      const r = try_({ preset: "tasmota" });
      if (r) return r;
    }
    if (["temperature", "humidity"].some((k) => k in o)) return try_({ preset: "zigbee2mqtt" }) ?? [];
    return [];
  }
  // A plain number on an ESPHome-style state topic; what it measures is guessed from its name.
  const m = /\/sensor\/([^/]+)\/state$/.exec(topic);
  if (m) {
    const name = m[1].toLowerCase();
    const channel: BridgeChannel | undefined = /temp/.test(name)
      ? "temperature"
      : /hum/.test(name)
        ? "humidity"
        : /lux|illum|light/.test(name)
          ? "lux"
          : /batt/.test(name)
            ? "battery"
            : undefined;
    if (channel) return try_({ preset: "esphome", channel, unit: "C" }) ?? [];
  }
  return [];
}
