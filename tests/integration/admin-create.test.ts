// `npm run admin:create`: the way to make the first admin of an install without the demo household.
import { spawn } from "node:child_process";
import { eq } from "drizzle-orm";
import { describe, expect, it } from "vitest";
import { signIn, verifyPassword } from "~/.server/auth";
import { db } from "~/.server/db";
import { users } from "~/db/schema.server";
import { makeUser } from "./helpers";

function run(args: string[], stdin: string | null): Promise<{ code: number | null; out: string }> {
  return new Promise((resolve) => {
    const p = spawn(process.execPath, ["--import", "tsx", "app/.server/admin-create.ts", ...args], {
      env: process.env,
      stdio: ["pipe", "pipe", "pipe"],
    });
    let out = "";
    p.stdout.on("data", (d) => (out += d));
    p.stderr.on("data", (d) => (out += d));
    if (stdin !== null) p.stdin.end(stdin);
    else p.stdin.end();
    p.once("exit", (code) => resolve({ code, out }));
  });
}

const row = async (email: string) => (await db().select().from(users).where(eq(users.email, email)))[0];

describe("npm run admin:create", () => {
  it("creates an admin with the password given on standard input", async () => {
    const email = `admin-${Date.now()}@example.test`;
    const r = await run(["--email", email, "--name", "Site admin"], "a long admin password\n");
    expect(r.code, r.out).toBe(0);
    const u = await row(email);
    expect(u.isAdmin).toBe(true);
    expect(u.name).toBe("Site admin");
    expect((await signIn(email, "a long admin password", "10.3.0.1")).ok).toBe(true);
  });

  it("generates and prints a password when none is piped in", async () => {
    const email = `admin-gen-${Date.now()}@example.test`;
    const r = await run([`--email=${email}`], "");
    expect(r.code, r.out).toBe(0);
    const password = /Password \(shown once[^)]*\): (\S+)/.exec(r.out)?.[1];
    expect(password, r.out).toBeDefined();
    expect(await verifyPassword((await row(email)).passwordHash, password!)).toBe(true);
  });

  it("makes an existing account admin without touching its password, and refuses a bad address", async () => {
    const u = await makeUser();
    const r = await run(["--email", u.email], "");
    expect(r.code, r.out).toBe(0);
    expect(r.out).toContain("password unchanged");
    const after = await row(u.email);
    expect(after.isAdmin).toBe(true);
    expect(await verifyPassword(after.passwordHash, u.password)).toBe(true);
    const bad = await run(["--email", "not-an-address"], "");
    expect(bad.code).toBe(1);
    expect(bad.out).toMatch(/not an e-mail address/);
  });
});
