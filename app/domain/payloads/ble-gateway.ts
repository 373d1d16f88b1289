import { fToC, hasValue, isObject, json, notNumber, num } from "./read";
import type { DecodeResult, Values } from "./types";

/** A BLE address as 12 upper-case hex digits with colons, or null. */
export function normaliseMac(v: unknown): string | null {
  if (typeof v !== "string") return null;
  const hex = v.replace(/[:-]/g, "").toUpperCase();
  return /^[0-9A-F]{12}$/.test(hex) ? hex.match(/../g)!.join(":") : null;
}

// OpenMQTTGateway / Theengs: each BLE advertisement becomes a JSON object with the device's MAC in
// `id`, decoded values `tempc`, `tempf`, `hum`, `batt`, `lux`, on `…/BTtoMQTT/<MAC without colons>`
// (or one shared topic for every device the gateway hears).
export function bleGateway(bytes: Uint8Array): DecodeResult {
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
  const values: Values = {
    temperature: tempc ?? (tempf === null ? null : fToC(tempf)),
    humidity: num(o.hum),
    lux: num(o.lux),
    battery: num(o.batt),
    at: null,
  };
  // Most advertisements a gateway hears are phones, tags and TVs: nothing to store, not an error.
  return { ok: true, items: hasValue(values) ? [{ device, values }] : [] };
}
