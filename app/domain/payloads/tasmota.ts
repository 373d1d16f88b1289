import { fToC, hasValue, isObject, json, notNumber, num, payloadTime, temperatureUnit } from "./read";
import type { DecodeContext, DecodeResult, Item, Values } from "./types";

// Tasmota: `tele/<topic>/SENSOR` holds `Time` (the device's local time), one object per attached
// sensor named after its driver (`AM2301`, `SI7021`, `DS18B20-1`, `BH1750`…) with `Temperature`,
// `Humidity`, `Illuminance`, and `TempUnit` ("C" or "F") for every temperature in the message.
export function tasmota(bytes: Uint8Array, ctx: DecodeContext): DecodeResult {
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
    const values: Values = {
      temperature: t === null ? null : unit === "F" ? fToC(t) : t,
      humidity: num(s.Humidity),
      lux: num(s.Illuminance),
      battery: null,
      at,
    };
    if (hasValue(values)) items.push({ device: name, values });
  }
  if (items.length === 0) return { ok: false, reason: "no sensor object with Temperature, Humidity or Illuminance" };
  return { ok: true, items };
}
