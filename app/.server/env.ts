// Environment, read once and validated at start-up; a bad value stops the process with its name.
import { isIP } from "node:net";
import { z } from "zod";

// 0 lets the system choose a free port (tests start the whole server that way).
const port = z.coerce.number().int().min(0).max(65535);
const flag = z
  .enum(["0", "1", "true", "false", "yes", "no"])
  .transform((v) => v === "1" || v === "true" || v === "yes");

// Which proxies' X-Forwarded-For to believe for the client's address (sign-in rate limit): none by
// default, a number of proxy hops in front, or a comma list of addresses/subnets (Express's "trust
// proxy" forms, kept to the safe ones).
const trustProxy = z
  .string()
  .trim()
  .default("0")
  .transform((v, ctx): number | string[] => {
    if (/^\d+$/.test(v) && Number(v) <= 10) return Number(v);
    const parts = v.split(",").map((p) => p.trim());
    const ok = parts.every((p) => {
      if (p === "loopback" || p === "linklocal" || p === "uniquelocal") return true;
      const [addr, bits, extra] = p.split("/");
      if (extra !== undefined || !isIP(addr)) return false;
      return bits === undefined || (/^\d+$/.test(bits) && Number(bits) <= (isIP(addr) === 4 ? 32 : 128));
    });
    if (!ok) {
      ctx.addIssue({
        code: "custom",
        message:
          "a number of proxy hops (0-10) or a comma list of addresses, subnets, loopback, linklocal, uniquelocal",
      });
      return z.NEVER;
    }
    return parts;
  });

const schema = z.object({
  NODE_ENV: z.enum(["development", "production", "test"]).default("production"),
  HOST: z.string().min(1).default("127.0.0.1"),
  PORT: port.default(3000),
  PUBLIC_URL: z.url().optional(),
  DATABASE_URL: z.url().optional(),
  NW_PG_PORT: port.default(54329),
  NW_PG_DATA: z.string().min(1).default(".data/postgres"),
  // The key that encrypts stored secrets (a home broker's password): 32 bytes as 64 hex digits or
  // base64. Unset: a key file made once beside NW_PG_DATA (app/.server/bridge/secret.ts).
  NW_SECRET_KEY: z
    .string()
    .trim()
    .refine(
      (v) => /^[0-9a-fA-F]{64}$/.test(v) || /^[A-Za-z0-9+/]{43}=$/.test(v),
      "32 bytes: 64 hex digits or 44 base64 characters",
    )
    .optional(),
  MQTT_HOST: z.string().min(1).default("127.0.0.1"),
  MQTT_PORT: port.default(1883),
  MQTT_WS_PORT: port.default(8083),
  // Open MQTT connections (TCP and WebSocket together) at most: each sensor holds one.
  MQTT_MAX_CONNECTIONS: z.coerce.number().int().min(1).max(100_000).default(1000),
  MQTT_PUBLIC_HOST: z.string().optional(),
  SMTP_URL: z.url().optional(),
  MAIL_FROM: z.string().default("Nichewise <alerts@nichewise.invalid>"),
  NW_SINK_PORT: port.default(2525),
  // Unset: the demo household (with its published logins) only when listening on loopback.
  NW_DEMO: flag.optional(),
  TRUST_PROXY: trustProxy,
  NW_SIMULATOR: flag.default(true),
  NW_SIM_SPEED: z.coerce.number().positive().max(3600).default(1),
  NW_SIM_INTERVAL_S: z.coerce.number().int().min(1).max(3600).default(60),
  NW_BACKFILL_DAYS: z.coerce.number().int().min(0).max(800).default(365),
  // The demo's compressed cold front on the outdoor bench, starting ~30 s after start (alert timings 60× faster).
  NW_COLD_FRONT: flag.default(false),
  // Outdoor weather: the hosted service's endpoints (Open-Meteo's archive and forecast, or a paid
  // plan's customer endpoints with WEATHER_API_KEY). Unset: the local fake, started on
  // WEATHER_FAKE_PORT (0: any free port) and backed by the simulator's climate.
  WEATHER_ARCHIVE_URL: z.url().optional(),
  WEATHER_FORECAST_URL: z.url().optional(),
  WEATHER_API_KEY: z.string().min(1).max(200).optional(),
  WEATHER_FAKE_PORT: port.default(0),
  // Past years of hourly weather stored per site, for the projections.
  WEATHER_YEARS: z.coerce.number().int().min(1).max(30).default(10),
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

export const isLoopbackHost = (host: string) =>
  host === "localhost" || host === "::1" || host === "[::1]" || /^127\.\d+\.\d+\.\d+$/.test(host);

/**
 * Whether to seed the demo household, whose logins are printed in the README, and why. On loopback
 * nobody else can use them; beyond it only when asked for by NW_DEMO=1.
 */
export function demoPolicy(e: Pick<Env, "NW_DEMO" | "HOST">): { seed: boolean; why: string } {
  if (e.NW_DEMO === false) return { seed: false, why: "NW_DEMO=0: no demo household" };
  if (e.NW_DEMO === true) {
    return isLoopbackHost(e.HOST)
      ? { seed: true, why: "NW_DEMO=1: demo household on an empty database" }
      : {
          seed: true,
          why: `NW_DEMO=1 while listening on ${e.HOST}: the demo household's published logins are open to anyone who can reach this server`,
        };
  }
  return isLoopbackHost(e.HOST)
    ? { seed: true, why: "listening on loopback: demo household on an empty database (NW_DEMO=0 to skip)" }
    : {
        seed: false,
        why:
          `listening on ${e.HOST}, beyond loopback: no demo household ` +
          `with known logins (NW_DEMO=1 to seed it anyway; \`npm run ` +
          `admin:create\` makes the first admin)`,
      };
}
