// Demo plants: a few pots standing in the demo household's spots (invented nicknames) and a
// wishlist with must-haves, so the inventory, the most tender plant and spot capacity show.
import { eq } from "drizzle-orm";
import { db } from "~/.server/db";
import { spotPlants, spots, wishlist } from "~/db/schema.server";

const STANDING: { spot: string; plantKey: string; nickname: string; pots: number }[] = [
  { spot: "Spare room (heated)", plantKey: "phalaenopsis", nickname: "Blush", pots: 2 },
  { spot: "Spare room (heated)", plantKey: "paphiopedilum-mottled", nickname: "Old Toad", pots: 1 },
  { spot: "Kitchen sill (east)", plantKey: "hoya", nickname: "Granny's wax vine", pots: 1 },
  { spot: "Bathroom shelf", plantKey: "ludisia", nickname: "Velvet", pots: 2 },
  { spot: "Landing sill (south-west)", plantKey: "cymbidium", nickname: "Cream Tea", pots: 1 },
  // Summered outdoors, as cymbidium growers commonly do for the autumn chill that sets buds: the
  // bench's cold watch follows it.
  { spot: "Bench under the pear tree", plantKey: "cymbidium", nickname: "Pear-tree lodger", pots: 1 },
];

const WISHES: { plantKey: string; mustHave: boolean; pots: number }[] = [
  { plantKey: "cattleya", mustHave: true, pots: 2 },
  { plantKey: "dendrobium-nobile", mustHave: true, pots: 1 },
  { plantKey: "miltoniopsis", mustHave: false, pots: 1 },
  { plantKey: "masdevallia", mustHave: false, pots: 1 },
  { plantKey: "begonia-rex", mustHave: true, pots: 1 },
];

export async function seedPlants(opts: { siteId: number }) {
  const rows = await db().select({ id: spots.id, name: spots.name }).from(spots).where(eq(spots.siteId, opts.siteId));
  const idOf = new Map(rows.map((r) => [r.name, r.id]));
  const standing = STANDING.filter((s) => idOf.has(s.spot)).map(({ spot, ...s }) => ({
    spotId: idOf.get(spot)!,
    ...s,
  }));
  if (standing.length) await db().insert(spotPlants).values(standing);
  await db()
    .insert(wishlist)
    .values(WISHES.map((w) => ({ siteId: opts.siteId, ...w })));
}
