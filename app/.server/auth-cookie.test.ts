// The session cookie is Secure when the app is reached over https (PUBLIC_URL), whatever NODE_ENV
// says (OWASP Session Management Cheat Sheet, cookie attributes). Its own file: the environment is
// read once per module graph.
import { describe, expect, it } from "vitest";

process.env.PUBLIC_URL = "https://grow.example.org";
const { blankSessionCookie, generateSessionToken, readSessionToken, sessionCookie } = await import("~/.server/auth");

describe("the session cookie behind https", () => {
  it("is Secure, HttpOnly and SameSite=Lax, and so is its removal", async () => {
    const c = await sessionCookie("abc", new Date(Date.now() + 1000));
    const blank = await blankSessionCookie();
    for (const attr of ["Secure", "HttpOnly", "SameSite=Lax", "Path=/"]) {
      expect(c.split("; ")).toContain(attr);
      expect(blank.split("; ")).toContain(attr);
    }
    expect(blank.split("; ")).toContain("Max-Age=0");
  });

  it("carries the opaque token through React Router's cookie helper, and still reads a bare token from before it", async () => {
    const token = generateSessionToken();
    const set = await sessionCookie(token, new Date(Date.now() + 1000));
    const pair = set.split("; ")[0];
    expect(await readSessionToken(pair)).toBe(token);
    expect(await readSessionToken(`other=1; ${pair}`)).toBe(token);
    expect(await readSessionToken(`nw_session=${token}`)).toBe(token);
    expect(await readSessionToken("nw_session=not-a-token")).toBeNull();
    expect(await readSessionToken(await blankSessionCookie())).toBeNull();
    expect(await readSessionToken(null)).toBeNull();
  });
});
