import { parseWithZod } from "@conform-to/zod/v4";
import { Form, redirect } from "react-router";
import { requireSiteRole } from "~/.server/auth";
import { readForm } from "~/.server/ids";
import { getSpot, deleteSpot, updateSpot } from "~/.server/spots";
import { SpotForm } from "~/components/spot-form";
import { spotSchema } from "~/forms/spot";
import type { Route } from "./+types/spots.$spotId.edit";

export const meta: Route.MetaFunction = () => [{ title: "Edit spot · Nichewise" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { siteId } = await requireSiteRole(request, params.siteId, ["owner"]);
  return { spot: await getSpot(siteId, params.spotId) };
}

export async function action({ request, params }: Route.ActionArgs) {
  const { siteId, user } = await requireSiteRole(request, params.siteId, ["owner"]);
  const spot = await getSpot(siteId, params.spotId);
  const formData = await readForm(request);
  if (formData.get("intent") === "delete") {
    if (formData.get("confirm") !== spot.name) {
      return { deleteError: `Type the spot's name, “${spot.name}”, to delete it.` };
    }
    await deleteSpot({ siteId, actorId: user.id, spot });
    return redirect(`/sites/${siteId}`);
  }
  const submission = parseWithZod(formData, { schema: spotSchema });
  if (submission.status !== "success") return { result: submission.reply() };
  const { indoor, notes, glazing, ...rest } = submission.value;
  await updateSpot({
    siteId,
    actorId: user.id,
    spot,
    values: { ...rest, indoor: indoor === "indoor", notes: notes ?? "", glazing: glazing ?? null },
  });
  return redirect(`/sites/${siteId}/spots/${spot.id}`);
}

export default function EditSpot({ loaderData, actionData }: Route.ComponentProps) {
  const { spot } = loaderData;
  return (
    <div className="max-w-xl space-y-8">
      <div>
        <h2 className="h2 mb-4">Edit {spot.name}</h2>
        <div className="card">
          <SpotForm
            lastResult={actionData && "result" in actionData ? actionData.result : undefined}
            defaultValue={{
              name: spot.name,
              indoor: spot.indoor ? "indoor" : "outdoor",
              facing: spot.facing,
              capacity: spot.capacity,
              notes: spot.notes,
              lightSource: spot.lightSource,
              glazing: spot.glazing ?? "",
            }}
            submitLabel="Save"
          />
        </div>
      </div>
      <div className="card border-poor/30">
        <h3 className="font-semibold text-poor">Delete this spot</h3>
        <p className="mt-1 text-sm text-muted">
          Its hourly history, plants list and alert rules go with it. Raw readings stay with their sensors.
        </p>
        <Form method="post" className="mt-4 space-y-3">
          <input type="hidden" name="intent" value="delete" />
          <label className="label" htmlFor="confirm">
            Type “{spot.name}” to confirm
          </label>
          <input id="confirm" name="confirm" className="field" autoComplete="off" />
          {actionData && "deleteError" in actionData ? <p className="error">{actionData.deleteError}</p> : null}
          <button className="btn-danger">Delete spot</button>
        </Form>
      </div>
    </div>
  );
}
