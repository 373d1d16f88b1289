// Forecast warnings as one more source of the alert engine: for each spot with placed plants that is
// outdoors (or indoors with no heating floor in its readings: an unheated porch or room says so by
// falling with the weather), the stored forecast runs through the spot's model (spotForecast) and
// every night 12–48 h ahead likely to cross its most tender plant's damage line is stored in
// forecast_warnings and e-mailed once, with an all-clear when a later forecast takes it back.
// Run by the weather job after each forecast top-up and on an interval, with an injected clock.
import { pool } from "~/.server/db";
import { publicUrl } from "~/.server/env";
import { sendMail } from "~/.server/mail";
import { projectedProfile, spotForecast } from "~/.server/projections";
import { siteRecipients } from "~/.server/alerts/store";
import {
  forecastClearMessage,
  forecastWarningMessage,
  mostTender,
  planForecast,
  type ForecastWarningFacts,
  type NightWarning,
  type TenderPlant,
} from "~/domain/alerts/forecast-warning";
import { linesOf, shortName } from "~/domain/fit/facts";
import { plantByKey, type PlantProfile } from "~/domain/plants/library";

const HOUR = 3_600_000;
/** A forecast older than this warns of nothing (the job has been failing): stale numbers mislead. */
const STALE_FORECAST_MS = 24 * HOUR;
/** A warned night is over (no longer shown) this long after its expected lowest hour. */
const NIGHT_OVER_MS = 6 * HOUR;

type SpotRow = { id: number; name: string; indoor: boolean; site_id: number; site_name: string; time_zone: string };
type WarningRow = {
  id: number;
  spot_id: number;
  night: string;
  plant_name: string;
  damage_c: number;
  likely_c: number;
  expected_low_c: number;
  lower_bound_c: number;
  leaf_low_c: number | null;
  low_at: Date;
  notified_at: Date | null;
  cleared_at: Date | null;
};

export type ForecastRunResult = { spots: number; warned: number; cleared: number };

/** The damage line of a placed plant: the fit model's line for its group, or a site's own profile's. */
async function tenderPlant(spotId: number, siteId: number): Promise<TenderPlant | null> {
  const placed = await pool().query<{ plant_key: string }>(`SELECT plant_key FROM spot_plants WHERE spot_id = $1`, [spotId]);
  if (placed.rows.length === 0) return null;
  const custom = await pool().query<{ key: string; profile: Partial<PlantProfile> }>(`SELECT key, profile FROM custom_plants WHERE site_id = $1`, [siteId]);
  const plants: { name: string; damageC: number }[] = [];
  for (const { plant_key } of placed.rows) {
    const lib = plantByKey(plant_key);
    if (lib) {
      plants.push({ name: shortName(lib), damageC: linesOf(lib).damageNightC });
      continue;
    }
    const own = custom.rows.find((c) => c.key === plant_key)?.profile;
    if (own && typeof own.name === "string" && typeof own.minNightC === "number") {
      plants.push({ name: own.name, damageC: typeof own.damageNightC === "number" ? own.damageNightC : own.minNightC - 4 });
    }
  }
  return mostTender(plants);
}

const facts = (r: WarningRow, spotName: string): ForecastWarningFacts => ({
  night: r.night,
  spotName,
  plantName: r.plant_name,
  damageC: r.damage_c,
  likelyC: r.likely_c,
  expectedLowC: r.expected_low_c,
  lowerBoundC: r.lower_bound_c,
  leafLowC: r.leaf_low_c,
  lowAt: r.low_at,
});

const columns = (w = "") =>
  `${w}id, ${w}spot_id, to_char(${w}night, 'YYYY-MM-DD') AS night, ${w}plant_name, ${w}damage_c, ${w}likely_c, ${w}expected_low_c, ${w}lower_bound_c, ${w}leaf_low_c, ${w}low_at, ${w}notified_at, ${w}cleared_at`;
const WARNING_COLUMNS = columns();

export class ForecastWarnings {
  private readonly now: () => number;
  private readonly log: (s: string) => void;
  private chain: Promise<unknown> = Promise.resolve();

  constructor(opts: { now?: () => number; log?: (s: string) => void } = {}) {
    this.now = opts.now ?? Date.now;
    this.log = opts.log ?? (() => {});
  }

  /** One pass over a site's spots (or every site's): runs one at a time, never two at once. */
  run(siteId?: number): Promise<ForecastRunResult> {
    const next = this.chain.then(() => this.pass(siteId ?? null));
    this.chain = next.catch(() => {});
    return next;
  }

  /** Resolves once the pass under way (if any) is done. */
  async idle() {
    await this.chain;
  }

  private async pass(siteId: number | null): Promise<ForecastRunResult> {
    const now = this.now();
    const spots = (await pool().query<SpotRow>(
      `SELECT sp.id, sp.name, sp.indoor, sp.site_id, si.name AS site_name, si.time_zone
       FROM spots sp JOIN sites si ON si.id = sp.site_id
       WHERE ($1::int IS NULL OR sp.site_id = $1)
         AND (EXISTS (SELECT 1 FROM spot_plants p WHERE p.spot_id = sp.id)
              OR EXISTS (SELECT 1 FROM forecast_warnings w WHERE w.spot_id = sp.id AND w.ended_at IS NULL))
       ORDER BY sp.id`,
      [siteId],
    )).rows;
    const result: ForecastRunResult = { spots: 0, warned: 0, cleared: 0 };
    for (const spot of spots) {
      try {
        const r = await this.spot(spot, now);
        result.spots += r.checked ? 1 : 0;
        result.warned += r.warned;
        result.cleared += r.cleared;
      } catch (err) {
        console.error(`[forecast] spot ${spot.id} not checked:`, err instanceof Error ? err.message : err);
      }
    }
    return result;
  }

  private async spot(spot: SpotRow, now: number): Promise<{ checked: boolean; warned: number; cleared: number }> {
    const none = { checked: false, warned: 0, cleared: 0 };
    const at = new Date(now);
    // Nights that have passed are over: no longer shown, no all-clear.
    await pool().query(`UPDATE forecast_warnings SET ended_at = $2 WHERE spot_id = $1 AND ended_at IS NULL AND low_at < $3`, [spot.id, at, new Date(now - NIGHT_OVER_MS)]);
    const tender = await tenderPlant(spot.id, spot.site_id);
    if (!tender) {
      // The plants left: nothing to warn about.
      await pool().query(`UPDATE forecast_warnings SET ended_at = $2 WHERE spot_id = $1 AND ended_at IS NULL`, [spot.id, at]);
      return none;
    }
    if (spot.indoor) {
      // A heated room holds its floor whatever the night does: no forecast warning there.
      const profile = await projectedProfile(spot.id, { now: at });
      if (!profile?.model) return none;
      if (profile.model.heatingFloor) {
        await pool().query(`UPDATE forecast_warnings SET ended_at = $2 WHERE spot_id = $1 AND ended_at IS NULL`, [spot.id, at]);
        return none;
      }
    }
    const forecast = await spotForecast(spot.id, { now: at });
    if (!forecast || !forecast.forecastAt || now - forecast.forecastAt.getTime() > STALE_FORECAST_MS) return none;
    const open = (await pool().query<WarningRow>(
      `SELECT ${WARNING_COLUMNS} FROM forecast_warnings WHERE spot_id = $1 AND ended_at IS NULL AND cleared_at IS NULL`,
      [spot.id],
    )).rows;
    const plan = planForecast({ now, nights: forecast.nights, tender, open });
    const values = (n: NightWarning) => [spot.id, n.key, tender.name, tender.damageC, n.likely, n.expectedLow, n.lowerBound, n.leafLow, n.at, forecast.forecastAt];
    let warned = 0;
    let cleared = 0;
    for (const n of plan.warn) {
      // A new night, or one cleared (or ended with its plants gone) that crosses again: a new event.
      const row = (await pool().query<{ id: number }>(
        `INSERT INTO forecast_warnings (spot_id, night, plant_name, damage_c, likely_c, expected_low_c, lower_bound_c, leaf_low_c, low_at, forecast_at, opened_at)
         VALUES ($1, $2::date, $3, $4, $5, $6, $7, $8, $9, $10, $11)
         ON CONFLICT (spot_id, night) DO UPDATE SET plant_name = $3, damage_c = $4, likely_c = $5, expected_low_c = $6, lower_bound_c = $7, leaf_low_c = $8,
           low_at = $9, forecast_at = $10, opened_at = $11, notified_at = NULL, cleared_at = NULL, clear_notified_at = NULL, ended_at = NULL
         WHERE forecast_warnings.cleared_at IS NOT NULL OR forecast_warnings.ended_at IS NOT NULL
         RETURNING id`,
        [...values(n), at],
      )).rows[0];
      if (!row) continue;
      warned++;
      this.log(`Forecast warning for ${spot.name}: night of ${n.key} likely ${n.likely.toFixed(1)} °C, ${tender.name}'s line ${tender.damageC} °C`);
    }
    for (const n of plan.keep) {
      await pool().query(
        `UPDATE forecast_warnings SET plant_name = $3, damage_c = $4, likely_c = $5, expected_low_c = $6, lower_bound_c = $7, leaf_low_c = $8, low_at = $9, forecast_at = $10
         WHERE spot_id = $1 AND night = $2::date AND ended_at IS NULL AND cleared_at IS NULL`,
        values(n),
      );
    }
    for (const key of plan.clear) {
      const n = forecast.nights.find((x) => x.key === key)!;
      const likely = Math.min(n.lowerBound, n.leafLow ?? Number.POSITIVE_INFINITY);
      const done = await pool().query(
        `UPDATE forecast_warnings SET cleared_at = $3, likely_c = $4, expected_low_c = $5, lower_bound_c = $6, leaf_low_c = $7, low_at = $8, forecast_at = $9
         WHERE spot_id = $1 AND night = $2::date AND ended_at IS NULL AND cleared_at IS NULL`,
        [spot.id, key, at, likely, n.expectedLow, n.lowerBound, n.leafLow, n.at, forecast.forecastAt],
      );
      if ((done.rowCount ?? 0) > 0) {
        cleared++;
        this.log(`Forecast all-clear for ${spot.name}: night of ${key} now likely ${likely.toFixed(1)} °C`);
      }
    }
    await this.deliverPending(spot);
    return { checked: true, warned, cleared };
  }

  /** Sends what is stored but not yet sent: new warnings, all-clears, and any a failed send left. */
  private async deliverPending(spot: SpotRow) {
    const pending = (await pool().query<WarningRow & { message: "warn" | "clear" }>(
      `SELECT ${WARNING_COLUMNS}, 'warn' AS message FROM forecast_warnings WHERE spot_id = $1 AND ended_at IS NULL AND cleared_at IS NULL AND notified_at IS NULL
       UNION ALL
       SELECT ${WARNING_COLUMNS}, 'clear' FROM forecast_warnings WHERE spot_id = $1 AND ended_at IS NULL AND cleared_at IS NOT NULL AND clear_notified_at IS NULL
       ORDER BY id`,
      [spot.id],
    )).rows;
    for (const w of pending) await this.deliver(spot, w, w.message);
  }

  /** Claims the message on the row, then e-mails everyone who takes cold-snap alerts (owners, carers, mentors who opted in). */
  private async deliver(spot: SpotRow, w: WarningRow, message: "warn" | "clear") {
    const column = message === "warn" ? "notified_at" : "clear_notified_at";
    const claim = await pool().query<{ notified_at: Date | null }>(
      `UPDATE forecast_warnings SET ${column} = $2 WHERE id = $1 AND ${column} IS NULL RETURNING notified_at`,
      [w.id, new Date(this.now())],
    );
    if (claim.rowCount === 0) return;
    // An all-clear for a warning nobody was sent is not news.
    if (message === "clear" && !w.notified_at) return;
    const base = publicUrl();
    let failed = false;
    for (const r of await siteRecipients(spot.site_id)) {
      if (!r.wantsEmail || !r.kinds.includes("cold")) continue;
      const ctx = {
        siteName: spot.site_name,
        spotName: spot.name,
        spotUrl: `${base}/sites/${spot.site_id}/spots/${spot.id}`,
        alertsUrl: `${base}/sites/${spot.site_id}/alerts`,
        timeZone: spot.time_zone,
        unit: r.unit,
      };
      const mail = message === "warn" ? forecastWarningMessage(ctx, facts(w, spot.name)) : forecastClearMessage(ctx, facts(w, spot.name));
      try {
        await sendMail({ to: r.email, subject: mail.subject, text: mail.text, html: mail.html });
      } catch (err) {
        failed = true;
        console.error(`[forecast] e-mail to ${r.email} not sent (will retry):`, err instanceof Error ? err.message : err);
      }
    }
    // A failed send is tried again on the next pass (the others may then hear twice: better than a frost unheard).
    if (failed) await pool().query(`UPDATE forecast_warnings SET ${column} = NULL WHERE id = $1`, [w.id]);
  }
}

/** Open forecast warnings of a site, for the banner: nights still to come or under way. */
export async function openForecastWarnings(siteId: number, now = new Date()) {
  const rows = (await pool().query<WarningRow & { spot_name: string }>(
    `SELECT ${columns("w.")}, sp.name AS spot_name
     FROM forecast_warnings w JOIN spots sp ON sp.id = w.spot_id
     WHERE sp.site_id = $1 AND w.ended_at IS NULL AND w.cleared_at IS NULL AND w.low_at > $2
     ORDER BY w.low_at LIMIT 10`,
    [siteId, new Date(now.getTime() - NIGHT_OVER_MS)],
  )).rows;
  return rows.map((r) => ({ id: r.id, spotId: r.spot_id, ...facts(r, r.spot_name), lowAt: r.low_at.toISOString() }));
}

/** Starts the interval pass; the weather job calls `runner.run(siteId)` after each forecast it stores. */
export function startForecastWarnings(opts: { everyMs?: number; now?: () => number; log?: (s: string) => void } = {}) {
  const runner = new ForecastWarnings(opts);
  const tick = () => {
    runner.run().catch((err) => console.error("[forecast] pass failed:", err instanceof Error ? err.message : err));
  };
  const timer = setInterval(tick, opts.everyMs ?? 30 * 60_000);
  timer.unref();
  return {
    runner,
    stop: async () => {
      clearInterval(timer);
      await runner.idle();
    },
  };
}
