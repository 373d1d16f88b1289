// GET /api/sites/:siteId/spots/:spotId/fits?from=YYYY-MM&to=YYYY-MM&glazing=…
// Each plant group's fit to the spot: a stable level code (good, care, poor, unknown), the display
// verdict, each rule's level with the facts behind it (numbers in °C, dates as the site's local
// dates) and the same facts in words in the member's unit, and the period judged. Same access as the
// other spot routes: any member of the site.
import { ALL_ROLES, requireSiteRole } from "~/.server/auth";
import { sitePlants } from "~/.server/plants";
import {
  describeSeasonal,
  glassContextFor,
  judgedPeriods,
  parseGlazing,
  parsePeriod,
  spotProfiles,
  windowOf,
} from "~/.server/profiles";
import { getSite } from "~/.server/sites";
import { getSpot, listSpots } from "~/.server/spots";
import { GLAZING_U } from "~/domain/climate/glass";
import { describeReason, describeVerdict, type Format } from "~/domain/fit/describe";
import { fitProjection } from "~/.server/projections";
import { basisOf } from "~/domain/fit/projected";
import { rankPlantsForSpot } from "~/domain/fit/verdict";
import { toLocalInputValue, zonedToUtc } from "~/lib/time";
import type { Route } from "./+types/api.fits";

const MONTH_RE = /^(\d{4})-(0[1-9]|1[0-2])$/;
/** Longest period judged at once: three years, as far back as readings are kept for a verdict. */
const MAX_MONTHS = 36;

const monthIndex = (key: string) => Number(key.slice(0, 4)) * 12 + Number(key.slice(5, 7)) - 1;
const keyOfIndex = (i: number) =>
  `${String(Math.floor(i / 12)).padStart(4, "0")}-${String((i % 12) + 1).padStart(2, "0")}`;
const startOf = (i: number, timeZone: string) =>
  zonedToUtc({ year: Math.floor(i / 12), month: (i % 12) + 1, day: 1 }, timeZone);

function bad(message: string): never {
  throw Response.json({ error: message }, { status: 400 });
}

export async function loader({ request, params }: Route.LoaderArgs) {
  const { siteId, user } = await requireSiteRole(request, params.siteId, ALL_ROLES);
  const spot = await getSpot(siteId, params.spotId);
  const site = await getSite(siteId);
  const q = new URL(request.url).searchParams;
  const fromQ = q.get("from")?.slice(0, 20) ?? null;
  const toQ = q.get("to")?.slice(0, 20) ?? null;
  const glazingQ = q.get("glazing")?.slice(0, 20) ?? null;
  if (fromQ !== null && !MONTH_RE.test(fromQ)) bad("from is a month, YYYY-MM");
  if (toQ !== null && !MONTH_RE.test(toQ)) bad("to is a month, YYYY-MM");
  if (glazingQ !== null && !Object.hasOwn(GLAZING_U, glazingQ))
    bad(`glazing is one of ${Object.keys(GLAZING_U).join(", ")}`);
  const now = new Date();
  const current = monthIndex(toLocalInputValue(now, site.timeZone).slice(0, 7));

  let period: { from: Date; to: Date; firstMonth: string; lastMonth: string; toToday: boolean };
  if (fromQ === null && toQ === null) {
    period = (await judgedPeriods(site, [spot.id], parsePeriod(null, now, site.timeZone).choice, now)).get(spot.id)!;
  } else {
    const last = toQ !== null ? monthIndex(toQ) : Math.min(monthIndex(fromQ!) + 11, current);
    const first = fromQ !== null ? monthIndex(fromQ) : last - 11;
    if (first > last) bad("from comes after to");
    if (first > current) bad("from is a month still to come");
    if (last - first + 1 > MAX_MONTHS) bad(`at most ${MAX_MONTHS} months at once`);
    const end = startOf(Math.min(last, current) + 1, site.timeZone);
    const toToday = end.getTime() > now.getTime();
    period = {
      from: startOf(first, site.timeZone),
      to: toToday ? now : end,
      firstMonth: keyOfIndex(first),
      lastMonth: keyOfIndex(Math.min(last, current)),
      toToday,
    };
  }

  // Cold glass from the spot's glazing (or the one asked for), when the site has an outdoor spot to read.
  const glazing = glazingQ !== null ? parseGlazing(glazingQ) : parseGlazing(spot.glazing);
  const glass = await glassContextFor(site, spot, await listSpots(siteId), period, glazing, now);

  const plants = await sitePlants(siteId);
  const season = (await spotProfiles(site, [spot.id], now, { range: period, plants })).get(spot.id)!;
  const format: Format = { unit: user.temperatureUnit };
  // Months of a period running to today not measured yet are filled from the spot's projection, when it has one.
  const projection = period.toToday ? await fitProjection(spot.id, season, { now }) : null;
  const ranked = rankPlantsForSpot(plants, season, undefined, {
    window: windowOf(site, spot),
    glass,
    projection: projection ?? undefined,
  });
  return Response.json(
    {
      spot: { id: spot.id, name: spot.name, indoor: spot.indoor, facing: spot.facing },
      period: {
        from: period.from.toISOString(),
        to: period.to.toISOString(),
        firstMonth: period.firstMonth,
        lastMonth: period.lastMonth,
        toToday: period.toToday,
      },
      units: {
        facts: "°C, K, degree-hours in K·h, %, mol m⁻² d⁻¹; dates are the site's local dates",
        text: `°${format.unit}`,
      },
      glazing: glass ? { glazing, uValue: glass.uValue } : null,
      // What every fit below rests on: months measured, months filled from the projection, when it is firm.
      basis: basisOf(season, projection ?? undefined) ?? {
        confidence: "measured",
        measuredMonths: season.year.filter((m) => m.coverage.enough).map((m) => m.month),
        projectedMonths: [],
        blendedMonths: [],
        years: 0,
        firmBy: null,
      },
      fits: ranked.map(({ plant, fit }) => {
        const name = plant.name.split(/[ ,(]/)[0];
        return {
          key: plant.key,
          name: plant.name,
          level: fit.level,
          verdict: fit.verdict,
          confidence: fit.confidence,
          verdictText: describeVerdict(fit, format, now),
          seasonal: fit.seasonal ? { ...fit.seasonal, text: describeSeasonal(fit, format) } : null,
          miss: fit.miss,
          missingMonths: fit.missingMonths,
          rules: fit.reasons.map((r) => ({
            rule: r.rule,
            level: r.level,
            confidence: r.confidence ?? "measured",
            ...(r.likely ? { likely: r.likely } : {}),
            months: r.months ?? [],
            facts: r.facts,
            text: describeReason(r, format, name),
          })),
        };
      }),
    },
    { headers: { "Cache-Control": "private, max-age=60" } },
  );
}
