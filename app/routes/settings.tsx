import { and, eq, ne } from "drizzle-orm";
import { data, Form } from "react-router";
import { getSession, hashPassword, requireUser, verifyPassword } from "~/.server/auth";
import { readForm } from "~/.server/ids";
import { db } from "~/.server/db";
import { sessions, users } from "~/db/schema.server";
import type { Route } from "./+types/settings";

export const meta: Route.MetaFunction = () => [{ title: "Settings · Nichewise" }];

export async function loader({ request }: Route.LoaderArgs) {
  return { user: await requireUser(request) };
}

export async function action({ request }: Route.ActionArgs) {
  const user = await requireUser(request);
  const form = await readForm(request);
  if (form.get("intent") === "unit") {
    const unit = form.get("unit") === "F" ? "F" : "C";
    await db().update(users).set({ temperatureUnit: unit }).where(eq(users.id, user.id));
    return { saved: "unit" };
  }
  if (form.get("intent") === "password") {
    const current = String(form.get("current") ?? "");
    const next = String(form.get("next") ?? "");
    const [row] = await db().select({ hash: users.passwordHash }).from(users).where(eq(users.id, user.id));
    if (!(await verifyPassword(row.hash, current))) return data({ error: "Your current password is not right." }, { status: 400 });
    if (next.length < 10 || next.length > 200) return data({ error: "Use 10 to 200 characters for the new password." }, { status: 400 });
    await db().update(users).set({ passwordHash: await hashPassword(next) }).where(eq(users.id, user.id));
    // A new password signs out every other session.
    const session = await getSession(request);
    await db().delete(sessions).where(and(eq(sessions.userId, user.id), ne(sessions.id, session!.id)));
    return { saved: "password" };
  }
  throw data("Unknown action", { status: 400 });
}

export default function Settings({ loaderData, actionData }: Route.ComponentProps) {
  const { user } = loaderData;
  return (
    <main className="mx-auto max-w-xl space-y-6 px-4 py-8 sm:px-6">
      <h1 className="h1">Settings</h1>
      <section className="card">
        <h2 className="h2 mb-3">Temperatures in</h2>
        <Form method="post" className="flex flex-wrap items-center gap-4">
          <input type="hidden" name="intent" value="unit" />
          {(["C", "F"] as const).map((u) => (
            <label key={u} className="inline-flex items-center gap-2">
              <input type="radio" name="unit" value={u} defaultChecked={user.temperatureUnit === u} /> °{u}
            </label>
          ))}
          <button className="btn-quiet">Save</button>
          {actionData && "saved" in actionData && actionData.saved === "unit" ? <span className="text-sm text-good">Saved</span> : null}
        </Form>
      </section>
      <section className="card">
        <h2 className="h2 mb-3">Change password</h2>
        <Form method="post" className="space-y-3">
          <input type="hidden" name="intent" value="password" />
          <label className="label" htmlFor="current">
            Current password
          </label>
          <input id="current" name="current" type="password" className="field" autoComplete="current-password" required />
          <label className="label" htmlFor="next">
            New password (at least 10 characters)
          </label>
          <input id="next" name="next" type="password" className="field" autoComplete="new-password" required minLength={10} />
          {actionData && "error" in actionData ? <p className="error">{actionData.error}</p> : null}
          {actionData && "saved" in actionData && actionData.saved === "password" ? (
            <p className="text-sm text-good">Password changed; your other sessions were signed out.</p>
          ) : null}
          <button className="btn-quiet">Change password</button>
        </Form>
      </section>
    </main>
  );
}
