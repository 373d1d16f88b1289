import { useEffect, useRef } from "react";
import { getFormProps, getInputProps, useForm } from "@conform-to/react";
import { parseWithZod } from "@conform-to/zod/v4";
import { data, Form, redirect, useNavigation } from "react-router";
import { ALL_ROLES, requireSiteRole } from "~/.server/auth";
import {
  InvitationLimitError,
  INVITES_PER_SITE_PER_HOUR,
  inviteMember,
  listInvitations,
  listMembers,
  MembershipError,
  recentChanges,
  revokeInvitation,
} from "~/.server/members";
import { changeRole, removeMember } from "~/.server/member-roles";
import { readForm, refuseForm, toId } from "~/.server/ids";
import { useNow } from "~/components/use-now";
import { describeChange, type ChangeDetail } from "~/domain/sharing/changes";
import { formatInZone, timeAgo } from "~/lib/date-words";
import { FieldError, FormErrors } from "~/components/field";
import { IntentButton } from "~/components/intent-button";
import { inviteSchema, membersSchema } from "~/forms/members";
import type { Route } from "./+types/members";

export const meta: Route.MetaFunction = () => [{ title: "People · Nichewise" }];

export async function loader({ request, params }: Route.LoaderArgs) {
  const { siteId, role, user } = await requireSiteRole(request, params.siteId, ALL_ROLES);
  const members = await listMembers(siteId);
  const owner = role === "owner";
  return {
    now: Date.now(),
    invitesPerHour: INVITES_PER_SITE_PER_HOUR,
    role,
    me: user.id,
    // Only owners see e-mail addresses of the other members.
    members: members.map((m) => ({ ...m, email: owner || m.userId === user.id ? m.email : null })),
    invitations: owner
      ? (await listInvitations(siteId)).filter(
          (i) => i.state === "open" || Date.now() - i.createdAt.getTime() < 30 * 86_400_000,
        )
      : [],
    changes: owner
      ? (await recentChanges(siteId)).map((c) => ({
          id: c.id,
          at: c.at,
          who: c.actorName ?? "Someone",
          what: describeChange(c.action, c.detail as ChangeDetail),
        }))
      : [],
  };
}

export async function action({ request, params }: Route.ActionArgs) {
  // Members only, before the body is read; the role the intent needs is checked below.
  await requireSiteRole(request, params.siteId, ALL_ROLES);
  const submission = parseWithZod(await readForm(request), { schema: membersSchema });
  const intent = submission.payload.intent;
  const { siteId, user } = await requireSiteRole(request, params.siteId, intent === "leave" ? ALL_ROLES : ["owner"]);
  if (submission.status !== "success") {
    if (intent === "invite") return data({ intent, result: submission.reply() }, { status: 400 });
    if (intent === "role" || intent === "remove") {
      const error = Object.values(submission.error ?? {}).flat()[0] ?? "Choose a member.";
      return data({ intent, error, userId: toId(submission.payload.userId) }, { status: 400 });
    }
    refuseForm(submission.error);
  }
  const form = submission.value;
  try {
    switch (form.intent) {
      case "invite":
        await inviteMember({ siteId, actor: user, email: form.email, role: form.role });
        return { intent: form.intent, invited: form.email };
      case "revoke":
        await revokeInvitation({ siteId, actorId: user.id, invitationId: form.invitationId });
        return { intent: form.intent, ok: true };
      case "role":
        await changeRole({ siteId, actorId: user.id, userId: form.userId, role: form.role });
        return { intent: form.intent, ok: true, userId: form.userId };
      case "remove":
        await removeMember({ siteId, actorId: user.id, userId: form.userId });
        if (form.userId === user.id) throw redirect("/");
        return { intent: form.intent, ok: true, userId: form.userId };
      case "leave":
        await removeMember({ siteId, actorId: user.id, userId: user.id });
        throw redirect("/");
    }
  } catch (err) {
    if (err instanceof MembershipError) {
      const status = err instanceof InvitationLimitError ? 429 : 400;
      const headers =
        err instanceof InvitationLimitError
          ? { "Retry-After": String(Math.max(1, Math.ceil((err.retryAt.getTime() - Date.now()) / 1000))) }
          : undefined;
      // An invitation's refusal goes back with the address and role typed.
      const result = form.intent === "invite" ? submission.reply({ formErrors: [err.message] }) : undefined;
      return data(
        { intent: form.intent, error: err.message, userId: "userId" in form ? form.userId : null, result },
        { status, headers },
      );
    }
    throw err;
  }
}

const roleWords = {
  owner: "Owner — manages spots, sensors, people and alerts",
  carer: "Carer — logs water checks, moves sensors and plants, acknowledges alerts",
  mentor: "Mentor — reads everything and leaves notes",
};

const stateWords = { open: "waiting", accepted: "accepted", revoked: "withdrawn", expired: "expired" } as const;

export default function Members({ loaderData, actionData }: Route.ComponentProps) {
  const { role, me, members, invitations, changes } = loaderData;
  const now = useNow(loaderData.now);
  const navigation = useNavigation();
  const busy = navigation.state !== "idle";
  const owner = role === "owner";
  const soleOwner = members.filter((m) => m.role === "owner").length === 1;
  const lastOwnerNote = "The only owner: make someone else an owner before stepping down or leaving.";
  const ad = actionData;
  const invited = ad && "invited" in ad ? ad.invited : null;
  // A refused role change, removal or leave, shown beside that member (or the leave button).
  const refused = ad && "error" in ad ? ad : null;
  const [invite, inviteFields] = useForm({
    id: "invite",
    lastResult: ad && "result" in ad ? ad.result : undefined,
    defaultValue: { role: "carer" },
    onValidate: ({ formData }) => parseWithZod(formData, { schema: inviteSchema }),
    shouldValidate: "onBlur",
    // An error clears while the field is corrected, so the button does not move under the pointer.
    shouldRevalidate: "onInput",
  });
  const inviteForm = useRef<HTMLFormElement>(null);
  useEffect(() => {
    if (invited) inviteForm.current?.reset();
  }, [ad, invited]);

  return (
    <div className="grid grid-cols-1 gap-6 lg:grid-cols-[minmax(0,1fr)_minmax(0,22rem)]">
      <div className="space-y-6">
        <section>
          <p className="mb-4 text-muted">Who shares this site, and what each can do.</p>
          <ul className="shelf-list" data-testid="members">
            {members.map((m) => (
              <li key={m.userId} className="flex flex-wrap items-start justify-between gap-3 p-4">
                <div className="min-w-0">
                  <p className="font-semibold">
                    {m.name}
                    {m.userId === me ? <span className="font-normal text-muted"> (you)</span> : null}
                  </p>
                  {m.email ? <p className="text-sm break-all text-muted">{m.email}</p> : null}
                  <p className="mt-1 text-sm">{roleWords[m.role]}</p>
                  {owner && soleOwner && m.role === "owner" ? (
                    <p id={`last-owner-${m.userId}`} className="hint">
                      {lastOwnerNote}
                    </p>
                  ) : null}
                  {refused &&
                  refused.userId === m.userId &&
                  (refused.intent === "role" || refused.intent === "remove") ? (
                    <p className="error" role="alert">
                      {refused.error}
                    </p>
                  ) : null}
                </div>
                {owner ? (
                  <div className="flex flex-wrap items-center gap-2">
                    <Form method="post" className="flex items-center gap-2">
                      <input type="hidden" name="intent" value="role" />
                      <input type="hidden" name="userId" value={m.userId} />
                      <label className="sr-only" htmlFor={`role-${m.userId}`}>
                        Role of {m.name}
                      </label>
                      <select
                        id={`role-${m.userId}`}
                        name="role"
                        defaultValue={m.role}
                        className="field w-auto py-1.5 text-sm"
                        disabled={soleOwner && m.role === "owner"}
                        aria-describedby={soleOwner && m.role === "owner" ? `last-owner-${m.userId}` : undefined}
                      >
                        <option value="owner">Owner</option>
                        <option value="carer">Carer</option>
                        <option value="mentor">Mentor</option>
                      </select>
                      <button className="btn-quiet px-3 py-1.5" disabled={busy || (soleOwner && m.role === "owner")}>
                        Change role
                      </button>
                    </Form>
                    {m.userId !== me ? (
                      <IntentButton
                        intent="remove"
                        fields={{ userId: m.userId }}
                        className="btn-danger px-3 py-1.5"
                        busy={busy}
                        ask={`Remove ${m.name} from this site?`}
                      >
                        Remove
                      </IntentButton>
                    ) : null}
                  </div>
                ) : null}
              </li>
            ))}
          </ul>
          <Form
            method="post"
            className="mt-3"
            onSubmit={(e) => {
              if (!confirm("Leave this site? You will need a new invitation to come back.")) e.preventDefault();
            }}
          >
            <input type="hidden" name="intent" value="leave" />
            <button className="btn-quiet" disabled={busy || (owner && soleOwner)}>
              Leave this site
            </button>
            {owner && soleOwner ? (
              <p className="hint">You are the only owner, so you cannot leave yet: make someone else an owner first.</p>
            ) : null}
            {refused && refused.intent === "leave" ? (
              <p className="error" role="alert">
                {refused.error}
              </p>
            ) : null}
          </Form>
        </section>

        {owner ? (
          <section className="card">
            <h2 className="h2 mb-1">What changed</h2>
            <p className="mb-3 text-sm text-muted">Every change in this site, newest first, with who made it.</p>
            {changes.length === 0 ? (
              <p className="text-muted">Nothing yet.</p>
            ) : (
              <ol className="divide-y divide-line text-sm" data-testid="changes">
                {changes.map((c) => (
                  <li key={c.id} className="flex flex-wrap justify-between gap-x-4 py-2">
                    <span>
                      <span className="font-medium">{c.who}</span> {c.what}
                    </span>
                    <time
                      className="text-muted"
                      dateTime={new Date(c.at).toISOString()}
                      title={formatInZone(c.at, "UTC")}
                    >
                      {timeAgo(c.at, now)}
                    </time>
                  </li>
                ))}
              </ol>
            )}
          </section>
        ) : null}
      </div>

      {owner ? (
        <aside className="space-y-6">
          <section className="card">
            <h2 className="h2 mb-1">Invite someone</h2>
            <p className="mb-3 text-sm text-muted">
              They get an e-mail with a link that works once, for 7 days, and only for that address. Opening it lets
              them sign in or create an account with it, then join. At most {loaderData.invitesPerHour} invitations an
              hour for a site.
            </p>
            <Form method="post" className="space-y-3" ref={inviteForm} {...getFormProps(invite)}>
              <input type="hidden" name="intent" value="invite" />
              <div>
                <label className="label" htmlFor={inviteFields.email.id}>
                  E-mail
                </label>
                <input autoComplete="off" className="field" {...getInputProps(inviteFields.email, { type: "email" })} />
                <FieldError meta={inviteFields.email} />
              </div>
              <fieldset>
                <legend className="label">Role</legend>
                <label className="flex items-start gap-2 text-sm">
                  <input {...getInputProps(inviteFields.role, { type: "radio", value: "carer" })} className="mt-1" />
                  <span>
                    <span className="font-medium">Carer</span> — waters while you are away, logs water checks, moves
                    sensors and plants
                  </span>
                </label>
                <label className="mt-2 flex items-start gap-2 text-sm">
                  <input {...getInputProps(inviteFields.role, { type: "radio", value: "mentor" })} className="mt-1" />
                  <span>
                    <span className="font-medium">Mentor</span> — reads everything and leaves notes; changes nothing
                    else
                  </span>
                </label>
                <FieldError meta={inviteFields.role} />
              </fieldset>
              <FormErrors errors={invite.errors} />
              {invited ? (
                <p className="text-sm text-good" role="status">
                  ✓ Invitation sent to {invited}.
                </p>
              ) : null}
              <button className="btn w-full" disabled={busy}>
                Send invitation
              </button>
            </Form>
          </section>

          <section className="card">
            <h2 className="h2 mb-3">Invitations</h2>
            {invitations.length === 0 ? <p className="text-sm text-muted">None sent recently.</p> : null}
            <ul className="space-y-3 text-sm" data-testid="invitations">
              {invitations.map((i) => (
                <li key={i.id} className="flex flex-wrap items-center justify-between gap-2">
                  <span className="min-w-0">
                    <span className="block font-medium break-all">{i.email}</span>
                    <span className="text-muted">
                      {i.role} · {stateWords[i.state]}
                      {i.state === "open"
                        ? ` · until ${formatInZone(i.expiresAt, "UTC", { hour: undefined, minute: undefined })}`
                        : ""}
                    </span>
                  </span>
                  {i.state === "open" ? (
                    <IntentButton
                      intent="revoke"
                      fields={{ invitationId: i.id }}
                      className="btn-quiet px-3 py-1.5"
                      busy={busy}
                    >
                      Withdraw
                    </IntentButton>
                  ) : null}
                </li>
              ))}
            </ul>
          </section>
        </aside>
      ) : null}
    </div>
  );
}
