// Placement values shared by the server and the pages.
import { z } from "zod";

/**
 * The start of a placement that covers everything the sensor sends from before it was placed (a
 * logger's stored months, an offline buffer). Readings older than three years are refused at
 * ingest, so no reading can fall before it; pages show it as "its first reading".
 */
export const FROM_FIRST_READING = new Date(0);

export const isFromFirstReading = (at: Date | string) => new Date(at).getTime() <= FROM_FIRST_READING.getTime();

/** A stretch of time in which the sensor was in no spot; null ends are open. */
export type Gap = { from: Date | null; to: Date | null };

/** The stretches outside every placement, in time order (placements sorted by start). */
export function gapsBetween(sorted: { fromAt: Date; toAt: Date | null }[]): Gap[] {
  const gaps: Gap[] = [];
  let cursor: Date | null = null; // end of the time covered so far; null before the first placement
  for (const [i, p] of sorted.entries()) {
    if (i === 0 ? p.fromAt.getTime() > FROM_FIRST_READING.getTime() : cursor && cursor.getTime() < p.fromAt.getTime()) {
      gaps.push({ from: i === 0 ? null : cursor, to: p.fromAt });
    }
    if (p.toAt === null) return gaps;
    cursor = p.toAt;
  }
  gaps.push({ from: cursor, to: null });
  return gaps;
}

const localTime = z.string().trim().max(40).optional();

/** "Place it" on a sensor's page (spotId) or a spot's page (sensorId): now or from an earlier time. */
export const placeSchema = z.object({
  spotId: z.number({ error: "Choose a spot" }).int().positive().optional(),
  sensorId: z.number({ error: "Choose a sensor" }).int().positive().optional(),
  when: z.enum(["first", "now", "earlier"]).default("now"),
  at: localTime,
});

/** The placement editor on a sensor's page. */
export const placementEditSchema = z.discriminatedUnion("intent", [
  z.object({
    intent: z.literal("move-start"),
    placementId: z.number().int().positive(),
    start: z.enum(["first", "at"]).default("at"),
    at: localTime,
  }),
  z.object({
    intent: z.literal("split"),
    placementId: z.number().int().positive(),
    spotId: z.number({ error: "Choose a spot" }).int().positive(),
    at: localTime,
  }),
  z.object({
    intent: z.literal("assign"),
    spotId: z.number({ error: "Choose a spot" }).int().positive(),
    // The stretch as the page showed it, in epoch milliseconds ("" for an open end).
    gapFrom: z.number().int().optional(),
    gapTo: z.number().int().optional(),
  }),
]);
