// The page an invitation link opens. Signed out, it offers to create an account or sign in and
// comes back here (?next=); signed in as the invited address, one button joins the site. Signed in
// as anyone else, the page says whose the invitation is and offers to sign out, or to ask the owner
// to invite this address instead. The link is single-use.
import { data, Form, Link, redirect, useNavigation } from "react-router";
import { getUser, requireUser } from "~/.server/auth";
import {
  acceptInvitation,
  findInvitation,
  invitationState,
  MembershipError,
  sameAddress,
  WrongAccountError,
} from "~/.server/members";
import { AuthFrame } from "~/components/auth-frame";
import type { Route } from "./+types/invite";

export const meta: Route.MetaFunction = () => [{ title: "Invitation · Nichewise" }];

const roleWords = {
  owner: "an owner",
  carer: "a carer: you can log water checks, move sensors and plants, and acknowledge alerts",
  mentor: "a mentor: you can read everything in the site and leave notes on spots and plants",
};

export async function loader({ request, params }: Route.LoaderArgs) {
  const user = await getUser(request);
  const inv = await findInvitation(params.token);
  if (!inv) throw data("This invitation link is not valid. Check that the whole link was copied.", { status: 404 });
  const state = invitationState(inv);
  const here = new URL(request.url).pathname;
  return data(
    {
      state,
      siteName: inv.siteName,
      siteId: inv.siteId,
      role: inv.role,
      email: inv.email,
      inviterName: inv.inviterName ?? "The owner",
      expiresAt: inv.expiresAt,
      user: user ? { name: user.name, email: user.email } : null,
      wrongAccount: !!user && !sameAddress(user.email, inv.email),
      next: here,
    },
    { status: state === "open" || state === "accepted" ? 200 : 410 },
  );
}

export async function action({ request, params }: Route.ActionArgs) {
  const user = await requireUser(request);
  const inv = await findInvitation(params.token);
  if (!inv) throw data("This invitation link is not valid.", { status: 404 });
  try {
    const joined = await acceptInvitation(params.token, user);
    throw redirect(`/sites/${joined.siteId}`);
  } catch (err) {
    if (err instanceof WrongAccountError) return data({ error: err.message }, { status: 403 });
    if (err instanceof MembershipError) return data({ error: err.message }, { status: 410 });
    throw err;
  }
}

export default function Invite({ loaderData, actionData }: Route.ComponentProps) {
  const d = loaderData;
  const navigation = useNavigation();
  const q = (extra: Record<string, string> = {}) => `?${new URLSearchParams({ next: d.next, ...extra })}`;
  if (d.state !== "open") {
    const why = { accepted: "has already been used", revoked: "was withdrawn by the owner", expired: "has expired" }[
      d.state
    ];
    return (
      <AuthFrame title={`Invitation to ${d.siteName}`} lead={`This invitation ${why}.`}>
        <p className="text-sm">
          Invitations work once and for 7 days. Ask {d.inviterName} to send a new one.
          {d.state === "accepted" && d.user ? " If you accepted it yourself, the site is on your list." : ""}
        </p>
        <p className="mt-4">
          <Link className="link" to={d.user ? "/" : "/sign-in"}>
            {d.user ? "Go to my sites" : "Sign in"}
          </Link>
        </p>
      </AuthFrame>
    );
  }
  return (
    <AuthFrame
      title={`Join ${d.siteName}`}
      lead={`${d.inviterName} invites you to share this site as ${roleWords[d.role]}.`}
    >
      <p className="mb-4 text-sm text-muted">
        Sent to {d.email}. The link works once, until{" "}
        {new Date(d.expiresAt).toLocaleDateString("en-GB", {
          day: "numeric",
          month: "long",
          year: "numeric",
          timeZone: "UTC",
        })}
        .
      </p>
      {actionData?.error ? (
        <p className="error mb-3" role="alert">
          {actionData.error}
        </p>
      ) : null}
      {d.user && d.wrongAccount ? (
        <div className="space-y-3" data-testid="wrong-account">
          <p className="error" role="alert">
            This invitation is for {d.email}, and you are signed in as {d.user.email}. Only the invited address can
            accept it.
          </p>
          <Form method="post" action={`/sign-out`}>
            <button className="btn w-full" disabled={navigation.state !== "idle"}>
              Sign out, then sign in as {d.email}
            </button>
          </Form>
          <p className="text-sm text-muted">
            After signing out, open this link again and sign in (or create an account) with {d.email}. To join with{" "}
            {d.user.email} instead, ask {d.inviterName} to send an invitation to that address.
          </p>
        </div>
      ) : d.user ? (
        <Form method="post" className="space-y-3">
          <button className="btn w-full" disabled={navigation.state !== "idle"}>
            Join {d.siteName}
          </button>
          <p className="text-sm text-muted">
            Signed in as {d.user.name} ({d.user.email}).
          </p>
        </Form>
      ) : (
        <div className="space-y-3">
          <Link className="btn w-full" to={`/sign-up${q({ email: d.email })}`}>
            Create an account
          </Link>
          <Link className="btn-quiet w-full" to={`/sign-in${q({ email: d.email })}`}>
            I have an account: sign in
          </Link>
          <p className="text-sm text-muted">You come back to this page afterwards to join.</p>
        </div>
      )}
    </AuthFrame>
  );
}
