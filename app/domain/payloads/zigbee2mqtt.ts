import { hasValue, isObject, json, notNumber, num, payloadTime } from "./read";
import type { DecodeContext, DecodeResult, Values } from "./types";

// Zigbee2MQTT: `zigbee2mqtt/<friendly name>` carries the device's state as one JSON object;
// temperature is °C, humidity %, battery %, illuminance in lx (`illuminance_lux` before 2.0);
// `linkquality` is radio, not climate. `last_seen`, when the bridge is set to add it, is the time.
export function zigbee2mqtt(bytes: Uint8Array, ctx: DecodeContext): DecodeResult {
  const j = json(bytes);
  if (!j.ok) return j;
  if (!isObject(j.value)) return { ok: false, reason: "payload is not a JSON object" };
  const o = j.value;
  const bad = notNumber(o, ["temperature", "humidity", "battery"]);
  if (bad) return { ok: false, reason: bad };
  const at = payloadTime(o.last_seen, ctx);
  if (at === "bad") return { ok: false, reason: "last_seen: not a time" };
  const values: Values = {
    temperature: num(o.temperature),
    humidity: num(o.humidity),
    lux: num(o.illuminance_lux) ?? num(o.illuminance),
    battery: num(o.battery),
    at,
  };
  if (!hasValue(values))
    return { ok: false, reason: "no temperature, humidity, illuminance or battery in this message" };
  return { ok: true, items: [{ device: null, values }] };
}
