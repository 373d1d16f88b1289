import { eq } from "drizzle-orm";
import { describe, expect, it } from "vitest";
import {
  ARGON2_OPTIONS,
  createSession,
  generateSessionToken,
  hashPassword,
  invalidateSession,
  MAX_FAILURES_PER_ACCOUNT,
  requireSiteRole,
  sessionCookie,
  sessionIdFromToken,
  signIn,
  validateSessionToken,
  verifyPassword,
} from "~/.server/auth";
import { db } from "~/.server/db";
import { sessions } from "~/db/schema.server";
import { addMember, makeSite, makeUser } from "./helpers";

const request = (token: string | null, path = "/sites/1") =>
  new Request(`http://127.0.0.1${path}`, { headers: token ? { Cookie: `nw_session=${token}` } : {} });

async function thrown(p: Promise<unknown>) {
  try {
    await p;
  } catch (e) {
    return e as { status?: number; init?: { status?: number }; headers?: Headers };
  }
  throw new Error("expected a throw");
}
const statusOf = (e: { status?: number; init?: { status?: number } }) => e.status ?? e.init?.status;

describe("passwords", () => {
  it("hashes with argon2id at no less than the OWASP Password Storage Cheat Sheet minimum (m=19 MiB, t=2, p=1)", async () => {
    const h = await hashPassword("a long enough password");
    expect(h).toMatch(/^\$argon2id\$v=19\$m=(\d+),t=(\d+),p=(\d+)\$/);
    const [, m, t, p] = /m=(\d+),t=(\d+),p=(\d+)/.exec(h)!.map(Number);
    expect(m).toBeGreaterThanOrEqual(19456);
    expect(t).toBeGreaterThanOrEqual(2);
    expect(p).toBeGreaterThanOrEqual(1);
    expect(ARGON2_OPTIONS.algorithm).toBe(2); // Argon2id in @node-rs/argon2's enum
    expect(await verifyPassword(h, "a long enough password")).toBe(true);
    expect(await verifyPassword(h, "a long enough passwore")).toBe(false);
    expect(await verifyPassword("not a hash", "x")).toBe(false);
  });
});

describe("sign-in and sessions", () => {
  it("signs in with the right password and refuses a wrong one", async () => {
    const u = await makeUser();
    const bad = await signIn(u.email, "wrong password", "10.0.0.1");
    expect(bad.ok).toBe(false);
    const good = await signIn(u.email.toUpperCase(), u.password, "10.0.0.1");
    expect(good.ok).toBe(true);
    if (!good.ok) return;
    const session = await validateSessionToken(good.token);
    expect(session?.user.id).toBe(u.id);
    // The token itself is never stored; only its SHA-256.
    const [row] = await db()
      .select()
      .from(sessions)
      .where(eq(sessions.id, sessionIdFromToken(good.token)));
    expect(row).toBeDefined();
    expect(row.id).not.toContain(good.token);
  });

  it("gives a new token at every sign-in (no fixation)", async () => {
    const u = await makeUser();
    const a = await signIn(u.email, u.password, "10.0.0.2");
    const b = await signIn(u.email, u.password, "10.0.0.2");
    expect(a.ok && b.ok && a.token !== b.token).toBe(true);
  });

  it("refuses an expired session and deletes it", async () => {
    const u = await makeUser();
    const token = generateSessionToken();
    await createSession(token, u.id);
    await db()
      .update(sessions)
      .set({ expiresAt: new Date(Date.now() - 1000) })
      .where(eq(sessions.id, sessionIdFromToken(token)));
    expect(await validateSessionToken(token)).toBeNull();
    expect(
      await db()
        .select()
        .from(sessions)
        .where(eq(sessions.id, sessionIdFromToken(token))),
    ).toHaveLength(0);
  });

  it("renews a session that is past half its life (sliding expiry)", async () => {
    const u = await makeUser();
    const token = generateSessionToken();
    await createSession(token, u.id);
    const soon = new Date(Date.now() + 2 * 86_400_000);
    await db()
      .update(sessions)
      .set({ expiresAt: soon })
      .where(eq(sessions.id, sessionIdFromToken(token)));
    const s = await validateSessionToken(token);
    expect(s?.renewed).toBe(true);
    expect(s!.expiresAt.getTime()).toBeGreaterThan(Date.now() + 29 * 86_400_000);
  });

  it("refuses a revoked session", async () => {
    const u = await makeUser();
    const token = generateSessionToken();
    const s = await createSession(token, u.id);
    await invalidateSession(s.id);
    expect(await validateSessionToken(token)).toBeNull();
  });

  it("sets HttpOnly and SameSite=Lax on the cookie; Secure only when PUBLIC_URL is https (app/.server/auth-cookie.test.ts)", async () => {
    const c = await sessionCookie("abc", new Date(Date.now() + 1000));
    expect(c).toContain("HttpOnly");
    expect(c).toContain("SameSite=Lax");
    // Here PUBLIC_URL is unset: the app is reached over plain http, where a Secure cookie is not kept.
    expect(c).not.toContain("Secure");
  });

  it("rate-limits failed sign-ins per account from one address, even with the right password afterwards, but not the owner elsewhere", async () => {
    const u = await makeUser();
    for (let i = 0; i < MAX_FAILURES_PER_ACCOUNT; i++) {
      expect((await signIn(u.email, "nope nope nope", "10.1.0.1")).ok).toBe(false);
    }
    const blocked = await signIn(u.email, u.password, "10.1.0.1");
    expect(blocked.ok).toBe(false);
    if (!blocked.ok) expect(blocked.error).toMatch(/Too many/);
    // OWASP Authentication Cheat Sheet: a lockout anyone can trigger is a denial of service.
    expect((await signIn(u.email, u.password, "10.1.0.99")).ok).toBe(true);
  });

  it("rate-limits failed sign-ins per address across accounts", async () => {
    const addr = "10.2.0.1";
    for (let i = 0; i < 20; i++) await signIn(`nobody${i}@example.test`, "x", addr);
    const u = await makeUser();
    expect((await signIn(u.email, u.password, addr)).ok).toBe(false);
    expect((await signIn(u.email, u.password, "10.2.0.2")).ok).toBe(true);
  });
});

describe("roles", () => {
  it("gives a stranger 404 for a site, a mentor 403 for an owner's action, a member the site", async () => {
    const owner = await makeUser();
    const mentor = await makeUser();
    const stranger = await makeUser();
    const site = await makeSite(owner);
    await addMember(site, mentor, "mentor");
    const tokens = await Promise.all(
      [owner, mentor, stranger].map(async (u) => {
        const t = generateSessionToken();
        await createSession(t, u.id);
        return t;
      }),
    );
    const [ownerT, mentorT, strangerT] = tokens;
    expect((await requireSiteRole(request(ownerT), site.id, ["owner"])).role).toBe("owner");
    expect((await requireSiteRole(request(mentorT), site.id, ["owner", "carer", "mentor"])).role).toBe("mentor");
    expect(statusOf(await thrown(requireSiteRole(request(mentorT), site.id, ["owner"])))).toBe(403);
    expect(statusOf(await thrown(requireSiteRole(request(strangerT), site.id, ["owner", "carer", "mentor"])))).toBe(
      404,
    );
    const signedOut = await thrown(requireSiteRole(request(null), site.id, ["owner"]));
    expect(statusOf(signedOut)).toBe(302);
  });
});
