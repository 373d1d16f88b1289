// What the open firmwares and gateways publish, read into Nichewise's channels. Pure: no I/O, so
// the bridge, the discovery preview and the tests share it. Each reader is written from the
// project's public documentation (named beside the tests in presets.test.ts).
//
// A message gives zero or more items: one per device it speaks for (a BLE gateway's MAC, a
// Tasmota sensor object, a Shelly component instance), with temperature in °C, humidity in %,
// lux, battery in % and the instant the payload says it was measured (null: use receive time).
import { parseInstant } from "~/domain/ingest/payload";
import { resolveWall, naiveMs } from "~/lib/time";

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

export type Values = { temperature: number | null; humidity: number | null; lux: number | null; battery: number | null; at: Date | null };
export type Item = { device: string | null; values: Values };
export type DecodeResult = { ok: true; items: Item[] } | { ok: false; reason: string };
/** `timeZone`: the site's, for payload times written without a zone (Tasmota's `Time`). */
export type DecodeContext = { now: Date; timeZone: string };

export const MAX_BRIDGED_PAYLOAD_BYTES = 4096;

const fToC = (f: number) => ((f - 32) * 5) / 9;
const EMPTY: Values = { temperature: null, humidity: null, lux: null, battery: null, at: null };

/** A finite number, or a numeric string ("21.5"); anything else is null. */
export function num(v: unknown): number | null {
  if (typeof v === "number") return Number.isFinite(v) ? v : null;
  if (typeof v === "string" && /^\s*-?\d+(\.\d+)?([eE][-+]?\d+)?\s*$/.test(v)) return Number(v);
  return null;
}

const isObject = (v: unknown): v is Record<string, unknown> => typeof v === "object" && v !== null && !Array.isArray(v);

/** A temperature unit as firmwares write it, or null when it is none we know. */
export function temperatureUnit(u: unknown): "C" | "F" | null {
  if (typeof u !== "string") return null;
  const s = u.trim().replace(/^°/, "").replace("℃", "C").replace("℉", "F").toUpperCase();
  return s === "C" ? "C" : s === "F" ? "F" : null;
}

const NAIVE_TIME = /^(\d{4})-(\d{2})-(\d{2})[T ](\d{2}):(\d{2})(?::(\d{2})(?:\.\d{1,9})?)?$/;

/**
 * A payload's time: epoch seconds or milliseconds, an ISO 8601 instant with a zone, or a wall-clock
 * time without one (Tasmota's `Time` is the device's local time), read in the site's zone. In the
 * hour the clocks go back such a time happens twice: the reading nearer to the receive time is
 * taken, since a live message was just measured.
 */
export function payloadTime(v: unknown, ctx: DecodeContext): Date | null | "bad" {
  if (v === undefined || v === null || v === "") return null;
  if (typeof v === "number") return Number.isFinite(v) && v > 0 ? parseInstant(v) ?? "bad" : "bad";
  if (typeof v !== "string" || v.length > 40) return "bad";
  const zoned = parseInstant(v.trim());
  if (zoned) return zoned;
  const m = NAIVE_TIME.exec(v.trim());
  if (!m) return "bad";
  const wall = { year: +m[1], month: +m[2], day: +m[3], hour: +m[4], minute: +m[5], second: m[6] ? +m[6] : 0 };
  const naive = naiveMs(wall);
  if (Number.isNaN(naive) || new Date(naive).getUTCDate() !== wall.day || wall.hour > 23 || wall.minute > 59 || wall.second > 59) return "bad";
  const r = resolveWall(naive, ctx.timeZone);
  if (r.kind !== "repeated") return new Date(r.ms);
  const now = ctx.now.getTime();
  return new Date(Math.abs(r.earlier - now) <= Math.abs(r.later - now) ? r.earlier : r.later);
}

/** The value at a dotted path ("a.b.0.c"); at most 16 steps. */
export function atPath(root: unknown, path: string): unknown {
  const steps = path.split(".").filter(Boolean);
  if (steps.length === 0 || steps.length > 16) return undefined;
  let v: unknown = root;
  for (const s of steps) {
    if (Array.isArray(v) && /^\d+$/.test(s)) v = v[Number(s)];
    else if (isObject(v) && Object.hasOwn(v, s)) v = v[s];
    else return undefined;
  }
  return v;
}

const utf8 = new TextDecoder("utf-8", { fatal: true });

function text(bytes: Uint8Array): { ok: true; text: string } | { ok: false; reason: string } {
  if (bytes.length === 0) return { ok: false, reason: "empty payload" };
  if (bytes.length > MAX_BRIDGED_PAYLOAD_BYTES) return { ok: false, reason: `payload over ${MAX_BRIDGED_PAYLOAD_BYTES} bytes` };
  try {
    return { ok: true, text: utf8.decode(bytes).replace(/^\uFEFF/, "").trim() };
  } catch {
    return { ok: false, reason: "payload is not UTF-8 text" };
  }
}

function json(bytes: Uint8Array): { ok: true; value: unknown } | { ok: false; reason: string } {
  const t = text(bytes);
  if (!t.ok) return t;
  try {
    return { ok: true, value: JSON.parse(t.text) };
  } catch {
    return { ok: false, reason: "payload is not JSON" };
  }
}

const hasValue = (v: Values) => v.temperature !== null || v.humidity !== null || v.lux !== null || v.battery !== null;

/** One of the values is there but is not a number: say which, rather than storing nothing quietly. */
function notNumber(obj: Record<string, unknown>, keys: string[]): string | null {
  for (const k of keys) if (obj[k] !== undefined && obj[k] !== null && num(obj[k]) === null) return `${k}: not a number`;
  return null;
}

// Zigbee2MQTT: `zigbee2mqtt/<friendly name>` carries the device's state as one JSON object;
// temperature is °C, humidity %, battery %, illuminance in lx (`illuminance_lux` before 2.0);
// `linkquality` is radio, not climate. `last_seen`, when the bridge is set to add it, is the time.
function zigbee2mqtt(bytes: Uint8Array, ctx: DecodeContext): DecodeResult {
  const j = json(bytes);
  if (!j.ok) return j;
  if (!isObject(j.value)) return { ok: false, reason: "payload is not a JSON object" };
  const o = j.value;
  const bad = notNumber(o, ["temperature", "humidity", "battery"]);
  if (bad) return { ok: false, reason: bad };
  const at = payloadTime(o.last_seen, ctx);
  if (at === "bad") return { ok: false, reason: "last_seen: not a time" };
  const values: Values = { temperature: num(o.temperature), humidity: num(o.humidity), lux: num(o.illuminance_lux) ?? num(o.illuminance), battery: num(o.battery), at };
  if (!hasValue(values)) return { ok: false, reason: "no temperature, humidity, illuminance or battery in this message" };
  return { ok: true, items: [{ device: null, values }] };
}

// Tasmota: `tele/<topic>/SENSOR` holds `Time` (the device's local time), one object per attached
// sensor named after its driver (`AM2301`, `SI7021`, `DS18B20-1`, `BH1750`…) with `Temperature`,
// `Humidity`, `Illuminance`, and `TempUnit` ("C" or "F") for every temperature in the message.
function tasmota(bytes: Uint8Array, ctx: DecodeContext): DecodeResult {
  const j = json(bytes);
  if (!j.ok) return j;
  if (!isObject(j.value)) return { ok: false, reason: "payload is not a JSON object" };
  const o = j.value;
  const unit = o.TempUnit === undefined ? "C" : temperatureUnit(o.TempUnit);
  if (!unit) return { ok: false, reason: `TempUnit: "${String(o.TempUnit).slice(0, 10)}" is not C or F` };
  const at = payloadTime(o.Time, ctx);
  if (at === "bad") return { ok: false, reason: "Time: not a time" };
  const items: Item[] = [];
  for (const [name, s] of Object.entries(o)) {
    if (!isObject(s)) continue;
    const bad = notNumber(s, ["Temperature", "Humidity", "Illuminance"]);
    if (bad) return { ok: false, reason: `${name}.${bad}` };
    const t = num(s.Temperature);
    const values: Values = { temperature: t === null ? null : unit === "F" ? fToC(t) : t, humidity: num(s.Humidity), lux: num(s.Illuminance), battery: null, at };
    if (hasValue(values)) items.push({ device: name, values });
  }
  if (items.length === 0) return { ok: false, reason: "no sensor object with Temperature, Humidity or Illuminance" };
  return { ok: true, items };
}

// ESPHome: each entity publishes its state alone, as text, on `<topic_prefix>/sensor/<name>/state`
// ("21.5"; "nan" while the sensor has no value). What the number is and its unit come from the
// entity's discovery config or the grower's choice.
function plainNumber(bytes: Uint8Array, mapping: Mapping): DecodeResult {
  const t = text(bytes);
  if (!t.ok) return t;
  if (!mapping.channel) return { ok: false, reason: "choose what this topic measures (temperature, humidity, light or battery)" };
  if (/^-?nan$/i.test(t.text)) return { ok: false, reason: `${mapping.channel}: the sensor sent no value (NaN)` };
  const n = num(t.text);
  if (n === null) return { ok: false, reason: `${mapping.channel}: plain payload is not a number` };
  const values: Values = { ...EMPTY };
  values[mapping.channel] = mapping.channel === "temperature" && mapping.unit === "F" ? fToC(n) : n;
  return { ok: true, items: [{ device: null, values }] };
}

// Shelly Gen2+: `<device id>/events/rpc` carries JSON-RPC notifications. `NotifyStatus` (and
// `NotifyFullStatus`) has `params.ts` (Unix time, UTC) and one key per changed component:
// `temperature:<id>` with `tC`/`tF`, `humidity:<id>` with `rh`, `illuminance:<id>` with `lux`,
// `devicepower:<id>` with `battery.percent`. Items are per component instance id ("0", "1").
function shelly(bytes: Uint8Array): DecodeResult {
  const j = json(bytes);
  if (!j.ok) return j;
  if (!isObject(j.value)) return { ok: false, reason: "payload is not a JSON object" };
  const o = j.value;
  if (o.method !== "NotifyStatus" && o.method !== "NotifyFullStatus") return { ok: false, reason: `not a status notification (method ${JSON.stringify(o.method ?? null)?.slice(0, 30)})` };
  const p = o.params;
  if (!isObject(p)) return { ok: false, reason: "params: missing" };
  const ts = num(p.ts);
  const at = ts !== null && ts > 0 ? new Date(Math.round(ts * 1000)) : null;
  const byId = new Map<string, Values>();
  const values = (id: string) => {
    let v = byId.get(id);
    if (!v) byId.set(id, (v = { ...EMPTY, at }));
    return v;
  };
  for (const [key, c] of Object.entries(p)) {
    const m = /^(temperature|humidity|illuminance|devicepower):(\d{1,3})$/.exec(key);
    if (!m || !isObject(c)) continue;
    const [, kind, id] = m;
    if (kind === "temperature") {
      const tC = num(c.tC);
      const tF = num(c.tF);
      if (tC !== null) values(id).temperature = tC;
      else if (tF !== null) values(id).temperature = fToC(tF);
    } else if (kind === "humidity" && num(c.rh) !== null) values(id).humidity = num(c.rh);
    else if (kind === "illuminance" && num(c.lux) !== null) values(id).lux = num(c.lux);
    else if (kind === "devicepower" && isObject(c.battery) && num(c.battery.percent) !== null) values(id).battery = num(c.battery.percent);
  }
  const items = [...byId].filter(([, v]) => hasValue(v)).map(([device, v]) => ({ device, values: v }));
  if (items.length === 0) return { ok: false, reason: "no temperature, humidity, illuminance or battery component in this notification" };
  return { ok: true, items };
}

/** A BLE address as 12 upper-case hex digits with colons, or null. */
export function normaliseMac(v: unknown): string | null {
  if (typeof v !== "string") return null;
  const hex = v.replace(/[:\-]/g, "").toUpperCase();
  return /^[0-9A-F]{12}$/.test(hex) ? hex.match(/../g)!.join(":") : null;
}

// OpenMQTTGateway / Theengs: each BLE advertisement becomes a JSON object with the device's MAC in
// `id`, decoded values `tempc`, `tempf`, `hum`, `batt`, `lux`, on `…/BTtoMQTT/<MAC without colons>`
// (or one shared topic for every device the gateway hears).
function bleGateway(bytes: Uint8Array): DecodeResult {
  const j = json(bytes);
  if (!j.ok) return j;
  if (!isObject(j.value)) return { ok: false, reason: "payload is not a JSON object" };
  const o = j.value;
  const device = normaliseMac(o.id);
  if (!device) return { ok: false, reason: "id: not a device address" };
  const bad = notNumber(o, ["tempc", "tempf", "hum", "batt", "lux"]);
  if (bad) return { ok: false, reason: bad };
  const tempc = num(o.tempc);
  const tempf = num(o.tempf);
  const values: Values = { temperature: tempc ?? (tempf === null ? null : fToC(tempf)), humidity: num(o.hum), lux: num(o.lux), battery: num(o.batt), at: null };
  // Most advertisements a gateway hears are phones, tags and TVs: nothing to store, not an error.
  return { ok: true, items: hasValue(values) ? [{ device, values }] : [] };
}

function custom(bytes: Uint8Array, mapping: Mapping, ctx: DecodeContext): DecodeResult {
  const paths = mapping.paths ?? {};
  if (!BRIDGE_CHANNELS.some((c) => paths[c])) return plainNumber(bytes, mapping);
  const j = json(bytes);
  if (!j.ok) return j;
  const values: Values = { ...EMPTY };
  for (const c of BRIDGE_CHANNELS) {
    const path = paths[c];
    if (!path) continue;
    const raw = atPath(j.value, path);
    if (raw === undefined || raw === null) continue;
    const n = num(raw);
    if (n === null) return { ok: false, reason: `${path}: not a number` };
    values[c] = c === "temperature" && mapping.unit === "F" ? fToC(n) : n;
  }
  if (paths.time) {
    const at = payloadTime(atPath(j.value, paths.time), ctx);
    if (at === "bad") return { ok: false, reason: `${paths.time}: not a time` };
    values.at = at;
  }
  if (!hasValue(values)) return { ok: false, reason: `none of the mapped fields (${BRIDGE_CHANNELS.map((c) => paths[c]).filter(Boolean).join(", ")}) is in this message` };
  return { ok: true, items: [{ device: null, values }] };
}

/** Reads one message with a topic's mapping. Items of other devices are left for the caller to drop. */
export function decodePayload(bytes: Uint8Array, mapping: Mapping, ctx: DecodeContext): DecodeResult {
  switch (mapping.preset) {
    case "zigbee2mqtt":
      return zigbee2mqtt(bytes, ctx);
    case "tasmota":
      return tasmota(bytes, ctx);
    case "esphome":
      return plainNumber(bytes, mapping);
    case "shelly":
      return shelly(bytes);
    case "ble-gateway":
      return bleGateway(bytes);
    case "custom":
      return custom(bytes, mapping, ctx);
  }
}

// ---------------------------------------------------------------------------------------------
// Home Assistant MQTT discovery: `<prefix>/<component>/[<node>/]<object>/config` describes an
// entity: `state_topic`, `device_class`, `unit_of_measurement` and a `value_template`. Only the
// simple `{{ value_json.a.b }}` template is read; others leave the grower to map by hand.

export type DiscoveryHint = { stateTopic: string; channel: BridgeChannel | null; unit: "C" | "F" | null; path: string | null };

const CLASS_CHANNEL: Record<string, BridgeChannel> = { temperature: "temperature", humidity: "humidity", illuminance: "lux", battery: "battery" };

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
  stateTopic = stateTopic.startsWith("~") ? base + stateTopic.slice(1) : stateTopic.endsWith("~") ? stateTopic.slice(0, -1) + base : stateTopic;
  const cls = pick("device_class", "dev_cla");
  const unitText = pick("unit_of_measurement", "unit_of_meas");
  const unit = temperatureUnit(unitText);
  let channel: BridgeChannel | null = typeof cls === "string" ? CLASS_CHANNEL[cls] ?? null : null;
  if (!channel && unit) channel = "temperature";
  if (!channel && unitText === "lx") channel = "lux";
  const tpl = pick("value_template", "val_tpl");
  const m = typeof tpl === "string" ? /^\{\{\s*value_json((?:\.[A-Za-z_][A-Za-z0-9_]*|\[\d+\]|\['[^']+'\]|\["[^"]+"\])+)\s*\}\}$/.exec(tpl.trim()) : null;
  const path = m
    ? m[1]
        .replace(/\[(\d+)\]/g, ".$1")
        .replace(/\[['"]([^'"]+)['"]\]/g, ".$1")
        .replace(/^\./, "")
    : null;
  return { stateTopic: stateTopic as string, channel, unit: channel === "temperature" ? unit ?? "C" : null, path };
}

// ---------------------------------------------------------------------------------------------
// Recognising a payload during discovery: which preset reads it, and the mapping to suggest.

export type Recognised = { mapping: Mapping; items: Item[] };

/** What a topic's last message looks like, with a mapping that reads it; null when nothing does. */
export function recognise(topic: string, bytes: Uint8Array, ctx: DecodeContext, hint?: DiscoveryHint | null): Recognised[] {
  const try_ = (mapping: Mapping): Recognised[] | null => {
    const r = decodePayload(bytes, mapping, ctx);
    if (!r.ok || r.items.length === 0) return null;
    // A shared topic: one suggestion per device in it.
    if (r.items.some((i) => i.device !== null) && mapping.preset !== "zigbee2mqtt") return r.items.map((i) => ({ mapping: { ...mapping, device: i.device }, items: [i] }));
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
    if (normaliseMac(o.id) && ["tempc", "tempf", "hum"].some((k) => k in o)) return try_({ preset: "ble-gateway" }) ?? [];
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
    const channel: BridgeChannel | undefined = /temp/.test(name) ? "temperature" : /hum/.test(name) ? "humidity" : /lux|illum|light/.test(name) ? "lux" : /batt/.test(name) ? "battery" : undefined;
    if (channel) return try_({ preset: "esphome", channel, unit: "C" }) ?? [];
  }
  return [];
}
