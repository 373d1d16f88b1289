import { useEffect } from "react";
import { data, Link, useFetcher, useNavigation } from "react-router";
import { ALL_ROLES, requireSiteRole, WRITERS } from "~/.server/auth";
import { readForm, refuseForm } from "~/.server/ids";
import { latestReading } from "~/.server/series";
import { getSite } from "~/.server/sites";
import { getSpot, listSpots } from "~/.server/spots";
import { listSensors } from "~/.server/sensors.server";
import { placementHistory, placeFromForm } from "~/.server/placements";
import { PlaceSensorForm, PlacementHistory, PlacingTips } from "~/components/placement";
import { SeasonTable } from "~/components/season";
import { GroupedFits, VerdictSummary } from "~/components/fit-groups";
import { useNow } from "~/components/use-now";
import { SpotKindIcon, WatchIcon } from "~/components/icons";
import { YearStrip } from "~/components/year-strip";
import { NotesPanel } from "~/components/notes-panel";
import { SpotExports } from "~/components/spot-exports";
import { listNotes } from "~/.server/notes";
import { DirectSun } from "~/components/direct-sun";
import { Inventory } from "~/components/inventory";
import { HoursCharts, YearCharts } from "~/components/spot-charts";
import { inventoryAction, sitePlants } from "~/.server/plants";
import { inventorySchema } from "~/forms/inventory";
import { parseWithZod } from "@conform-to/zod/v4";
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
import { slimProfile } from "~/domain/season/slim";
import { periodLabel, PeriodPicker } from "~/components/period-picker";
import { fitProjection } from "~/.server/projections";
import { dayOneFor } from "~/.server/day-one-view";
import { DayOne } from "~/components/day-one";
import { VERDICT_RULES } from "~/domain/fit/verdict";
import { timeAgo } from "~/lib/time";
import { formatTemp } from "~/domain/units";
import { LightNotes } from "~/components/light-notes";
import type { Route } from "./+types/spots.$spotId";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.spot.name ?? "Spot"} · Nichewise` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { siteId, role, user } = await requireSiteRole(request, params.siteId, ALL_ROLES);
  const spot = await getSpot(siteId, params.spotId);
  const site = await getSite(siteId);
  const q = new URL(request.url).searchParams;
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
  const fits = fitsFor(
    season,
    allPlants,
    { window: windowOf(site, spot), glass, projection },
    { unit: user.temperatureUnit },
  );
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
    role,
    unit: user.temperatureUnit,
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

export async function action({ request, params }: Route.ActionArgs) {
  const { siteId, user } = await requireSiteRole(request, params.siteId, WRITERS);
  const spot = await getSpot(siteId, params.spotId);
  const site = await getSite(siteId);
  const form = await readForm(request);
  if (form.get("intent") === "place") {
    const placed = await placeFromForm(form, { siteId, spotId: spot.id, timeZone: site.timeZone, actorId: user.id });
    return "placeError" in placed ? data(placed, { status: 400 }) : placed;
  }
  const submission = parseWithZod(form, { schema: inventorySchema });
  if (submission.status !== "success") {
    const intent = submission.payload.intent;
    if (intent === "plant-add") return data({ plantResult: submission.reply() }, { status: 400 });
    if (intent !== "plant-move" && intent !== "plant-remove") refuseForm(submission.error);
    return data({ plantError: Object.values(submission.error ?? {}).flat()[0] ?? "Choose a plant." }, { status: 400 });
  }
  const planted = await inventoryAction(submission.value, { siteId, spotId: spot.id, actorId: user.id });
  if (planted.error && submission.value.intent === "plant-add") {
    return data(
      { plantResult: submission.reply({ fieldErrors: { plantKey: [planted.error] } }) },
      { status: planted.status },
    );
  }
  return data({ plantError: planted.error }, { status: planted.status });
}

export default function SpotPage({ loaderData, actionData }: Route.ComponentProps) {
  const { spot, site, role, unit, history, sensors } = loaderData;
  const navigation = useNavigation();
  const now = useNow(loaderData.now);
  const live = useFetcher<{ latest: typeof loaderData.latest }>();
  const { load } = live;
  useEffect(() => {
    const t = setInterval(() => {
      if (document.visibilityState === "visible") load(`/api/sites/${site.id}/spots/${spot.id}/latest`);
    }, 20_000);
    return () => clearInterval(t);
  }, [site.id, spot.id, load]);
  const latest = live.data?.latest ?? loaderData.latest;

  const days = loaderData.profile.year.reduce((n, m) => n + m.coverage.daysObserved, 0);
  const openNotes = loaderData.notes.filter((n) => n.resolvedAt === null).length;
  const allUnjudged = loaderData.fits.length > 0 && loaderData.fits.every((f) => f.verdict === "not enough data yet");

  return (
    <div className="space-y-6">
      <div className="flex flex-wrap items-end justify-between gap-3">
        <div className="flex items-start gap-3">
          <span className="mt-0.5 grid size-11 shrink-0 place-items-center rounded-t-full rounded-b-[0.2rem] bg-stone text-ink">
            <SpotKindIcon name={spot.name} indoor={spot.indoor} size={24} />
          </span>
          <div>
            <h2 className="text-title font-semibold">{spot.name}</h2>
            <p className="text-sm text-muted">
              {spot.indoor ? "Indoors" : "Outdoors"}
              {spot.facing !== "none" ? ` · window faces ${spot.facing}` : ""}
              {spot.capacity ? ` · room for ${spot.capacity} pots` : ""}
            </p>
          </div>
        </div>
        <div className="flex flex-wrap gap-2">
          <Link to="alerts" className="btn-quiet">
            <WatchIcon size={16} />
            Alert watches
          </Link>
          {role === "owner" ? (
            <Link to="edit" className="btn-quiet">
              Edit spot
            </Link>
          ) : null}
        </div>
      </div>

      <section id="answer" className="answer" aria-labelledby="answer-heading">
        <h3 id="answer-heading" className="eyebrow mb-2">
          What grows here
        </h3>
        <VerdictSummary
          fits={loaderData.fits}
          days={days}
          pastPeriod={loaderData.period.chosen !== "latest"}
          period={`${periodLabel(loaderData.period)}${loaderData.period.chosen === "latest" ? ", this spot's latest twelve months with readings" : ""}`}
        />
        <div
          className="mt-3 border-t border-stone-line pt-2 text-sm text-muted tabular-nums"
          aria-live="polite"
          data-testid="live-tile"
        >
          {latest ? (
            <p>
              Now: <span className="font-semibold text-ink">{formatTemp(latest.temp, unit)}</span>
              {latest.rh != null ? `, ${Math.round(latest.rh)} % RH` : ""}, measured {timeAgo(latest.measured_at, now)}
            </p>
          ) : (
            <p>Waiting for the first reading.</p>
          )}
        </div>
      </section>

      <nav aria-label="On this page" className="page-index" data-testid="page-index">
        <span className="eyebrow self-center">On this page</span>
        <a className="link" href="#year">
          The year
        </a>
        <a className="link" href="#fits">
          Every group
        </a>
        <a className="link" href="#plants">
          Plants here
        </a>
        <a className="link" href="#notes">
          Notes{openNotes ? ` (${openNotes} open)` : ""}
        </a>
        {role !== "mentor" ? (
          <a className="link" href="#place">
            Place a sensor here
          </a>
        ) : null}
        <a className="link" href="#closer">
          Charts and numbers
        </a>
      </nav>

      {/* A new spot: what can be known now, right under the answer and the page's index (issue 16). */}
      {loaderData.dayOne ? <DayOne view={loaderData.dayOne} sun={loaderData.growing.directSun} unit={unit} /> : null}

      <section id="year" className="card space-y-3">
        <YearStrip
          months={loaderData.profile.year}
          unit={unit}
          title={`${periodLabel(loaderData.period)}, month by month`}
          band={
            loaderData.plant
              ? {
                  low: loaderData.plant.minNightC,
                  high: loaderData.plant.maxDayC,
                  label: `${loaderData.plant.name}'s comfortable range`,
                }
              : null
          }
        />
        <PeriodPicker
          chosen={loaderData.period.chosen}
          months={loaderData.period.months}
          keep={{ plant: loaderData.plant?.key }}
          problem={loaderData.period.problem}
        />
        <form method="get" className="flex flex-wrap items-center gap-2 text-sm">
          {loaderData.period.chosen !== "latest" ? (
            <input type="hidden" name="period" value={loaderData.period.chosen} />
          ) : null}
          <label htmlFor="plant">Lay a plant's range over it:</label>
          <select
            id="plant"
            name="plant"
            className="field w-auto max-w-full"
            defaultValue={loaderData.plant?.key}
            onChange={(e) => e.currentTarget.form?.requestSubmit()}
          >
            {loaderData.plants.map((p) => (
              <option key={p.key} value={p.key}>
                {p.name}
              </option>
            ))}
          </select>
          <noscript>
            <button className="btn-quiet">Show</button>
          </noscript>
        </form>
      </section>

      <section id="fits" className="card">
        <h3 className="h2 mb-1">Every group, best first</h3>
        <p className="mb-3 text-sm text-muted">
          The best few in full; the rest gathered by verdict and by what holds them back.
        </p>
        {allUnjudged ? (
          // One line instead of a wall of identical rows: nothing is judged yet (issue 16).
          <p data-testid="fits-unjudged">
            None of the {loaderData.fits.length} groups can be judged yet:{" "}
            {loaderData.fits[0]?.missingAdvice ?? "too few days of readings here."}
            {loaderData.dayOne ? " What is known already is above." : ""}
          </p>
        ) : (
          <GroupedFits fits={loaderData.fits} unit={unit} siteId={site.id} />
        )}
        {spot.indoor && spot.facing !== "none" ? (
          <p className="mt-4 text-sm text-muted" data-testid="glazing-note">
            {loaderData.glazing.judged
              ? `Cold glass judged for ${loaderData.glazing.chosen?.replace("_", " ")} glazing, from the site's outdoor spot.`
              : loaderData.glazing.chosen
                ? "Cold glass needs an outdoor spot with readings on this site to know the cold outside."
                : "Name the window's glazing under Edit spot to judge condensation on cold glass."}
          </p>
        ) : null}
        <LightNotes profile={loaderData.profile} lightSource={spot.lightSource} />
        <details className="mt-4 text-sm">
          <summary className="cursor-pointer font-medium">How the verdict is decided</summary>
          <ol className="mt-2 list-decimal space-y-1 pl-5 text-muted">
            {loaderData.verdictRules.map((r) => (
              <li key={r.verdict}>
                <span className="font-medium text-ink">{r.verdict}</span>: {r.when}
              </li>
            ))}
          </ol>
        </details>
      </section>

      <div className="grid gap-6 lg:grid-cols-2">
        <div id="plants">
          <Inventory
            standing={loaderData.growing.standing}
            plants={loaderData.plants}
            otherSpots={loaderData.growing.otherSpots}
            tender={loaderData.growing.tender}
            canEdit={role !== "mentor"}
            unit={unit}
            capacity={spot.capacity}
            error={actionData && "plantError" in actionData ? (actionData.plantError ?? undefined) : undefined}
            lastResult={actionData && "plantResult" in actionData ? actionData.plantResult : undefined}
            busy={navigation.state !== "idle"}
          />
        </div>
        <div id="notes">
          <NotesPanel
            siteId={site.id}
            target={{ spotId: spot.id }}
            notes={loaderData.notes}
            role={role}
            timeZone={site.timeZone}
            about="this spot"
          />
        </div>
      </div>

      {role !== "mentor" ? (
        <section id="place" className="card space-y-3">
          <h3 className="h2">Place a sensor here</h3>
          <PlacingTips />
          <PlaceSensorForm
            sensors={sensors.map((s) => ({ id: s.id, name: s.spotName ? `${s.name} (now in ${s.spotName})` : s.name }))}
            timeZone={site.timeZone}
            error={actionData && "placeError" in actionData ? actionData.placeError : undefined}
            busy={navigation.state !== "idle"}
          />
        </section>
      ) : null}

      {/* One level down: the same year in other forms, kept where each adds something. The monthly
          envelope chart is not repeated here: the year strip above draws the same figures. */}
      <section id="closer" className="space-y-3" aria-labelledby="closer-heading">
        <h3 id="closer-heading" className="h2">
          Charts and numbers
        </h3>
        <details className="fold" data-testid="fold-48h">
          <summary>The last 48 hours, reading by reading</summary>
          <div>
            <HoursCharts
              url={`/api/sites/${site.id}/spots/${spot.id}/series?range=48h`}
              unit={unit}
              timeZone={site.timeZone}
            />
          </div>
        </details>
        <details className="fold" data-testid="fold-days">
          <summary>Day by day through the year, and the dew-point margin</summary>
          <div className="space-y-4">
            <YearCharts
              url={`/api/sites/${site.id}/spots/${spot.id}/series?range=year`}
              unit={unit}
              timeZone={site.timeZone}
            />
          </div>
        </details>
        <details className="fold" data-testid="fold-numbers">
          <summary>Month by month and season by season, in numbers</summary>
          <div>
            <SeasonTable months={loaderData.profile.year} seasons={loaderData.profile.seasons} unit={unit} />
          </div>
        </details>
        <DirectSun estimate={loaderData.growing.directSun} hasLightSensor={loaderData.growing.hasLightSensor} />
        <details className="fold">
          <summary>Sensors here over time</summary>
          <div>
            <PlacementHistory rows={history} timeZone={site.timeZone} show="sensor" />
          </div>
        </details>
        <SpotExports siteId={site.id} spotId={spot.id} />
      </section>
    </div>
  );
}
