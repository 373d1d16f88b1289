// Water checks per site: logged by carers and owners, read by everyone in the site.
import { and, asc, eq } from "drizzle-orm";
import { db } from "~/.server/db";
import { checkEc, checkPpm, checkSample } from "~/domain/water/logged-check";
import { waterVerdict } from "~/domain/water/verdict";
import { auditLog, users, waterChecks } from "~/db/schema.server";

export async function listWaterChecks(siteId: number) {
  const rows = await db()
    .select({
      id: waterChecks.id,
      source: waterChecks.source,
      checkedOn: waterChecks.checkedOn,
      ppm: waterChecks.ppm,
      ec: waterChecks.ec,
      ecScale: waterChecks.ecScale,
      ph: waterChecks.ph,
      byName: users.name,
    })
    .from(waterChecks)
    .leftJoin(users, eq(users.id, waterChecks.byUserId))
    .where(eq(waterChecks.siteId, siteId))
    .orderBy(asc(waterChecks.checkedOn), asc(waterChecks.id));
  return rows.map((r) => ({ ...r, ecExact: checkEc(r), ...waterVerdict(checkSample(r)) }));
}

/** `ecScale`: the meter's ppm per µS/cm when the grower gave it, for a TDS or an EC meter alike. */
export type NewWaterCheck = {
  source: string;
  checkedOn: Date;
  ppm: number | null;
  ec: number | null;
  ecScale: 0.5 | 0.7 | null;
  ph: number | null;
};

export async function addWaterCheck(siteId: number, actorId: number, check: NewWaterCheck) {
  return db().transaction(async (tx) => {
    const [row] = await tx
      .insert(waterChecks)
      .values({ siteId, byUserId: actorId, ...check })
      .returning();
    await tx.insert(auditLog).values({
      siteId,
      actorId,
      action: "water.add",
      detail: { checkId: row.id, source: check.source, ppm: checkPpm(check), ec: checkEc(check), ph: check.ph },
    });
    return row;
  });
}

export async function deleteWaterCheck(siteId: number, actorId: number, checkId: number) {
  await db().transaction(async (tx) => {
    const [row] = await tx
      .delete(waterChecks)
      .where(and(eq(waterChecks.id, checkId), eq(waterChecks.siteId, siteId)))
      .returning();
    if (row)
      await tx
        .insert(auditLog)
        .values({ siteId, actorId, action: "water.delete", detail: { checkId, source: row.source } });
  });
}
