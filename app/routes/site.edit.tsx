import { parseWithZod } from "@conform-to/zod/v4";
import { eq } from "drizzle-orm";
import { redirect } from "react-router";
import { requireSiteRole } from "~/.server/auth";
import { readForm } from "~/.server/ids";
import { db } from "~/.server/db";
import { getSite } from "~/.server/sites";
import { SiteForm } from "~/components/site-form";
import { auditLog, sites } from "~/db/schema.server";
import { siteSchema } from "~/forms/site";
import type { Route } from "./+types/site.edit";

export const meta: Route.MetaFunction = () => [{ title: "Edit site · Nichewise" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { siteId } = await requireSiteRole(request, params.siteId, ["owner"]);
  return { site: await getSite(siteId) };
}

export async function action({ request, params }: Route.ActionArgs) {
  const { siteId, user } = await requireSiteRole(request, params.siteId, ["owner"]);
  const submission = parseWithZod(await readForm(request), { schema: siteSchema });
  if (submission.status !== "success") return { result: submission.reply() };
  await db().update(sites).set(submission.value).where(eq(sites.id, siteId));
  await db().insert(auditLog).values({ siteId, actorId: user.id, action: "site.update", detail: submission.value });
  return redirect(`/sites/${siteId}`);
}

export default function EditSite({ loaderData, actionData }: Route.ComponentProps) {
  const { site } = loaderData;
  return (
    <div className="max-w-xl">
      <h2 className="h2 mb-4">Edit site</h2>
      <div className="card">
        <SiteForm
          lastResult={actionData?.result}
          defaultValue={{
            name: site.name,
            latitude: site.latitude,
            longitude: site.longitude,
            timeZone: site.timeZone,
          }}
          submitLabel="Save"
        />
      </div>
    </div>
  );
}
