// What the open firmwares and gateways publish, read into Nichewise's channels. Pure: no I/O, so
// the bridge, the discovery preview and the tests share it. Each reader is written from the
// project's public documentation (named beside the tests in presets.test.ts).
//
// A message gives zero or more items: one per device it speaks for (a BLE gateway's MAC, a
// Tasmota sensor object, a Shelly component instance), with temperature in °C, humidity in %,
// lux, battery in % and the instant the payload says it was measured (null: use receive time).
//
// One module per format (zigbee2mqtt.ts, tasmota.ts, esphome.ts, shelly.ts, ble-gateway.ts,
// custom.ts) over the shared readers of read.ts; Home Assistant discovery and the recognising of an
// unknown topic beside them. This module is their one door.
export * from "./types";
export { atPath, num, payloadTime, temperatureUnit } from "./read";
export { normaliseMac } from "./ble-gateway";
export { decodePayload } from "./decode";
export { isDiscoveryConfigTopic, parseDiscoveryConfig, type DiscoveryHint } from "./home-assistant";
export { recognise, type Recognised } from "./recognise";
export { sensorChannelsFor, sensorNameFor } from "./new-sensor";
