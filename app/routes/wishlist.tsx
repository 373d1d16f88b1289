import { useEffect, useRef } from "react";
import { getFormProps, getInputProps, useForm } from "@conform-to/react";
import { parseWithZod } from "@conform-to/zod/v4";
import { data, Form, Link, useNavigation } from "react-router";
import { ALL_ROLES, requireSiteRole, WRITERS } from "~/.server/auth";
import { readForm, refuseForm } from "~/.server/ids";
import { ConfirmRemoval, removeWish, saveWish, sitePlants } from "~/.server/plants";
import { wishlistView } from "~/.server/wishlist";
import { PeriodPicker } from "~/components/period-picker";
import { RoomInSpots, WishItem } from "~/components/wishlist";
import { FieldError, FormErrors, SelectField, TextField } from "~/components/field";
import { saveWishSchema, wishlistSchema } from "~/forms/wishlist";
import type { Route } from "./+types/wishlist";

export const meta: Route.MetaFunction = () => [{ title: "Wishlist · Nichewise" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { siteId, role, user } = await requireSiteRole(request, params.siteId, ALL_ROLES);
  const view = await wishlistView(siteId, {
    unit: user.temperatureUnit,
    period: new URL(request.url).searchParams.get("period"),
    now: new Date(),
  });
  return { siteId, canEdit: role !== "mentor", ...view };
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
    failed && failed.plantKey === plantKey
      ? (Object.values(failed.result.error ?? {}).flat()[0] ?? undefined)
      : undefined;
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
              <WishItem
                key={r.plantKey}
                row={r}
                siteId={siteId}
                canEdit={canEdit}
                busy={busy}
                error={rowError(r.plantKey)}
              />
            ))}
          </ul>
        )}
      </section>

      {spots.length > 0 ? <RoomInSpots spots={spots} /> : null}

      {canEdit ? (
        <Form
          ref={addForm}
          method="post"
          className="card grid gap-3 sm:grid-cols-[3fr_1fr_auto_auto] sm:items-end"
          aria-label="Add to the wishlist"
          {...getFormProps(wishForm)}
        >
          <input type="hidden" name="intent" value="save" />
          <SelectField
            meta={addFields.plantKey}
            label="Plant"
            options={choices.map((p) => ({ value: p.key, label: p.name }))}
            inlineError={false}
          />
          <TextField meta={addFields.pots} label="Pots" type="number" min={1} max={100} inlineError={false} />
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
