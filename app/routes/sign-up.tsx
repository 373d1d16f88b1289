import { getFormProps, useForm } from "@conform-to/react";
import { parseWithZod } from "@conform-to/zod/v4";
import { Form, Link, redirect, useNavigation } from "react-router";
import { createSession, generateSessionToken, getUser, hashPassword, sessionCookie } from "~/.server/auth";
import { readForm } from "~/.server/ids";
import { db } from "~/.server/db";
import { publicUrl } from "~/.server/env";
import { sendMail } from "~/.server/mail";
import { AuthFrame } from "~/components/auth-frame";
import { FormErrors, TextField } from "~/components/field";
import { users } from "~/db/schema.server";
import { safeNext, signUpSchema } from "~/forms/auth";
import type { Route } from "./+types/sign-up";

export const meta: Route.MetaFunction = () => [{ title: "Create an account · Nichewise" }];

export async function loader({ request }: Route.LoaderArgs) {
  const params = new URL(request.url).searchParams;
  const next = params.get("next") ?? "";
  if (await getUser(request)) throw redirect(safeNext(next));
  return { next, email: params.get("email") ?? "" };
}

export async function action({ request }: Route.ActionArgs) {
  const submission = parseWithZod(await readForm(request), { schema: signUpSchema });
  if (submission.status !== "success") return { result: submission.reply({ hideFields: ["password"] }) };
  const { name, email, password, next } = submission.value;
  // Hashed either way, so that the answer takes as long for a taken address as for a new one.
  const passwordHash = await hashPassword(password);
  const [user] = await db()
    .insert(users)
    .values({ name, email, passwordHash })
    .onConflictDoNothing({ target: users.email })
    .returning({ id: users.id });
  if (!user) {
    // The address has an account: the answer is the same redirect a new account gets (without its
    // session), so the form does not tell who has an account here (OWASP Authentication Cheat
    // Sheet, account enumeration); the owner of the address hears of it by e-mail instead.
    tellOwnerOfSignUpAttempt(email);
    return redirect(safeNext(next));
  }
  const token = generateSessionToken();
  const session = await createSession(token, user.id);
  return redirect(safeNext(next), { headers: { "Set-Cookie": await sessionCookie(token, session.expiresAt) } });
}

function tellOwnerOfSignUpAttempt(email: string) {
  const signInUrl = `${publicUrl()}/sign-in?email=${encodeURIComponent(email)}`;
  const text = [
    "Someone tried to create a Nichewise account with this e-mail address, which already has one.",
    "",
    `If it was you, sign in instead: ${signInUrl}`,
    "If it was not you, you need do nothing: your account and password are unchanged.",
  ].join("\n");
  const html = `<p>Someone tried to create a Nichewise account with this e-mail address, which already has one.</p>
<p>If it was you, <a href="${signInUrl}">sign in instead</a>.</p>
<p>If it was not you, you need do nothing: your account and password are unchanged.</p>`;
  // Not awaited: the answer must not wait on (or reveal) the mail.
  sendMail({ to: email, subject: "Your Nichewise account", text, html }).catch((err) =>
    console.error(`[nichewise] could not send the sign-up notice: ${(err as Error).message}`),
  );
}

export default function SignUp({ loaderData, actionData }: Route.ComponentProps) {
  const navigation = useNavigation();
  const [form, fields] = useForm({
    lastResult: actionData?.result,
    defaultValue: { next: loaderData.next, email: loaderData.email },
    onValidate: ({ formData }) => parseWithZod(formData, { schema: signUpSchema }),
    shouldValidate: "onBlur",
    // An error clears as the field is corrected, so the button does not move under the pointer on blur.
    shouldRevalidate: "onInput",
  });
  return (
    <AuthFrame
      title="Create an account"
      lead="Measure first, then choose plants that will thrive where you already are."
    >
      <Form method="post" className="space-y-4" {...getFormProps(form)}>
        <FormErrors errors={form.errors} />
        <TextField meta={fields.name} label="Your name" autoComplete="name" />
        <TextField meta={fields.email} label="E-mail" type="email" autoComplete="email" />
        <TextField
          meta={fields.password}
          label="Password"
          type="password"
          autoComplete="new-password"
          hint="At least 10 characters."
        />
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
