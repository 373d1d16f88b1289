// The session cookie is Secure when the app is reached over https (PUBLIC_URL), whatever NODE_ENV
// says (OWASP Session Management Cheat Sheet, cookie attributes). Its own file: the environment is
// read once per module graph.
import { describe, expect, it } from "vitest";

process.env.PUBLIC_URL = "https://grow.example.org";
const { blankSessionCookie, sessionCookie } = await import("~/.server/auth");

describe("the session cookie behind https", () => {
  it("is Secure, HttpOnly and SameSite=Lax, and so is its removal", () => {
    const c = sessionCookie("abc", new Date(Date.now() + 1000));
    for (const attr of ["Secure", "HttpOnly", "SameSite=Lax"]) {
      expect(c.split("; ")).toContain(attr);
      expect(blankSessionCookie().split("; ")).toContain(attr);
    }
  });
});
