import { and, eq, ne } from "drizzle-orm";
import { getFormProps, useForm } from "@conform-to/react";
import { parseWithZod } from "@conform-to/zod/v4";
import { data, Form } from "react-router";
import { getSession, hashPassword, requireUser, verifyPassword } from "~/.server/auth";
import { readForm } from "~/.server/ids";
import { db } from "~/.server/db";
import { sessions, users } from "~/db/schema.server";
import { FieldError, FormErrors, TextField } from "~/components/field";
import { TEMPERATURE_UNITS } from "~/domain/vocabulary";
import { passwordSchema, settingsSchema, unitSchema } from "~/forms/settings";
import type { Route } from "./+types/settings";

export const meta: Route.MetaFunction = () => [{ title: "Settings · Nichewise" }];

export async function loader({ request }: Route.LoaderArgs) {
  return { user: await requireUser(request) };
}

export async function action({ request }: Route.ActionArgs) {
  const user = await requireUser(request);
  const submission = parseWithZod(await readForm(request), { schema: settingsSchema });
  // Passwords never come back to the page.
  const hideFields = ["current", "next"];
  if (submission.status !== "success") {
    const intent = submission.payload.intent;
    if (intent !== "unit" && intent !== "password") throw data("Unknown action", { status: 400 });
    return data({ intent, result: submission.reply({ hideFields }) }, { status: 400 });
  }
  const form = submission.value;
  if (form.intent === "unit") {
    await db().update(users).set({ temperatureUnit: form.unit }).where(eq(users.id, user.id));
    return { saved: "unit" as const };
  }
  const [row] = await db().select({ hash: users.passwordHash }).from(users).where(eq(users.id, user.id));
  if (!(await verifyPassword(row.hash, form.current))) {
    return data(
      {
        intent: form.intent,
        result: submission.reply({ fieldErrors: { current: ["Your current password is not right."] }, hideFields }),
      },
      { status: 400 },
    );
  }
  await db()
    .update(users)
    .set({ passwordHash: await hashPassword(form.next) })
    .where(eq(users.id, user.id));
  // A new password signs out every other session.
  const session = await getSession(request);
  await db()
    .delete(sessions)
    .where(and(eq(sessions.userId, user.id), ne(sessions.id, session!.id)));
  return { saved: "password" as const };
}

export default function Settings({ loaderData, actionData }: Route.ComponentProps) {
  const { user } = loaderData;
  const failed = (intent: "unit" | "password") =>
    actionData && "result" in actionData && actionData.intent === intent ? actionData.result : undefined;
  const saved = actionData && "saved" in actionData ? actionData.saved : null;
  const [unitForm, unitFields] = useForm({
    id: "unit",
    lastResult: failed("unit"),
    onValidate: ({ formData }) => parseWithZod(formData, { schema: unitSchema }),
  });
  const [passwordForm, passwordFields] = useForm({
    id: "password",
    lastResult: failed("password"),
    onValidate: ({ formData }) => parseWithZod(formData, { schema: passwordSchema }),
    shouldValidate: "onBlur",
    // An error clears while the field is corrected, so the button does not move under the pointer.
    shouldRevalidate: "onInput",
  });
  return (
    <main className="mx-auto max-w-xl space-y-6 px-4 py-8 sm:px-6">
      <h1 className="h1">Settings</h1>
      <section className="card">
        <h2 className="h2 mb-3">Temperatures in</h2>
        <Form method="post" className="flex flex-wrap items-center gap-4" {...getFormProps(unitForm)}>
          <input type="hidden" name="intent" value="unit" />
          {TEMPERATURE_UNITS.map((u) => (
            <label key={u} className="inline-flex items-center gap-2">
              <input type="radio" name={unitFields.unit.name} value={u} defaultChecked={user.temperatureUnit === u} /> °
              {u}
            </label>
          ))}
          <button className="btn-quiet">Save</button>
          {saved === "unit" ? <span className="text-sm text-good">Saved</span> : null}
          <FieldError meta={unitFields.unit} />
        </Form>
      </section>
      <section className="card">
        <h2 className="h2 mb-3">Change password</h2>
        <Form method="post" className="space-y-3" {...getFormProps(passwordForm)}>
          <input type="hidden" name="intent" value="password" />
          <FormErrors errors={passwordForm.errors} />
          <TextField
            meta={passwordFields.current}
            label="Current password"
            type="password"
            autoComplete="current-password"
          />
          <TextField
            meta={passwordFields.next}
            label="New password (at least 10 characters)"
            type="password"
            autoComplete="new-password"
          />
          {saved === "password" ? (
            <p className="text-sm text-good">Password changed; your other sessions were signed out.</p>
          ) : null}
          <button className="btn-quiet">Change password</button>
        </Form>
      </section>
    </main>
  );
}
