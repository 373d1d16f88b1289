/** Role changes and removals, guarded so a site always keeps at least one owner. */
import { and, eq, sql } from "drizzle-orm";
import { db, type Tx } from "~/.server/db";
import { MembershipError } from "~/.server/members";
import { auditLog, memberships, type Role } from "~/db/schema.server";

/** Locks the site's memberships and returns them, so the last-owner check holds until commit. */
async function lockMembers(tx: Tx, siteId: number) {
  const res = await tx.execute<{ user_id: number; role: Role; name: string; email: string }>(
    sql`select m.user_id, m.role, u.name, u.email from memberships m join users u on u.id = m.user_id where m.site_id = ${siteId} for update of m`,
  );
  return res.rows;
}

const LAST_OWNER = "A site needs at least one owner. Make someone else an owner first.";

export async function changeRole(opts: { siteId: number; actorId: number; userId: number; role: Role }) {
  await db().transaction(async (tx) => {
    const members = await lockMembers(tx, opts.siteId);
    const target = members.find((m) => m.user_id === opts.userId);
    if (!target) throw new MembershipError("That person is not a member of this site.");
    if (target.role === opts.role) return;
    const owners = members.filter((m) => m.role === "owner").length;
    if (target.role === "owner" && owners <= 1) throw new MembershipError(LAST_OWNER);
    await tx
      .update(memberships)
      .set({ role: opts.role })
      .where(and(eq(memberships.siteId, opts.siteId), eq(memberships.userId, opts.userId)));
    await tx.insert(auditLog).values({
      siteId: opts.siteId,
      actorId: opts.actorId,
      action: "member.role",
      detail: { userId: target.user_id, name: target.name, from: target.role, to: opts.role },
    });
  });
}

/** Removes a member (an owner removing someone) or the actor themself (leaving). */
export async function removeMember(opts: { siteId: number; actorId: number; userId: number }) {
  await db().transaction(async (tx) => {
    const members = await lockMembers(tx, opts.siteId);
    const target = members.find((m) => m.user_id === opts.userId);
    if (!target) throw new MembershipError("That person is not a member of this site.");
    const owners = members.filter((m) => m.role === "owner").length;
    if (target.role === "owner" && owners <= 1) {
      throw new MembershipError(
        opts.actorId === opts.userId ? `You are the only owner, so you cannot leave. ${LAST_OWNER}` : LAST_OWNER,
      );
    }
    await tx.delete(memberships).where(and(eq(memberships.siteId, opts.siteId), eq(memberships.userId, opts.userId)));
    await tx.insert(auditLog).values({
      siteId: opts.siteId,
      actorId: opts.actorId,
      action: opts.actorId === opts.userId ? "member.leave" : "member.remove",
      detail: { userId: target.user_id, name: target.name, role: target.role },
    });
  });
}
