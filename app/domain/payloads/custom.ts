import { atPath, EMPTY, fToC, hasValue, json, num, payloadTime } from "./read";
import { plainNumber } from "./esphome";
import { BRIDGE_CHANNELS, type DecodeContext, type DecodeResult, type Mapping, type Values } from "./types";

// Your own mapping: the dotted JSON path of each value, the temperature unit and a time field; a
// mapping with no path reads a plain number like ESPHome's.
export function custom(bytes: Uint8Array, mapping: Mapping, ctx: DecodeContext): DecodeResult {
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
  if (!hasValue(values))
    return {
      ok: false,
      reason: `none of the mapped fields (${BRIDGE_CHANNELS.map((c) => paths[c])
        .filter(Boolean)
        .join(", ")}) is in this message`,
    };
  return { ok: true, items: [{ device: null, values }] };
}
