// Shared form schemas: the same zod schema validates in the browser (through conform) and in the action.
import { z } from "zod";
import { GLAZINGS, LIGHT_SOURCES, SPOT_FACINGS, SPOT_PLACES } from "~/domain/vocabulary";

const email = z.string({ error: "Enter your e-mail address" }).trim().toLowerCase().pipe(z.email("That is not an e-mail address"));

/** The longest password read anywhere; argon2 hashes every byte of it. */
export const MAX_PASSWORD_LENGTH = 256;

export const signInSchema = z.object({
  email,
  password: z.string({ error: "Enter your password" }).min(1, "Enter your password").max(MAX_PASSWORD_LENGTH, "That e-mail and password do not match an account."),
  next: z.string().optional(),
});

export const signUpSchema = z.object({
  name: z.string({ error: "Tell us what to call you" }).trim().min(1, "Tell us what to call you").max(80),
  email,
  password: z
    .string({ error: "Choose a password" })
    .min(10, "Use at least 10 characters")
    .max(200, "That is longer than we accept (200 characters)"),
  next: z.string().optional(),
});

export const siteSchema = z.object({
  name: z.string({ error: "Name your site" }).trim().min(1, "Name your site").max(80),
  latitude: z
    .number({ error: "Enter the latitude in degrees (north positive)" })
    .min(-90, "Latitude is between −90 and 90")
    .max(90, "Latitude is between −90 and 90"),
  longitude: z
    .number({ error: "Enter the longitude in degrees (east positive)" })
    .min(-180, "Longitude is between −180 and 180")
    .max(180, "Longitude is between −180 and 180"),
  timeZone: z
    .string({ error: "Choose a time zone" })
    .refine((tz) => isTimeZone(tz), "Choose a time zone from the list"),
});

export function isTimeZone(tz: string) {
  try {
    new Intl.DateTimeFormat("en", { timeZone: tz });
    return tz.length > 0;
  } catch {
    return false;
  }
}

export const spotSchema = z.object({
  name: z.string({ error: "Name the spot" }).trim().min(1, "Name the spot").max(80),
  indoor: z.enum(SPOT_PLACES, { error: "Is it indoors or outdoors?" }),
  facing: z.enum(SPOT_FACINGS, { error: "Choose the window facing, or no window" }),
  capacity: z
    .number({ error: "How many pots fit? (0 if you don't know yet)" })
    .int("Whole pots only")
    .min(0, "Can't be negative")
    .max(500, "That is more pots than we expect on one spot"),
  notes: z.string().trim().max(2000, "Keep notes under 2,000 characters").optional(),
  lightSource: z.enum(LIGHT_SOURCES, { error: "Choose what lights the spot" }).default("sun"),
  // Empty means not given; kept only for a spot by a window (see updateSpot).
  glazing: z.enum(GLAZINGS, { error: "Choose the glazing, or leave it not given" }).optional(),
});

export const CHANNELS = ["temperature", "humidity", "lux", "battery"] as const;

export const sensorSchema = z.object({
  name: z.string({ error: "Name the sensor" }).trim().min(1, "Name the sensor").max(80),
  channels: z.array(z.enum(CHANNELS)).min(1, "Pick at least one channel").default(["temperature", "humidity"]),
  spotId: z.number().int().positive().optional(),
  // Where its placement starts: its first reading (a logger's stored data lands in the spot), now, or a time.
  since: z.enum(["first", "now", "at"]).default("first"),
  sinceAt: z.string().trim().max(40).optional(),
});

const offset = (label: string, max: number) =>
  z
    .number({ error: `${label} offset must be a number` })
    .min(-max, `${label} offset is at most ±${max}`)
    .max(max, `${label} offset is at most ±${max}`)
    .optional();

export const calibrationSchema = z.object({
  name: z.string({ error: "Name the sensor" }).trim().min(1, "Name the sensor").max(80),
  temperature: offset("Temperature", 10),
  humidity: offset("Humidity", 30),
  lux: offset("Light", 5000),
});

/** Where to go after signing in: only paths on this site. */
/**
 * Where to go after signing in: a path on this site, or "/". The value is parsed the way a browser
 * reads a Location header (tabs and newlines dropped, backslashes read as slashes), against a
 * stand-in origin, and only a same-origin result is kept, re-serialised as path, query and fragment
 * (OWASP Unvalidated Redirects and Forwards Cheat Sheet).
 */
export function safeNext(next: string | null | undefined) {
  if (!next || next.length > 2048) return "/";
  const origin = "http://nichewise.invalid";
  let url: URL;
  try {
    url = new URL(next, `${origin}/`);
  } catch {
    return "/";
  }
  if (url.origin !== origin || !next.startsWith("/")) return "/";
  const path = url.pathname + url.search + url.hash;
  // "//host" would itself be read as another site.
  return path.startsWith("/") && !path.startsWith("//") ? path : "/";
}
