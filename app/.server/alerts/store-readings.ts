// The alert store's readings: a spot's calibrated readings from the sensors placed in it at the
// time, as the evaluator (and cluster mode's alert engine) reads them. Part of the one store (store.ts).
import { and, asc, eq, gt, gte, isNull, lt, lte, or, sql } from "drizzle-orm";
import { db, type Queryable } from "~/.server/db";
import { calibratedSql } from "~/.server/ingest/calibrated";
import { placements, readings, sensors } from "~/db/schema.server";

export type SpotPoint = { at: Date; t: number | null; h: number | null; battery: number | null };

/** Calibrated readings of the sensors placed in the spot at the time, from < at ≤ to, oldest first. */
export async function spotPoints(spotId: number, from: Date, to: Date, q: Queryable = db()): Promise<SpotPoint[]> {
  return q
    .select({
      at: readings.measuredAt,
      t: sql<number | null>`${sql.raw(calibratedSql("temperature", '"readings"."temperature"', '"sensors"'))}`,
      h: sql<number | null>`${sql.raw(calibratedSql("humidity", '"readings"."humidity"', '"sensors"'))}`,
      battery: readings.battery,
    })
    .from(placements)
    .innerJoin(sensors, eq(sensors.id, placements.sensorId))
    .innerJoin(
      readings,
      and(
        eq(readings.sensorId, placements.sensorId),
        gte(readings.measuredAt, placements.fromAt),
        or(isNull(placements.toAt), lt(readings.measuredAt, placements.toAt)),
      ),
    )
    .where(and(eq(placements.spotId, spotId), gt(readings.measuredAt, from), lte(readings.measuredAt, to)))
    .orderBy(asc(readings.measuredAt));
}
