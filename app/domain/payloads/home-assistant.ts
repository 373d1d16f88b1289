import { isObject, json, temperatureUnit } from "./read";
import type { BridgeChannel } from "./types";

// Home Assistant MQTT discovery: `<prefix>/<component>/[<node>/]<object>/config` describes an
// entity: `state_topic`, `device_class`, `unit_of_measurement` and a `value_template`. Only the
// simple `{{ value_json.a.b }}` template is read; others leave the grower to map by hand.

export type DiscoveryHint = {
  stateTopic: string;
  channel: BridgeChannel | null;
  unit: "C" | "F" | null;
  path: string | null;
};

const CLASS_CHANNEL: Record<string, BridgeChannel> = {
  temperature: "temperature",
  humidity: "humidity",
  illuminance: "lux",
  battery: "battery",
};

export function isDiscoveryConfigTopic(topic: string) {
  return /\/config$/.test(topic) && topic.split("/").length >= 4;
}

export function parseDiscoveryConfig(bytes: Uint8Array): DiscoveryHint | null {
  const j = json(bytes);
  if (!j.ok || !isObject(j.value)) return null;
  const o = j.value;
  // The documented abbreviations, and `~` standing for a base topic.
  const pick = (long: string, short: string) => (o[long] ?? o[short]) as unknown;
  const base = typeof o["~"] === "string" ? (o["~"] as string) : "";
  let stateTopic = pick("state_topic", "stat_t");
  if (typeof stateTopic !== "string" || !stateTopic) return null;
  stateTopic = stateTopic.startsWith("~")
    ? base + stateTopic.slice(1)
    : stateTopic.endsWith("~")
      ? stateTopic.slice(0, -1) + base
      : stateTopic;
  const cls = pick("device_class", "dev_cla");
  const unitText = pick("unit_of_measurement", "unit_of_meas");
  const unit = temperatureUnit(unitText);
  let channel: BridgeChannel | null = typeof cls === "string" ? (CLASS_CHANNEL[cls] ?? null) : null;
  if (!channel && unit) channel = "temperature";
  if (!channel && unitText === "lx") channel = "lux";
  const tpl = pick("value_template", "val_tpl");
  const m =
    typeof tpl === "string"
      ? /^\{\{\s*value_json((?:\.[A-Za-z_][A-Za-z0-9_]*|\[\d+\]|\['[^']+'\]|\["[^"]+"\])+)\s*\}\}$/.exec(tpl.trim())
      : null;
  const path = m
    ? m[1]
        .replace(/\[(\d+)\]/g, ".$1")
        .replace(/\[['"]([^'"]+)['"]\]/g, ".$1")
        .replace(/^\./, "")
    : null;
  return { stateTopic: stateTopic as string, channel, unit: channel === "temperature" ? (unit ?? "C") : null, path };
}
