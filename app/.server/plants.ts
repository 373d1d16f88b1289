// A site's plants: the library plus its own profiles (custom_plants), what stands in each spot now
// (spot_plants) and the wishlist. Callers have checked the role; every lookup checks the site.
import { and, asc, eq, inArray, sql } from "drizzle-orm";
import { notFound } from "~/.server/auth";
import { db } from "~/.server/db";
import { ensureColdWatch } from "~/.server/watches";
import { auditLog, customPlants, spotPlants, spots, wishlist } from "~/db/schema.server";
import { PLANT_LIBRARY, type PlantProfile } from "~/domain/plants/library";
import { storedProfileSchema } from "~/forms/plant";
import type { InventoryChange } from "~/forms/inventory";

export type SitePlant = PlantProfile & { own: boolean; basedOn: string | null };

export async function customProfiles(siteId: number): Promise<SitePlant[]> {
  const rows = await db()
    .select()
    .from(customPlants)
    .where(eq(customPlants.siteId, siteId))
    .orderBy(asc(customPlants.key));
  return rows.flatMap((r) => {
    const parsed = storedProfileSchema.safeParse({ ...(r.profile as object), key: r.key });
    return parsed.success ? [{ ...parsed.data, own: true, basedOn: r.basedOn }] : [];
  });
}

/** The library and the site's own profiles; an own profile never hides a library one (keys differ by prefix). */
export async function sitePlants(siteId: number): Promise<SitePlant[]> {
  const own = await customProfiles(siteId);
  return [...PLANT_LIBRARY.map((p) => ({ ...p, own: false, basedOn: null })), ...own];
}

export async function sitePlant(siteId: number, key: string | undefined): Promise<SitePlant> {
  return findSitePlant(await sitePlants(siteId), key);
}

/** The plant with this key among a site's plants already loaded, or a 404. */
export function findSitePlant(plants: SitePlant[], key: string | undefined): SitePlant {
  const plant = plants.find((p) => p.key === key);
  if (!plant) notFound();
  return plant;
}

export const OWN_PREFIX = "own-";

export async function saveCustomProfile(
  siteId: number,
  actorId: number,
  profile: PlantProfile,
  basedOn: string | null,
) {
  const { key, ...rest } = profile;
  await db()
    .insert(customPlants)
    .values({ siteId, key, basedOn, profile: rest })
    .onConflictDoUpdate({ target: [customPlants.siteId, customPlants.key], set: { profile: rest, basedOn } });
  await db().insert(auditLog).values({ siteId, actorId, action: "plant.save", detail: { key, basedOn } });
}

export async function deleteCustomProfile(siteId: number, actorId: number, key: string) {
  await db()
    .delete(customPlants)
    .where(and(eq(customPlants.siteId, siteId), eq(customPlants.key, key)));
  await db().insert(auditLog).values({ siteId, actorId, action: "plant.delete", detail: { key } });
}

export async function freeOwnKey(siteId: number, slug: string) {
  const taken = new Set(
    (await db().select({ key: customPlants.key }).from(customPlants).where(eq(customPlants.siteId, siteId))).map(
      (r) => r.key,
    ),
  );
  let key = `${OWN_PREFIX}${slug}`;
  for (let i = 2; taken.has(key); i++) key = `${OWN_PREFIX}${slug}-${i}`;
  return key;
}

// --- Inventory: plants standing in spots now ---

export async function spotInventory(spotIds: number[]) {
  if (spotIds.length === 0) return [];
  return db()
    .select()
    .from(spotPlants)
    .where(inArray(spotPlants.spotId, spotIds))
    .orderBy(asc(spotPlants.addedAt), asc(spotPlants.id));
}

export async function siteInventory(siteId: number) {
  return db()
    .select({
      id: spotPlants.id,
      spotId: spotPlants.spotId,
      plantKey: spotPlants.plantKey,
      nickname: spotPlants.nickname,
      pots: spotPlants.pots,
    })
    .from(spotPlants)
    .innerJoin(spots, eq(spots.id, spotPlants.spotId))
    .where(eq(spots.siteId, siteId));
}

/** The plant in a spot with the highest safe night: the one cold alerts should protect first. */
export function mostTender<T extends { plantKey: string }>(
  standing: T[],
  plants: PlantProfile[],
): (T & { plant: PlantProfile }) | null {
  const byKey = new Map(plants.map((p) => [p.key, p]));
  let best: (T & { plant: PlantProfile }) | null = null;
  for (const s of standing) {
    const plant = byKey.get(s.plantKey);
    if (plant && (!best || plant.minNightC > best.plant.minNightC)) best = { ...s, plant };
  }
  return best;
}

export async function addToSpot(
  siteId: number,
  actorId: number,
  spotId: number,
  v: { plantKey: string; nickname: string; pots: number },
) {
  // The plant, its audit row and the cold watch it calls for outdoors (watches.ts) in one change.
  await db().transaction(async (tx) => {
    await tx.insert(spotPlants).values({ spotId, ...v });
    await tx.insert(auditLog).values({ siteId, actorId, action: "plant.place", detail: { spotId, ...v } });
    await ensureColdWatch({ siteId, spotId, actorId }, tx);
  });
}

async function inventoryRow(siteId: number, id: number) {
  const [row] = await db()
    .select({ id: spotPlants.id, spotId: spotPlants.spotId })
    .from(spotPlants)
    .innerJoin(spots, eq(spots.id, spotPlants.spotId))
    .where(and(eq(spotPlants.id, id), eq(spots.siteId, siteId)));
  if (!row) notFound();
  return row;
}

export async function moveToSpot(siteId: number, actorId: number, id: number, toSpotId: number) {
  const row = await inventoryRow(siteId, id);
  await db().transaction(async (tx) => {
    await tx
      .update(spotPlants)
      .set({ spotId: toSpotId, addedAt: sql`now()` })
      .where(eq(spotPlants.id, row.id));
    await tx
      .insert(auditLog)
      .values({ siteId, actorId, action: "plant.move", detail: { id, from: row.spotId, to: toSpotId } });
    await ensureColdWatch({ siteId, spotId: toSpotId, actorId }, tx);
  });
}

export async function removeFromSpot(siteId: number, actorId: number, id: number) {
  const row = await inventoryRow(siteId, id);
  await db().delete(spotPlants).where(eq(spotPlants.id, row.id));
  await db()
    .insert(auditLog)
    .values({ siteId, actorId, action: "plant.remove", detail: { id, spotId: row.spotId } });
}

// --- Wishlist ---

export async function siteWishlist(siteId: number) {
  return db()
    .select()
    .from(wishlist)
    .where(eq(wishlist.siteId, siteId))
    .orderBy(asc(wishlist.addedAt), asc(wishlist.id));
}

export async function saveWish(
  siteId: number,
  actorId: number,
  v: { plantKey: string; mustHave: boolean; pots: number },
  plantName?: string,
) {
  await db()
    .insert(wishlist)
    .values({ siteId, ...v })
    .onConflictDoUpdate({ target: [wishlist.siteId, wishlist.plantKey], set: { mustHave: v.mustHave, pots: v.pots } });
  await db()
    .insert(auditLog)
    .values({ siteId, actorId, action: "wishlist.save", detail: { ...v, plant: plantName ?? v.plantKey } });
}

export class ConfirmRemoval extends Error {}

/**
 * Takes a plant off the wishlist and returns what was removed, so the page can offer to put it back.
 * A must-have goes only with `confirmed` (it may be another member's), checked here, not only on the page.
 * The audit row names the plant and what it was.
 */
export async function removeWish(
  siteId: number,
  actorId: number,
  plantKey: string,
  opts: { confirmed?: boolean; plantName?: string } = {},
) {
  return db().transaction(async (tx) => {
    const [row] = await tx
      .select()
      .from(wishlist)
      .where(and(eq(wishlist.siteId, siteId), eq(wishlist.plantKey, plantKey)))
      .for("update");
    if (!row) return null;
    if (row.mustHave && !opts.confirmed) throw new ConfirmRemoval(`${opts.plantName ?? plantKey} is a must-have.`);
    await tx.delete(wishlist).where(eq(wishlist.id, row.id));
    const removed = { plantKey, plant: opts.plantName ?? plantKey, mustHave: row.mustHave, pots: row.pots };
    await tx.insert(auditLog).values({ siteId, actorId, action: "wishlist.remove", detail: removed });
    return removed;
  });
}

/**
 * The spot page's inventory changes (plant-add, plant-move, plant-remove), parsed with
 * app/forms/inventory.ts. The caller has checked WRITERS and that the spot belongs to the site.
 */
export async function inventoryAction(
  change: InventoryChange,
  ctx: { siteId: number; spotId: number; actorId: number },
) {
  if (change.intent === "plant-add") {
    const plants = await sitePlants(ctx.siteId);
    if (!plants.some((p) => p.key === change.plantKey))
      return { status: 400 as const, error: "Choose a plant from the list." };
    await addToSpot(ctx.siteId, ctx.actorId, ctx.spotId, {
      plantKey: change.plantKey,
      nickname: change.nickname,
      pots: change.pots,
    });
    return { status: 200 as const, error: null };
  }
  if (change.intent === "plant-remove") {
    await removeFromSpot(ctx.siteId, ctx.actorId, change.id);
    return { status: 200 as const, error: null };
  }
  const [target] = await db()
    .select({ id: spots.id })
    .from(spots)
    .where(and(eq(spots.id, change.toSpotId), eq(spots.siteId, ctx.siteId)));
  if (!target) return { status: 400 as const, error: "Choose the spot to move it to." };
  await moveToSpot(ctx.siteId, ctx.actorId, change.id, target.id);
  return { status: 200 as const, error: null };
}
