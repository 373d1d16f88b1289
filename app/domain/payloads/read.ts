// Reading a message's bytes and fields the same way in every preset: numbers, units, times, paths.
import { parseInstant } from "~/domain/ingest/payload";
import { resolveWall, naiveMs } from "~/lib/time";
import { MAX_BRIDGED_PAYLOAD_BYTES, type DecodeContext, type Values } from "./types";

export const fToC = (f: number) => ((f - 32) * 5) / 9;
export const EMPTY: Values = { temperature: null, humidity: null, lux: null, battery: null, at: null };

/** A finite number, or a numeric string ("21.5"); anything else is null. */
export function num(v: unknown): number | null {
  if (typeof v === "number") return Number.isFinite(v) ? v : null;
  if (typeof v === "string" && /^\s*-?\d+(\.\d+)?([eE][-+]?\d+)?\s*$/.test(v)) return Number(v);
  return null;
}

export const isObject = (v: unknown): v is Record<string, unknown> =>
  typeof v === "object" && v !== null && !Array.isArray(v);

/** A temperature unit as firmwares write it, or null when it is none we know. */
export function temperatureUnit(u: unknown): "C" | "F" | null {
  if (typeof u !== "string") return null;
  const s = u.trim().replace(/^°/, "").replace("℃", "C").replace("℉", "F").toUpperCase();
  return s === "C" ? "C" : s === "F" ? "F" : null;
}

export const NAIVE_TIME = /^(\d{4})-(\d{2})-(\d{2})[T ](\d{2}):(\d{2})(?::(\d{2})(?:\.\d{1,9})?)?$/;

/**
 * A payload's time: epoch seconds or milliseconds, an ISO 8601 instant with a zone, or a wall-clock
 * time without one (Tasmota's `Time` is the device's local time), read in the site's zone. In the
 * hour the clocks go back such a time happens twice: the reading nearer to the receive time is
 * taken, since a live message was just measured.
 */
export function payloadTime(v: unknown, ctx: DecodeContext): Date | null | "bad" {
  if (v === undefined || v === null || v === "") return null;
  if (typeof v === "number") return Number.isFinite(v) && v > 0 ? (parseInstant(v) ?? "bad") : "bad";
  if (typeof v !== "string" || v.length > 40) return "bad";
  const zoned = parseInstant(v.trim());
  if (zoned) return zoned;
  const m = NAIVE_TIME.exec(v.trim());
  if (!m) return "bad";
  const wall = { year: +m[1], month: +m[2], day: +m[3], hour: +m[4], minute: +m[5], second: m[6] ? +m[6] : 0 };
  const naive = naiveMs(wall);
  if (
    Number.isNaN(naive) ||
    new Date(naive).getUTCDate() !== wall.day ||
    wall.hour > 23 ||
    wall.minute > 59 ||
    wall.second > 59
  )
    return "bad";
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

export function text(bytes: Uint8Array): { ok: true; text: string } | { ok: false; reason: string } {
  if (bytes.length === 0) return { ok: false, reason: "empty payload" };
  if (bytes.length > MAX_BRIDGED_PAYLOAD_BYTES)
    return { ok: false, reason: `payload over ${MAX_BRIDGED_PAYLOAD_BYTES} bytes` };
  try {
    return {
      ok: true,
      text: utf8
        .decode(bytes)
        .replace(/^\uFEFF/, "")
        .trim(),
    };
  } catch {
    return { ok: false, reason: "payload is not UTF-8 text" };
  }
}

export function json(bytes: Uint8Array): { ok: true; value: unknown } | { ok: false; reason: string } {
  const t = text(bytes);
  if (!t.ok) return t;
  try {
    return { ok: true, value: JSON.parse(t.text) };
  } catch {
    return { ok: false, reason: "payload is not JSON" };
  }
}

export const hasValue = (v: Values) =>
  v.temperature !== null || v.humidity !== null || v.lux !== null || v.battery !== null;

/** One of the values is there but is not a number: say which, rather than storing nothing quietly. */
export function notNumber(obj: Record<string, unknown>, keys: string[]): string | null {
  for (const k of keys)
    if (obj[k] !== undefined && obj[k] !== null && num(obj[k]) === null) return `${k}: not a number`;
  return null;
}
