// People in a site: invitations by e-mail, role changes, removal and leaving. Every change is
// written to audit_log in the same transaction. The last owner can neither leave nor be demoted or
// removed: the owner rows of the site are locked first, so two owners demoting each other at once
// cannot both succeed.
import { and, asc, desc, eq, gt, isNull, sql } from "drizzle-orm";
import { db, type Tx } from "~/.server/db";
import { publicUrl } from "~/.server/env";
import { sendMail } from "~/.server/mail";
import { oneLine } from "~/.server/ids";
import { randomToken, sha256Hex } from "~/.server/secrets";
import { auditLog, invitations, memberships, sites, users, type Role } from "~/db/schema.server";
import { INVITABLE_ROLES, type InvitableRole } from "~/domain/vocabulary";

export { INVITABLE_ROLES, type InvitableRole };

/** The site's members, owners first. */
export async function listMembers(siteId: number) {
  return db()
    .select({
      userId: users.id,
      name: users.name,
      email: users.email,
      role: memberships.role,
      since: memberships.createdAt,
    })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(eq(memberships.siteId, siteId))
    .orderBy(asc(memberships.role), asc(users.name));
}

export const INVITATION_DAYS = 7;

export class MembershipError extends Error {}
/** Too many invitations in the window; `retryAt` is when the oldest counted one leaves it. */
export class InvitationLimitError extends MembershipError {
  constructor(
    message: string,
    readonly retryAt: Date,
  ) {
    super(message);
  }
}
/** The signed-in account is not the address the invitation was sent to. */
export class WrongAccountError extends MembershipError {}

// Invitations cost the sender nothing and put our mail in strangers' inboxes, so they are limited:
// per site an hour and per sender a day (common practice for invite and contact forms: a few an
// hour is plenty for a household, and a fresh account cannot spray hundreds of addresses).
export const INVITES_PER_SITE_PER_HOUR = 10;
export const INVITES_PER_USER_PER_DAY = 30;
/** Longest name (of a person or a site) put into an invitation e-mail. */
export const MAIL_NAME_MAX = 60;

export const invitationTokenHash = sha256Hex;

export const invitationUrl = (token: string) => `${publicUrl()}/invite/${token}`;

const roleLine: Record<Role, string> = {
  owner: "an owner: manages spots, sensors, people and alerts",
  carer: "a carer: you can log water checks, move sensors and plants, and acknowledge alerts",
  mentor: "a mentor: you can read everything in the site and leave notes on spots and plants",
};

/** Creates the invitation and e-mails its link; the token itself is only in the e-mail. */
export async function inviteMember(opts: {
  siteId: number;
  actor: { id: number; name: string };
  email: string;
  role: InvitableRole;
  now?: Date;
}) {
  const email = opts.email.trim().toLowerCase();
  const now = opts.now ?? new Date();
  const [existing] = await db()
    .select({ userId: users.id })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(and(eq(memberships.siteId, opts.siteId), eq(users.email, email)));
  if (existing) throw new MembershipError(`${email} is already a member of this site.`);
  const token = randomToken();
  const expiresAt = new Date(now.getTime() + INVITATION_DAYS * 86_400_000);
  const [site] = await db().select({ name: sites.name }).from(sites).where(eq(sites.id, opts.siteId));
  const invitation = await db().transaction(async (tx) => {
    // The sender's and the site's rows are locked, so invitations sent at once are counted in turn.
    await tx.execute(sql`select 1 from users where id = ${opts.actor.id} for update`);
    await tx.execute(sql`select 1 from sites where id = ${opts.siteId} for update`);
    await checkInvitationLimits(tx, { siteId: opts.siteId, userId: opts.actor.id, now });
    // A new invitation to the same address replaces any still open, so only the newest link works.
    await tx
      .update(invitations)
      .set({ revokedAt: now })
      .where(
        and(
          eq(invitations.siteId, opts.siteId),
          eq(invitations.email, email),
          isNull(invitations.acceptedAt),
          isNull(invitations.revokedAt),
        ),
      );
    const [row] = await tx
      .insert(invitations)
      .values({
        siteId: opts.siteId,
        email,
        role: opts.role,
        tokenHash: invitationTokenHash(token),
        invitedBy: opts.actor.id,
        expiresAt,
        createdAt: now,
      })
      .returning();
    await tx.insert(auditLog).values({
      siteId: opts.siteId,
      actorId: opts.actor.id,
      action: "member.invite",
      detail: { email, role: opts.role },
    });
    return row;
  });
  const url = invitationUrl(token);
  const until = expiresAt.toLocaleDateString("en-GB", {
    day: "numeric",
    month: "long",
    year: "numeric",
    timeZone: "UTC",
  });
  // Names are the sender's own words: one line, bounded, quoted, so they cannot pose as our text.
  const who = `"${oneLine(opts.actor.name, MAIL_NAME_MAX) || "A Nichewise member"}"`;
  const where = `"${oneLine(site.name, MAIL_NAME_MAX) || "a site"}"`;
  await sendMail({
    to: email,
    subject: `${who} invites you to ${where} on Nichewise`,
    text:
      `${who} has invited you to share ${where} on Nichewise as ${roleLine[opts.role]}.\n\n` +
      `Open this link to accept (it works once, until ${until}):\n${url}\n\n` +
      `If you were not expecting this, ignore this e-mail; nothing happens unless the link is opened.\n`,
    html:
      `<p>${escapeHtml(who)} has invited you to share <strong>${escapeHtml(where)}</strong> on Nichewise as ${escapeHtml(roleLine[opts.role])}.</p>` +
      `<p><a href="${url}">Accept the invitation</a> — the link works once, until ${until}.</p>` +
      `<p>If you were not expecting this, ignore this e-mail; nothing happens unless the link is opened.</p>`,
  });
  return { invitation, url };
}

async function checkInvitationLimits(tx: Tx, opts: { siteId: number; userId: number; now: Date }) {
  const hourAgo = new Date(opts.now.getTime() - 3_600_000);
  const dayAgo = new Date(opts.now.getTime() - 86_400_000);
  const [site] = await tx
    .select({ n: sql<number>`count(*)::int`, oldest: sql<Date | null>`min(${invitations.createdAt})` })
    .from(invitations)
    .where(and(eq(invitations.siteId, opts.siteId), gt(invitations.createdAt, hourAgo)));
  if (site.n >= INVITES_PER_SITE_PER_HOUR) {
    const retryAt = new Date(new Date(site.oldest!).getTime() + 3_600_000);
    throw new InvitationLimitError(
      `This site has sent ${INVITES_PER_SITE_PER_HOUR} invitations in the last hour, the most we send. Try again in ${minutesUntil(retryAt, opts.now)}.`,
      retryAt,
    );
  }
  const [mine] = await tx
    .select({ n: sql<number>`count(*)::int`, oldest: sql<Date | null>`min(${invitations.createdAt})` })
    .from(invitations)
    .where(and(eq(invitations.invitedBy, opts.userId), gt(invitations.createdAt, dayAgo)));
  if (mine.n >= INVITES_PER_USER_PER_DAY) {
    const retryAt = new Date(new Date(mine.oldest!).getTime() + 86_400_000);
    throw new InvitationLimitError(
      `You have sent ${INVITES_PER_USER_PER_DAY} invitations in the ` +
        `last 24 hours, the most we send for one person. Try again in ` +
        `${minutesUntil(retryAt, opts.now)}.`,
      retryAt,
    );
  }
}

function minutesUntil(at: Date, now: Date) {
  const min = Math.max(1, Math.ceil((at.getTime() - now.getTime()) / 60_000));
  if (min < 90) return `${min} minute${min === 1 ? "" : "s"}`;
  return `about ${Math.round(min / 60)} hours`;
}

function escapeHtml(s: string) {
  return s.replace(/[&<>"']/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" })[c]!);
}

export type InvitationState = "open" | "accepted" | "revoked" | "expired";

export function invitationState(
  inv: { acceptedAt: Date | null; revokedAt: Date | null; expiresAt: Date },
  now = new Date(),
): InvitationState {
  if (inv.acceptedAt) return "accepted";
  if (inv.revokedAt) return "revoked";
  if (inv.expiresAt.getTime() <= now.getTime()) return "expired";
  return "open";
}

/** The invitation behind a link, with its site and who sent it; null when the token is unknown. */
export async function findInvitation(token: string) {
  if (!/^[a-z2-7]{16,64}$/.test(token)) return null;
  const [row] = await db()
    .select({
      id: invitations.id,
      siteId: invitations.siteId,
      siteName: sites.name,
      email: invitations.email,
      role: invitations.role,
      expiresAt: invitations.expiresAt,
      acceptedAt: invitations.acceptedAt,
      revokedAt: invitations.revokedAt,
      inviterName: users.name,
    })
    .from(invitations)
    .innerJoin(sites, eq(sites.id, invitations.siteId))
    .leftJoin(users, eq(users.id, invitations.invitedBy))
    .where(eq(invitations.tokenHash, invitationTokenHash(token)));
  return row ?? null;
}

/**
 * Joins the signed-in user to the site. Single use: the row is claimed with a conditional update,
 * so two tabs opening the same link cannot both join. Someone who is already a member keeps their
 * role (an owner following an old link must not be demoted by it).
 */
export async function acceptInvitation(token: string, user: { id: number; email: string }, now = new Date()) {
  return db().transaction(async (tx) => {
    // Only the invited address may use the link: a forwarded or leaked link is no way in.
    const [sent] = await tx
      .select({ email: invitations.email })
      .from(invitations)
      .where(eq(invitations.tokenHash, invitationTokenHash(token)));
    if (sent && !sameAddress(sent.email, user.email)) {
      throw new WrongAccountError(
        `This invitation was sent to ${sent.email}, and you are signed ` +
          `in as ${user.email}. Sign out and sign in (or create an ` +
          `account) as ${sent.email}, or ask the owner to invite ` +
          `${user.email}.`,
      );
    }
    const [inv] = await tx
      .update(invitations)
      .set({ acceptedAt: now, acceptedBy: user.id })
      .where(
        and(
          eq(invitations.tokenHash, invitationTokenHash(token)),
          isNull(invitations.acceptedAt),
          isNull(invitations.revokedAt),
          gt(invitations.expiresAt, now),
        ),
      )
      .returning();
    if (!inv)
      throw new MembershipError(
        "This invitation has been used, withdrawn or has expired. Ask the owner for a new one.",
      );
    const [already] = await tx
      .select({ role: memberships.role })
      .from(memberships)
      .where(and(eq(memberships.siteId, inv.siteId), eq(memberships.userId, user.id)));
    if (!already) await tx.insert(memberships).values({ siteId: inv.siteId, userId: user.id, role: inv.role });
    await tx.insert(auditLog).values({
      siteId: inv.siteId,
      actorId: user.id,
      action: "member.join",
      detail: { email: inv.email, role: already?.role ?? inv.role, invitationId: inv.id },
    });
    return { siteId: inv.siteId, role: already?.role ?? inv.role };
  });
}

export const sameAddress = (a: string, b: string) => a.trim().toLowerCase() === b.trim().toLowerCase();

export async function revokeInvitation(opts: { siteId: number; actorId: number; invitationId: number; now?: Date }) {
  await db().transaction(async (tx) => {
    const [inv] = await tx
      .update(invitations)
      .set({ revokedAt: opts.now ?? new Date() })
      .where(
        and(
          eq(invitations.id, opts.invitationId),
          eq(invitations.siteId, opts.siteId),
          isNull(invitations.acceptedAt),
          isNull(invitations.revokedAt),
        ),
      )
      .returning();
    if (!inv) throw new MembershipError("That invitation is no longer open.");
    await tx.insert(auditLog).values({
      siteId: opts.siteId,
      actorId: opts.actorId,
      action: "member.invite-revoke",
      detail: { email: inv.email, role: inv.role },
    });
  });
}

export async function listInvitations(siteId: number, now = new Date()) {
  const rows = await db()
    .select({
      id: invitations.id,
      email: invitations.email,
      role: invitations.role,
      expiresAt: invitations.expiresAt,
      acceptedAt: invitations.acceptedAt,
      revokedAt: invitations.revokedAt,
      createdAt: invitations.createdAt,
    })
    .from(invitations)
    .where(eq(invitations.siteId, siteId))
    .orderBy(desc(invitations.createdAt))
    .limit(30);
  return rows.map((r) => ({ ...r, state: invitationState(r, now) }));
}

/** The newest changes in the site, with who made them, for the owners' "what changed" list. */
export async function recentChanges(siteId: number, limit = 50) {
  return db()
    .select({
      id: auditLog.id,
      at: auditLog.at,
      action: auditLog.action,
      detail: auditLog.detail,
      actorName: users.name,
    })
    .from(auditLog)
    .leftJoin(users, eq(users.id, auditLog.actorId))
    .where(eq(auditLog.siteId, siteId))
    .orderBy(desc(auditLog.at), desc(auditLog.id))
    .limit(limit);
}
