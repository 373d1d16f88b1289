// SQL the alert engine and pages share: calibrated points of a spot, who gets alerts for a site.
import { calibratedSql } from "~/.server/ingest/calibrated";
import type pg from "pg";
import { pool } from "~/.server/db";
import { ALERT_KINDS } from "~/domain/alerts/rules";
import type { Role } from "~/db/schema.server";

export type SpotPoint = { at: Date; t: number | null; h: number | null; battery: number | null };
type Queryable = Pick<pg.Pool, "query"> | pg.PoolClient;

/** Calibrated readings of the sensors placed in the spot at the time, from < at ≤ to, oldest first. */
export async function spotPoints(spotId: number, from: Date, to: Date, q: Queryable = pool()): Promise<SpotPoint[]> {
  const res = await q.query<{ at: Date; t: number | null; h: number | null; battery: number | null }>(
    `SELECT r.measured_at AS at, ${calibratedSql("temperature", "r.temperature")} AS t,
       ${calibratedSql("humidity", "r.humidity")} AS h,
       r.battery
     FROM placements p JOIN sensors s ON s.id = p.sensor_id
     JOIN readings r ON r.sensor_id = p.sensor_id AND r.measured_at >= p.from_at AND (p.to_at IS NULL OR r.measured_at < p.to_at)
     WHERE p.spot_id = $1 AND r.measured_at > $2 AND r.measured_at <= $3
     ORDER BY r.measured_at`,
    [spotId, from, to],
  );
  return res.rows;
}

export type Recipient = {
  userId: number;
  email: string;
  unit: "C" | "F";
  wantsEmail: boolean;
  kinds: string[];
  quietFrom: number | null;
  quietTo: number | null;
};


/**
 * What a member who never chose gets by e-mail. Owners and carers look after the plants, so they
 * get every kind; a mentor advises from afar and hears of cold snaps and silent sensors only when
 * they tick them (the alerts page's e-mail settings): otherwise a mentor far away is woken for a
 * frost nobody asked them to act on.
 */
export function defaultKinds(role: Role): string[] {
  return role === "mentor" ? ALERT_KINDS.filter((k) => k !== "cold" && k !== "silent") : ALERT_KINDS;
}

/** Every member of the site with their alert preferences (defaults for their role when they never saved any). */
export async function siteRecipients(siteId: number, q: Queryable = pool()): Promise<Recipient[]> {
  const res = await q.query<{ user_id: number; email: string; unit: "C" | "F"; role: Role; wants: boolean | null; kinds: string[] | null; quiet_from: number | null; quiet_to: number | null }>(
    `SELECT u.id AS user_id, u.email, u.temperature_unit AS unit, m.role, p.email AS wants, p.kinds, p.quiet_from, p.quiet_to
     FROM memberships m JOIN users u ON u.id = m.user_id
     LEFT JOIN alert_preferences p ON p.user_id = m.user_id AND p.site_id = m.site_id
     WHERE m.site_id = $1 ORDER BY u.id`,
    [siteId],
  );
  return res.rows.map((r) => ({
    userId: r.user_id,
    email: r.email,
    unit: r.unit,
    wantsEmail: r.wants ?? true,
    kinds: r.kinds ?? defaultKinds(r.role),
    quietFrom: r.quiet_from,
    quietTo: r.quiet_to,
  }));
}
