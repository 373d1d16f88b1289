// The alert store's forecast warnings: one row per spot and night, opened, updated, cleared or
// ended as the forecast changes, their e-mails claimed on the row; the spots they are worked out
// for and those spots' plants. Part of the one store (store.ts).
import { and, asc, eq, exists, getTableColumns, gt, isNotNull, isNull, lt, or, sql } from "drizzle-orm";
import { db, type Queryable } from "~/.server/db";
import { customPlants, forecastWarnings, sites, spotPlants, spots } from "~/db/schema.server";

export type ForecastWarning = typeof forecastWarnings.$inferSelect;
export type ForecastSpot = {
  id: number;
  name: string;
  indoor: boolean;
  siteId: number;
  siteName: string;
  timeZone: string;
};
/** A night's figures as stored: the plant's line and the forecast's lows. */
export type NightFigures = Pick<
  ForecastWarning,
  "plantName" | "damageC" | "likelyC" | "expectedLowC" | "lowerBoundC" | "leafLowC" | "lowAt" | "forecastAt"
>;

const fw = forecastWarnings;
const stillWarned = (spotId: number) => and(eq(fw.spotId, spotId), isNull(fw.endedAt), isNull(fw.clearedAt));

/** Spots of the site (or every site) with placed plants or a warning still standing. */
export function forecastSpots(siteId: number | null, q: Queryable = db()): Promise<ForecastSpot[]> {
  const planted = q
    .select({ one: sql`1` })
    .from(spotPlants)
    .where(eq(spotPlants.spotId, spots.id));
  const warned = q
    .select({ one: sql`1` })
    .from(fw)
    .where(and(eq(fw.spotId, spots.id), isNull(fw.endedAt)));
  return q
    .select({
      id: spots.id,
      name: spots.name,
      indoor: spots.indoor,
      siteId: spots.siteId,
      siteName: sites.name,
      timeZone: sites.timeZone,
    })
    .from(spots)
    .innerJoin(sites, eq(sites.id, spots.siteId))
    .where(and(siteId === null ? undefined : eq(spots.siteId, siteId), or(exists(planted), exists(warned))))
    .orderBy(asc(spots.id));
}

export async function plantsOfSpot(spotId: number, siteId: number, q: Queryable = db()) {
  const placed = await q
    .select({ plantKey: spotPlants.plantKey })
    .from(spotPlants)
    .where(eq(spotPlants.spotId, spotId));
  if (placed.length === 0) return { placed: [], custom: [] };
  const custom = await q
    .select({ key: customPlants.key, profile: customPlants.profile })
    .from(customPlants)
    .where(eq(customPlants.siteId, siteId));
  return { placed: placed.map((p) => p.plantKey), custom };
}

/** Ends the spot's standing warnings (all, or those whose low came before `lowBefore`): no longer shown, no all-clear. */
export async function endForecastWarnings(spotId: number, at: Date, lowBefore?: Date, q: Queryable = db()) {
  await q
    .update(fw)
    .set({ endedAt: at })
    .where(and(eq(fw.spotId, spotId), isNull(fw.endedAt), lowBefore ? lt(fw.lowAt, lowBefore) : undefined));
}

export function standingWarnings(spotId: number, q: Queryable = db()): Promise<ForecastWarning[]> {
  return q.select().from(fw).where(stillWarned(spotId));
}

/** A new warned night, or one cleared (or ended) that crosses again; null when it stands already. */
export async function openForecastWarning(
  spotId: number,
  night: string,
  f: NightFigures,
  at: Date,
  q: Queryable = db(),
): Promise<number | null> {
  const [row] = await q
    .insert(fw)
    .values({ spotId, night, ...f, openedAt: at })
    .onConflictDoUpdate({
      target: [fw.spotId, fw.night],
      set: { ...f, openedAt: at, notifiedAt: null, clearedAt: null, clearNotifiedAt: null, endedAt: null },
      setWhere: or(isNotNull(fw.clearedAt), isNotNull(fw.endedAt)),
    })
    .returning({ id: fw.id });
  return row?.id ?? null;
}

/** Updates a standing warning's figures (cleared too when `clearedAt` is given); false when none stands. */
export async function updateForecastWarning(
  spotId: number,
  night: string,
  f: Partial<NightFigures> & { clearedAt?: Date },
  q: Queryable = db(),
): Promise<boolean> {
  return (
    (
      await q
        .update(fw)
        .set(f)
        .where(and(stillWarned(spotId), eq(fw.night, night)))
        .returning({ id: fw.id })
    ).length > 0
  );
}

/** Warnings and all-clears of the spot not yet e-mailed, oldest first. */
export async function unsentForecastMessages(
  spotId: number,
  q: Queryable = db(),
): Promise<(ForecastWarning & { message: "warn" | "clear" })[]> {
  const unsent = or(
    and(isNull(fw.clearedAt), isNull(fw.notifiedAt)),
    and(isNotNull(fw.clearedAt), isNull(fw.clearNotifiedAt)),
  );
  const rows = await q
    .select()
    .from(fw)
    .where(and(eq(fw.spotId, spotId), isNull(fw.endedAt), unsent))
    .orderBy(asc(fw.id));
  return rows.map((r) => ({ ...r, message: r.clearedAt ? "clear" : "warn" }));
}

/** Claims the warning's e-mail (or its all-clear's): whoever sets the column sends it. */
export async function claimForecastMessage(
  id: number,
  message: "warn" | "clear",
  at: Date,
  q: Queryable = db(),
): Promise<boolean> {
  const [column, set] =
    message === "warn" ? [fw.notifiedAt, { notifiedAt: at }] : [fw.clearNotifiedAt, { clearNotifiedAt: at }];
  return (
    (
      await q
        .update(fw)
        .set(set)
        .where(and(eq(fw.id, id), isNull(column)))
        .returning({ id: fw.id })
    ).length > 0
  );
}

/** Gives the claim back after a failed send: the next pass sends it again. */
export async function releaseForecastMessage(id: number, message: "warn" | "clear", q: Queryable = db()) {
  await q
    .update(fw)
    .set(message === "warn" ? { notifiedAt: null } : { clearNotifiedAt: null })
    .where(eq(fw.id, id));
}

/** Standing warnings of a site whose night is still to come or under way (low after `lowAfter`). */
export function siteForecastWarnings(siteId: number, lowAfter: Date, q: Queryable = db()) {
  return q
    .select({ ...getTableColumns(fw), spotName: spots.name })
    .from(fw)
    .innerJoin(spots, eq(spots.id, fw.spotId))
    .where(and(eq(spots.siteId, siteId), isNull(fw.endedAt), isNull(fw.clearedAt), gt(fw.lowAt, lowAfter)))
    .orderBy(asc(fw.lowAt))
    .limit(10);
}
