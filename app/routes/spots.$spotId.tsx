import { data, Link, useNavigation } from "react-router";
import { ALL_ROLES, requireSiteRole, WRITERS } from "~/.server/auth";
import { readForm, refuseForm } from "~/.server/ids";
import { getSite } from "~/.server/sites";
import { getSpot } from "~/.server/spots";
import { placeFromForm } from "~/.server/placements";
import { inventoryAction } from "~/.server/plants";
import { spotPage } from "~/.server/spot-page";
import { PlaceSensorForm, PlacingTips } from "~/components/placement";
import { VerdictSummary } from "~/components/fit-groups";
import { SpotKindIcon, WatchIcon } from "~/components/icons";
import { NotesPanel } from "~/components/notes-panel";
import { Inventory } from "~/components/inventory";
import { DayOne } from "~/components/day-one";
import { periodLabel } from "~/domain/season/period";
import { LiveTile } from "~/components/spot-live";
import { SpotYear } from "~/components/spot-year";
import { SpotFits } from "~/components/spot-fits";
import { SpotCloser } from "~/components/spot-closer";
import { inventorySchema } from "~/forms/inventory";
import { parseWithZod } from "@conform-to/zod/v4";
import type { Route } from "./+types/spots.$spotId";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.spot.name ?? "Spot"} · Nichewise` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { siteId, role, user } = await requireSiteRole(request, params.siteId, ALL_ROLES);
  const spot = await getSpot(siteId, params.spotId);
  const site = await getSite(siteId);
  return { role, ...(await spotPage(site, spot, user.temperatureUnit, new URL(request.url).searchParams)) };
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
  const days = loaderData.profile.year.reduce((n, m) => n + m.coverage.daysObserved, 0);
  const openNotes = loaderData.notes.filter((n) => n.resolvedAt === null).length;

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
        <LiveTile
          siteId={site.id}
          spotId={spot.id}
          initial={loaderData.latest}
          serverNow={loaderData.now}
          unit={unit}
        />
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

      <SpotYear
        months={loaderData.profile.year}
        unit={unit}
        period={loaderData.period}
        plant={loaderData.plant}
        plants={loaderData.plants}
      />

      <SpotFits
        fits={loaderData.fits}
        unit={unit}
        siteId={site.id}
        spot={spot}
        glazing={loaderData.glazing}
        profile={loaderData.profile}
        verdictRules={loaderData.verdictRules}
        hasDayOne={loaderData.dayOne !== null}
      />

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

      {/* One level down: the same year in other forms, kept where each adds something. */}
      <SpotCloser
        siteId={site.id}
        spotId={spot.id}
        timeZone={site.timeZone}
        unit={unit}
        profile={loaderData.profile}
        directSun={loaderData.growing.directSun}
        hasLightSensor={loaderData.growing.hasLightSensor}
        history={history}
      />
    </div>
  );
}
