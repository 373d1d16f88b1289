// The forms of the site's home-broker page: one zod schema each, shared by the action and the page.
import { z } from "zod";
import { BRIDGE_CHANNELS, PRESETS, type Mapping } from "./presets";

const MAX_TOPIC = 200;

/** A topic to subscribe to exactly: no wildcards, no empty or control characters (MQTT 3.1.1 §4.7). */
export const topicSchema = z
  .string()
  .trim()
  .min(1, "Give the topic")
  .max(MAX_TOPIC, `At most ${MAX_TOPIC} characters`)
  .refine((t) => !/[+#\u0000-\u001f\u007f]/.test(t), "A topic to attach has no wildcards (+ or #)");

const path = z
  .string()
  .trim()
  .max(100)
  .regex(
    /^$|^[A-Za-z0-9_@$\- ]+(\.[A-Za-z0-9_@$\- ]+){0,15}$/,
    "Write a path as names joined by dots, like env.temp or values.0",
  )
  .optional()
  .transform((s) => (s ? s : undefined));

export const mappingSchema = z
  .object({
    preset: z.enum(PRESETS),
    device: z.string().trim().max(64).nullish(),
    channel: z.enum(BRIDGE_CHANNELS).optional(),
    unit: z.enum(["C", "F"]).optional(),
    paths: z.object({ temperature: path, humidity: path, lux: path, battery: path, time: path }).partial().optional(),
  })
  .transform((m): Mapping => {
    const out: Mapping = { preset: m.preset };
    if (m.device) out.device = m.device;
    if (m.channel) out.channel = m.channel;
    if (m.unit) out.unit = m.unit;
    if (m.paths) {
      const paths = Object.fromEntries(Object.entries(m.paths).filter(([, v]) => v));
      if (Object.keys(paths).length) out.paths = paths;
    }
    return out;
  })
  .refine((m) => m.preset !== "esphome" || m.channel, { message: "Choose what the number measures", path: ["channel"] })
  .refine((m) => m.preset !== "custom" || m.channel || BRIDGE_CHANNELS.some((c) => m.paths?.[c]), {
    message: "Give the path of at least one value, or what a plain number measures",
    path: ["paths"],
  });

/** mqtt://host[:port] or mqtts://host[:port]; nothing else (no paths, no credentials in the address). */
export const brokerUrlSchema = z
  .string()
  .trim()
  .min(1, "Give the broker's address, like mqtt://192.168.1.20:1883")
  .max(300)
  .transform((s, ctx) => {
    let u: URL;
    try {
      u = new URL(/^[a-z]+:\/\//i.test(s) ? s : `mqtt://${s}`);
    } catch {
      ctx.addIssue({ code: "custom", message: "Not an address: write it like mqtt://192.168.1.20:1883" });
      return z.NEVER;
    }
    if (u.protocol !== "mqtt:" && u.protocol !== "mqtts:") {
      ctx.addIssue({ code: "custom", message: "Use mqtt:// (plain) or mqtts:// (TLS)" });
      return z.NEVER;
    }
    if (!u.hostname || u.username || u.password || (u.pathname && u.pathname !== "/") || u.search) {
      ctx.addIssue({
        code: "custom",
        message: "Only a host and a port: the user name and password have their own fields",
      });
      return z.NEVER;
    }
    return `${u.protocol}//${u.host}`;
  });

export const bridgeSettingsSchema = z.object({
  url: brokerUrlSchema,
  username: z
    .string()
    .trim()
    .max(200)
    .optional()
    .transform((s) => s || null),
  /** Empty keeps the stored password; `clearPassword` removes it. */
  password: z
    .string()
    .max(500)
    .optional()
    .transform((s) => s || null),
  clearPassword: z.literal("on").optional(),
  protocolVersion: z.enum(["4", "5"]).transform(Number),
  caCert: z
    .string()
    .trim()
    .max(20_000, "A CA certificate is a few kilobytes of PEM")
    .optional()
    .transform((s) => s || null)
    .refine(
      (s) => s === null || /-----BEGIN CERTIFICATE-----[\s\S]+-----END CERTIFICATE-----/.test(s),
      "Paste the CA certificate as PEM (-----BEGIN CERTIFICATE----- …)",
    ),
  enabled: z
    .literal("on")
    .optional()
    .transform((v) => v === "on"),
});

export const listenSchema = z.object({
  prefix: z
    .string()
    .trim()
    .max(200)
    .refine((t) => !/[+#\u0000-\u001f\u007f]/.test(t), "A prefix has no wildcards: Nichewise adds /# itself")
    .transform((t) => t.replace(/\/+$/, "")),
});
