import { getFormProps, useForm } from "@conform-to/react";
import { parseWithZod } from "@conform-to/zod/v4";
import { Form, Link, redirect, useNavigation } from "react-router";
import { getUser, sessionCookie, signIn } from "~/.server/auth";
import { readForm } from "~/.server/ids";
import { AuthFrame } from "~/components/auth-frame";
import { FormErrors, TextField } from "~/components/field";
import { safeNext, signInSchema } from "~/forms/auth";
import type { Route } from "./+types/sign-in";

export const meta: Route.MetaFunction = () => [{ title: "Sign in · Nichewise" }];

export async function loader({ request }: Route.LoaderArgs) {
  const params = new URL(request.url).searchParams;
  const next = params.get("next") ?? "";
  if (await getUser(request)) throw redirect(safeNext(next));
  return { next, email: params.get("email") ?? "" };
}

export async function action({ request, context }: Route.ActionArgs) {
  const submission = parseWithZod(await readForm(request), { schema: signInSchema });
  if (submission.status !== "success") return { result: submission.reply({ hideFields: ["password"] }) };
  const { email, password, next } = submission.value;
  const result = await signIn(email, password, context.clientAddress);
  if (!result.ok) return { result: submission.reply({ formErrors: [result.error], hideFields: ["password"] }) };
  return redirect(safeNext(next), { headers: { "Set-Cookie": await sessionCookie(result.token, result.expiresAt) } });
}

export default function SignIn({ loaderData, actionData }: Route.ComponentProps) {
  const navigation = useNavigation();
  const [form, fields] = useForm({
    lastResult: actionData?.result,
    defaultValue: { next: loaderData.next, email: loaderData.email },
    onValidate: ({ formData }) => parseWithZod(formData, { schema: signInSchema }),
    shouldValidate: "onBlur",
    // An error clears as the field is corrected, so the button does not move under the pointer on blur.
    shouldRevalidate: "onInput",
  });
  return (
    <AuthFrame title="Sign in" lead="Read back what your spots have been through, and what will grow there.">
      <Form method="post" className="space-y-4" {...getFormProps(form)}>
        <FormErrors errors={form.errors} />
        <TextField meta={fields.email} label="E-mail" type="email" autoComplete="email" />
        <TextField meta={fields.password} label="Password" type="password" autoComplete="current-password" />
        <input type="hidden" name="next" value={loaderData.next} />
        <button className="btn w-full" disabled={navigation.state !== "idle"}>
          Sign in
        </button>
      </Form>
      <p className="mt-6 text-sm text-muted">
        New here?{" "}
        <Link className="link" to={`/sign-up${loaderData.next ? `?next=${encodeURIComponent(loaderData.next)}` : ""}`}>
          Create an account
        </Link>
      </p>
    </AuthFrame>
  );
}
