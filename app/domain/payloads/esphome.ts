import { EMPTY, fToC, num, text } from "./read";
import type { DecodeResult, Mapping, Values } from "./types";

// ESPHome: each entity publishes its state alone, as text, on `<topic_prefix>/sensor/<name>/state`
// ("21.5"; "nan" while the sensor has no value). What the number is and its unit come from the
// entity's discovery config or the grower's choice.
export function plainNumber(bytes: Uint8Array, mapping: Mapping): DecodeResult {
  const t = text(bytes);
  if (!t.ok) return t;
  if (!mapping.channel)
    return { ok: false, reason: "choose what this topic measures (temperature, humidity, light or battery)" };
  if (/^-?nan$/i.test(t.text)) return { ok: false, reason: `${mapping.channel}: the sensor sent no value (NaN)` };
  const n = num(t.text);
  if (n === null) return { ok: false, reason: `${mapping.channel}: plain payload is not a number` };
  const values: Values = { ...EMPTY };
  values[mapping.channel] = mapping.channel === "temperature" && mapping.unit === "F" ? fToC(n) : n;
  return { ok: true, items: [{ device: null, values }] };
}
