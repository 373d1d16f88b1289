// Invitations, role changes and the last-owner rule against a real PostgreSQL, with the mail going
// through the real SMTP sink.
import { and, eq } from "drizzle-orm";
import { describe, expect, it } from "vitest";
import { db } from "~/.server/db";
import { sunkMail } from "~/.server/mail";
import { createSession, generateSessionToken } from "~/.server/auth";
import {
  acceptInvitation,
  findInvitation,
  InvitationLimitError,
  invitationTokenHash,
  inviteMember,
  INVITES_PER_SITE_PER_HOUR,
  INVITES_PER_USER_PER_DAY,
  MAIL_NAME_MAX,
  MembershipError,
  recentChanges,
  revokeInvitation,
  WrongAccountError,
} from "~/.server/members";
import { changeRole, removeMember } from "~/.server/member-roles";
import { auditLog, invitations, memberships, sites } from "~/db/schema.server";
import { action as inviteAction, loader as inviteLoader } from "~/routes/invite";
import { action as membersAction } from "~/routes/members";
import { addMember, makeSite, makeUser, useMailSink } from "./helpers";

useMailSink();

const roleOf = async (siteId: number, userId: number) =>
  (
    await db()
      .select({ role: memberships.role })
      .from(memberships)
      .where(and(eq(memberships.siteId, siteId), eq(memberships.userId, userId)))
  )[0]?.role ?? null;

const tokenFromMail = (to: string) => {
  const mail = sunkMail()
    .filter((m) => m.to.includes(to))
    .at(-1);
  const raw = mail!.raw.replace(/=\r?\n/g, "");
  return /\/invite\/([a-z2-7]+)/.exec(raw)![1];
};

async function setup() {
  const owner = await makeUser();
  const site = await makeSite(owner);
  return { owner: { ...owner, name: "Wren" }, site };
}

describe("invitations", () => {
  it("mails a link whose token is stored only as its SHA-256, and joins with the role once", async () => {
    const { owner, site } = await setup();
    const guest = await makeUser();
    const { invitation, url } = await inviteMember({
      siteId: site.id,
      actor: owner,
      email: ` ${guest.email.toUpperCase()} `,
      role: "mentor",
    });
    expect(invitation.email).toBe(guest.email);
    const token = tokenFromMail(guest.email);
    expect(url.endsWith(`/invite/${token}`)).toBe(true);
    expect(invitation.tokenHash).toBe(invitationTokenHash(token));
    expect(invitation.tokenHash).not.toContain(token);
    // 7 days
    expect(invitation.expiresAt.getTime() - invitation.createdAt.getTime()).toBeGreaterThan(7 * 86_400_000 - 60_000);
    expect(invitation.expiresAt.getTime() - invitation.createdAt.getTime()).toBeLessThan(7 * 86_400_000 + 60_000);

    expect((await findInvitation(token))?.siteId).toBe(site.id);
    const joined = await acceptInvitation(token, guest);
    expect(joined).toEqual({ siteId: site.id, role: "mentor" });
    expect(await roleOf(site.id, guest.id)).toBe("mentor");

    // Single use: a second person with the same link gets nothing.
    const other = await makeUser();
    await expect(acceptInvitation(token, other)).rejects.toBeInstanceOf(MembershipError);
    expect(await roleOf(site.id, other.id)).toBeNull();
  });

  it("refuses an expired or withdrawn link", async () => {
    const { owner, site } = await setup();
    const a = await makeUser();
    await inviteMember({
      siteId: site.id,
      actor: owner,
      email: a.email,
      role: "carer",
      now: new Date(Date.now() - 8 * 86_400_000),
    });
    await expect(acceptInvitation(tokenFromMail(a.email), a)).rejects.toThrow(/expired/);

    const b = await makeUser();
    const { invitation } = await inviteMember({ siteId: site.id, actor: owner, email: b.email, role: "carer" });
    await revokeInvitation({ siteId: site.id, actorId: owner.id, invitationId: invitation.id });
    await expect(acceptInvitation(tokenFromMail(b.email), b)).rejects.toBeInstanceOf(MembershipError);
    expect(await roleOf(site.id, b.id)).toBeNull();
  });

  it("a newer invitation to the same address replaces the older link", async () => {
    const { owner, site } = await setup();
    const a = await makeUser();
    await inviteMember({ siteId: site.id, actor: owner, email: a.email, role: "carer" });
    const first = tokenFromMail(a.email);
    await inviteMember({ siteId: site.id, actor: owner, email: a.email, role: "mentor" });
    const second = tokenFromMail(a.email);
    await expect(acceptInvitation(first, a)).rejects.toBeInstanceOf(MembershipError);
    expect((await acceptInvitation(second, a)).role).toBe("mentor");
  });

  it("does not invite an existing member, and a member following a link keeps their role", async () => {
    const { owner, site } = await setup();
    await expect(inviteMember({ siteId: site.id, actor: owner, email: owner.email, role: "carer" })).rejects.toThrow(
      /already a member/,
    );
    const [inv] = await db()
      .insert(invitations)
      .values({
        siteId: site.id,
        email: owner.email,
        role: "carer",
        tokenHash: invitationTokenHash("abcdefghijklmnopqrstu"),
        expiresAt: new Date(Date.now() + 86_400_000),
      })
      .returning();
    expect((await acceptInvitation("abcdefghijklmnopqrstu", owner)).role).toBe("owner");
    expect(await roleOf(site.id, owner.id)).toBe("owner");
    expect(inv.id).toBeGreaterThan(0);
  });
});

describe("roles and the last-owner rule", () => {
  it("owners change roles and remove members; every change is in audit_log", async () => {
    const { owner, site } = await setup();
    const carer = await makeUser();
    await addMember(site, carer, "carer");
    await changeRole({ siteId: site.id, actorId: owner.id, userId: carer.id, role: "mentor" });
    expect(await roleOf(site.id, carer.id)).toBe("mentor");
    await removeMember({ siteId: site.id, actorId: owner.id, userId: carer.id });
    expect(await roleOf(site.id, carer.id)).toBeNull();
    const log = await db().select().from(auditLog).where(eq(auditLog.siteId, site.id));
    expect(log.map((l) => l.action)).toEqual(["member.role", "member.remove"]);
    expect(log[0].detail).toMatchObject({ userId: carer.id, from: "carer", to: "mentor" });
    expect(log.every((l) => l.actorId === owner.id)).toBe(true);
    const changes = await recentChanges(site.id);
    expect(changes[0]).toMatchObject({ action: "member.remove", actorName: "Test grower" });
  });

  it("the last owner can neither be demoted, removed nor leave", async () => {
    const { owner, site } = await setup();
    await expect(changeRole({ siteId: site.id, actorId: owner.id, userId: owner.id, role: "carer" })).rejects.toThrow(
      /at least one owner/,
    );
    await expect(removeMember({ siteId: site.id, actorId: owner.id, userId: owner.id })).rejects.toThrow(/only owner/);
    expect(await roleOf(site.id, owner.id)).toBe("owner");
  });

  it("with a second owner, the first may step down or leave, and then the second is the last", async () => {
    const { owner, site } = await setup();
    const second = await makeUser();
    await addMember(site, second, "carer");
    await changeRole({ siteId: site.id, actorId: owner.id, userId: second.id, role: "owner" });
    await changeRole({ siteId: site.id, actorId: owner.id, userId: owner.id, role: "mentor" });
    expect(await roleOf(site.id, owner.id)).toBe("mentor");
    await expect(
      changeRole({ siteId: site.id, actorId: second.id, userId: second.id, role: "carer" }),
    ).rejects.toBeInstanceOf(MembershipError);
    await removeMember({ siteId: site.id, actorId: owner.id, userId: owner.id });
    const log = await db().select({ action: auditLog.action }).from(auditLog).where(eq(auditLog.siteId, site.id));
    expect(log.map((l) => l.action)).toContain("member.leave");
  });

  it("two owners demoting each other at the same time leave one owner", async () => {
    const { owner, site } = await setup();
    const second = await makeUser();
    await addMember(site, second, "owner");
    const results = await Promise.allSettled([
      changeRole({ siteId: site.id, actorId: owner.id, userId: second.id, role: "carer" }),
      changeRole({ siteId: site.id, actorId: second.id, userId: owner.id, role: "carer" }),
    ]);
    expect(results.filter((r) => r.status === "fulfilled")).toHaveLength(1);
    const owners = await db()
      .select()
      .from(memberships)
      .where(and(eq(memberships.siteId, site.id), eq(memberships.role, "owner")));
    expect(owners).toHaveLength(1);
  });
});

// Invitations as an abuser would send them (issue 14): many at once, with names that try to be
// mail headers, and a link used by someone it was not sent to.
describe("invitation abuse", () => {
  const sessionFor = async (userId: number) => {
    const token = generateSessionToken();
    await createSession(token, userId);
    return token;
  };
  const req = (token: string, path: string, form?: Record<string, string>) =>
    new Request(`http://127.0.0.1${path}`, {
      method: form ? "POST" : "GET",
      headers: { Cookie: `nw_session=${token}`, ...(form ? { Origin: "http://127.0.0.1" } : {}) },
      body: form ? new URLSearchParams(form) : undefined,
    });
  const unwrap = (r: unknown) => {
    const d = r as { type?: string; data?: unknown; init?: { status?: number } | null };
    return d && d.type === "DataWithResponseInit"
      ? { status: d.init?.status ?? 200, body: d.data as Record<string, unknown> }
      : { status: 200, body: r as Record<string, unknown> };
  };

  it(`allows ${INVITES_PER_SITE_PER_HOUR} invitations an hour per site, then answers 429 with a clear message`, async () => {
    const { owner, site } = await setup();
    const token = await sessionFor(owner.id);
    for (let i = 0; i < INVITES_PER_SITE_PER_HOUR; i++) {
      const r = unwrap(
        await membersAction({
          request: req(token, `/sites/${site.id}/members`, {
            intent: "invite",
            email: `flood${i}-${site.id}@example.test`,
            role: "carer",
          }),
          params: { siteId: String(site.id) },
          context: {},
        } as never),
      );
      expect(r.status).toBe(200);
    }
    const over = unwrap(
      await membersAction({
        request: req(token, `/sites/${site.id}/members`, {
          intent: "invite",
          email: `one-more-${site.id}@example.test`,
          role: "carer",
        }),
        params: { siteId: String(site.id) },
        context: {},
      } as never),
    );
    expect(over.status).toBe(429);
    expect(over.body.error).toMatch(/10 invitations in the last hour.*Try again in \d+ minutes?/);
    expect(sunkMail().some((m) => m.to.includes(`one-more-${site.id}@example.test`))).toBe(false);
    // An hour on, the site may invite again.
    await expect(
      inviteMember({
        siteId: site.id,
        actor: owner,
        email: `later-${site.id}@example.test`,
        role: "carer",
        now: new Date(Date.now() + 3_700_000),
      }),
    ).resolves.toBeTruthy();
  });

  it(`allows one person ${INVITES_PER_USER_PER_DAY} invitations a day across all their sites`, async () => {
    const owner = { ...(await makeUser()), name: "Sprayer" };
    const sites = [await makeSite(owner), await makeSite(owner), await makeSite(owner), await makeSite(owner)];
    const sends = Array.from({ length: INVITES_PER_USER_PER_DAY }, (_, i) => ({
      site: sites[i % 4],
      email: `spray${i}-${owner.id}@example.test`,
    }));
    // Sent at once: the row locks count them in turn, so no burst slips past the limit.
    const results = await Promise.allSettled(
      [...sends, { site: sites[3], email: `spray-extra-${owner.id}@example.test` }].map((x) =>
        inviteMember({ siteId: x.site.id, actor: owner, email: x.email, role: "mentor" }),
      ),
    );
    const refused = results.filter((r) => r.status === "rejected");
    expect(refused, refused.map((r) => String((r as PromiseRejectedResult).reason)).join("; ")).toHaveLength(1);
    expect((refused[0] as PromiseRejectedResult).reason).toBeInstanceOf(InvitationLimitError);
    expect(String((refused[0] as PromiseRejectedResult).reason.message)).toMatch(/30 invitations in the last 24 hours/);
  });

  it("puts the inviter's and the site's names into the mail on one line, bounded and quoted", async () => {
    const owner = await makeUser();
    const site = await makeSite(owner);
    await db().update(sites).set({ name: "Hollins\r\nBcc: victim@example.test\u0007" }).where(eq(sites.id, site.id));
    const guest = `named-${site.id}@example.test`;
    const evil = "Your bank\r\nReply-To: thief@example.test\t" + "x".repeat(300);
    await inviteMember({ siteId: site.id, actor: { id: owner.id, name: evil }, email: guest, role: "carer" });
    const mail = sunkMail()
      .filter((m) => m.to.includes(guest))
      .at(-1)!;
    expect(mail.to).toEqual([guest]); // no Bcc smuggled in
    expect(mail.subject).not.toMatch(/[\r\n\u0000]/);
    expect(mail.subject).toMatch(
      /^"Your bank Reply-To: thief@example\.test x+…" invites you to "Hollins Bcc: victim@example\.test" on Nichewise$/,
    );
    expect(mail.subject.length).toBeLessThan(2 * MAIL_NAME_MAX + 40);
    expect(mail.raw).not.toMatch(/^Reply-To: thief/im);
    expect(mail.raw).not.toMatch(/^Bcc:/im);
  });

  it("accepts a link only as the invited address; another signed-in account gets a clear page and is not joined", async () => {
    const { owner, site } = await setup();
    const invited = await makeUser();
    const other = await makeUser();
    await inviteMember({ siteId: site.id, actor: owner, email: invited.email, role: "carer" });
    const link = tokenFromMail(invited.email);
    await expect(acceptInvitation(link, other)).rejects.toBeInstanceOf(WrongAccountError);
    expect(await roleOf(site.id, other.id)).toBeNull();

    const otherToken = await sessionFor(other.id);
    const page = unwrap(
      await inviteLoader({
        request: req(otherToken, `/invite/${link}`),
        params: { token: link },
        context: {},
      } as never),
    );
    expect(page.body).toMatchObject({ wrongAccount: true, email: invited.email });
    const post = unwrap(
      await inviteAction({
        request: req(otherToken, `/invite/${link}`, {}),
        params: { token: link },
        context: {},
      } as never),
    );
    expect(post.status).toBe(403);
    expect(post.body.error).toContain(`sent to ${invited.email}`);
    expect(post.body.error).toMatch(/Sign out and sign in .* or ask the owner to invite/);
    expect(await roleOf(site.id, other.id)).toBeNull();

    // The link still works for its address (the refusal did not use it up), whatever the case.
    expect((await acceptInvitation(link, { ...invited, email: invited.email.toUpperCase() })).role).toBe("carer");
  });
});
