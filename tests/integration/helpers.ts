// Test data made through the same tables the app uses.
import { eq, sql } from "drizzle-orm";
import { beforeAll, afterAll } from "vitest";
import { hashPassword } from "~/.server/auth";
import { db } from "~/.server/db";
import { ReadingWriter } from "~/.server/ingest/writer";
import { configureMailer, startMailSink } from "~/.server/mail";
import type { Reading } from "~/domain/ingest/payload";
import { DEMO_SCENARIO, DEMO_SITE, generate, type SimSpot } from "../../simulator/model";
import { hashSensorSecret, newSensorSecret } from "~/.server/secrets";
import { memberships, placements, sensors, sites, spots, users, type Role } from "~/db/schema.server";

let counter = 0;
const uniq = () => `${process.pid}-${Date.now()}-${++counter}`;

export async function makeUser(opts: { password?: string; isAdmin?: boolean } = {}) {
  const email = `u${uniq()}@example.test`;
  const password = opts.password ?? "correct horse battery";
  const [u] = await db()
    .insert(users)
    .values({ email, name: "Test grower", passwordHash: await hashPassword(password), isAdmin: opts.isAdmin ?? false })
    .returning();
  return { ...u, password };
}

export async function makeSite(owner: { id: number }, opts: { timeZone?: string; latitude?: number } = {}) {
  const [site] = await db()
    .insert(sites)
    .values({
      name: `Site ${uniq()}`,
      latitude: opts.latitude ?? 51.7,
      longitude: -2.2,
      timeZone: opts.timeZone ?? "Europe/London",
    })
    .returning();
  await db().insert(memberships).values({ userId: owner.id, siteId: site.id, role: "owner" });
  return site;
}

export async function addMember(site: { id: number }, user: { id: number }, role: Role) {
  await db().insert(memberships).values({ userId: user.id, siteId: site.id, role });
}

export async function makeSpot(site: { id: number }, opts: { indoor?: boolean; name?: string } = {}) {
  const [spot] = await db()
    .insert(spots)
    .values({ siteId: site.id, name: opts.name ?? `Spot ${uniq()}`, indoor: opts.indoor ?? true })
    .returning();
  return spot;
}

export async function makeSensor(
  site: { id: number },
  spot?: { id: number },
  placedFrom = new Date("2020-01-01T00:00:00Z"),
) {
  const secret = newSensorSecret();
  const [sensor] = await db()
    .insert(sensors)
    .values({ siteId: site.id, name: `Sensor ${uniq()}`, secretHash: hashSensorSecret(secret) })
    .returning();
  // Made when it starts, as a placement made live is (not dated back).
  if (spot)
    await db()
      .insert(placements)
      .values({ sensorId: sensor.id, spotId: spot.id, fromAt: placedFrom, createdAt: placedFrom });
  return { ...sensor, secret };
}

/** Hourly aggregation straight from raw readings, independent of the writer's incremental upserts. */
export async function freshRollups(spotId: number) {
  const res = await db().execute<{
    hour: string;
    n: number;
    tmin: number;
    tmax: number;
    tsum: number;
    hn: number;
    hsum: number;
  }>(sql`
    select r.measured_at - ((r.measured_at at time zone si.time_zone) - date_trunc('hour', r.measured_at at time zone si.time_zone)) as hour,
      count(r.temperature)::int as n, min(r.temperature + coalesce((s.calibration->>'temperature')::real, 0)) as tmin,
      max(r.temperature + coalesce((s.calibration->>'temperature')::real, 0)) as tmax,
      sum(r.temperature + coalesce((s.calibration->>'temperature')::real, 0)) as tsum,
      count(r.humidity)::int as hn, sum(r.humidity) as hsum
    from placements p join readings r on r.sensor_id = p.sensor_id and r.measured_at >= p.from_at and (p.to_at is null or r.measured_at < p.to_at)
    join sensors s on s.id = p.sensor_id join spots sp on sp.id = p.spot_id join sites si on si.id = sp.site_id
    where p.spot_id = ${spotId} group by 1 order by 1`);
  return res.rows;
}

export async function storedRollups(spotId: number) {
  const res = await db().execute<{
    hour: string;
    n: number;
    tmin: number;
    tmax: number;
    tsum: number;
    hn: number;
    hsum: number;
  }>(sql`
    select hour, t_n as n, t_min as tmin, t_max as tmax, t_sum as tsum, h_n as hn, h_sum as hsum
    from hourly_rollups where spot_id = ${spotId} and (t_n > 0 or h_n > 0) order by hour`);
  return res.rows;
}

/** The local SMTP sink for this test file, with the mailer pointed at it (e-mail is faked at the network edge only). */
export function useMailSink() {
  let sink: Awaited<ReturnType<typeof startMailSink>> | undefined;
  beforeAll(async () => {
    sink = await startMailSink({ port: 0 });
    configureMailer(`smtp://127.0.0.1:${sink.port}`);
  });
  afterAll(async () => {
    await sink?.close();
  });
  return {
    get port() {
      return sink!.port;
    },
  };
}

/**
 * A spot of `site` whose sensor has `days` of the demo's simulated readings up to `now` (ten-minute
 * steps, the demo's weather), placed a day before the first; no sensor when `days` is 0.
 */
export async function simulatedSpot(
  site: { id: number },
  sim: SimSpot,
  opts: { days: number; seed: number; now: Date; indoor?: boolean; name?: string },
) {
  const spot = await makeSpot(site, { indoor: opts.indoor ?? true, name: opts.name });
  await db().update(spots).set({ facing: sim.facing }).where(eq(spots.id, spot.id));
  if (opts.days === 0) return spot;
  const from = new Date(opts.now.getTime() - opts.days * 86_400_000);
  const sensor = await makeSensor(site, spot, new Date(from.getTime() - 86_400_000));
  const rows: Reading[] = [];
  for (const r of generate(DEMO_SITE, sim, DEMO_SCENARIO, {
    from,
    to: opts.now,
    intervalMs: 600_000,
    sensorSeed: opts.seed,
  })) {
    rows.push({
      sensorId: sensor.id,
      measuredAt: r.measuredAt,
      temperature: r.temperature,
      humidity: r.humidity,
      lux: null,
      battery: r.battery,
    });
  }
  await new ReadingWriter().write(rows);
  return spot;
}
