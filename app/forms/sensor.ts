// The sensor forms: a new sensor, and a sensor's name and calibration.
import { z } from "zod";

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
