// Issue 17: a carer's one-click Remove deleted the owner's must-have with no confirmation, and the
// audit row did not name the plant. The server now keeps a must-have until the removal is confirmed,
// hands back what was removed (for "put it back"), and names the plant in the audit row.
import { beforeAll, describe, expect, it } from "vitest";
import { and, eq } from "drizzle-orm";
import { createSession, generateSessionToken } from "~/.server/auth";
import { db } from "~/.server/db";
import { auditLog, wishlist } from "~/db/schema.server";
import { action as wishlistAction } from "~/routes/wishlist";
import { addMember, makeSite, makeUser } from "./helpers";

const post = (token: string, siteId: number, form: Record<string, string>) =>
  wishlistAction({
    request: new Request(`http://127.0.0.1/sites/${siteId}/wishlist`, {
      method: "POST",
      headers: { Cookie: `nw_session=${token}`, Origin: "http://127.0.0.1" },
      body: new URLSearchParams(form),
    }),
    params: { siteId: String(siteId) },
    context: {},
  } as never) as Promise<Record<string, unknown>>;

let site: { id: number };
let carerToken: string;

beforeAll(async () => {
  const owner = await makeUser();
  const carer = await makeUser();
  site = await makeSite(owner);
  await addMember(site, carer, "carer");
  const token = generateSessionToken();
  await createSession(token, carer.id);
  carerToken = token;
  await db()
    .insert(wishlist)
    .values([
      { siteId: site.id, plantKey: "cattleya", mustHave: true, pots: 2 },
      { siteId: site.id, plantKey: "masdevallia", mustHave: false, pots: 1 },
    ]);
});

const wishes = async () =>
  (await db().select().from(wishlist).where(eq(wishlist.siteId, site.id))).map((w) => w.plantKey).sort();

describe("removing from the wishlist", () => {
  it("keeps a must-have until the removal is confirmed, then hands back what went", async () => {
    const first = await post(carerToken, site.id, { intent: "remove", plantKey: "cattleya" });
    expect(first.confirm).toMatchObject({ plantKey: "cattleya" });
    expect(await wishes()).toEqual(["cattleya", "masdevallia"]);

    const confirmed = await post(carerToken, site.id, { intent: "remove", plantKey: "cattleya", confirm: "yes" });
    expect(confirmed.removed).toMatchObject({ plantKey: "cattleya", mustHave: true, pots: 2 });
    expect(await wishes()).toEqual(["masdevallia"]);
  });

  it("removes a plant that is not a must-have at once, and names the plant in the audit row", async () => {
    const done = await post(carerToken, site.id, { intent: "remove", plantKey: "masdevallia" });
    expect(done.removed).toMatchObject({ plantKey: "masdevallia", mustHave: false });
    const [row] = await db()
      .select()
      .from(auditLog)
      .where(and(eq(auditLog.siteId, site.id), eq(auditLog.action, "wishlist.remove")))
      .orderBy(auditLog.id)
      .limit(1);
    expect(row.detail).toMatchObject({ plantKey: "cattleya", plant: "Cattleya and hybrids", mustHave: true, pots: 2 });
  });

  it("puts a removed must-have back as it was", async () => {
    await post(carerToken, site.id, { intent: "save", restore: "1", plantKey: "cattleya", pots: "2", mustHave: "on" });
    const [w] = await db()
      .select()
      .from(wishlist)
      .where(and(eq(wishlist.siteId, site.id), eq(wishlist.plantKey, "cattleya")));
    expect(w).toMatchObject({ mustHave: true, pots: 2 });
  });
});
