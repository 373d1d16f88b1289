import { useEffect, useRef } from "react";
import { getFormProps, getInputProps, getSelectProps, useForm } from "@conform-to/react";
import { parseWithZod } from "@conform-to/zod/v4";
import { data, Form, Link, useNavigation } from "react-router";
import { ALL_ROLES, requireSiteRole, WRITERS } from "~/.server/auth";
import { readForm, refuseForm } from "~/.server/ids";
import { ConfirmRemoval, removeWish, saveWish, siteInventory, sitePlants, siteWishlist } from "~/.server/plants";
import { fitSummary, judgedPeriods, parsePeriod, pickableMonths, spotProfiles, windowOf } from "~/.server/profiles";
import { periodLabel, PeriodPicker } from "~/components/period-picker";
import { getSite } from "~/.server/sites";
import { listSpots } from "~/.server/spots";
import { VerdictBadge } from "~/components/season";
import { rankSpotsForPlant, VERDICT_ORDER } from "~/domain/fit/verdict";
import { planWishlist } from "~/domain/fit/wishlist";
import { fitProjections } from "~/.server/projections";
import { FieldError, FormErrors } from "~/components/field";
import { saveWishSchema, wishlistSchema } from "~/forms/wishlist";
import type { Route } from "./+types/wishlist";

export const meta: Route.MetaFunction = () => [{ title: "Wishlist · Nichewise" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { siteId, role, user } = await requireSiteRole(request, params.siteId, ALL_ROLES);
  const [site, spots, plants, wishes, inventory] = await Promise.all([
    getSite(siteId),
    listSpots(siteId),
    sitePlants(siteId),
    siteWishlist(siteId),
    siteInventory(siteId),
  ]);
  const byKey = new Map(plants.map((p) => [p.key, p]));
  const wanted = wishes.filter((w) => byKey.has(w.plantKey));
  const now = new Date();
  const { choice, problem: periodProblem } = parsePeriod(
    new URL(request.url).searchParams.get("period"),
    now,
    site.timeZone,
  );
  const periods = wanted.length
    ? await judgedPeriods(
        site,
        spots.map((s) => s.id),
        choice,
        now,
      )
    : new Map();
  const profiles = wanted.length
    ? await spotProfiles(
        site,
        spots.map((s) => s.id),
        now,
        { plants, periods },
      )
    : new Map();
  // Months not measured yet are judged from each spot's projection (issue 16); a past period stays as measured.
  const projections = wanted.length
    ? await fitProjections(
        new Map(spots.filter((s) => periods.get(s.id)?.toToday).map((s) => [s.id, profiles.get(s.id)!] as const)),
        { now },
      )
    : new Map();
  const withSeason = spots.map((s) => ({
    spot: s,
    season: profiles.get(s.id)!,
    window: windowOf(site, s),
    projection: projections.get(s.id),
  }));
  const ranked = wanted.map((w) => ({
    wish: w,
    fits: rankSpotsForPlant(byKey.get(w.plantKey)!, withSeason).map((r) => ({
      spotId: r.spot.spot.id,
      verdict: r.fit.verdict,
      likely: !!r.fit.confidence && r.fit.confidence !== "measured" && r.fit.verdict !== "not enough data yet",
      reason: fitSummary(byKey.get(w.plantKey)!, r.fit, { unit: user.temperatureUnit }).reasons[0]?.message ?? null,
    })),
  }));
  const reasonIn = (i: number, spotId: number | undefined) =>
    ranked[i].fits.find((f) => f.spotId === spotId)?.reason ?? null;
  const plan = planWishlist(
    spots.map((s) => ({
      id: s.id,
      name: s.name,
      capacity: s.capacity,
      standingPots: inventory.filter((i) => i.spotId === s.id).reduce((n, i) => n + i.pots, 0),
    })),
    ranked.map((r) => ({ plantKey: r.wish.plantKey, mustHave: r.wish.mustHave, pots: r.wish.pots, fits: r.fits })),
  );
  const spotName = new Map(spots.map((s) => [s.id, s.name]));
  const rows = ranked
    .map((r, i) => {
      const p = plan.wishes[i];
      const bestFit = r.fits[0];
      return {
        plantKey: r.wish.plantKey,
        name: byKey.get(r.wish.plantKey)!.name,
        mustHave: r.wish.mustHave,
        pots: r.wish.pots,
        best: p.best
          ? {
              spot: spotName.get(p.best.spotId)!,
              verdict: p.best.verdict,
              likely: r.fits.find((f) => f.spotId === p.best!.spotId)?.likely ?? false,
              reason: bestFit?.reason ?? null,
            }
          : null,
        placed: p.placed
          ? { spot: spotName.get(p.placed.spotId)!, verdict: p.placed.verdict, reason: reasonIn(i, p.placed.spotId) }
          : null,
        note: p.note,
        everywhereStruggles: p.everywhereStruggles ?? false,
      };
    })
    .sort(
      (a, b) =>
        VERDICT_ORDER.indexOf(a.best?.verdict ?? "struggles here") -
          VERDICT_ORDER.indexOf(b.best?.verdict ?? "struggles here") || Number(b.mustHave) - Number(a.mustHave),
    );
  return {
    siteId,
    canEdit: role !== "mentor",
    rows,
    spots: plan.spots.filter((s) => s.capacity > 0 || s.mustHavePots + s.otherPots > 0),
    choices: plants.filter((p) => !wishes.some((w) => w.plantKey === p.key)).map((p) => ({ key: p.key, name: p.name })),
    period: {
      chosen: choice.kind === "latest" ? "latest" : choice.month,
      months: pickableMonths(now, site.timeZone),
      problem: periodProblem,
      // A chosen period is the same for every spot; by default each spot has its own.
      judged:
        choice.kind === "ending"
          ? periodLabel(
              periods.values().next().value ?? { firstMonth: choice.month, lastMonth: choice.month, toToday: false },
            )
          : null,
      bySpot:
        choice.kind === "latest"
          ? spots.filter((s) => periods.has(s.id)).map((s) => `${s.name}: ${periodLabel(periods.get(s.id))}`)
          : [],
    },
  };
}

export async function action({ request, params }: Route.ActionArgs) {
  const { siteId, user } = await requireSiteRole(request, params.siteId, WRITERS);
  const submission = parseWithZod(await readForm(request), { schema: wishlistSchema });
  if (submission.status !== "success") {
    if (submission.payload.intent !== "save") refuseForm(submission.error);
    return data(
      {
        intent: "save" as const,
        plantKey: String(submission.payload.plantKey ?? "").slice(0, 120),
        result: submission.reply(),
      },
      { status: 400 },
    );
  }
  const form = submission.value;
  const plants = await sitePlants(siteId);
  if (form.intent === "save") {
    const plant = plants.find((p) => p.key === form.plantKey);
    if (!plant)
      return data(
        {
          intent: form.intent,
          plantKey: "",
          result: submission.reply({ fieldErrors: { plantKey: ["Choose a plant from the list."] } }),
        },
        { status: 400 },
      );
    await saveWish(siteId, user.id, { plantKey: plant.key, mustHave: form.mustHave, pots: form.pots }, plant.name);
    return { saved: plant.key, restored: form.restore ? plant.name : null };
  }
  const plantName = plants.find((p) => p.key === form.plantKey)?.name ?? form.plantKey;
  try {
    const removed = await removeWish(siteId, user.id, form.plantKey, { confirmed: form.confirm === "yes", plantName });
    return { removed };
  } catch (e) {
    if (e instanceof ConfirmRemoval) return { confirm: { plantKey: form.plantKey, name: plantName } };
    throw e;
  }
}

export default function Wishlist({ loaderData, actionData }: Route.ComponentProps) {
  const { rows, spots, canEdit, choices, siteId } = loaderData;
  const busy = useNavigation().state !== "idle";
  const addForm = useRef<HTMLFormElement>(null);
  // After an add, the form starts clean: the next plant must not silently become a must-have too.
  useEffect(() => {
    if (actionData && "saved" in actionData && actionData.saved) addForm.current?.reset();
  }, [actionData]);
  // A refused change of a listed plant shows at its row; anything else at the add form.
  const failed = actionData && "result" in actionData ? actionData : null;
  const rowError = (plantKey: string) =>
    failed && failed.plantKey === plantKey ? Object.values(failed.result.error ?? {}).flat()[0] : undefined;
  const [wishForm, addFields] = useForm({
    id: "wish-add",
    lastResult: failed && !rows.some((r) => r.plantKey === failed.plantKey) ? failed.result : undefined,
    defaultValue: { pots: "1" },
    onValidate: ({ formData }) => parseWithZod(formData, { schema: saveWishSchema }),
    shouldValidate: "onBlur",
    // An error clears while the field is corrected, so the button does not move under the pointer.
    shouldRevalidate: "onInput",
  });
  const removed = actionData && "removed" in actionData ? actionData.removed : null;
  const confirm = actionData && "confirm" in actionData ? actionData.confirm : null;
  const full = spots.filter((s) => s.filledByMustHaves);
  return (
    <div className="space-y-6">
      <div>
        <h2 className="h2">Wishlist</h2>
        <p className="text-sm text-muted">
          Plants you want, best fit first. Must-haves claim room in their best spot before the rest.
        </p>
        <p className="mt-1 text-sm text-muted" data-testid="judged-period">
          Judged on {loaderData.period.judged ?? "each spot's latest twelve months with readings"}
          {loaderData.period.bySpot.length > 0 ? ` (${loaderData.period.bySpot.join("; ")})` : ""}.
        </p>
        <div className="mt-2">
          <PeriodPicker
            chosen={loaderData.period.chosen}
            months={loaderData.period.months}
            problem={loaderData.period.problem}
          />
        </div>
      </div>

      {full.length > 0 ? (
        <p className="card border-care/40 text-sm" role="status" data-testid="wishlist-full">
          <span className="font-semibold text-care">Full with must-haves: </span>
          {full
            .map((s) => `${s.name} (${s.standingPots} standing + ${s.mustHavePots} must-have of ${s.capacity} pots)`)
            .join("; ")}
          . Anything else wanted there needs another spot.
        </p>
      ) : null}

      {removed ? (
        <Form
          method="post"
          className="card flex flex-wrap items-center gap-3 text-sm"
          role="status"
          data-testid="wish-removed"
        >
          <span>
            Took {removed.plant}
            {removed.mustHave ? " (a must-have)" : ""} off the wishlist.
          </span>
          <input type="hidden" name="intent" value="save" />
          <input type="hidden" name="restore" value="1" />
          <input type="hidden" name="plantKey" value={removed.plantKey} />
          <input type="hidden" name="pots" value={removed.pots} />
          {removed.mustHave ? <input type="hidden" name="mustHave" value="on" /> : null}
          <button className="btn-quiet py-1 text-sm" disabled={busy}>
            Put it back
          </button>
        </Form>
      ) : null}
      {actionData && "restored" in actionData && actionData.restored ? (
        <p className="card text-sm" role="status">
          {actionData.restored} is back on the wishlist.
        </p>
      ) : null}
      {confirm ? (
        <Form
          method="post"
          className="card flex flex-wrap items-center gap-3 border-care/40 text-sm"
          role="alertdialog"
          aria-label={`Remove ${confirm.name}?`}
          data-testid="wish-confirm"
        >
          <span>
            <strong className="text-care">{confirm.name} is a must-have.</strong> Someone on this site counts on it
            having room. Remove it anyway?
          </span>
          <input type="hidden" name="intent" value="remove" />
          <input type="hidden" name="plantKey" value={confirm.plantKey} />
          <input type="hidden" name="confirm" value="yes" />
          <button className="btn-danger py-1 text-sm" disabled={busy}>
            Remove {confirm.name}
          </button>
          <Link to="." className="link" preventScrollReset>
            Keep it
          </Link>
        </Form>
      ) : null}

      <section className="card">
        {rows.length === 0 ? (
          <p className="text-muted">
            Nothing on the wishlist yet. Add a plant below or from its page in{" "}
            <Link to={`/sites/${siteId}/plants`} className="link">
              Plants
            </Link>
            .
          </p>
        ) : (
          <ul className="divide-y divide-line" data-testid="wishlist">
            {rows.map((r) => (
              <li key={r.plantKey} className="space-y-1.5 py-3">
                <div className="flex flex-wrap items-center gap-x-3 gap-y-1">
                  <Link to={`/sites/${siteId}/plants/${r.plantKey}`} className="link font-semibold">
                    {r.name}
                  </Link>
                  {r.mustHave ? <span className="tag">must-have</span> : null}
                  <span className="text-sm text-muted">
                    {r.pots} {r.pots === 1 ? "pot" : "pots"}
                  </span>
                  {r.best ? (
                    <span className="ml-auto">
                      <VerdictBadge verdict={r.best.verdict} likely={r.best.likely} />
                    </span>
                  ) : null}
                </div>
                {r.everywhereStruggles && r.best ? (
                  <p className="text-sm" data-testid="wish-struggles">
                    {r.note}
                    {r.best.reason ? (
                      <span className="text-muted">
                        {" "}
                        Closest is {r.best.spot}: {r.best.reason}
                      </span>
                    ) : null}
                  </p>
                ) : r.best ? (
                  <>
                    <p className="text-sm">
                      Best spot: <span className="font-medium">{r.best.spot}</span>
                      {r.best.reason ? <span className="text-muted"> — {r.best.reason}</span> : null}
                    </p>
                    {r.placed && r.placed.spot !== r.best.spot ? (
                      <p className="text-sm" data-testid="wish-planned">
                        Planned for <span className="font-medium">{r.placed.spot}</span> ({r.placed.verdict})
                        {r.placed.reason ? <span className="text-muted"> — {r.placed.reason}</span> : null}
                      </p>
                    ) : null}
                    {r.note ? <p className="text-sm text-care">{r.note}</p> : null}
                  </>
                ) : r.note ? (
                  <p className="text-sm text-care">{r.note}</p>
                ) : null}
                {canEdit ? (
                  <div className="flex flex-wrap items-center gap-2">
                    <Form method="post" className="flex flex-wrap items-center gap-2">
                      <input type="hidden" name="intent" value="save" />
                      <input type="hidden" name="plantKey" value={r.plantKey} />
                      <label className="inline-flex items-center gap-1.5 text-sm">
                        <input type="checkbox" name="mustHave" defaultChecked={r.mustHave} /> Must-have
                      </label>
                      <label className="sr-only" htmlFor={`pots-${r.plantKey}`}>
                        Pots of {r.name}
                      </label>
                      <input
                        id={`pots-${r.plantKey}`}
                        name="pots"
                        type="number"
                        min={1}
                        max={100}
                        defaultValue={r.pots}
                        className="field w-20 py-1 text-sm"
                      />
                      <button className="btn-quiet py-1 text-sm" disabled={busy}>
                        Save
                      </button>
                      {rowError(r.plantKey) ? (
                        <p className="error w-full" role="alert">
                          {rowError(r.plantKey)}
                        </p>
                      ) : null}
                    </Form>
                    <Form method="post">
                      <input type="hidden" name="intent" value="remove" />
                      <input type="hidden" name="plantKey" value={r.plantKey} />
                      <button
                        className="btn-quiet py-1 text-sm"
                        disabled={busy}
                        aria-label={`Remove ${r.name} from the wishlist`}
                      >
                        Remove
                      </button>
                    </Form>
                  </div>
                ) : null}
              </li>
            ))}
          </ul>
        )}
      </section>

      {spots.length > 0 ? (
        <section className="card">
          <h3 className="h2 mb-3">Room in each spot</h3>
          {/* Under `sm` each spot is a card of label–value pairs (.stack-table), so "Left" is on a phone's screen. */}
          <div
            className="sm:-mx-5 sm:overflow-x-auto sm:px-5"
            tabIndex={0}
            role="region"
            aria-label="Room in each spot"
          >
            <table className="table stack-table" data-testid="wishlist-room">
              <thead>
                <tr>
                  <th>Spot</th>
                  <th>Room for</th>
                  <th>Standing now</th>
                  <th>Must-haves planned</th>
                  <th>Others planned</th>
                  <th>Left</th>
                </tr>
              </thead>
              <tbody>
                {spots.map((s) => (
                  <tr key={s.id}>
                    <th scope="row" className="font-medium text-ink">
                      {s.name}
                    </th>
                    <td data-label="Room for">{s.capacity || "not set"}</td>
                    <td data-label="Standing now">{s.standingPots}</td>
                    <td data-label="Must-haves planned">{s.mustHavePots}</td>
                    <td data-label="Others planned">{s.otherPots}</td>
                    <td
                      data-label="Left"
                      data-testid="room-left"
                      className={s.free != null && s.free <= 0 ? "font-semibold text-care" : "font-semibold"}
                    >
                      {s.free == null ? "–" : s.free <= 0 ? `none (${s.free})` : s.free}
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        </section>
      ) : null}

      {canEdit ? (
        <Form
          ref={addForm}
          method="post"
          className="card grid gap-3 sm:grid-cols-[3fr_1fr_auto_auto] sm:items-end"
          aria-label="Add to the wishlist"
          {...getFormProps(wishForm)}
        >
          <input type="hidden" name="intent" value="save" />
          <div>
            <label className="label" htmlFor={addFields.plantKey.id}>
              Plant
            </label>
            <select className="field" {...getSelectProps(addFields.plantKey)}>
              {choices.map((p) => (
                <option key={p.key} value={p.key}>
                  {p.name}
                </option>
              ))}
            </select>
          </div>
          <div>
            <label className="label" htmlFor={addFields.pots.id}>
              Pots
            </label>
            <input min={1} max={100} className="field" {...getInputProps(addFields.pots, { type: "number" })} />
          </div>
          <label className="inline-flex items-center gap-2 pb-2 text-sm">
            <input {...getInputProps(addFields.mustHave, { type: "checkbox" })} /> Must-have
          </label>
          <button className="btn" disabled={busy}>
            Add to the wishlist
          </button>
          <div className="sm:col-span-4">
            <FieldError meta={addFields.plantKey} />
            <FieldError meta={addFields.pots} />
            <FormErrors errors={wishForm.errors} />
          </div>
        </Form>
      ) : null}
    </div>
  );
}
