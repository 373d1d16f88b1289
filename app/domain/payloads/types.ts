// The bridge's formats and what a message is read into: the shared vocabulary of the preset modules.

export const PRESETS = ["zigbee2mqtt", "tasmota", "esphome", "shelly", "ble-gateway", "custom"] as const;
export type PresetId = (typeof PRESETS)[number];
export const BRIDGE_CHANNELS = ["temperature", "humidity", "lux", "battery"] as const;
export type BridgeChannel = (typeof BRIDGE_CHANNELS)[number];

/** The formats' own names; the rest of the page speaks Nichewise. */
export const PRESET_LABELS: Record<PresetId, string> = {
  zigbee2mqtt: "Zigbee2MQTT device JSON",
  tasmota: "Tasmota SENSOR JSON",
  esphome: "ESPHome state topic (a plain number)",
  shelly: "Shelly Gen2+ NotifyStatus",
  "ble-gateway": "OpenMQTTGateway / Theengs BLE JSON",
  custom: "Your own mapping",
};

/** How a topic's messages become readings. `device` picks one device out of a shared topic. */
export type Mapping = {
  preset: PresetId;
  device?: string | null;
  /** esphome (and plain numbers under custom): what the number is. */
  channel?: BridgeChannel;
  /** Temperature unit where the payload does not say it (esphome, custom). */
  unit?: "C" | "F";
  /** custom: dotted JSON paths ("a.b.0.c") of each value and of the time. */
  paths?: Partial<Record<BridgeChannel | "time", string>>;
};

export type Values = {
  temperature: number | null;
  humidity: number | null;
  lux: number | null;
  battery: number | null;
  at: Date | null;
};
export type Item = { device: string | null; values: Values };
export type DecodeResult = { ok: true; items: Item[] } | { ok: false; reason: string };
/** `timeZone`: the site's, for payload times written without a zone (Tasmota's `Time`). */
export type DecodeContext = { now: Date; timeZone: string };

export const MAX_BRIDGED_PAYLOAD_BYTES = 4096;
