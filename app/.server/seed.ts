// Demo data: an invented household with five spots, a sensor in each, a year of simulated history
// written through the bulk path, and credentials for the live simulator. Runs only on an empty database.
import { mkdirSync, writeFileSync } from "node:fs";
import path from "node:path";
import { sql } from "drizzle-orm";
import { hashPassword } from "~/.server/auth";
import { db } from "~/.server/db";
import { writer } from "~/.server/ingest/writer";
import { memberships, placements, sensors, sites, spots, users } from "~/db/schema.server";
import { hashSensorSecret, newSensorSecret } from "~/.server/secrets";
import { seedSharing } from "~/.server/seed-sharing";
import { seedPlants } from "~/.server/seed-plants";
import { seedAlerts } from "~/.server/seed-alerts";
import { backfill } from "../../simulator/backfill";
import { DEMO_HOUSEHOLD, type DemoSensorCredentials } from "../../simulator/demo";
import { CREDENTIALS_FILE } from "../../simulator/live";

export async function seedDemo(opts: { log?: (s: string) => void; backfillDays?: number; intervalS?: number } = {}) {
  const log = opts.log ?? console.log;
  const [{ n }] = (await db().execute<{ n: number }>(sql`select count(*)::int as n from users`)).rows;
  if (n > 0) return false;
  log("Empty database: creating the demo household…");
  const h = DEMO_HOUSEHOLD;
  const people = Object.fromEntries(
    await Promise.all(
      Object.entries(h.people).map(async ([role, p]) => {
        const [u] = await db()
          .insert(users)
          .values({
            email: p.email,
            name: p.name,
            passwordHash: await hashPassword(p.password),
            isAdmin: role === "admin",
          })
          .returning({ id: users.id });
        return [role, u.id] as const;
      }),
    ),
  ) as Record<keyof typeof h.people, number>;
  const [site] = await db().insert(sites).values(h.site).returning({ id: sites.id });
  await db()
    .insert(memberships)
    .values([
      { userId: people.owner, siteId: site.id, role: "owner" },
      { userId: people.carer, siteId: site.id, role: "carer" },
      { userId: people.mentor, siteId: site.id, role: "mentor" },
    ]);
  const days = opts.backfillDays ?? 365;
  const to = new Date(Math.floor(Date.now() / 60_000) * 60_000);
  const from = new Date(to.getTime() - days * 86_400_000);
  const creds: DemoSensorCredentials = [];
  const targets = [];
  for (const [i, s] of h.spots.entries()) {
    const [spot] = await db()
      .insert(spots)
      .values({
        siteId: site.id,
        name: s.name,
        indoor: s.indoor,
        facing: s.facing,
        glazing: s.glazing ?? null,
        capacity: s.capacity,
        notes: s.notes,
      })
      .returning({ id: spots.id });
    const secret = newSensorSecret();
    const [sensor] = await db()
      .insert(sensors)
      .values({
        siteId: site.id,
        name: s.sensor.name,
        secretHash: hashSensorSecret(secret),
        channels: s.sensor.channels,
      })
      .returning({ id: sensors.id });
    await db()
      .insert(placements)
      .values({ sensorId: sensor.id, spotId: spot.id, fromAt: new Date(from.getTime() - 3_600_000) });
    creds.push({ sensorId: sensor.id, secret, spotIndex: i });
    targets.push({ sensorId: sensor.id, spot: s.sim, seed: s.sensor.seed });
  }
  mkdirSync(path.dirname(CREDENTIALS_FILE), { recursive: true });
  writeFileSync(CREDENTIALS_FILE, JSON.stringify(creds, null, 2), { mode: 0o600 });

  if (days > 0) {
    const started = performance.now();
    await db().execute(
      sql`select ensure_reading_partitions(${from.toISOString()}::timestamptz, ${Math.ceil(days / 30) + 2}::int)`,
    );
    const { written } = await backfill({
      site: h.site,
      scenario: h.scenario,
      targets,
      from,
      to,
      intervalMs: (opts.intervalS ?? 300) * 1000,
      write: (rows) => writer().write(rows),
      progress: (done, total) =>
        log(`Backfill: ${Math.round((done / total) * 100)} % (${done.toLocaleString("en")} readings)`),
    });
    const s = (performance.now() - started) / 1000;
    log(
      `Backfilled ${written.toLocaleString("en")} readings over ${days} days in ${s.toFixed(1)} s (${Math.round(written / s).toLocaleString("en")}/s)`,
    );
  }
  await seedSharing({ siteId: site.id, ownerId: people.owner, carerId: people.carer, mentorId: people.mentor });
  await seedPlants({ siteId: site.id });
  await seedAlerts(site.id, log);
  await db().execute(sql`analyze`);
  return true;
}
