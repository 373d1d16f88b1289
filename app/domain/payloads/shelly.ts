import { EMPTY, fToC, hasValue, isObject, json, num } from "./read";
import type { DecodeResult, Values } from "./types";

// Shelly Gen2+: `<device id>/events/rpc` carries JSON-RPC notifications. `NotifyStatus` (and
// `NotifyFullStatus`) has `params.ts` (Unix time, UTC) and one key per changed component:
// `temperature:<id>` with `tC`/`tF`, `humidity:<id>` with `rh`, `illuminance:<id>` with `lux`,
// `devicepower:<id>` with `battery.percent`. Items are per component instance id ("0", "1").
export function shelly(bytes: Uint8Array): DecodeResult {
  const j = json(bytes);
  if (!j.ok) return j;
  if (!isObject(j.value)) return { ok: false, reason: "payload is not a JSON object" };
  const o = j.value;
  if (o.method !== "NotifyStatus" && o.method !== "NotifyFullStatus")
    return {
      ok: false,
      reason: `not a status notification (method ${JSON.stringify(o.method ?? null)?.slice(0, 30)})`,
    };
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
    else if (kind === "devicepower" && isObject(c.battery) && num(c.battery.percent) !== null)
      values(id).battery = num(c.battery.percent);
  }
  const items = [...byId].filter(([, v]) => hasValue(v)).map(([device, v]) => ({ device, values: v }));
  if (items.length === 0)
    return { ok: false, reason: "no temperature, humidity, illuminance or battery component in this notification" };
  return { ok: true, items };
}
