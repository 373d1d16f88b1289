// Forecast warnings as one more source of the alert engine: for each spot with placed plants that is
// outdoors (or indoors with no heating floor in its readings: an unheated porch or room says so by
// falling with the weather), the stored forecast runs through the spot's model (spotForecast) and
// every night 12–48 h ahead likely to cross its most tender plant's damage line is stored in
// forecast_warnings and e-mailed once, with an all-clear when a later forecast takes it back.
// Run by the weather job after each forecast top-up and on an interval, with an injected clock.
import { systemClock, type Clock } from "~/.server/alerts/clock";
import { Notifier, wantsKind } from "~/.server/alerts/notifier";
import * as store from "~/.server/alerts/store";
import type { ForecastSpot, ForecastWarning } from "~/.server/alerts/store";
import { publicUrl } from "~/.server/env";
import { projectedProfile, spotForecast } from "~/.server/projections";
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

export type ForecastRunResult = { spots: number; warned: number; cleared: number };

/** The damage line of a placed plant: the fit model's line for its group, or a site's own profile's. */
async function tenderPlant(spotId: number, siteId: number): Promise<TenderPlant | null> {
  const { placed, custom } = await store.plantsOfSpot(spotId, siteId);
  if (placed.length === 0) return null;
  const plants: { name: string; damageC: number }[] = [];
  for (const key of placed) {
    const lib = plantByKey(key);
    if (lib) {
      plants.push({ name: shortName(lib), damageC: linesOf(lib).damageNightC });
      continue;
    }
    const own = custom.find((c) => c.key === key)?.profile as Partial<PlantProfile> | undefined;
    if (own && typeof own.name === "string" && typeof own.minNightC === "number") {
      plants.push({
        name: own.name,
        damageC: typeof own.damageNightC === "number" ? own.damageNightC : own.minNightC - 4,
      });
    }
  }
  return mostTender(plants);
}

const facts = (r: ForecastWarning, spotName: string): ForecastWarningFacts => ({
  night: r.night,
  spotName,
  plantName: r.plantName,
  damageC: r.damageC,
  likelyC: r.likelyC,
  expectedLowC: r.expectedLowC,
  lowerBoundC: r.lowerBoundC,
  leafLowC: r.leafLowC,
  lowAt: r.lowAt,
});

export type ForecastWarningsOptions = { clock?: Clock; notifier?: Notifier; log?: (s: string) => void };

export class ForecastWarnings {
  private readonly clock: Clock;
  private readonly notifier: Notifier;
  private readonly log: (s: string) => void;
  private chain: Promise<unknown> = Promise.resolve();

  constructor(opts: ForecastWarningsOptions = {}) {
    this.clock = opts.clock ?? opts.notifier?.clock ?? systemClock;
    this.log = opts.log ?? (() => {});
    this.notifier = opts.notifier ?? new Notifier({ clock: this.clock, log: this.log });
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
    const now = this.clock.now().getTime();
    const result: ForecastRunResult = { spots: 0, warned: 0, cleared: 0 };
    for (const spot of await store.forecastSpots(siteId)) {
      try {
        const r = await this.spot(spot, now);
        result.spots += r.checked ? 1 : 0;
        result.warned += r.warned;
        result.cleared += r.cleared;
      } catch (err) {
        console.error(`[forecast] spot ${spot.id} not checked:`, store.failure(err));
      }
    }
    return result;
  }

  private async spot(spot: ForecastSpot, now: number): Promise<{ checked: boolean; warned: number; cleared: number }> {
    const none = { checked: false, warned: 0, cleared: 0 };
    const at = new Date(now);
    // Nights that have passed are over: no longer shown, no all-clear.
    await store.endForecastWarnings(spot.id, at, new Date(now - NIGHT_OVER_MS));
    const tender = await tenderPlant(spot.id, spot.siteId);
    if (!tender) {
      // The plants left: nothing to warn about.
      await store.endForecastWarnings(spot.id, at);
      return none;
    }
    if (spot.indoor) {
      // A heated room holds its floor whatever the night does: no forecast warning there.
      const profile = await projectedProfile(spot.id, { now: at });
      if (!profile?.model) return none;
      if (profile.model.heatingFloor) {
        await store.endForecastWarnings(spot.id, at);
        return none;
      }
    }
    const forecast = await spotForecast(spot.id, { now: at });
    if (!forecast || !forecast.forecastAt || now - forecast.forecastAt.getTime() > STALE_FORECAST_MS) return none;
    const open = await store.standingWarnings(spot.id);
    const plan = planForecast({ now, nights: forecast.nights, tender, open });
    const figures = (n: NightWarning) => ({
      plantName: tender.name,
      damageC: tender.damageC,
      likelyC: n.likely,
      expectedLowC: n.expectedLow,
      lowerBoundC: n.lowerBound,
      leafLowC: n.leafLow,
      lowAt: n.at,
      forecastAt: forecast.forecastAt,
    });
    let warned = 0;
    let cleared = 0;
    for (const n of plan.warn) {
      // A new night, or one cleared (or ended with its plants gone) that crosses again: a new event.
      if ((await store.openForecastWarning(spot.id, n.key, figures(n), at)) === null) continue;
      warned++;
      this.log(
        `Forecast warning for ${spot.name}: night of ${n.key} likely ${n.likely.toFixed(1)} °C, ${tender.name}'s line ${tender.damageC} °C`,
      );
    }
    for (const n of plan.keep) await store.updateForecastWarning(spot.id, n.key, figures(n));
    for (const key of plan.clear) {
      const n = forecast.nights.find((x) => x.key === key)!;
      const likely = Math.min(n.lowerBound, n.leafLow ?? Number.POSITIVE_INFINITY);
      const lows = { likelyC: likely, expectedLowC: n.expectedLow, lowerBoundC: n.lowerBound, leafLowC: n.leafLow };
      const night = { clearedAt: at, ...lows, lowAt: n.at, forecastAt: forecast.forecastAt };
      if (await store.updateForecastWarning(spot.id, key, night)) {
        cleared++;
        this.log(`Forecast all-clear for ${spot.name}: night of ${key} now likely ${likely.toFixed(1)} °C`);
      }
    }
    await this.deliverPending(spot);
    return { checked: true, warned, cleared };
  }

  /** Sends what is stored but not yet sent: new warnings, all-clears, and any a failed send left. */
  private async deliverPending(spot: ForecastSpot) {
    for (const w of await store.unsentForecastMessages(spot.id)) await this.deliver(spot, w, w.message);
  }

  /**
   * Claims the message on the row, then posts it to the alerts' outbox for everyone who takes
   * cold-snap alerts (owners, carers, mentors who opted in).
   */
  private async deliver(spot: ForecastSpot, w: ForecastWarning, message: "warn" | "clear") {
    if (!(await store.claimForecastMessage(w.id, message, this.clock.now()))) return;
    // An all-clear for a warning nobody was sent is not news.
    if (message === "clear" && !w.notifiedAt) return;
    const base = publicUrl();
    const sent = await this.notifier.post({
      source: "forecast",
      siteId: spot.siteId,
      for: (r) => wantsKind(r, "cold"),
      compose: (r) => {
        const ctx = {
          siteName: spot.siteName,
          spotName: spot.name,
          spotUrl: `${base}/sites/${spot.siteId}/spots/${spot.id}`,
          alertsUrl: `${base}/sites/${spot.siteId}/alerts`,
          timeZone: spot.timeZone,
          unit: r.unit,
        };
        return message === "warn"
          ? forecastWarningMessage(ctx, facts(w, spot.name))
          : forecastClearMessage(ctx, facts(w, spot.name));
      },
    });
    // A failed send is tried again on the next pass (the others may then hear twice: better than a frost unheard).
    if (!sent) await store.releaseForecastMessage(w.id, message);
  }
}

/** Open forecast warnings of a site, for the banner: nights still to come or under way. */
export async function openForecastWarnings(siteId: number, now = new Date()) {
  const rows = await store.siteForecastWarnings(siteId, new Date(now.getTime() - NIGHT_OVER_MS));
  return rows.map((r) => ({ id: r.id, spotId: r.spotId, ...facts(r, r.spotName), lowAt: r.lowAt.toISOString() }));
}

/** Starts the interval pass; the weather job calls `runner.run(siteId)` after each forecast it stores. */
export function startForecastWarnings(opts: ForecastWarningsOptions & { everyMs?: number } = {}) {
  const runner = new ForecastWarnings(opts);
  const tick = () => {
    runner.run().catch((err) => console.error("[forecast] pass failed:", store.failure(err)));
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
