// Placements: where a sensor was when. Placing, moving, editing placements and assigning readings
// that fell outside every spot; each change is one transaction under the sensor's lock, with its
// audit row and the rebuild of every affected spot's rollups inside it. The ingest cache is
// invalidated after COMMIT: invalidated earlier, a lookup between the two could cache the old
// placement again.
//
// Readings belong to the spot the sensor was placed in at their own timestamp. A placement that
// starts at FROM_FIRST_READING covers everything the sensor ever sends from before it was placed
// (a logger's stored year, an offline buffer), so a new sensor's history lands in its spot.
import { parseWithZod } from "@conform-to/zod/v4";
import { asc, desc, eq } from "drizzle-orm";
import type pg from "pg";
import { db, pool } from "~/.server/db";
import { invalidateSensorCache } from "~/.server/ingest/sensor-cache";
import { rebuildRollupsIn } from "~/.server/rollups/rebuild";
import { audit, inTransaction, lockSensor, PlacementError, spotInSite, type Tx } from "~/.server/sensors.server";
import { placements, sensors, spots, type Placement } from "~/db/schema.server";
import { FROM_FIRST_READING, gapsBetween, placeSchema, type Gap } from "~/lib/placements";
import { parseLocalDateTime } from "~/lib/time";

/** A sensor's or a spot's placements, newest first, with both names. */
export async function placementHistory(where: { sensorId?: number; spotId?: number }) {
  const cond = where.sensorId ? eq(placements.sensorId, where.sensorId) : eq(placements.spotId, where.spotId!);
  return db()
    .select({
      id: placements.id,
      sensorId: placements.sensorId,
      sensorName: sensors.name,
      spotId: placements.spotId,
      spotName: spots.name,
      fromAt: placements.fromAt,
      toAt: placements.toAt,
    })
    .from(placements)
    .innerJoin(sensors, eq(sensors.id, placements.sensorId))
    .innerJoin(spots, eq(spots.id, placements.spotId))
    .where(cond)
    .orderBy(desc(placements.fromAt));
}

/** Moves the sensor to `spotId` from `at` on (closing its open placement there). */
export async function placeSensor(opts: {
  siteId: number;
  sensorId: number;
  spotId: number;
  at: Date;
  actorId: number | null;
}) {
  const { sensorId, spotId, at } = opts;
  if (at.getTime() > Date.now() + 60_000) throw new PlacementError("That time is in the future.");
  await changePlacements(sensorId, async (tx, all) => {
    await spotInSite(tx, opts.siteId, spotId);
    const current = all.find((p) => p.toAt === null);
    const laterMove = all.some(
      (p) => p.fromAt.getTime() >= at.getTime() || (p.toAt !== null && p.toAt.getTime() > at.getTime()),
    );
    if (laterMove) {
      throw new PlacementError(
        "The sensor was already placed somewhere after that time. To " +
          "change where it was earlier, edit its placements on this " +
          "sensor's page (move a start or split a placement).",
      );
    }
    if (current?.spotId === spotId) throw new PlacementError("The sensor is already in that spot.");
    if (current) await tx.update(placements).set({ toAt: at }).where(eq(placements.id, current.id));
    await tx.insert(placements).values({ sensorId, spotId, fromAt: at });
    await audit(tx, opts.siteId, opts.actorId, "sensor.place", {
      sensorId,
      spotId,
      at: at.toISOString(),
      from: current?.spotId ?? null,
    });
    return current ? [current.spotId, spotId] : [spotId];
  });
}

/**
 * The "Place it" form of a sensor's page (which names the spot) and of a spot's page (which names
 * the sensor), in one place: `fixed` holds what the page itself stands for.
 */
export async function placeFromForm(
  form: FormData,
  fixed: { siteId: number; timeZone: string; actorId: number | null } & ({ sensorId: number } | { spotId: number }),
): Promise<{ placed: true } | { placeError: string }> {
  const submission = parseWithZod(form, { schema: placeSchema });
  if (submission.status !== "success")
    return { placeError: "sensorId" in fixed ? "Choose a spot." : "Choose a sensor." };
  const sensorId = "sensorId" in fixed ? fixed.sensorId : submission.value.sensorId;
  const spotId = "spotId" in fixed ? fixed.spotId : submission.value.spotId;
  if (!sensorId) return { placeError: "Choose a sensor." };
  if (!spotId) return { placeError: "Choose a spot." };
  let at = new Date();
  if (submission.value.when === "first") {
    // Only a sensor that has never been placed: later placements would overlap it (placeSensor refuses).
    at = FROM_FIRST_READING;
  } else if (submission.value.when === "earlier") {
    const parsed = submission.value.at ? parseLocalDateTime(submission.value.at, fixed.timeZone) : null;
    if (!parsed) return { placeError: "Enter the date and time it was moved." };
    at = parsed;
  }
  try {
    const [sensor] = await pool()
      .query<{ id: number }>("SELECT id FROM sensors WHERE id = $1 AND site_id = $2", [sensorId, fixed.siteId])
      .then((r) => r.rows);
    if (!sensor) return { placeError: "That sensor is not in this site." };
    await placeSensor({ siteId: fixed.siteId, sensorId, spotId, at, actorId: fixed.actorId });
  } catch (err) {
    if (err instanceof PlacementError) return { placeError: err.message };
    throw err;
  }
  return { placed: true };
}

/** Takes the sensor out of its spot: its readings from `at` on belong to no spot. */
export async function removeSensorFromSpot(opts: {
  siteId: number;
  sensorId: number;
  at: Date;
  actorId: number | null;
}) {
  await changePlacements(opts.sensorId, async (tx, all) => {
    const current = all.find((p) => p.toAt === null);
    if (!current) return [];
    const at = new Date(Math.max(opts.at.getTime(), current.fromAt.getTime()));
    await tx.update(placements).set({ toAt: at }).where(eq(placements.id, current.id));
    await audit(tx, opts.siteId, opts.actorId, "sensor.unplace", {
      sensorId: opts.sensorId,
      spotId: current.spotId,
      at: at.toISOString(),
    });
    return [current.spotId];
  });
}

/**
 * Moves a placement's start (earlier or later), or back to the sensor's first reading. It may not
 * reach into the sensor's previous placement: split or move that one first.
 */
export async function movePlacementStart(opts: {
  siteId: number;
  sensorId: number;
  placementId: number;
  fromAt: Date | "first";
  actorId: number | null;
}) {
  await changePlacements(opts.sensorId, async (tx, all) => {
    const p = placementOf(all, opts.placementId);
    const previous = all.filter((q) => q.fromAt.getTime() < p.fromAt.getTime()).at(-1);
    let fromAt: Date;
    if (opts.fromAt === "first") {
      if (previous) throw new PlacementError("Only the sensor's first placement can start from its first reading.");
      fromAt = FROM_FIRST_READING;
    } else {
      fromAt = opts.fromAt;
      if (fromAt.getTime() > Date.now() + 60_000) throw new PlacementError("That time is in the future.");
    }
    if (p.toAt && fromAt.getTime() >= p.toAt.getTime())
      throw new PlacementError("The start must come before the placement's end.");
    if (previous?.toAt && fromAt.getTime() < previous.toAt.getTime()) {
      throw new PlacementError("The sensor was in another spot then. Split or shorten that placement first.");
    }
    await tx.update(placements).set({ fromAt }).where(eq(placements.id, p.id));
    await audit(tx, opts.siteId, opts.actorId, "placement.move-start", {
      sensorId: opts.sensorId,
      placementId: p.id,
      spotId: p.spotId,
      from: p.fromAt.toISOString(),
      to: opts.fromAt === "first" ? "first reading" : fromAt.toISOString(),
    });
    return [p.spotId];
  });
}

/** Splits a placement at `at`: from then on (to the placement's end) the sensor was in `spotId`. */
export async function splitPlacement(opts: {
  siteId: number;
  sensorId: number;
  placementId: number;
  at: Date;
  spotId: number;
  actorId: number | null;
}) {
  const { at, spotId } = opts;
  await changePlacements(opts.sensorId, async (tx, all) => {
    await spotInSite(tx, opts.siteId, spotId);
    const p = placementOf(all, opts.placementId);
    const end = p.toAt?.getTime() ?? Date.now() + 60_000;
    if (at.getTime() <= p.fromAt.getTime() || at.getTime() >= end)
      throw new PlacementError("Choose a time inside that placement.");
    if (spotId === p.spotId) throw new PlacementError("Choose another spot for the second part.");
    await tx.update(placements).set({ toAt: at }).where(eq(placements.id, p.id));
    await tx.insert(placements).values({ sensorId: opts.sensorId, spotId, fromAt: at, toAt: p.toAt });
    await audit(tx, opts.siteId, opts.actorId, "placement.split", {
      sensorId: opts.sensorId,
      placementId: p.id,
      at: at.toISOString(),
      from: p.spotId,
      to: spotId,
    });
    return [p.spotId, spotId];
  });
}

export type UnplacedStretch = Gap & { count: number; first: Date; last: Date };

/** Readings in no spot, by stretch of time between placements: how many, first and last. */
export async function unplacedReadings(sensorId: number): Promise<UnplacedStretch[]> {
  const all = await pool().query<{ from_at: Date; to_at: Date | null }>(
    "SELECT from_at, to_at FROM placements WHERE sensor_id = $1 ORDER BY from_at",
    [sensorId],
  );
  const gaps = gapsBetween(all.rows.map((r) => ({ fromAt: r.from_at, toAt: r.to_at })));
  if (gaps.length === 0) return [];
  const res = await pool().query<{ i: number; n: number; first: Date; last: Date }>(
    `SELECT g.i, count(r.*)::int AS n, min(r.measured_at) AS first, max(r.measured_at) AS last
     FROM unnest($2::timestamptz[], $3::timestamptz[]) WITH ORDINALITY AS g(f, t, i)
     JOIN readings r ON r.sensor_id = $1 AND (g.f IS NULL OR r.measured_at >= g.f) AND (g.t IS NULL OR r.measured_at < g.t)
     GROUP BY g.i ORDER BY g.i`,
    [sensorId, gaps.map((g) => g.from), gaps.map((g) => g.to)],
  );
  return res.rows.map((r) => ({ ...gaps[Number(r.i) - 1], count: r.n, first: r.first, last: r.last }));
}

/** The site's sensors that have any reading outside every placement (one index probe per stretch). */
export async function sensorsWithUnplaced(siteId: number): Promise<Set<number>> {
  const rows = await pool().query<{ id: number; from_at: Date | null; to_at: Date | null }>(
    `SELECT s.id, p.from_at, p.to_at FROM sensors s LEFT JOIN placements p ON p.sensor_id = s.id
     WHERE s.site_id = $1 ORDER BY s.id, p.from_at`,
    [siteId],
  );
  const bySensor = new Map<number, { fromAt: Date; toAt: Date | null }[]>();
  for (const r of rows.rows) {
    const list = bySensor.get(r.id) ?? [];
    if (r.from_at) list.push({ fromAt: r.from_at, toAt: r.to_at });
    bySensor.set(r.id, list);
  }
  const ids: number[] = [],
    froms: (Date | null)[] = [],
    tos: (Date | null)[] = [];
  for (const [id, list] of bySensor) {
    for (const g of gapsBetween(list)) {
      ids.push(id);
      froms.push(g.from);
      tos.push(g.to);
    }
  }
  if (ids.length === 0) return new Set();
  const res = await pool().query<{ id: number }>(
    `SELECT DISTINCT g.id FROM unnest($1::int[], $2::timestamptz[], $3::timestamptz[]) AS g(id, f, t)
     WHERE EXISTS (SELECT 1 FROM readings r WHERE r.sensor_id = g.id AND (g.f IS NULL OR r.measured_at >= g.f) AND (g.t IS NULL OR r.measured_at < g.t))`,
    [ids, froms, tos],
  );
  return new Set(res.rows.map((r) => r.id));
}

/**
 * Puts the readings of one stretch outside every placement into `spotId`, by extending the
 * neighbouring placement in that spot or adding one that covers the stretch. `gap` is the stretch
 * as the page showed it; if the placements changed meanwhile, nothing is done.
 */
export async function assignUnplaced(opts: {
  siteId: number;
  sensorId: number;
  gap: Gap;
  spotId: number;
  actorId: number | null;
}) {
  const { sensorId, spotId } = opts;
  const same = (a: Date | null, b: Date | null) =>
    a === null ? b === null : b !== null && a.getTime() === b.getTime();
  await changePlacements(sensorId, async (tx, all, client) => {
    await spotInSite(tx, opts.siteId, spotId);
    const gap = gapsBetween(all).find((g) => same(g.from, opts.gap.from) && same(g.to, opts.gap.to));
    if (!gap) throw new PlacementError("The sensor's placements changed meanwhile; look at them again.");
    const before = gap.from ? all.find((p) => p.toAt?.getTime() === gap.from!.getTime()) : undefined;
    const after = gap.to ? all.find((p) => p.fromAt.getTime() === gap.to!.getTime()) : undefined;
    let to = gap.to;
    if (!to && before) {
      // After the sensor was taken out: cover its readings so far, not what it sends from now on.
      const last = await client.query<{ last: Date | null }>(
        "SELECT max(measured_at) AS last FROM readings WHERE sensor_id = $1 AND measured_at >= $2",
        [sensorId, gap.from],
      );
      to = new Date(Math.max(Date.now(), (last.rows[0].last?.getTime() ?? 0) + 1));
    }
    const from = gap.from ?? FROM_FIRST_READING;
    let how: string;
    if (before?.spotId === spotId) {
      await tx.update(placements).set({ toAt: to }).where(eq(placements.id, before.id));
      how = "extended-end";
    } else if (after?.spotId === spotId) {
      await tx.update(placements).set({ fromAt: from }).where(eq(placements.id, after.id));
      how = "extended-start";
    } else {
      await tx.insert(placements).values({ sensorId, spotId, fromAt: from, toAt: to });
      how = "added";
    }
    await audit(tx, opts.siteId, opts.actorId, "placement.assign", {
      sensorId,
      spotId,
      from: gap.from ? gap.from.toISOString() : "first reading",
      to: to ? to.toISOString() : null,
      how,
    });
    return [spotId];
  });
}

function placementOf(all: Placement[], id: number) {
  const p = all.find((q) => q.id === id);
  if (!p) throw new PlacementError("That placement is not this sensor's.");
  return p;
}

/**
 * One change to a sensor's placements: under the sensor's lock, `change` gets them in time order
 * and returns the spots whose rollups it changed, which are rebuilt before COMMIT.
 */
async function changePlacements(
  sensorId: number,
  change: (tx: Tx, all: Placement[], client: pg.PoolClient) => Promise<number[]>,
) {
  await inTransaction(async (tx, client) => {
    await lockSensor(client, sensorId);
    const all = await tx
      .select()
      .from(placements)
      .where(eq(placements.sensorId, sensorId))
      .orderBy(asc(placements.fromAt));
    const affected = await change(tx, all, client);
    await rebuildRollupsIn(client, affected);
  });
  invalidateSensorCache(sensorId);
}
