import { redirect } from "react-router";
import { blankSessionCookie, getSession, invalidateSession } from "~/.server/auth";
import type { Route } from "./+types/sign-out";

export async function loader() {
  return redirect("/");
}

export async function action({ request }: Route.ActionArgs) {
  const session = await getSession(request);
  if (session) await invalidateSession(session.id);
  return redirect("/sign-in", { headers: { "Set-Cookie": await blankSessionCookie() } });
}
