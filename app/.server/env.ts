// Environment, read once and validated at start-up; a bad value stops the process with its name.
import { z } from "zod";

const port = z.coerce.number().int().min(1).max(65535);
const flag = z
  .enum(["0", "1", "true", "false", "yes", "no"])
  .transform((v) => v === "1" || v === "true" || v === "yes");

const schema = z.object({
  NODE_ENV: z.enum(["development", "production", "test"]).default("production"),
  HOST: z.string().min(1).default("127.0.0.1"),
  PORT: port.default(3000),
  PUBLIC_URL: z.url().optional(),
  DATABASE_URL: z.url().optional(),
  NW_PG_PORT: port.default(54329),
  NW_PG_DATA: z.string().min(1).default(".data/postgres"),
  MQTT_HOST: z.string().min(1).default("127.0.0.1"),
  MQTT_PORT: port.default(1883),
  MQTT_WS_PORT: port.default(8083),
  // Open MQTT connections (TCP and WebSocket together) at most: each sensor holds one.
  MQTT_MAX_CONNECTIONS: z.coerce.number().int().min(1).max(100_000).default(1000),
  MQTT_PUBLIC_HOST: z.string().optional(),
  SMTP_URL: z.url().optional(),
  MAIL_FROM: z.string().default("Nichewise <alerts@nichewise.invalid>"),
  NW_SINK_PORT: port.default(2525),
  NW_DEMO: flag.default(true),
  NW_SIMULATOR: flag.default(true),
  NW_SIM_SPEED: z.coerce.number().positive().max(3600).default(1),
  NW_SIM_INTERVAL_S: z.coerce.number().int().min(1).max(3600).default(60),
  NW_BACKFILL_DAYS: z.coerce.number().int().min(0).max(800).default(365),
  // The demo's compressed cold front on the outdoor bench, starting ~30 s after start (alert timings 60× faster).
  NW_COLD_FRONT: flag.default(false),
});

export type Env = z.infer<typeof schema>;

export function parseEnv(source: NodeJS.ProcessEnv = process.env): Env {
  const result = schema.safeParse(source);
  if (!result.success) {
    const lines = result.error.issues.map((i) => `  ${i.path.join(".")}: ${i.message}`);
    throw new Error(`Invalid environment:\n${lines.join("\n")}`);
  }
  return result.data;
}

let cached: Env | undefined;
export function env(): Env {
  cached ??= parseEnv();
  return cached;
}

export function publicUrl(): string {
  const e = env();
  return (e.PUBLIC_URL ?? `http://${e.HOST === "0.0.0.0" ? "127.0.0.1" : e.HOST}:${e.PORT}`).replace(/\/$/, "");
}
