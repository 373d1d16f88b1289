// Sign-in and sessions, written the way the Lucia guide teaches (the `lucia` package itself is
// deprecated): an opaque random token in the cookie, its SHA-256 as the session id in PostgreSQL,
// a 30-day expiry renewed when less than half remains, and deletion on sign-out.
import { hash, verify } from "@node-rs/argon2";
import { and, eq, gt, sql } from "drizzle-orm";
import { createCookie, data } from "react-router";
import { db } from "~/.server/db";
import { publicUrl } from "~/.server/env";
import { paramId } from "~/.server/ids";
import { requestScope } from "~/.server/request-scope";
import { randomToken, sha256Hex } from "~/.server/secrets";
import { MAX_PASSWORD_LENGTH } from "~/forms/auth";
import { ROLES } from "~/domain/vocabulary";
import { memberships, sessions, signInFailures, users, type Role, type User } from "~/db/schema.server";

// OWASP Password Storage Cheat Sheet, argon2id minimum: m = 19 MiB, t = 2, p = 1.
export const ARGON2_OPTIONS = { algorithm: 2, memoryCost: 19456, timeCost: 2, parallelism: 1 } as const;

// Passwords are bounded before argon2 reads them, whatever the caller checked: argon2 costs per byte
// (OWASP Authentication Cheat Sheet, maximum password length).
export { MAX_PASSWORD_LENGTH };

export const hashPassword = (password: string) => {
  if (password.length > MAX_PASSWORD_LENGTH) throw new Error(`Passwords are at most ${MAX_PASSWORD_LENGTH} characters`);
  return hash(password, ARGON2_OPTIONS);
};
export async function verifyPassword(passwordHash: string, password: string) {
  if (password.length > MAX_PASSWORD_LENGTH) return false;
  try {
    return await verify(passwordHash, password);
  } catch {
    return false;
  }
}

export const SESSION_COOKIE = "nw_session";
export const SESSION_DAYS = 30;
const DAY = 24 * 60 * 60 * 1000;

export const generateSessionToken = randomToken;

export const sessionIdFromToken = sha256Hex;

export async function createSession(token: string, userId: number) {
  const session = { id: sessionIdFromToken(token), userId, expiresAt: new Date(Date.now() + SESSION_DAYS * DAY) };
  await db().insert(sessions).values(session);
  return session;
}

export type SessionUser = Pick<User, "id" | "email" | "name" | "isAdmin" | "temperatureUnit">;
export type ValidSession = { id: string; expiresAt: Date; user: SessionUser; renewed: boolean };

export async function validateSessionToken(token: string): Promise<ValidSession | null> {
  const id = sessionIdFromToken(token);
  const [row] = await db()
    .select({
      id: sessions.id,
      expiresAt: sessions.expiresAt,
      user: {
        id: users.id,
        email: users.email,
        name: users.name,
        isAdmin: users.isAdmin,
        temperatureUnit: users.temperatureUnit,
      },
    })
    .from(sessions)
    .innerJoin(users, eq(users.id, sessions.userId))
    .where(eq(sessions.id, id));
  if (!row) return null;
  const now = Date.now();
  if (now >= row.expiresAt.getTime()) {
    await db().delete(sessions).where(eq(sessions.id, id));
    return null;
  }
  let renewed = false;
  if (now >= row.expiresAt.getTime() - (SESSION_DAYS / 2) * DAY) {
    row.expiresAt = new Date(now + SESSION_DAYS * DAY);
    await db().update(sessions).set({ expiresAt: row.expiresAt }).where(eq(sessions.id, id));
    renewed = true;
    // The web adapter sends the cookie again with the new expiry, whatever route asked.
    const scope = requestScope.getStore();
    if (scope) scope.renewedSession = { token, expiresAt: row.expiresAt };
  }
  return { ...row, renewed };
}

/** Whether a token names an unexpired session: one read, no renewal (the web adapter's upload check). */
export async function sessionIsLive(token: string): Promise<boolean> {
  const [row] = await db()
    .select({ id: sessions.id })
    .from(sessions)
    .where(and(eq(sessions.id, sessionIdFromToken(token)), gt(sessions.expiresAt, new Date())));
  return !!row;
}

export async function invalidateSession(sessionId: string) {
  await db().delete(sessions).where(eq(sessions.id, sessionId));
}

// Secure whenever the app is reached over https (PUBLIC_URL); a plain-http install on a home network
// could not keep the cookie otherwise.
const secureCookies = () => publicUrl().startsWith("https:");

/**
 * The session cookie, through React Router's cookie helper: HttpOnly, SameSite=Lax, Path=/, Secure
 * over https. Its value is the opaque token (the helper writes it as base64 JSON); the database holds
 * only the token's SHA-256. Made per use, so that it follows PUBLIC_URL as read now.
 */
const sessionCookieJar = () =>
  createCookie(SESSION_COOKIE, { httpOnly: true, sameSite: "lax", path: "/", secure: secureCookies() });

export function sessionCookie(token: string, expiresAt: Date): Promise<string> {
  return sessionCookieJar().serialize(token, { expires: expiresAt });
}

export function blankSessionCookie(): Promise<string> {
  return sessionCookieJar().serialize("", { maxAge: 0 });
}

/** A bare token, as cookies set before the helper carried it (and as tests send it). */
const BARE_TOKEN = /^[a-z2-7]{32}$/;

export async function readSessionToken(cookieHeader: string | null | undefined): Promise<string | null> {
  if (!cookieHeader) return null;
  const value: unknown = await sessionCookieJar().parse(cookieHeader);
  if (typeof value === "string" && value) return value;
  // A cookie from before the helper holds the bare token: read it still, so that no one is signed
  // out by the change (it is written the helper's way at the next renewal).
  for (const part of cookieHeader.split(";")) {
    const [name, ...rest] = part.trim().split("=");
    if (name === SESSION_COOKIE && BARE_TOKEN.test(rest.join("="))) return rest.join("=");
  }
  return null;
}

export async function getSession(request: Request): Promise<ValidSession | null> {
  const token = await readSessionToken(request.headers.get("Cookie"));
  return token ? validateSessionToken(token) : null;
}

export async function getUser(request: Request): Promise<SessionUser | null> {
  return (await getSession(request))?.user ?? null;
}

function redirectToSignIn(request: Request): never {
  const url = new URL(request.url);
  const next = url.pathname + url.search;
  throw new Response(null, { status: 302, headers: { Location: `/sign-in?next=${encodeURIComponent(next)}` } });
}

export async function requireUser(request: Request): Promise<SessionUser> {
  const user = await getUser(request);
  if (!user) redirectToSignIn(request);
  return user;
}

export function notFound(): never {
  throw data("Not found", { status: 404 });
}

export const ALL_ROLES: Role[] = [...ROLES];
export const WRITERS: Role[] = ["owner", "carer"];

// A non-member gets 404 for anything in a site, so that site ids reveal nothing; a member whose
// role is not allowed gets 403.
export async function requireSiteRole(request: Request, siteId: number | string | undefined, roles: Role[]) {
  const user = await requireUser(request);
  const id = paramId(siteId);
  const [m] = await db()
    .select({ role: memberships.role })
    .from(memberships)
    .where(and(eq(memberships.userId, user.id), eq(memberships.siteId, id)));
  if (!m) notFound();
  if (!roles.includes(m.role)) throw data("Your role in this site cannot do that", { status: 403 });
  return { user, siteId: id, role: m.role };
}

export async function requireAdmin(request: Request) {
  const user = await requireUser(request);
  if (!user.isAdmin) notFound();
  return user;
}

// Rate limit of failed sign-ins, counted over a sliding window: per client address, and per account
// from that address. The account's count is kept per address so that failures from one place (a
// flood on guessed accounts, or on a real one) do not lock the account's owner out elsewhere
// (OWASP Authentication Cheat Sheet, account lockout as a denial of service). The address is the
// socket's, or a trusted proxy's forwarded one (TRUST_PROXY): never a header the client picks.
export const SIGN_IN_WINDOW_MINUTES = 15;
export const MAX_FAILURES_PER_ACCOUNT = 5;
export const MAX_FAILURES_PER_ADDRESS = 20;

async function failuresFor(key: string) {
  const [row] = await db()
    .select({ n: sql<number>`count(*)::int` })
    .from(signInFailures)
    .where(
      and(
        eq(signInFailures.key, key),
        gt(signInFailures.at, sql`now() - make_interval(mins => ${SIGN_IN_WINDOW_MINUTES})`),
      ),
    );
  return row?.n ?? 0;
}

const accountKey = (email: string, address: string) => `acct:${email}@@${address}`;

export async function signInBlocked(email: string, address: string) {
  const [acct, addr] = await Promise.all([failuresFor(accountKey(email, address)), failuresFor(`addr:${address}`)]);
  return acct >= MAX_FAILURES_PER_ACCOUNT || addr >= MAX_FAILURES_PER_ADDRESS;
}

export async function recordSignInFailure(email: string, address: string) {
  await db()
    .insert(signInFailures)
    .values([{ key: accountKey(email, address) }, { key: `addr:${address}` }]);
  await db().execute(sql`delete from sign_in_failures where at < now() - interval '1 day'`);
}

export async function clearSignInFailures(email: string, address: string) {
  await db()
    .delete(signInFailures)
    .where(eq(signInFailures.key, accountKey(email, address)));
}

export type SignInResult = { ok: true; token: string; expiresAt: Date; user: User } | { ok: false; error: string };

export async function signIn(email: string, password: string, address: string): Promise<SignInResult> {
  const normalised = email.trim().toLowerCase();
  if (await signInBlocked(normalised, address)) {
    return { ok: false, error: `Too many failed attempts. Wait ${SIGN_IN_WINDOW_MINUTES} minutes and try again.` };
  }
  const [user] = await db().select().from(users).where(eq(users.email, normalised));
  // Verify against a real hash even for unknown e-mails, so timing does not reveal accounts.
  const ok = await verifyPassword(user?.passwordHash ?? DUMMY_HASH, password);
  if (!user || !ok) {
    await recordSignInFailure(normalised, address);
    return { ok: false, error: "That e-mail and password do not match an account." };
  }
  await clearSignInFailures(normalised, address);
  const token = generateSessionToken();
  const session = await createSession(token, user.id);
  return { ok: true, token, expiresAt: session.expiresAt, user };
}

const DUMMY_HASH = "$argon2id$v=19$m=19456,t=2,p=1$c29tZXNhbHRzb21lc2FsdA$Vf3s9w3U0ZxZrWm1h3Gm0n2FJc6k0m8s3b2Q7w1QhJY";
