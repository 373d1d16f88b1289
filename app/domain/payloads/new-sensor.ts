// A sensor made in the same step as attaching a topic heard on the grower's broker: its name from
// the device's own name in the topic (Zigbee2MQTT's friendly name, ESPHome's entity, a BLE address),
// its channels from what the mapping reads. Both can be changed on the sensor's page afterwards.
import { BRIDGE_CHANNELS, type BridgeChannel, type Mapping } from "./types";

const MAX_NAME = 80;

/** "zigbee2mqtt/orchid_shelf" → "orchid shelf"; "esp/sensor/bench_temperature/state" → "bench temperature". */
export function sensorNameFor(topic: string, device?: string | null): string {
  if (device) return device.slice(0, MAX_NAME);
  const parts = topic.split("/").filter(Boolean);
  const esphome = /^(.+)\/sensor\/([^/]+)\/state$/.exec(topic);
  const tasmota = /^tele\/([^/]+)\/SENSOR$/.exec(topic);
  const shelly = /^([^/]+)\/events\/rpc$/.exec(topic);
  const raw = esphome?.[2] ?? tasmota?.[1] ?? shelly?.[1] ?? parts.at(-1) ?? topic;
  const name = raw.replace(/[_-]+/g, " ").trim();
  return (name || topic).slice(0, MAX_NAME);
}

/** The channels a new sensor gets: what a plain number is, the mapped paths, else temperature and humidity. */
export function sensorChannelsFor(mapping: Mapping): BridgeChannel[] {
  const paths = mapping.paths ?? {};
  const mapped = BRIDGE_CHANNELS.filter((c) => c !== "battery" && paths[c]);
  if (mapped.length) return mapped;
  if (mapping.channel && mapping.channel !== "battery") return [mapping.channel];
  return ["temperature", "humidity"];
}
