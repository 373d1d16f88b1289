// Season profiles and fits for spots, computed from the hourly rollups on each page load (a year of
// rollups is ~8,760 rows per spot, read through rollups/read.ts; the raw readings are never read here).
import { pool } from "~/.server/db";
import { loadRollups } from "~/.server/rollups/read";
import { rankPlantsForSpot, type FitContext, type PlantFit } from "~/domain/fit/verdict";
import {
  describeFact,
  describeReason,
  describeSeasonal as seasonalWords,
  describeVerdict,
  DEFAULT_FORMAT,
  type Format,
} from "~/domain/fit/describe";
import type { SpotWindow } from "~/domain/fit/window-light";
import type { GlassContext } from "~/domain/fit/cold-glass";
import { GLAZING_U, type Glazing } from "~/domain/climate/glass";
import { PLANT_LIBRARY, type PlantProfile } from "~/domain/plants/library";
import type { LightSource } from "~/domain/vocabulary";
import { MONTH_NAMES, seasonProfile } from "~/domain/season/profile";
import { encodeStrip, monthStrip } from "~/domain/fit/month-strip";
import type { Site } from "~/db/schema.server";
import { toLocalInputValue, zonedToUtc } from "~/lib/time";

const plantThresholds = [...new Set(PLANT_LIBRARY.map((p) => p.minNightC))];

// ---------------------------------------------------------------------------------------------
// The period a verdict judges. By default each spot's latest twelve months with readings: a year
// imported from a logger is judged as that year, not as eleven empty months before today. A page
// may ask for the twelve months ending with a chosen month instead (`?period=2025-12`).

export type PeriodChoice = { kind: "latest" } | { kind: "ending"; month: string };

export type JudgedPeriod = {
  from: Date;
  to: Date;
  /** First and last month judged, "YYYY-MM" in the site's time zone. */
  firstMonth: string;
  lastMonth: string;
  /** The period runs to today (rather than ending with a past month). */
  toToday: boolean;
};

const MONTH_RE = /^(\d{4})-(0[1-9]|1[0-2])$/;
type YearMonth = { y: number; m: number };
const ymOf = (key: string): YearMonth => ({ y: Number(key.slice(0, 4)), m: Number(key.slice(5, 7)) });
const addMonths = ({ y, m }: YearMonth, n: number): YearMonth => {
  const k = y * 12 + (m - 1) + n;
  return { y: Math.floor(k / 12), m: (k % 12) + 1 };
};
const keyOfYm = ({ y, m }: YearMonth) => `${String(y).padStart(4, "0")}-${String(m).padStart(2, "0")}`;
const localMonth = (at: Date, timeZone: string) => toLocalInputValue(at, timeZone).slice(0, 7);
const monthStartAt = (ym: YearMonth, timeZone: string) => zonedToUtc({ year: ym.y, month: ym.m, day: 1 }, timeZone);

/** Reads `?period=`: absent or "latest" is the default; a month "YYYY-MM" ends a chosen twelve months. */
export function parsePeriod(
  value: string | null,
  now: Date,
  timeZone: string,
): { choice: PeriodChoice; problem: string | null } {
  if (value === null || value === "" || value === "latest") return { choice: { kind: "latest" }, problem: null };
  if (!MONTH_RE.test(value))
    return {
      choice: { kind: "latest" },
      problem: "Choose the period by its last month (e.g. 2025-12); showing the latest twelve months with readings.",
    };
  const current = localMonth(now, timeZone);
  if (value > current)
    return {
      choice: { kind: "ending", month: current },
      problem: "That month hasn't happened yet; showing the twelve months to this one.",
    };
  return { choice: { kind: "ending", month: value }, problem: null };
}

/** The twelve months ending with `month` (to today if it is the current month). */
function periodEnding(month: string, now: Date, timeZone: string): JudgedPeriod {
  const last = ymOf(month);
  const first = addMonths(last, -11);
  const end = monthStartAt(addMonths(last, 1), timeZone);
  const toToday = end.getTime() > now.getTime();
  return {
    from: monthStartAt(first, timeZone),
    to: toToday ? now : end,
    firstMonth: keyOfYm(first),
    lastMonth: month,
    toToday,
  };
}

/** The rolling year to today: what a spot with readings this month is judged on. */
function yearToToday(now: Date, timeZone: string): JudgedPeriod {
  const from = new Date(now.getTime() - 365 * 86_400_000);
  return { from, to: now, firstMonth: localMonth(from, timeZone), lastMonth: localMonth(now, timeZone), toToday: true };
}

/** Months a page offers as a period's last month: this one and the 35 before (readings reach three years back). */
export function pickableMonths(now: Date, timeZone: string): string[] {
  const current = ymOf(localMonth(now, timeZone));
  return Array.from({ length: 36 }, (_, i) => keyOfYm(addMonths(current, -i)));
}

/** Each spot's judged period for `choice`; "latest" looks up the spot's latest hour with readings. */
export async function judgedPeriods(
  site: Site,
  spotIds: number[],
  choice: PeriodChoice,
  now = new Date(),
): Promise<Map<number, JudgedPeriod>> {
  if (choice.kind === "ending") {
    const period = periodEnding(choice.month, now, site.timeZone);
    return new Map(spotIds.map((id) => [id, period]));
  }
  const latest = await pool().query<{ spot_id: number; hour: Date }>(
    `SELECT s AS spot_id, (SELECT max(hour) FROM hourly_rollups WHERE spot_id = s AND hour <= $2) AS hour FROM unnest($1::int[]) s`,
    [spotIds, now],
  );
  const current = localMonth(now, site.timeZone);
  return new Map(
    latest.rows.map(({ spot_id, hour }) => {
      const month = hour ? localMonth(hour, site.timeZone) : current;
      return [
        spot_id,
        month >= current ? yearToToday(now, site.timeZone) : periodEnding(month, now, site.timeZone),
      ] as const;
    }),
  );
}

/**
 * By default the last twelve months of a spot (ending now); `range` picks another period for all
 * spots (the compare page), `periods` one per spot (see judgedPeriods). `plants` adds the site's
 * own profiles' nights to the hour counts.
 */
export async function spotProfiles(
  site: Site,
  spotIds: number[],
  now = new Date(),
  opts: {
    range?: { from: Date; to: Date };
    periods?: Map<number, { from: Date; to: Date }>;
    plants?: PlantProfile[];
  } = {},
) {
  const siteInfo = { latitude: site.latitude, longitude: site.longitude, timeZone: site.timeZone };
  const thresholds = opts.plants
    ? [...new Set([...plantThresholds, ...opts.plants.map((p) => p.minNightC)])]
    : plantThresholds;
  const rangeOf = (id: number) =>
    opts.periods?.get(id) ?? opts.range ?? { from: new Date(now.getTime() - 365 * 86_400_000), to: now };
  // Spots judged on the same period are read together.
  const groups = new Map<string, { from: Date; to: Date; ids: number[] }>();
  for (const id of spotIds) {
    const { from, to } = rangeOf(id);
    const key = `${from.getTime()}:${to.getTime()}`;
    const group = groups.get(key) ?? { from, to, ids: [] };
    group.ids.push(id);
    groups.set(key, group);
  }
  // Each spot's light source sets the lux → PPFD factor of its DLI (sunlight unless the grower said lamps).
  const lit = await pool().query<{ id: number; light_source: LightSource }>(
    "SELECT id, light_source FROM spots WHERE id = ANY($1::int[])",
    [spotIds],
  );
  const lightSource = new Map(lit.rows.map((r) => [r.id, r.light_source]));
  const out = new Map<number, ReturnType<typeof seasonProfile>>();
  for (const { from, to, ids } of groups.values()) {
    const rollups = await loadRollups(ids, from, to);
    for (const id of ids)
      out.set(
        id,
        seasonProfile(rollups.get(id)!, siteInfo, { from, to, thresholds, lightSource: lightSource.get(id) }),
      );
  }
  return new Map(spotIds.map((id) => [id, out.get(id)!] as const));
}

/** Fits for one spot, best first; pass the site's plants (library plus own profiles) and the grower's unit. */
export function fitsFor(
  season: ReturnType<typeof seasonProfile>,
  plants: PlantProfile[] = PLANT_LIBRARY,
  context: FitContext | SpotWindow = {},
  format: Format = DEFAULT_FORMAT,
) {
  return rankPlantsForSpot(plants, season, undefined, context).map(({ plant, fit }) => fitSummary(plant, fit, format));
}

/** "Good from May to September; bring it in before nights fall under 10 °C." */
export function describeSeasonal(fit: PlantFit, format: Format = DEFAULT_FORMAT): string | null {
  return fit.seasonal ? seasonalWords(fit.seasonal, format) : null;
}

/** What a page shows of one plant's fit: the verdict, reasons that ask for something, and what suits it, in the grower's unit. */
export function fitSummary(plant: PlantProfile, fit: PlantFit, format: Format = DEFAULT_FORMAT) {
  const name = plant.name.split(/[ ,(]/)[0];
  const seasonal = describeSeasonal(fit, format);
  // Each reason's twelve-month strip (issue 17): measured months are those not still short of data.
  const missing = new Set(fit.missingMonths.map((n) => (MONTH_NAMES as readonly string[]).indexOf(n) + 1));
  const stripBasis = {
    measured: [1, 2, 3, 4, 5, 6, 7, 8, 9, 10, 11, 12].filter((m) => !missing.has(m)),
    projected: fit.basis?.projectedMonths ?? [],
  };
  const asking = fit.reasons
    .filter((r) => r.level !== "good")
    .map((r) => {
      const cells = monthStrip(r, stripBasis);
      return {
        rule: r.rule,
        level: r.level,
        confidence: r.confidence ?? ("measured" as const),
        message: describeReason(r, format, name),
        strip: cells ? encodeStrip(cells) : null,
      };
    });
  return {
    key: plant.key,
    name: plant.name,
    // Cool / intermediate / warm are orchid terms.
    category: plant.group === "orchid" ? plant.category : null,
    minNightC: plant.minNightC,
    maxDayC: plant.maxDayC,
    verdict: fit.verdict,
    level: fit.level,
    /** "likely thrives here — 3 of 12 months measured, the rest projected …; firm by 14 May", or the verdict as it is. */
    verdictText: describeVerdict(fit, format),
    confidence: fit.confidence,
    basis: fit.basis,
    reasons: seasonal
      ? [{ rule: "seasonal", level: "care" as const, confidence: fit.confidence, message: seasonal }, ...asking]
      : asking,
    okReasons: fit.reasons
      .filter((r) => r.level === "good")
      .map((r) => r.facts.map((f) => describeFact(f, format, name)).join(" "))
      .filter(Boolean),
    missingMonths: fit.missingMonths,
    missingAdvice: fit.missingAdvice,
  };
}

/**
 * Cold glass for a windowsill (issue 15): with the glazing named (the spot's setting), the pane's inside temperature each
 * month from the site's outdoor spot (its mean daily low) — null without an outdoor spot with readings.
 */
export async function glassContextFor(
  site: Site,
  spot: { id: number; indoor: boolean; facing: string },
  outdoorSpots: { id: number; indoor: boolean }[],
  period: { from: Date; to: Date },
  glazing: Glazing | null,
  now = new Date(),
): Promise<GlassContext | undefined> {
  if (!glazing || !spot.indoor || spot.facing === "none") return undefined;
  const outdoor = outdoorSpots.find((s) => !s.indoor && s.id !== spot.id);
  if (!outdoor) return undefined;
  const season = (await spotProfiles(site, [outdoor.id], now, { range: period })).get(outdoor.id)!;
  const lows = new Map(
    season.year
      .filter((m) => m.temperature.meanDailyLow !== null)
      .map((m) => [m.month, m.temperature.meanDailyLow!] as const),
  );
  return lows.size > 0 ? { uValue: GLAZING_U[glazing], outdoorLowByMonth: lows } : undefined;
}

/** A glazing with a pane to judge, or null for "none", not given or anything else. */
export const parseGlazing = (v: string | null | undefined): Glazing | null =>
  v != null && Object.hasOwn(GLAZING_U, v) ? (v as Glazing) : null;

/** How a spot's window is described to the fit rules (used for light when it has no light sensor). */
export const windowOf = (site: Site, spot: { facing: SpotWindow["facing"]; indoor: boolean }): SpotWindow => ({
  latitude: site.latitude,
  facing: spot.facing,
  indoor: spot.indoor,
});
