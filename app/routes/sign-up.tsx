import { getFormProps, useForm } from "@conform-to/react";
import { parseWithZod } from "@conform-to/zod/v4";
import { eq } from "drizzle-orm";
import { Form, Link, redirect, useNavigation } from "react-router";
import { createSession, generateSessionToken, getUser, hashPassword, sessionCookie } from "~/.server/auth";
import { db } from "~/.server/db";
import { AuthFrame } from "~/components/auth-frame";
import { FormErrors, TextField } from "~/components/field";
import { users } from "~/db/schema.server";
import { safeNext, signUpSchema } from "~/lib/forms";
import type { Route } from "./+types/sign-up";

export const meta: Route.MetaFunction = () => [{ title: "Create an account · Nichewise" }];

export async function loader({ request }: Route.LoaderArgs) {
  const params = new URL(request.url).searchParams;
  const next = params.get("next") ?? "";
  if (await getUser(request)) throw redirect(safeNext(next));
  return { next, email: params.get("email") ?? "" };
}

export async function action({ request }: Route.ActionArgs) {
  const submission = parseWithZod(await request.formData(), { schema: signUpSchema });
  if (submission.status !== "success") return { result: submission.reply({ hideFields: ["password"] }) };
  const { name, email, password, next } = submission.value;
  const [existing] = await db().select({ id: users.id }).from(users).where(eq(users.email, email));
  if (existing) {
    return {
      result: submission.reply({ fieldErrors: { email: ["An account with this e-mail exists already: sign in instead."] }, hideFields: ["password"] }),
    };
  }
  const [user] = await db()
    .insert(users)
    .values({ name, email, passwordHash: await hashPassword(password) })
    .returning({ id: users.id });
  const token = generateSessionToken();
  const session = await createSession(token, user.id);
  return redirect(safeNext(next), { headers: { "Set-Cookie": sessionCookie(token, session.expiresAt) } });
}

export default function SignUp({ loaderData, actionData }: Route.ComponentProps) {
  const navigation = useNavigation();
  const [form, fields] = useForm({
    lastResult: actionData?.result,
    defaultValue: { next: loaderData.next, email: loaderData.email },
    onValidate: ({ formData }) => parseWithZod(formData, { schema: signUpSchema }),
    shouldValidate: "onBlur",
  });
  return (
    <AuthFrame title="Create an account" lead="Measure first, then choose plants that will thrive where you already are.">
      <Form method="post" className="space-y-4" {...getFormProps(form)}>
        <FormErrors errors={form.errors} />
        <TextField meta={fields.name} label="Your name" autoComplete="name" />
        <TextField meta={fields.email} label="E-mail" type="email" autoComplete="email" />
        <TextField meta={fields.password} label="Password" type="password" autoComplete="new-password" hint="At least 10 characters." />
        <input type="hidden" name="next" value={loaderData.next} />
        <button className="btn w-full" disabled={navigation.state !== "idle"}>
          Create account
        </button>
      </Form>
      <p className="mt-6 text-sm text-muted">
        Have an account?{" "}
        <Link className="link" to={`/sign-in${loaderData.next ? `?next=${encodeURIComponent(loaderData.next)}` : ""}`}>
          Sign in
        </Link>
      </p>
    </AuthFrame>
  );
}
