import { parseWithZod } from "@conform-to/zod/v4";
import { redirect } from "react-router";
import { requireSiteRole } from "~/.server/auth";
import { readForm } from "~/.server/ids";
import { createSpot } from "~/.server/spots";
import { SpotForm } from "~/components/spot-form";
import { spotSchema } from "~/forms/spot";
import type { Route } from "./+types/spots.new";

export const meta: Route.MetaFunction = () => [{ title: "Add a spot · Nichewise" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  await requireSiteRole(request, params.siteId, ["owner"]);
  return null;
}

export async function action({ request, params }: Route.ActionArgs) {
  const { siteId, user } = await requireSiteRole(request, params.siteId, ["owner"]);
  const submission = parseWithZod(await readForm(request), { schema: spotSchema });
  if (submission.status !== "success") return { result: submission.reply() };
  const { indoor, notes, glazing, ...rest } = submission.value;
  const spot = await createSpot({
    siteId,
    actorId: user.id,
    values: { ...rest, indoor: indoor === "indoor", notes: notes ?? "", glazing: glazing ?? null },
  });
  return redirect(`/sites/${siteId}/spots/${spot.id}`);
}

export default function NewSpot({ actionData }: Route.ComponentProps) {
  return (
    <div className="max-w-xl">
      <h2 className="h2 mb-1">Add a spot</h2>
      <p className="mb-4 text-muted">A candidate place for plants: one windowsill, one shelf, one bench.</p>
      <div className="card">
        <SpotForm lastResult={actionData?.result} submitLabel="Add spot" />
      </div>
    </div>
  );
}
