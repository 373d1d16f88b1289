// What the spot page's loader hands the page: the spot's judged period and season, the fits with
// cold glass and the projection for unmeasured months, the day-one view of a new spot, the plant
// laid over the year strip, its notes, sensors, placements and what grows there now.
import { latestReading } from "~/.server/series";
import { listSpots } from "~/.server/spots";
import { listSensors } from "~/.server/sensors.server";
import { placementHistory } from "~/.server/placements";
import { listNotes } from "~/.server/notes";
import { sitePlants } from "~/.server/plants";
import { spotGrowing } from "~/.server/spot-growing";
import {
  fitsFor,
  glassContextFor,
  judgedPeriods,
  parseGlazing,
  parsePeriod,
  pickableMonths,
  spotProfiles,
  windowOf,
} from "~/.server/profiles";
import { fitProjection } from "~/.server/projections";
import { dayOneFor } from "~/.server/day-one-view";
import { slimProfile } from "~/domain/season/slim";
import { VERDICT_RULES } from "~/domain/fit/verdict";
import type { TempUnit } from "~/domain/units";
import type { Site, Spot } from "~/db/schema.server";

/** `q`: the page's search params (`period`, `plant`). */
export async function spotPage(site: Site, spot: Spot, unit: TempUnit, q: URLSearchParams) {
  const siteId = site.id;
  const now = new Date();
  const { choice, problem: periodProblem } = parsePeriod(q.get("period"), now, site.timeZone);
  const period = (await judgedPeriods(site, [spot.id], choice, now)).get(spot.id)!;
  const [history, latest, sensors, profiles, allPlants, notes] = await Promise.all([
    placementHistory({ spotId: spot.id }),
    latestReading(spot.id),
    listSensors(siteId),
    spotProfiles(site, [spot.id], now, { range: period }),
    sitePlants(siteId),
    listNotes(siteId, { spotId: spot.id }),
  ]);
  const season = profiles.get(spot.id)!;
  // Cold glass from the spot's glazing (a windowsill of a site with an outdoor spot).
  const glazing = parseGlazing(spot.glazing);
  const glass = await glassContextFor(site, spot, await listSpots(siteId), period, glazing, now);
  // Months not measured yet are judged from the spot's projection, when it has one (issue 16); a past period stays as measured.
  const projection = period.toToday ? ((await fitProjection(spot.id, season, { now })) ?? undefined) : undefined;
  const fits = fitsFor(season, allPlants, { window: windowOf(site, spot), glass, projection }, { unit });
  const plantKey = q.get("plant") ?? fits[0]?.key;
  // A new spot (fewer than twelve measured months, its latest year shown): what can be known now (issue 16, part 5).
  const measuredMonths = season.year.filter((m) => m.coverage.enough).length;
  const dayOneView =
    choice.kind === "latest" && period.toToday && measuredMonths < 12
      ? await dayOneFor(site, spot.id, season, fits, now)
      : null;
  const plant = allPlants.find((p) => p.key === plantKey) ?? null;
  return {
    now: Date.now(),
    unit,
    site,
    spot,
    history,
    latest,
    sensors: sensors.filter((s) => s.spotId !== spot.id),
    profile: slimProfile(season),
    period: {
      chosen: choice.kind === "latest" ? "latest" : choice.month,
      firstMonth: period.firstMonth,
      lastMonth: period.lastMonth,
      toToday: period.toToday,
      months: pickableMonths(now, site.timeZone),
      problem: periodProblem,
    },
    fits,
    dayOne: dayOneView,
    plant: plant ? { key: plant.key, name: plant.name, minNightC: plant.minNightC, maxDayC: plant.maxDayC } : null,
    plants: allPlants.map((p) => ({ key: p.key, name: p.name })),
    verdictRules: VERDICT_RULES,
    glazing: { chosen: glazing, judged: glass !== undefined },
    notes,
    growing: await spotGrowing(site, spot, allPlants, fits, sensors),
  };
}
