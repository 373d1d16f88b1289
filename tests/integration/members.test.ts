// Invitations, role changes and the last-owner rule against a real PostgreSQL, with the mail going
// through the real SMTP sink.
import { and, eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { db } from "~/.server/db";
import { configureMailer, startMailSink, sunkMail } from "~/.server/mail";
import {
  acceptInvitation,
  changeRole,
  findInvitation,
  invitationTokenHash,
  inviteMember,
  MembershipError,
  recentChanges,
  removeMember,
  revokeInvitation,
} from "~/.server/members";
import { auditLog, invitations, memberships } from "~/db/schema.server";
import { addMember, makeSite, makeUser } from "./helpers";

let sink: Awaited<ReturnType<typeof startMailSink>>;
beforeAll(async () => {
  sink = await startMailSink({ port: 0 });
  configureMailer(`smtp://127.0.0.1:${sink.port}`);
});
afterAll(async () => {
  await sink?.close();
});

const roleOf = async (siteId: number, userId: number) =>
  (await db().select({ role: memberships.role }).from(memberships).where(and(eq(memberships.siteId, siteId), eq(memberships.userId, userId))))[0]?.role ?? null;

const tokenFromMail = (to: string) => {
  const mail = sunkMail().filter((m) => m.to.includes(to)).at(-1);
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
    const { invitation, url } = await inviteMember({ siteId: site.id, actor: owner, email: ` ${guest.email.toUpperCase()} `, role: "mentor" });
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
    await inviteMember({ siteId: site.id, actor: owner, email: a.email, role: "carer", now: new Date(Date.now() - 8 * 86_400_000) });
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
    await expect(inviteMember({ siteId: site.id, actor: owner, email: owner.email, role: "carer" })).rejects.toThrow(/already a member/);
    const [inv] = await db()
      .insert(invitations)
      .values({ siteId: site.id, email: "someone@example.test", role: "carer", tokenHash: invitationTokenHash("abcdefghijklmnopqrstu"), expiresAt: new Date(Date.now() + 86_400_000) })
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
    await expect(changeRole({ siteId: site.id, actorId: owner.id, userId: owner.id, role: "carer" })).rejects.toThrow(/at least one owner/);
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
    await expect(changeRole({ siteId: site.id, actorId: second.id, userId: second.id, role: "carer" })).rejects.toBeInstanceOf(MembershipError);
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
    const owners = await db().select().from(memberships).where(and(eq(memberships.siteId, site.id), eq(memberships.role, "owner")));
    expect(owners).toHaveLength(1);
  });
});
