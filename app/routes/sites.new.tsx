import { parseWithZod } from "@conform-to/zod/v4";
import { redirect } from "react-router";
import { requireUser } from "~/.server/auth";
import { readForm } from "~/.server/ids";
import { db } from "~/.server/db";
import { SiteForm } from "~/components/site-form";
import { auditLog, memberships, sites } from "~/db/schema.server";
import { siteSchema } from "~/forms/site";
import type { Route } from "./+types/sites.new";

export const meta: Route.MetaFunction = () => [{ title: "New site · Nichewise" }];

export async function loader({ request }: Route.LoaderArgs) {
  await requireUser(request);
  return null;
}

export async function action({ request }: Route.ActionArgs) {
  const user = await requireUser(request);
  const submission = parseWithZod(await readForm(request), { schema: siteSchema });
  if (submission.status !== "success") return { result: submission.reply() };
  const siteId = await db().transaction(async (tx) => {
    const [site] = await tx.insert(sites).values(submission.value).returning({ id: sites.id });
    await tx.insert(memberships).values({ userId: user.id, siteId: site.id, role: "owner" });
    await tx
      .insert(auditLog)
      .values({ siteId: site.id, actorId: user.id, action: "site.create", detail: submission.value });
    return site.id;
  });
  return redirect(`/sites/${siteId}`);
}

export default function NewSite({ actionData }: Route.ComponentProps) {
  return (
    <main className="mx-auto max-w-xl px-4 py-8 sm:px-6">
      <h1 className="h1">New site</h1>
      <p className="mt-1 mb-6 text-muted">A home, a flat or a garden: the place your spots are in.</p>
      <div className="card">
        <SiteForm lastResult={actionData?.result} submitLabel="Create site" />
      </div>
    </main>
  );
}
