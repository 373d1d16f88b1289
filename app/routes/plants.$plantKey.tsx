import { getFormProps, getInputProps, useForm } from "@conform-to/react";
import { parseWithZod } from "@conform-to/zod/v4";
import { data, Form, Link, redirect, useNavigation } from "react-router";
import { ALL_ROLES, requireSiteRole, WRITERS } from "~/.server/auth";
import { readForm, refuseForm } from "~/.server/ids";
import {
  deleteCustomProfile,
  findSitePlant,
  saveWish,
  siteInventory,
  sitePlant,
  sitePlants,
  siteWishlist,
} from "~/.server/plants";
import { fitSummary, judgedPeriods, parsePeriod, pickableMonths, spotProfiles, windowOf } from "~/.server/profiles";
import { PeriodPicker } from "~/components/period-picker";
import { periodLabel } from "~/domain/season/period";
import { getSite } from "~/.server/sites";
import { listSpots } from "~/.server/spots";
import { VerdictBadge } from "~/components/season";
import { MonthStripKey } from "~/components/month-strip";
import { needsOf, ReasonStrip, sourcesFor, stripOf } from "~/components/plant-needs";
import { NotesPanel } from "~/components/notes-panel";
import { listNotes } from "~/.server/notes";
import { rankSpotsForPlant } from "~/domain/fit/verdict";
import { fitProjections } from "~/.server/projections";
import { PLANT_LIBRARY } from "~/domain/plants/library";
import { FieldError, FormErrors } from "~/components/field";
import { plantPageSchema, plantWishSchema } from "~/forms/wishlist";
import type { Route } from "./+types/plants.$plantKey";

export const meta: Route.MetaFunction = ({ data }) => [{ title: `${data?.plant.name ?? "Plant"} · Nichewise` }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { siteId, role, user } = await requireSiteRole(request, params.siteId, ALL_ROLES);
  const [site, spots, wishes, inventory, plants, notes] = await Promise.all([
    getSite(siteId),
    listSpots(siteId),
    siteWishlist(siteId),
    siteInventory(siteId),
    sitePlants(siteId),
    listNotes(siteId, { plantKey: params.plantKey }),
  ]);
  const plant = findSitePlant(plants, params.plantKey);
  const now = new Date();
  const { choice, problem: periodProblem } = parsePeriod(
    new URL(request.url).searchParams.get("period"),
    now,
    site.timeZone,
  );
  const periods = await judgedPeriods(
    site,
    spots.map((s) => s.id),
    choice,
    now,
  );
  const profiles = await spotProfiles(
    site,
    spots.map((s) => s.id),
    now,
    { plants, periods },
  );
  // Months not measured yet are judged from each spot's projection (issue 16); a past period stays as measured.
  const projections = await fitProjections(
    new Map(spots.filter((s) => periods.get(s.id)?.toToday).map((s) => [s.id, profiles.get(s.id)!] as const)),
    { now },
  );
  const ranked = rankSpotsForPlant(
    plant,
    spots.map((s) => ({
      spot: s,
      season: profiles.get(s.id)!,
      window: windowOf(site, s),
      projection: projections.get(s.id),
    })),
  );
  const wish = wishes.find((w) => w.plantKey === plant.key) ?? null;
  return {
    role,
    siteId,
    unit: user.temperatureUnit,
    plant,
    notes: { rows: notes, timeZone: site.timeZone },
    basedOnName: plant.basedOn ? (PLANT_LIBRARY.find((p) => p.key === plant.basedOn)?.name ?? plant.basedOn) : null,
    wish: wish ? { mustHave: wish.mustHave, pots: wish.pots } : null,
    standing: inventory
      .filter((i) => i.plantKey === plant.key)
      .map((i) => ({ ...i, spotName: spots.find((s) => s.id === i.spotId)?.name ?? "" })),
    spots: ranked.map(({ spot: { spot }, fit }) => {
      const f = fitSummary(plant, fit, { unit: user.temperatureUnit });
      const { firstMonth, lastMonth, toToday } = periods.get(spot.id)!;
      return {
        id: spot.id,
        name: spot.name,
        verdict: f.verdict,
        likely: !!f.confidence && f.confidence !== "measured" && f.verdict !== "not enough data yet",
        basisText: f.verdictText?.startsWith("likely ") ? f.verdictText.replace(/^likely [^—]+— /, "") : null,
        reasons: f.reasons,
        okReasons: f.okReasons,
        missingAdvice: f.missingAdvice,
        period: { firstMonth, lastMonth, toToday },
      };
    }),
    period: {
      chosen: choice.kind === "latest" ? "latest" : choice.month,
      months: pickableMonths(now, site.timeZone),
      problem: periodProblem,
    },
  };
}

export async function action({ request, params }: Route.ActionArgs) {
  const { siteId, role, user } = await requireSiteRole(request, params.siteId, WRITERS);
  const plant = await sitePlant(siteId, params.plantKey);
  const submission = parseWithZod(await readForm(request), { schema: plantPageSchema });
  if (submission.status !== "success") {
    if (submission.payload.intent !== "wish") refuseForm(submission.error);
    return data({ result: submission.reply() }, { status: 400 });
  }
  if (submission.value.intent === "wish") {
    const { mustHave, pots } = submission.value;
    await saveWish(siteId, user.id, { plantKey: plant.key, mustHave, pots });
    return { saved: true };
  }
  if (role !== "owner") throw data("Only the owner can delete a profile", { status: 403 });
  if (!plant.own) return data({ error: "Library profiles can't be deleted; copy one to change it." }, { status: 400 });
  await deleteCustomProfile(siteId, user.id, plant.key);
  return redirect(`/sites/${siteId}/plants`);
}

export default function PlantPage({ loaderData, actionData }: Route.ComponentProps) {
  const { plant, unit, role, spots, wish, standing } = loaderData;
  const navigation = useNavigation();
  const canWrite = role !== "mentor";
  const [wishForm, wishFields] = useForm({
    id: "plant-wish",
    lastResult: actionData && "result" in actionData ? actionData.result : undefined,
    defaultValue: { pots: String(wish?.pots ?? 1), mustHave: wish?.mustHave ? "on" : undefined },
    onValidate: ({ formData }) => parseWithZod(formData, { schema: plantWishSchema }),
    shouldValidate: "onBlur",
    // An error clears while the field is corrected, so the button does not move under the pointer.
    shouldRevalidate: "onInput",
  });
  return (
    <div className="space-y-6">
      <p className="text-sm">
        <Link to={`/sites/${loaderData.siteId}/plants`} className="link">
          ← All plants
        </Link>
      </p>
      <div className="flex flex-wrap items-end justify-between gap-3">
        <div>
          <h2 className="text-xl font-semibold">{plant.name}</h2>
          <p className="text-sm text-muted">
            {plant.own
              ? `This site's own profile${loaderData.basedOnName ? `, copied from ${loaderData.basedOnName}` : ""}. `
              : ""}
            {plant.summary}
          </p>
        </div>
        {role === "owner" ? (
          <Link
            to={`/sites/${loaderData.siteId}/plants/new?from=${encodeURIComponent(plant.key)}`}
            className="btn-quiet"
          >
            {plant.own ? "Edit" : "Copy to adjust"}
          </Link>
        ) : null}
      </div>

      <section className="card">
        <h3 className="h2 mb-1">What it needs</h3>
        <p className="mb-3 text-sm text-muted">
          Every value with where it comes from. “From memory” marks a value recalled from grower practice without a
          checked publication.
        </p>
        <dl className="divide-y divide-line" data-testid="plant-needs">
          {needsOf(plant, unit).map((n) => (
            <div key={n.label} className="grid gap-1 py-2.5 sm:grid-cols-[12rem_1fr]">
              <dt className="font-medium">{n.label}</dt>
              <dd>
                <p>{n.value}</p>
                <ul className="mt-0.5 space-y-0.5 text-sm text-muted" data-testid="plant-sources">
                  {sourcesFor(plant, n.fields).map((s) => (
                    <li key={s.field + s.source}>
                      Source: {s.source}
                      {s.memory ? <span className="tag ml-1">from memory</span> : null}
                    </li>
                  ))}
                  {sourcesFor(plant, n.fields).length === 0 ? <li>No source recorded.</li> : null}
                </ul>
              </dd>
            </div>
          ))}
        </dl>
      </section>

      <section className="card">
        <h3 className="h2 mb-1">Where could it live?</h3>
        <p className="mb-2 text-sm text-muted">
          This site's spots, best fit first, judged on{" "}
          {loaderData.period.chosen === "latest"
            ? "each spot's latest twelve months with readings"
            : "the months below"}
          .
        </p>
        {spots.some((s) => s.reasons.some((r) => stripOf(r))) ? (
          <div className="mb-3">
            <MonthStripKey />
          </div>
        ) : null}
        <div className="mb-3">
          <PeriodPicker
            chosen={loaderData.period.chosen}
            months={loaderData.period.months}
            problem={loaderData.period.problem}
          />
        </div>
        {spots.length === 0 ? (
          <p className="text-muted">No spots yet.</p>
        ) : (
          <ol className="divide-y divide-line" data-testid="plant-spots">
            {spots.map((s) => (
              <li key={s.id} className="py-3">
                <div className="flex flex-wrap items-center gap-x-3 gap-y-1">
                  <Link
                    to={`/sites/${loaderData.siteId}/spots/${s.id}?plant=${encodeURIComponent(plant.key)}`}
                    className="link font-semibold"
                  >
                    {s.name}
                  </Link>
                  <span className="text-sm text-muted" data-testid="judged-period">
                    {periodLabel(s.period)}
                  </span>
                  <span className="ml-auto">
                    <VerdictBadge verdict={s.verdict} likely={s.likely} />
                  </span>
                </div>
                {s.likely && s.basisText ? (
                  <p className="mt-1 text-sm text-muted" data-testid="fit-basis">
                    {s.basisText}. Projected months are estimates from past weather.
                  </p>
                ) : null}
                {s.reasons[0] ? (
                  <div className="mt-1.5 text-sm">
                    <p>{s.reasons[0].message}</p>
                    <ReasonStrip reason={s.reasons[0]} />
                  </div>
                ) : null}
                {s.missingAdvice ? <p className="mt-1 text-sm text-muted">{s.missingAdvice}</p> : null}
                {s.reasons.length > 1 ? (
                  <details className="mt-1 text-sm">
                    <summary className="cursor-pointer text-muted">{s.reasons.length - 1} more</summary>
                    <ul className="mt-1 list-disc space-y-0.5 pl-5">
                      {s.reasons.slice(1).map((r) => (
                        <li key={r.rule}>
                          {r.message}
                          <ReasonStrip reason={r} />
                        </li>
                      ))}
                    </ul>
                  </details>
                ) : null}
              </li>
            ))}
          </ol>
        )}
        {standing.length > 0 ? (
          <p className="mt-3 text-sm text-muted">
            Standing now:{" "}
            {standing
              .map((s) => `${s.nickname || "one"} in ${s.spotName}${s.pots > 1 ? ` (${s.pots} pots)` : ""}`)
              .join("; ")}
            .
          </p>
        ) : null}
      </section>

      <section className="card space-y-3" data-testid="plant-wish">
        <h3 className="h2">Wishlist</h3>
        {wish ? (
          <p className="text-sm">
            On the wishlist{wish.mustHave ? " as a must-have" : ""}, {wish.pots} {wish.pots === 1 ? "pot" : "pots"}.{" "}
            <Link to={`/sites/${loaderData.siteId}/wishlist`} className="link">
              See the wishlist
            </Link>
          </p>
        ) : (
          <p className="text-sm text-muted">Not on the wishlist.</p>
        )}
        {canWrite ? (
          <Form method="post" className="flex flex-wrap items-end gap-3" {...getFormProps(wishForm)}>
            <input type="hidden" name="intent" value="wish" />
            <div>
              <label className="label" htmlFor={wishFields.pots.id}>
                Pots
              </label>
              <input min={1} max={100} className="field w-24" {...getInputProps(wishFields.pots, { type: "number" })} />
            </div>
            <label className="inline-flex items-center gap-2 pb-2 text-sm">
              <input {...getInputProps(wishFields.mustHave, { type: "checkbox" })} /> Must-have
            </label>
            <button className="btn" disabled={navigation.state !== "idle"}>
              {wish ? "Update the wishlist" : "Add to the wishlist"}
            </button>
            <div className="w-full">
              <FieldError meta={wishFields.pots} />
              <FormErrors errors={wishForm.errors} />
              {actionData && "error" in actionData ? (
                <p className="error" role="alert">
                  {actionData.error}
                </p>
              ) : null}
            </div>
          </Form>
        ) : null}
      </section>

      <NotesPanel
        siteId={loaderData.siteId}
        target={{ plantKey: plant.key }}
        notes={loaderData.notes.rows}
        role={role}
        timeZone={loaderData.notes.timeZone}
        about={plant.name}
      />

      {role === "owner" && plant.own ? (
        <Form method="post" className="card border-poor/30">
          <input type="hidden" name="intent" value="delete" />
          <p className="text-sm text-muted">
            Deleting this profile leaves plants recorded with it in their spots, shown as a removed profile.
          </p>
          <button className="btn-danger mt-2">Delete this profile</button>
        </Form>
      ) : null}
    </div>
  );
}
